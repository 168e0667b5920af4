package micrograph

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strings"
)

// MRC 2014 header layout (Cheng et al. 2015): byte offsets of the words
// read here. The header is 1024 bytes, then NSYMBT bytes of extended
// header, then the data, fastest along X (columns), then Y (rows), then Z
// (sections, the images of a stack).
const (
	mrcHeaderBytes = 1024
	mrcNX          = 0
	mrcMode        = 12
	mrcMX          = 28
	mrcCellA       = 40
	mrcNSymBT      = 92
	mrcMachST      = 212
	mrcNLabl       = 220
	mrcLabel       = 224
)

// mrcModes gives the bytes per value and a description of each MRC mode
// this package reads.
var mrcModes = map[int32]struct {
	size int64
	kind string
}{
	0:  {1, "8-bit signed integer"},
	1:  {2, "16-bit signed integer"},
	2:  {4, "32-bit float"},
	6:  {2, "16-bit unsigned integer"},
	12: {2, "16-bit float"},
}

// decodeMRC reads image stack (counted from 0) of an MRC 2014 file.
// The byte order is the machine stamp's (0x44 0x44: little-endian, 0x11
// 0x11: big-endian). The pixel size is the X voxel size CELLA.X / MX in Å,
// converted to nm.
func decodeMRC(r io.ReaderAt, size int64, stack int) (*Image, error) {
	h := make([]byte, mrcHeaderBytes)
	if n, _ := r.ReadAt(h, 0); n < mrcHeaderBytes {
		return nil, errTruncated("MRC")
	}
	var bo binary.ByteOrder = binary.LittleEndian
	if h[mrcMachST] == 0x11 {
		bo = binary.BigEndian
	}
	i32 := func(off int) int32 { return int32(bo.Uint32(h[off:])) }
	f32 := func(off int) float32 { return math.Float32frombits(bo.Uint32(h[off:])) }
	nx, ny, nz, mode := i32(mrcNX), i32(mrcNX+4), i32(mrcNX+8), i32(mrcMode)
	if err := checkSize("MRC", int64(nx), int64(ny)); err != nil {
		return nil, err
	}
	if nz <= 0 {
		return nil, errorf("MRC: NZ = %d: the number of sections must be positive", nz)
	}
	md, ok := mrcModes[mode]
	if !ok {
		return nil, errorf("MRC: mode %d is not supported; this program reads modes 0, 1, 2, 6 and 12 (real images)", mode)
	}
	ext := int64(i32(mrcNSymBT))
	if ext < 0 {
		return nil, errorf("MRC: NSYMBT = %d: the extended header size must not be negative", ext)
	}
	if int64(stack) >= int64(nz) {
		return nil, errorf("MRC: image #%d asked for, the stack has %d (#0 to #%d)", stack, nz, nz-1)
	}
	section := int64(nx) * int64(ny) * md.size
	start := mrcHeaderBytes + ext
	if start+section*int64(nz) > size {
		return nil, errTruncated("MRC")
	}
	raw := make([]byte, section)
	if n, err := r.ReadAt(raw, start+section*int64(stack)); int64(n) < section {
		if err != nil && err != io.EOF {
			return nil, err
		}
		return nil, errTruncated("MRC")
	}
	m := &Image{Width: int(nx), Height: int(ny), Format: "mrc", Kind: md.kind}
	m.Pix = make([]float32, int(nx)*int(ny))
	for k := range m.Pix {
		switch mode {
		case 0:
			m.Pix[k] = float32(int8(raw[k]))
		case 1:
			m.Pix[k] = float32(int16(bo.Uint16(raw[2*k:])))
		case 2:
			m.Pix[k] = math.Float32frombits(bo.Uint32(raw[4*k:]))
		case 6:
			m.Pix[k] = float32(bo.Uint16(raw[2*k:]))
		case 12:
			m.Pix[k] = halfToFloat32(bo.Uint16(raw[2*k:]))
		}
	}
	if mx, ax := i32(mrcMX), f32(mrcCellA); mx > 0 && ax > 0 && !math.IsInf(float64(ax), 0) {
		m.NmPerPx = float64(ax) / float64(mx) * 0.1 // Å to nm
		m.PixelSizeFrom = "MRC voxel size"
	}
	m.Meta.StackIndex = stack
	if nz > 1 {
		m.Meta.StackSize = int(nz)
		m.Notices = append(m.Notices, fmt.Sprintf("image #%d of a stack of %d (pick another with #N after the file name)", stack, nz))
	}
	if nl := i32(mrcNLabl); nl > 0 {
		l := h[mrcLabel : mrcLabel+80]
		if k := bytes.IndexByte(l, 0); k >= 0 {
			l = l[:k]
		}
		m.Meta.Description = strings.TrimSpace(string(l))
	}
	return m, nil
}

// halfToFloat32 converts an IEEE 754 binary16 value (1 sign bit, 5
// exponent bits with bias 15, 10 fraction bits) to float32, subnormals,
// infinities and NaN included.
func halfToFloat32(h uint16) float32 {
	sign := uint32(h>>15) << 31
	exp := uint32(h>>10) & 0x1f
	frac := uint32(h) & 0x3ff
	switch {
	case exp == 0 && frac == 0:
		return math.Float32frombits(sign)
	case exp == 0: // subnormal: frac · 2^−24
		v := float32(frac) * (1.0 / (1 << 24))
		if sign != 0 {
			v = -v
		}
		return v
	case exp == 0x1f:
		return math.Float32frombits(sign | 0xff<<23 | frac<<13)
	}
	return math.Float32frombits(sign | (exp+127-15)<<23 | frac<<13)
}
