package figure

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"image"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/image/tiff"

	"faultline/internal/pyref"
)

// tiffData returns an nx × ny image whose pixels differ from each other and
// span signs and magnitudes, so a swapped axis or byte shows up.
func tiffData(nx, ny int) []float64 {
	d := make([]float64, nx*ny)
	for j := range ny {
		for i := range nx {
			d[j*nx+i] = 0.001*float64(i) + float64(j) + math.Sin(float64(i*7+j*13))/3
		}
	}
	d[0] = -2.5e-7
	d[len(d)-1] = 1.25e6
	return d
}

func TestFloatTIFFRoundTrip(t *testing.T) {
	// 5×3 fits one strip; 300×200 (240 000 bytes) needs several.
	for _, sz := range [][2]int{{5, 3}, {300, 200}, {1, 1}, {20000, 2}} {
		nx, ny := sz[0], sz[1]
		data := tiffData(nx, ny)
		path := filepath.Join(t.TempDir(), "f.tiff")
		if err := WriteFloatTIFF(path, data, nx, ny); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		got, gx, gy, err := ReadFloatTIFF(f)
		f.Close()
		if err != nil {
			t.Fatalf("%d×%d: %v", nx, ny, err)
		}
		if gx != nx || gy != ny || len(got) != nx*ny {
			t.Fatalf("read %d×%d (%d values), wrote %d×%d", gx, gy, len(got), nx, ny)
		}
		// Exact: the file holds float32(v), and reading gives it back bit
		// for bit.
		for k, v := range data {
			if got[k] != float32(v) {
				t.Fatalf("%d×%d: value %d = %v, want %v", nx, ny, k, got[k], float32(v))
			}
		}
	}
}

func TestFloatTIFFBigEndian(t *testing.T) {
	data := tiffData(40, 900) // several strips
	var buf bytes.Buffer
	if err := encodeFloatTIFF(&buf, data, 40, 900, binary.BigEndian, TIFFMeta{NmPerPx: 0.5, Scene: `{"a": 1}`}); err != nil {
		t.Fatal(err)
	}
	got, nx, ny, err := ReadFloatTIFF(&buf)
	if err != nil || nx != 40 || ny != 900 {
		t.Fatalf("%d×%d, %v", nx, ny, err)
	}
	for k, v := range data {
		if got[k] != float32(v) {
			t.Fatalf("value %d = %v, want %v", k, got[k], float32(v))
		}
	}
}

// TestFloatTIFFPIL opens the file with Pillow (Debian's python3-pil): it
// must see mode F (32-bit float), the right size, and every value equal to
// float32 of what was written (Python's float holds the float32 exactly, so
// the tolerance is zero).
func TestFloatTIFFPIL(t *testing.T) {
	pyref.Require(t, "python3-pil and python3-numpy", "PIL")
	for _, sz := range [][2]int{{6, 4}, {300, 200}} {
		nx, ny := sz[0], sz[1]
		data := tiffData(nx, ny)
		path := filepath.Join(t.TempDir(), "pil.tiff")
		if err := WriteFloatTIFF(path, data, nx, ny); err != nil {
			t.Fatal(err)
		}
		out := pyref.Run(t, nil, `import sys, json
from PIL import Image
im = Image.open(sys.argv[1])
print(json.dumps({"mode": im.mode, "size": im.size, "pix": list(im.getdata())}))`, path)
		var got struct {
			Mode string
			Size [2]int
			Pix  []float64
		}
		if err := json.Unmarshal(out, &got); err != nil {
			t.Fatal(err)
		}
		if got.Mode != "F" || got.Size != [2]int{nx, ny} || len(got.Pix) != nx*ny {
			t.Fatalf("PIL: mode %s size %v (%d values), want F [%d %d]", got.Mode, got.Size, len(got.Pix), nx, ny)
		}
		for k, v := range data {
			if got.Pix[k] != float64(float32(v)) {
				t.Fatalf("PIL: %d×%d value %d = %v, want %v", nx, ny, k, got.Pix[k], float32(v))
			}
		}
	}
}

