package figure

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"faultline/internal/atomicfile"
)

// WriteMRC writes an nx × ny image as an MRC 2014 file at path,
// atomically (see EncodeMRC).
func WriteMRC(path string, data []float64, nx, ny int, nmPerPx float64, label string) error {
	if err := checkMRC(len(data), nx, ny, nmPerPx, label); err != nil {
		return err
	}
	return atomicfile.Write(path, func(w io.Writer) error { return EncodeMRC(w, data, nx, ny, nmPerPx, label) })
}

func checkMRC(n, nx, ny int, nmPerPx float64, label string) error {
	if err := checkRaster(n, nx, ny); err != nil {
		return err
	}
	if !(nmPerPx > 0 && nmPerPx < 1e9) {
		return fmt.Errorf("figure: MRC pixel size %g nm: must be positive and below 1 m", nmPerPx)
	}
	if len(label) > 80 {
		return fmt.Errorf("figure: MRC label of %d bytes: at most 80", len(label))
	}
	for _, r := range label {
		if r < 0x20 || r > 0x7e {
			return fmt.Errorf("figure: MRC label %q: printable ASCII only", label)
		}
	}
	return nil
}

// EncodeMRC writes data as one 32-bit float image (mode 2) of an MRC 2014
// file (Cheng et al., J. Struct. Biol. 192, 146 (2015)), little-endian:
// NX = MX = nx, NY = MY = ny, NZ = MZ = 1, CELLA = (nx, ny, 1) voxels of
// nmPerPx in Å, so the voxel size CELLA/MX is the pixel size; angles 90°,
// axes in the order x, y, z, ISPG 0 (an image), no extended header,
// NVERSION 20140, the minimum, maximum, mean and RMS deviation of the
// stored float32 values, and label as the one text label. Rows go in the
// order of data (row 0 first), as the float TIFF holds them, so numpy
// readers of both files see the same array.
func EncodeMRC(w io.Writer, data []float64, nx, ny int, nmPerPx float64, label string) error {
	if err := checkMRC(len(data), nx, ny, nmPerPx, label); err != nil {
		return err
	}
	h := make([]byte, 1024)
	le := binary.LittleEndian
	i32 := func(off int, v int32) { le.PutUint32(h[off:], uint32(v)) }
	f32 := func(off int, v float64) { le.PutUint32(h[off:], math.Float32bits(float32(v))) }
	i32(0, int32(nx))
	i32(4, int32(ny))
	i32(8, 1)
	i32(12, 2) // mode 2: 32-bit float
	i32(28, int32(nx))
	i32(32, int32(ny))
	i32(36, 1)
	a := nmPerPx * 10 // Å
	f32(40, a*float64(nx))
	f32(44, a*float64(ny))
	f32(48, a)
	f32(52, 90)
	f32(56, 90)
	f32(60, 90)
	i32(64, 1)
	i32(68, 2)
	i32(72, 3)
	// Statistics of the values as stored (float32), in float64.
	lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
	for _, v := range data {
		x := float64(float32(v))
		lo, hi, sum = min(lo, x), max(hi, x), sum+x
	}
	mean := sum / float64(len(data))
	var ss float64
	for _, v := range data {
		d := float64(float32(v)) - mean
		ss += d * d
	}
	f32(76, lo)
	f32(80, hi)
	f32(84, mean)
	i32(88, 0)      // ISPG 0: an image or image stack
	i32(92, 0)      // NSYMBT: no extended header
	i32(108, 20140) // NVERSION
	copy(h[208:], "MAP ")
	copy(h[212:], []byte{0x44, 0x44, 0, 0}) // machine stamp: little-endian
	f32(216, math.Sqrt(ss/float64(len(data))))
	if label != "" {
		i32(220, 1)
		copy(h[224:], label)
		for k := 224 + len(label); k < 224+80; k++ {
			h[k] = ' '
		}
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := bw.Write(h); err != nil {
		return err
	}
	var b [4]byte
	for _, v := range data {
		le.PutUint32(b[:], math.Float32bits(float32(v)))
		if _, err := bw.Write(b[:]); err != nil {
			return err
		}
	}
	return bw.Flush()
}
