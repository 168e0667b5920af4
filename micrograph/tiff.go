package micrograph

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"strconv"
	"strings"

	"golang.org/x/image/tiff"

	"faultline/figure"
)

// TIFF tags read here (TIFF 6.0, sections 8 and 19).
const (
	tTIFFWidth        = 256
	tTIFFLength       = 257
	tTIFFBits         = 258
	tTIFFCompression  = 259
	tTIFFDescription  = 270
	tTIFFSamples      = 277
	tTIFFXResolution  = 282
	tTIFFYResolution  = 283
	tTIFFResUnit      = 296
	tTIFFDateTime     = 306
	tTIFFSampleFormat = 339
)

// tiffCompression names the TIFF compression schemes (TIFF 6.0 section 8,
// and the registered extensions); ok marks those this package reads.
var tiffCompression = map[uint32]struct {
	name string
	ok   bool
}{
	1: {"none", true}, 2: {"CCITT 1D", false}, 3: {"CCITT Group 3", false}, 4: {"CCITT Group 4", false},
	5: {"LZW", true}, 6: {"old-style JPEG", false}, 7: {"JPEG", false}, 8: {"Deflate", true},
	32773: {"PackBits", true}, 32946: {"Deflate", true}, 34712: {"JPEG 2000", false},
	34925: {"LZMA", false}, 50000: {"Zstandard", false}, 50001: {"WebP", false},
}

// tiffIFD is the first image file directory of a TIFF, read far enough to
// learn the layout and the calibration.
type tiffIFD struct {
	b      []byte
	bo     binary.ByteOrder
	fields map[uint16]tiffField
}

type tiffField struct {
	typ   uint16
	count uint32
	at    uint64 // offset of the first value
}

// tiffTypeSize is the size of one value of each TIFF field type (TIFF 6.0
// section 2, and section 17 for the signed and float types).
var tiffTypeSize = map[uint16]uint64{1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8}

func readIFD(b []byte) (*tiffIFD, error) {
	t := &tiffIFD{b: b, fields: map[uint16]tiffField{}}
	if len(b) < 8 {
		return nil, errTruncated("TIFF")
	}
	if b[0] == 'I' {
		t.bo = binary.LittleEndian
	} else {
		t.bo = binary.BigEndian
	}
	if t.bo.Uint16(b[2:]) == 43 {
		return nil, errorf("TIFF: BigTIFF is not supported; save a classic TIFF")
	}
	ifd := uint64(t.bo.Uint32(b[4:]))
	if ifd+2 > uint64(len(b)) {
		return nil, errTruncated("TIFF")
	}
	n := uint64(t.bo.Uint16(b[ifd:]))
	for k := range n {
		p := ifd + 2 + 12*k
		if p+12 > uint64(len(b)) {
			return nil, errTruncated("TIFF")
		}
		f := tiffField{typ: t.bo.Uint16(b[p+2:]), count: t.bo.Uint32(b[p+4:]), at: p + 8}
		size, ok := tiffTypeSize[f.typ]
		if !ok {
			continue // unknown types are skipped, as TIFF 6.0 asks
		}
		if size*uint64(f.count) > 4 {
			f.at = uint64(t.bo.Uint32(b[p+8:]))
		}
		if f.at+size*uint64(f.count) > uint64(len(b)) {
			return nil, errorf("TIFF: tag %d: values run past the end of the file (truncated?)", t.bo.Uint16(b[p:]))
		}
		t.fields[t.bo.Uint16(b[p:])] = f
	}
	return t, nil
}

// uint returns the first value of an integer tag, or def when absent.
func (t *tiffIFD) uint(tag uint16, def uint32) uint32 {
	f, ok := t.fields[tag]
	if !ok || f.count == 0 {
		return def
	}
	switch f.typ {
	case 1, 7:
		return uint32(t.b[f.at])
	case 3:
		return uint32(t.bo.Uint16(t.b[f.at:]))
	case 4:
		return t.bo.Uint32(t.b[f.at:])
	}
	return def
}

// rational returns the first value of a RATIONAL tag.
func (t *tiffIFD) rational(tag uint16) (float64, bool) {
	f, ok := t.fields[tag]
	if !ok || f.count == 0 || f.typ != 5 {
		return 0, false
	}
	num, den := t.bo.Uint32(t.b[f.at:]), t.bo.Uint32(t.b[f.at+4:])
	if num == 0 || den == 0 {
		return 0, false
	}
	return float64(num) / float64(den), true
}

// ascii returns an ASCII tag's text up to its first NUL.
func (t *tiffIFD) ascii(tag uint16) string {
	f, ok := t.fields[tag]
	if !ok || f.typ != 2 {
		return ""
	}
	s := t.b[f.at : f.at+uint64(f.count)]
	if k := bytes.IndexByte(s, 0); k >= 0 {
		s = s[:k]
	}
	return string(s)
}

