package ui

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math"
	"path/filepath"
	"testing"

	"golang.org/x/image/tiff"

	"faultline/figure"
	"faultline/internal/pyref"
)

// Integer micrographs are read as fractions of their sample range; a
// 32-bit float TIFF keeps its values.
func TestDecodeMicrograph(t *testing.T) {
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
		name   string
		data   []byte
		format string
		want   []float64
		tol    float64
	}{
		{"8-bit PNG", b8.Bytes(), "8-bit grey png", []float64{0, 0.2, 0, 0, 0, 1}, 1e-12},
		{"16-bit TIFF", b16.Bytes(), "16-bit grey tiff", []float64{0, 0, 0, 1, 0.2, 0}, 1e-12},
		// float32 keeps about 7 significant digits.
		{"float TIFF", bf.Bytes(), "32-bit float TIFF", []float64{0.5, 1.25, -0.1, 0, 2, 0.75}, 1e-7},
	}
	for _, c := range cases {
		m, err := decodeMicrograph(c.data)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if m.nx != 3 || m.ny != 2 || m.Format != c.format {
			t.Errorf("%s: %d × %d %q, want 3 × 2 %q", c.name, m.nx, m.ny, m.Format, c.format)
		}
		for i, w := range c.want {
			if math.Abs(m.data[i]-w) > c.tol {
				t.Errorf("%s: value %d = %g, want %g", c.name, i, m.data[i], w)
			}
		}
		if m.gray == nil || m.inv == nil {
			t.Errorf("%s: no grey picture", c.name)
		}
	}
	if _, err := decodeMicrograph([]byte("not an image")); err == nil {
		t.Error("text decoded as a micrograph")
	}
}

// A 16-bit TIFF written by an outside library (Pillow, from Debian's
// python3-pil) reads with the values it was written with.
func TestMicrographFromPillow(t *testing.T) {
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
	m, err := loadMicrograph(path)
	if err != nil {
		t.Fatal(err)
	}
	if m.nx != 4 || m.ny != 3 {
		t.Fatalf("%d × %d, want 4 × 3", m.nx, m.ny)
	}
	for _, c := range []struct {
		i, j int
		want float64
	}{{0, 0, 0}, {1, 0, 32768.0 / 65535}, {3, 2, 1}} {
		if got := m.data[c.j*m.nx+c.i]; math.Abs(got-c.want) > 1e-12 {
			t.Errorf("pixel (%d, %d) = %g, want %g", c.i, c.j, got, c.want)
		}
	}
}
