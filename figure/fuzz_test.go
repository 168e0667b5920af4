package figure

import (
	"bytes"
	"image"
	"testing"
)

func FuzzDecodePNGText(f *testing.F) {
	var buf bytes.Buffer
	if err := EncodePNG(&buf, testGray(), testText); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add(buf.Bytes()[:60])
	f.Add([]byte("\x89PNG\r\n\x1a\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		// Must not panic; on success every key is a valid keyword length.
		m, err := DecodePNGText(bytes.NewReader(b))
		if err != nil {
			return
		}
		for k := range m {
			if k == "" {
				t.Fatal("empty keyword accepted")
			}
		}
	})
}

// FuzzPNGTextRoundTrip: whatever EncodePNG accepts, DecodePNGText gives
// back unchanged.
func FuzzPNGTextRoundTrip(f *testing.F) {
	f.Add("Comment", "Ångström")
	f.Add("scene", "{\"a\": \"ξ\"}\n")
	f.Add("k", "")
	img := image.NewGray(image.Rect(0, 0, 2, 2))
	f.Fuzz(func(t *testing.T, k, v string) {
		var buf bytes.Buffer
		if err := EncodePNG(&buf, img, map[string]string{k: v}); err != nil {
			return
		}
		m, err := DecodePNGText(&buf)
		if err != nil {
			t.Fatal(err)
		}
		if len(m) != 1 || m[k] != v {
			t.Fatalf("wrote %q: %q, read %q", k, v, m)
		}
	})
}

func FuzzReadFloatTIFF(f *testing.F) {
	for _, sz := range [][2]int{{3, 2}, {40, 500}} {
		var buf bytes.Buffer
		if err := EncodeFloatTIFF(&buf, tiffData(sz[0], sz[1]), sz[0], sz[1]); err != nil {
			f.Fatal(err)
		}
		f.Add(buf.Bytes())
	}
	f.Add([]byte("II*\x00\x08\x00\x00\x00"))
	f.Fuzz(func(t *testing.T, b []byte) {
		data, nx, ny, err := ReadFloatTIFF(bytes.NewReader(b))
		if err == nil && (nx <= 0 || ny <= 0 || len(data) != nx*ny) {
			t.Fatalf("%d values for %d×%d", len(data), nx, ny)
		}
	})
}
