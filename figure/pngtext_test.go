package figure

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"hash/crc32"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// testText mixes a Latin-1 value (tEXt), values needing UTF-8 (iTXt), a
// multi-line JSON document and an empty value.
var testText = map[string]string{
	"Software":   "faultline",
	"Comment":    "Ångström-scale fringes, 200 kV",
	"conditions": "ξ_g = 42.1 nm, g·b = 1, Δs = 0.01 /nm",
	"scene":      "{\n  \"version\": 1,\n  \"foil\": {\"thickness_nm\": 120}\n}",
	"empty":      "",
}

func testGray() *image.Gray {
	img := image.NewGray(image.Rect(0, 0, 7, 5))
	for k := range img.Pix {
		img.Pix[k] = uint8(k * 37)
	}
	return img
}

func TestPNGTextRoundTrip(t *testing.T) {
	path := filepath.Join(t.TempDir(), "a.png")
	img := testGray()
	if err := WritePNG(path, img, testText); err != nil {
		t.Fatal(err)
	}
	got, err := ReadPNGText(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(testText) {
		t.Errorf("read %d entries, wrote %d", len(got), len(testText))
	}
	for k, v := range testText {
		if got[k] != v {
			t.Errorf("key %q: read %q, wrote %q", k, got[k], v)
		}
	}
	// The pixels survive unchanged (image/png as the reader).
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	dec, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	g, ok := dec.(*image.Gray)
	if !ok || !bytes.Equal(g.Pix, img.Pix) {
		t.Errorf("pixels changed in the round trip (decoded %T)", dec)
	}
}

// TestPNGChunkLayout walks the chunks of an encoded file: the text chunks
// follow IHDR directly, in key order, with tEXt for Latin-1 and iTXt
// otherwise, and every CRC is the CRC-32 (hash/crc32.IEEE, the polynomial
// the PNG specification §5.5 prescribes) of type and data.
func TestPNGChunkLayout(t *testing.T) {
	var buf bytes.Buffer
	if err := EncodePNG(&buf, testGray(), testText); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()[8:]
	var types, keys []string
	for len(b) >= 12 {
		n := binary.BigEndian.Uint32(b)
		typ := string(b[4:8])
		data := b[8 : 8+n]
		if crc := binary.BigEndian.Uint32(b[8+n:]); crc != crc32.ChecksumIEEE(b[4:8+n]) {
			t.Errorf("chunk %s: CRC %08x, want %08x", typ, crc, crc32.ChecksumIEEE(b[4:8+n]))
		}
		types = append(types, typ)
		if typ == "tEXt" || typ == "iTXt" {
			k, _, _ := bytes.Cut(data, []byte{0})
			keys = append(keys, string(k))
		}
		b = b[12+n:]
	}
	// Sorted keys: Comment, Software, conditions, empty, scene; only
	// "conditions" needs iTXt.
	want := "IHDR tEXt tEXt iTXt tEXt tEXt IDAT IEND"
	if got := strings.Join(types, " "); got != want {
		t.Errorf("chunks %s, want %s", got, want)
	}
	if got := strings.Join(keys, ","); got != "Comment,Software,conditions,empty,scene" {
		t.Errorf("text keys in order %s", got)
	}
}

// TestPNGTextPIL reads the file with Pillow (Debian's python3-pil), which
// checks every chunk CRC as it parses, and compares its text dictionary and
// its pixels with what was written.
func TestPNGTextPIL(t *testing.T) {
	pyref.Require(t, "python3-pil and python3-numpy", "PIL")
	path := filepath.Join(t.TempDir(), "pil.png")
	img := testGray()
	if err := WritePNG(path, img, testText); err != nil {
		t.Fatal(err)
	}
	out := pyref.Run(t, nil, `import sys, json
from PIL import Image
im = Image.open(sys.argv[1])
im.load()
print(json.dumps({"text": {k: str(v) for k, v in im.text.items()}, "mode": im.mode, "size": im.size, "pix": list(im.getdata())}))`, path)
	var got struct {
		Text map[string]string
		Mode string
		Size [2]int
		Pix  []int
	}
	if err := json.Unmarshal(out, &got); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	if len(got.Text) != len(testText) {
		t.Errorf("PIL read %d text entries, wrote %d: %q", len(got.Text), len(testText), got.Text)
	}
	for k, v := range testText {
		if got.Text[k] != v {
			t.Errorf("PIL: key %q = %q, wrote %q", k, got.Text[k], v)
		}
	}
	if got.Mode != "L" || got.Size != [2]int{7, 5} {
		t.Errorf("PIL: mode %s size %v, want L [7 5]", got.Mode, got.Size)
	}
	for k, v := range got.Pix {
		if k >= len(img.Pix) || uint8(v) != img.Pix[k] {
			t.Fatalf("PIL: pixel %d = %d, want %d", k, v, img.Pix[k])
		}
	}
}

// TestPNGTextFromPIL reads text that Pillow wrote, including a compressed
// zTXt and a compressed iTXt chunk, which this package never writes.
func TestPNGTextFromPIL(t *testing.T) {
	pyref.Require(t, "python3-pil and python3-numpy", "PIL")
	path := filepath.Join(t.TempDir(), "from-pil.png")
	pyref.Run(t, nil, `import sys
from PIL import Image, PngImagePlugin
info = PngImagePlugin.PngInfo()
info.add_text("plain", "latin-1 é")
info.add_text("zipped", "x" * 500, zip=True)
info.add_itxt("unicode", "ξ_g = 42 nm", zip=False)
info.add_itxt("unizip", "Δ" * 300, zip=True)
Image.new("L", (4, 3), 9).save(sys.argv[1], pnginfo=info)`, path)
	got, err := ReadPNGText(path)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{
		"plain":   "latin-1 é",
		"zipped":  strings.Repeat("x", 500),
		"unicode": "ξ_g = 42 nm",
		"unizip":  strings.Repeat("Δ", 300),
	}
	for k, v := range want {
		if got[k] != v {
			t.Errorf("key %q = %q, want %q", k, got[k], v)
		}
	}
}

func TestPNGDeterministic(t *testing.T) {
	// Two maps with the same entries built in different orders.
	a := map[string]string{}
	b := map[string]string{}
	keys := []string{"k1", "k2", "k3", "k4", "k5", "k6", "k7", "k8"}
	for i := range keys {
		a[keys[i]] = "v" + keys[i]
		b[keys[len(keys)-1-i]] = "v" + keys[len(keys)-1-i]
	}
	var x, y bytes.Buffer
	if err := EncodePNG(&x, testGray(), a); err != nil {
		t.Fatal(err)
	}
	for range 5 {
		y.Reset()
		if err := EncodePNG(&y, testGray(), b); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x.Bytes(), y.Bytes()) {
			t.Fatal("same image and text gave different bytes")
		}
	}
}