// decodeTIFF reads a grey TIFF: 32-bit float samples through the
// project's own float TIFF reader, 8- and 16-bit integer samples through
// golang.org/x/image/tiff. The size and compression are checked before
// either allocates.
func decodeTIFF(b []byte) (*Image, error) {
	t, err := readIFD(b)
	if err != nil {
		return nil, err
	}
	w, h := t.uint(tTIFFWidth, 0), t.uint(tTIFFLength, 0)
	if err := checkSize("TIFF", int64(w), int64(h)); err != nil {
		return nil, err
	}
	c := t.uint(tTIFFCompression, 1)
	if cc, known := tiffCompression[c]; !known || !cc.ok {
		name := "unknown"
		if known {
			name = cc.name
		}
		return nil, errorf("TIFF: compression %d (%s) is not supported; this program reads uncompressed, LZW, Deflate and PackBits TIFFs", c, name)
	}
	bits, sf := t.uint(tTIFFBits, 1), t.uint(tTIFFSampleFormat, 1)
	var m *Image
	switch {
	case sf == 3 && bits == 32:
		if c != 1 {
			return nil, errorf("TIFF: 32-bit float samples with compression %d (%s) are not supported; save the float image uncompressed", c, tiffCompression[c].name)
		}
		data, nx, ny, err := figure.ReadFloatTIFF(bytes.NewReader(b))
		if err != nil {
			return nil, errorf("TIFF: %s", strings.TrimPrefix(err.Error(), "figure: "))
		}
		m = &Image{Width: nx, Height: ny, Pix: data, Format: "tiff", Kind: "32-bit float"}
	case sf == 3:
		return nil, errorf("TIFF: %d-bit float samples are not supported; want 32-bit float", bits)
	case sf == 2:
		return nil, errorf("TIFF: signed integer samples are not supported; want unsigned 8- or 16-bit or 32-bit float")
	case bits == 8 || bits == 16 || bits == 1 || bits == 4 || t.uint(tTIFFSamples, 1) > 1:
		img, err := tiff.Decode(bytes.NewReader(b))
		if err != nil {
			return nil, errorf("TIFF: %v", err)
		}
		if m, err = fromImage(img, "tiff"); err != nil {
			return nil, err
		}
	default:
		return nil, errorf("TIFF: %d-bit integer samples are not supported; want 8- or 16-bit or 32-bit float", bits)
	}
	if err := t.calibrate(m); err != nil {
		return nil, err
	}
	m.Meta.Date = t.ascii(tTIFFDateTime)
	return m, nil
}

// calibrate sets the pixel size from the ImageJ-style description
// ("unit=nm" with XResolution in pixels per unit, or "spacing" when there
// is no XResolution) or else from the TIFF resolution tags (XResolution
// pixels per ResolutionUnit: 2 = inch, 3 = centimetre).
func (t *tiffIFD) calibrate(m *Image) error {
	desc := t.ascii(tTIFFDescription)
	xres, hasX := t.rational(tTIFFXResolution)
	if kv := imageJDescription(desc); kv != nil {
		unit := unescapeImageJ(kv["unit"])
		if unit == "" || strings.EqualFold(unit, "pixel") || strings.EqualFold(unit, "pixels") {
			return nil
		}
		f, err := UnitToNm(unit)
		if err != nil {
			return errorf("TIFF: ImageJ description: %s", err.(*fileError).msg)
		}
		switch {
		case hasX:
			m.NmPerPx, m.PixelSizeFrom = f/xres, "TIFF XResolution with the ImageJ unit"
		default:
			if sp, err := strconv.ParseFloat(kv["spacing"], 64); err == nil && sp > 0 && !math.IsInf(sp, 0) {
				m.NmPerPx, m.PixelSizeFrom = sp*f, "ImageJ spacing"
			}
		}
		return nil
	}
	if desc != "" {
		m.Meta.Description = desc
	}
	if !hasX {
		return nil
	}
	var nm float64
	switch t.uint(tTIFFResUnit, 2) {
	case 2:
		nm = 2.54e7 / xres
	case 3:
		nm = 1e7 / xres
	default:
		return nil
	}
	if nm >= maxResolutionNmPerPx {
		m.Notices = append(m.Notices, fmt.Sprintf("the resolution tags give %.4g nm per pixel, a print resolution rather than a calibration: the pixel size is not taken from them", nm))
		return nil
	}
	m.NmPerPx, m.PixelSizeFrom = nm, "TIFF resolution tags"
	return nil
}

// maxResolutionNmPerPx is the largest pixel size taken from the TIFF
// resolution tags: 1 µm, about 25 400 pixels per inch. Larger ones (72 or
// 300 dpi is the default of most image writers) describe printing, not a
// transmission micrograph.
const maxResolutionNmPerPx = 1000

// imageJDescription parses an ImageJ-style description (a first line
// "ImageJ=version", then key=value lines) into its keys; nil when desc is
// not one.
func imageJDescription(desc string) map[string]string {
	if !strings.HasPrefix(desc, "ImageJ=") {
		return nil
	}
	kv := map[string]string{}
	for _, line := range strings.Split(desc, "\n") {
		k, v, ok := strings.Cut(strings.TrimSpace(line), "=")
		if ok {
			kv[strings.TrimSpace(k)] = strings.TrimSpace(v)
		}
	}
	return kv
}

// unescapeImageJ turns the \uXXXX escapes ImageJ writes for non-ASCII
// units ("\u00B5m") into their characters.
func unescapeImageJ(s string) string {
	if !strings.Contains(s, `\u`) {
		return s
	}
	if u, err := strconv.Unquote(`"` + strings.ReplaceAll(s, `"`, `\"`) + `"`); err == nil {
		return u
	}
	return s
}
