package micrograph

import (
	"bytes"
	"testing"
)

// Each reader must return an image or an error for any input: never
// panic, never hang, and never hold more pixels than the input can pay
// for where the format is uncompressed (a header claiming 10^9 × 10^9
// pixels is refused before anything is allocated: see TestBadFiles and
// its DM and MRC counterparts). Seed corpora are in testdata/fuzz.

// checkDecoded checks an image a reader returned; bytesPerPx is the least
// number of input bytes one pixel costs (0: compressed, no bound).
func checkDecoded(t *testing.T, m *Image, in []byte, bytesPerPx int) {
	t.Helper()
	if m.Width <= 0 || m.Height <= 0 || m.Width > MaxSide || m.Height > MaxSide || len(m.Pix) != m.Width*m.Height {
		t.Fatalf("decoded %d × %d with %d values", m.Width, m.Height, len(m.Pix))
	}
	if bytesPerPx > 0 && len(m.Pix)*bytesPerPx > len(in) {
		t.Fatalf("%d pixels from %d bytes", len(m.Pix), len(in))
	}
	if m.NmPerPx < 0 {
		t.Fatalf("negative pixel size %g", m.NmPerPx)
	}
}

func FuzzDM(f *testing.F) {
	f.Add(dmTestFile(false, dmImageSpec{dataType: 2, elem: dmFloat32, nx: 3, ny: 2, scale: 0.5, unit: "nm"}))
	f.Fuzz(func(t *testing.T, b []byte) {
		if m, err := decodeDM(bytes.NewReader(b), int64(len(b))); err == nil {
			checkDecoded(t, m, b, 1)
		}
	})
}

func FuzzMRC(f *testing.F) {
	f.Add(mrcSeed())
	f.Fuzz(func(t *testing.T, b []byte) {
		if m, err := decodeMRC(bytes.NewReader(b), int64(len(b)), 0); err == nil {
			checkDecoded(t, m, b, 1)
		}
	})
}

func FuzzTIFF(f *testing.F) {
	f.Fuzz(func(t *testing.T, b []byte) {
		if m, err := decodeTIFF(b); err == nil {
			per := 0
			if m.Kind == "32-bit float" {
				per = 4
			}
			checkDecoded(t, m, b, per)
		}
	})
}

func FuzzPNG(f *testing.F) {
	f.Fuzz(func(t *testing.T, b []byte) {
		if m, err := decodeStd(b); err == nil {
			checkDecoded(t, m, b, 0)
		}
	})
}

// FuzzDecode goes through the format detection as Read does.
func FuzzDecode(f *testing.F) {
	f.Add(mrcSeed())
	f.Fuzz(func(t *testing.T, b []byte) {
		if m, err := DecodeBytes(b, Options{}); err == nil {
			checkDecoded(t, m, b, 0)
		}
	})
}

// mrcSeed is a 3 × 2 mode-2 MRC file.
func mrcSeed() []byte {
	h := make([]byte, 1024+24)
	le := func(off int, v uint32) {
		h[off], h[off+1], h[off+2], h[off+3] = byte(v), byte(v>>8), byte(v>>16), byte(v>>24)
	}
	le(0, 3)
	le(4, 2)
	le(8, 1)
	le(12, 2)
	le(28, 3)
	le(32, 2)
	le(36, 1)
	le(40, 0x41f00000) // 30.0 Å
	copy(h[208:], "MAP DD")
	for k := range 6 {
		le(1024+4*k, 0x3f800000) // 1.0
	}
	return h
}