func TestPNGTextInvalid(t *testing.T) {
	cases := []struct {
		key, value, want string
	}{
		{"", "x", "empty"},
		{strings.Repeat("k", 80), "x", "at most 79"},
		{" lead", "x", "space"},
		{"trail ", "x", "space"},
		{"two  spaces", "x", "consecutive"},
		{"tab\tkey", "x", "printable"},
		{"ξ", "x", "printable"},
		{"nul", "a\x00b", "NUL"},
		{"utf8", "\xff\xfe", "UTF-8"},
	}
	for _, c := range cases {
		path := filepath.Join(t.TempDir(), "bad.png")
		err := WritePNG(path, testGray(), map[string]string{c.key: c.value})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("key %q value %q: error %v, want one mentioning %q", c.key, c.value, err, c.want)
		}
		if _, serr := os.Stat(path); serr == nil {
			t.Errorf("key %q: a file was written despite the error", c.key)
		}
	}
	// 79 characters is allowed.
	if err := EncodePNG(&bytes.Buffer{}, testGray(), map[string]string{strings.Repeat("k", 79): "x"}); err != nil {
		t.Errorf("79-character key: %v", err)
	}
}

func TestDecodePNGTextErrors(t *testing.T) {
	var buf bytes.Buffer
	if err := EncodePNG(&buf, testGray(), map[string]string{"a": "b"}); err != nil {
		t.Fatal(err)
	}
	good := buf.Bytes()
	corrupt := bytes.Clone(good)
	corrupt[8+25+8+2] ^= 0xFF // a byte of the tEXt data: its CRC no longer matches
	cases := []struct {
		name string
		b    []byte
		want string
	}{
		{"not PNG", []byte("GIF89a......"), "signature"},
		{"truncated", good[:len(good)-6], "truncated"},
		{"bad CRC", corrupt, `"tEXt": CRC mismatch`},
		{"empty input", nil, "signature"},
	}
	for _, c := range cases {
		if _, err := DecodePNGText(bytes.NewReader(c.b)); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %s", c.name, err, c.want)
		}
	}
	if _, err := ReadPNGText(filepath.Join(t.TempDir(), "missing.png")); err == nil {
		t.Error("missing file: no error")
	}
}
