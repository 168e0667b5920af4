package micrograph

import (
	"bytes"
	"errors"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/image/tiff"

	"faultline/figure"
	"faultline/internal/pyref"
)

// Integer PNG and TIFF samples are read as fractions of their full scale;
// a 32-bit float TIFF keeps its values.
func TestDecodePNGAndTIFF(t *testing.T) {
	g8 := image.NewGray(image.Rect(0, 0, 3, 2))
	g8.SetGray(2, 1, color.Gray{Y: 255})
	g8.SetGray(1, 0, color.Gray{Y: 51})
	var b8 bytes.Buffer
	if err := png.Encode(&b8, g8); err != nil {
		t.Fatal(err)
	}
	g16 := image.NewGray16(image.Rect(0, 0, 3, 2))
	g16.SetGray16(0, 1, color.Gray16{Y: 65535})
	g16.SetGray16(1, 1, color.Gray16{Y: 13107}) // 0.2 of full scale
	var b16 bytes.Buffer
	if err := tiff.Encode(&b16, g16, nil); err != nil {
		t.Fatal(err)
	}
	var bf bytes.Buffer
	if err := figure.EncodeFloatTIFF(&bf, []float64{0.5, 1.25, -0.1, 0, 2, 0.75}, 3, 2); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, format, kind string
		data               []byte
		want               []float64
	}{
		{"8-bit PNG", "png", "8-bit grey", b8.Bytes(), []float64{0, 0.2, 0, 0, 0, 1}},
		{"16-bit TIFF", "tiff", "16-bit grey", b16.Bytes(), []float64{0, 0, 0, 1, 0.2, 0}},
		{"float TIFF", "tiff", "32-bit float", bf.Bytes(), []float64{0.5, 1.25, -0.1, 0, 2, 0.75}},
	}
	for _, c := range cases {
		m, err := DecodeBytes(c.data, Options{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if m.Width != 3 || m.Height != 2 || m.Format != c.format || m.Kind != c.kind {
			t.Errorf("%s: %d × %d %q %q, want 3 × 2 %q %q", c.name, m.Width, m.Height, m.Format, m.Kind, c.format, c.kind)
		}
		for i, w := range c.want {
			// float32 holds about 7 significant digits.
			if math.Abs(float64(m.Pix[i])-w) > 1e-7 {
				t.Errorf("%s: value %d = %g, want %g", c.name, i, m.Pix[i], w)
			}
		}
		if m.NmPerPx != 0 {
			t.Errorf("%s: pixel size %g from a file that records none", c.name, m.NmPerPx)
		}
	}
	if _, err := DecodeBytes([]byte("not an image, not at all"), Options{}); !errors.Is(err, ErrInvalid) {
		t.Errorf("text: %v, want ErrInvalid", err)
	}
}

// A 16-bit TIFF written by an outside library (Pillow, from Debian's
// python3-pil) reads with the values it was written with.
func TestReadTIFFFromPillow(t *testing.T) {
	pyref.Require(t, "python3-pil", "PIL")
	path := filepath.Join(t.TempDir(), "pil16.tif")
	script := `
import sys
from PIL import Image
im = Image.new("I;16", (4, 3))
im.putpixel((0, 0), 0)
im.putpixel((1, 0), 32768)
im.putpixel((3, 2), 65535)
im.save(sys.argv[1])
`
	pyref.Run(t, nil, script, path)
	m, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if m.Width != 4 || m.Height != 3 {
		t.Fatalf("%d × %d, want 4 × 3", m.Width, m.Height)
	}
	for _, c := range []struct {
		i, j int
		want float64
	}{{0, 0, 0}, {1, 0, 32768.0 / 65535}, {3, 2, 1}} {
		if got := float64(m.At(c.i, c.j)); math.Abs(got-c.want) > 1e-7 {
			t.Errorf("pixel (%d, %d) = %g, want %g", c.i, c.j, got, c.want)
		}
	}
}

// Bad files give one line that says what is wrong, and match ErrInvalid.
func TestBadFiles(t *testing.T) {
	var bf bytes.Buffer
	if err := figure.EncodeFloatTIFF(&bf, make([]float64, 64*64), 64, 64); err != nil {
		t.Fatal(err)
	}
	tf := bf.Bytes()
	// A TIFF whose compression says JPEG (7): patch the Compression entry.
	jpegTIFF := patchTIFFTag(t, tf, 259, 7)
	hugeTIFF := patchTIFFTag(t, patchTIFFTag(t, tf, 256, 1e9), 257, 1e9)
	bigTIFF := patchTIFFTag(t, tf, 256, MaxSide+1)
	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"truncated TIFF", tf[:len(tf)/3], "truncated"},
		{"JPEG-compressed TIFF", jpegTIFF, "compression 7 (JPEG) is not supported"},
		{"TIFF claiming 1e9 × 1e9", hugeTIFF, "over the limit of 16384"},
		{"TIFF over 16384 wide", bigTIFF, "over the limit of 16384"},
		{"empty", nil, "too short"},
	}
	for _, c := range cases {
		_, err := DecodeBytes(c.data, Options{})
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want one line with %q", c.name, err, c.want)
		}
	}
	dir := t.TempDir()
	p := filepath.Join(dir, "cut.tiff")
	if err := os.WriteFile(p, tf[:100], 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Read(p); err == nil || !strings.HasPrefix(err.Error(), "cut.tiff: ") {
		t.Errorf("Read of a cut file: %v, want an error naming cut.tiff", err)
	}
	if _, err := Read(filepath.Join(dir, "none.mrc#x")); err == nil || !strings.Contains(err.Error(), "counted from 0") {
		t.Errorf("bad stack suffix: %v", err)
	}
}

// patchTIFFTag sets the value of a one-value SHORT or LONG entry of the
// first IFD of a little-endian TIFF, in a copy.
func patchTIFFTag(t *testing.T, b []byte, tag uint16, v uint32) []byte {
	t.Helper()
	out := append([]byte(nil), b...)
	ifd, err := readIFD(out)
	if err != nil {
		t.Fatal(err)
	}
	f, ok := ifd.fields[tag]
	if !ok {
		t.Fatalf("tag %d absent", tag)
	}
	if f.typ == 3 {
		ifd.bo.PutUint16(out[f.at:], uint16(v))
		// A SHORT too small for v: make the entry a LONG.
		if v > 0xffff {
			ifd.bo.PutUint16(out[f.at-6:], 4)
			ifd.bo.PutUint32(out[f.at:], v)
		}
	} else {
		ifd.bo.PutUint32(out[f.at:], v)
	}
	return out
}