// TestFloatTIFFFromPIL reads a float TIFF that Pillow wrote, and rejects
// its compressed variant.
func TestFloatTIFFFromPIL(t *testing.T) {
	pyref.Require(t, "python3-pil and python3-numpy", "PIL")
	dir := t.TempDir()
	plain, packed := filepath.Join(dir, "plain.tiff"), filepath.Join(dir, "deflate.tiff")
	pyref.Run(t, nil, `import sys
from PIL import Image
im = Image.new("F", (3, 2))
im.putdata([0.5, -1.25, 3.0, 1e-3, 7.0, 1e6])
im.save(sys.argv[1])
im.save(sys.argv[2], compression="tiff_deflate")`, plain, packed)
	f, err := os.Open(plain)
	if err != nil {
		t.Fatal(err)
	}
	got, nx, ny, err := ReadFloatTIFF(f)
	f.Close()
	if err != nil || nx != 3 || ny != 2 {
		t.Fatalf("%d×%d, %v", nx, ny, err)
	}
	want := []float32{0.5, -1.25, 3.0, 1e-3, 7.0, 1e6}
	for k := range want {
		if got[k] != want[k] {
			t.Errorf("value %d = %v, want %v", k, got[k], want[k])
		}
	}
	f, err = os.Open(packed)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, _, _, err := ReadFloatTIFF(f); err == nil || !strings.Contains(err.Error(), "Compression") {
		t.Errorf("deflate-compressed TIFF: error %v, want one naming Compression", err)
	}
}

func TestFloatTIFFRejects(t *testing.T) {
	// An 8-bit grey TIFF from golang.org/x/image/tiff.
	var g8 bytes.Buffer
	if err := tiff.Encode(&g8, image.NewGray(image.Rect(0, 0, 4, 4)), nil); err != nil {
		t.Fatal(err)
	}
	var good bytes.Buffer
	if err := EncodeFloatTIFF(&good, tiffData(4, 3), 4, 3); err != nil {
		t.Fatal(err)
	}
	// setShort rewrites the value of a one-SHORT tag in our own file.
	setShort := func(tag, v uint16) []byte {
		b := bytes.Clone(good.Bytes())
		ifd := binary.LittleEndian.Uint32(b[4:])
		n := binary.LittleEndian.Uint16(b[ifd:])
		for k := range uint32(n) {
			p := ifd + 2 + 12*k
			if binary.LittleEndian.Uint16(b[p:]) == tag {
				binary.LittleEndian.PutUint16(b[p+8:], v)
				return b
			}
		}
		t.Fatalf("tag %d not in the file", tag)
		return nil
	}
	bigTIFF := bytes.Clone(good.Bytes())
	binary.LittleEndian.PutUint16(bigTIFF[2:], 43)
	cases := []struct {
		name string
		b    []byte
		want string
	}{
		{"8-bit grey", g8.Bytes(), "BitsPerSample"},
		{"integer samples", setShort(tagSampleFormat, 1), "SampleFormat"},
		{"LZW", setShort(tagCompression, 5), "Compression"},
		{"RGB", setShort(tagSamplesPerPixel, 3), "SamplesPerPixel"},
		{"WhiteIsZero", setShort(tagPhotometric, 0), "PhotometricInterpretation"},
		{"BigTIFF", bigTIFF, "BigTIFF"},
		{"truncated", good.Bytes()[:40], "TIFF"},
		{"not TIFF", []byte("\x89PNG\r\n\x1a\n"), "not a TIFF"},
		{"empty", nil, "not a TIFF"},
	}
	for _, c := range cases {
		_, _, _, err := ReadFloatTIFF(bytes.NewReader(c.b))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %s", c.name, err, c.want)
		}
	}
}

func TestWriteFloatTIFFBadSize(t *testing.T) {
	path := filepath.Join(t.TempDir(), "x.tiff")
	for _, c := range []struct{ n, nx, ny int }{{6, 0, 6}, {6, 2, -3}, {5, 2, 3}} {
		if err := WriteFloatTIFF(path, make([]float64, c.n), c.nx, c.ny); err == nil {
			t.Errorf("%d values as %d×%d: no error", c.n, c.nx, c.ny)
		}
	}
	if _, err := os.Stat(path); err == nil {
		t.Error("a file was written despite the errors")
	}
}

func TestFloatTIFFDeterministic(t *testing.T) {
	var a, b bytes.Buffer
	data := tiffData(300, 200)
	if err := EncodeFloatTIFF(&a, data, 300, 200); err != nil {
		t.Fatal(err)
	}
	if err := EncodeFloatTIFF(&b, data, 300, 200); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("same data gave different bytes")
	}
	// Header 8 bytes + 4 bytes a pixel + strip tables + IFD of 11 entries.
	strips := (200 + 54 - 1) / 54 // 65536/1200 = 54 rows a strip
	if want := 8 + 4*300*200 + 8*strips + 2 + 12*11 + 4; a.Len() != want {
		t.Errorf("file is %d bytes, want %d", a.Len(), want)
	}
}
