package figure

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"faultline/internal/atomicfile"
)

// TIFF tags of a calibrated float TIFF (TIFF 6.0, section 8).
const (
	tagImageDescription = 270
	tagXResolution      = 282
	tagYResolution      = 283
	tagResolutionUnit   = 296
	tagSoftware         = 305
)

// TIFF field types beyond SHORT and LONG (TIFF 6.0, section 2).
const (
	typeASCII    = 2
	typeRational = 5
	typeDouble   = 12
)

// Private TIFF tags of the acquisition software's TIFF export, which
// hyperspy and other readers of microscope TIFFs take the axes from: the
// unit of x and y (ASCII), the origin and the scale per pixel of x and y
// (DOUBLE). Tag numbers as hyperspy's TIFF reader reads them (hyperspy
// 1.7, io_plugins/tiff.py).
const (
	tagAxisUnitX   = 65003
	tagAxisUnitY   = 65004
	tagAxisOriginX = 65006
	tagAxisOriginY = 65007
	tagAxisScaleX  = 65009
	tagAxisScaleY  = 65010
)

// TIFFMeta is what a float TIFF carries besides its pixels.
type TIFFMeta struct {
	// NmPerPx is the pixel size; 0 writes no calibration.
	NmPerPx float64
	// Scene is the scene that made the image (JSON); it is stored
	// compacted, on one line of the description.
	Scene string
}

// ImageJ's description opens with its version; 1.11a is the version
// tifffile writes and the oldest one that reads "unit".
const imageJHeader = "ImageJ=1.11a"

// WriteCalibratedTIFF writes data as a 32-bit float TIFF at path,
// atomically, with the pixel size and the scene of meta (see
// EncodeCalibratedTIFF).
func WriteCalibratedTIFF(path string, data []float64, nx, ny int, meta TIFFMeta) error {
	if err := checkRaster(len(data), nx, ny); err != nil {
		return err
	}
	if _, err := meta.description(); err != nil {
		return err
	}
	return atomicfile.Write(path, func(w io.Writer) error { return EncodeCalibratedTIFF(w, data, nx, ny, meta) })
}

// EncodeCalibratedTIFF writes the float TIFF of EncodeFloatTIFF with the
// pixel size in the form image tools read, the ImageJ convention: an
// ImageDescription of key=value lines opening with "ImageJ=" that says
// unit=nm, XResolution and YResolution in pixels per nm (RATIONAL), and
// ResolutionUnit 1 (none: the unit is the description's). The scene, when
// given, is a line "scene=" of compact JSON with every non-ASCII character
// escaped, since TIFF text is 7-bit ASCII. Software is "Faultline". With a zero TIFFMeta the file is that of
// EncodeFloatTIFF.
func EncodeCalibratedTIFF(w io.Writer, data []float64, nx, ny int, meta TIFFMeta) error {
	if err := checkRaster(len(data), nx, ny); err != nil {
		return err
	}
	if _, err := meta.description(); err != nil {
		return err
	}
	return encodeFloatTIFF(w, data, nx, ny, binary.LittleEndian, meta)
}

// description returns the ImageDescription text, "" when there is
// nothing to describe.
func (m TIFFMeta) description() (string, error) {
	if m.NmPerPx == 0 && m.Scene == "" {
		return "", nil
	}
	if m.NmPerPx != 0 && !(m.NmPerPx > 0 && m.NmPerPx < 1e9) {
		return "", fmt.Errorf("figure: TIFF pixel size %g nm: must be positive and below 1 m", m.NmPerPx)
	}
	lines := []string{imageJHeader}
	if m.NmPerPx > 0 {
		lines = append(lines, "unit=nm")
	}
	if m.Scene != "" {
		s, err := asciiJSON(m.Scene)
		if err != nil {
			return "", err
		}
		lines = append(lines, "scene="+s)
	}
	return strings.Join(lines, "\n") + "\n", nil
}

// asciiJSON compacts a JSON text onto one line and escapes every
// non-ASCII character and "=" as \uXXXX (a surrogate pair above U+FFFF),
// which leaves the same JSON value.
func asciiJSON(s string) (string, error) {
	var v any
	if err := json.Unmarshal([]byte(s), &v); err != nil {
		return "", fmt.Errorf("figure: TIFF scene: not JSON: %w", err)
	}
	b, err := json.Marshal(v)
	if err != nil {
		return "", err
	}
	var out strings.Builder
	for _, r := range string(b) {
		switch {
		case r == '=':
			// ImageJ-style readers split each line at every "=".
			out.WriteString(`\u003d`)
		case r < utf8.RuneSelf:
			out.WriteRune(r)
		case r > 0xffff:
			r -= 0x10000
			fmt.Fprintf(&out, `\u%04x\u%04x`, 0xd800+(r>>10), 0xdc00+(r&0x3ff))
		default:
			fmt.Fprintf(&out, `\u%04x`, r)
		}
	}
	return out.String(), nil
}

// rational returns num/den close to x (x > 0) with both below 2^32: the
// largest power-of-ten denominator that keeps the numerator in range, so
// the value keeps about nine significant digits.
func rational(x float64) (num, den uint32) {
	den = 1
	for den <= math.MaxUint32/10 && x*float64(den)*10 < math.MaxUint32 {
		den *= 10
	}
	return uint32(math.Round(x * float64(den))), den
}

// entries lays out the values of the calibration and text entries,
// starting at file offset at, and returns them with their IFD entries.
func (m TIFFMeta) entries(at uint32, bo binary.ByteOrder) ([]byte, []entry) {
	var extra []byte
	var es []entry
	put := func(tag, typ uint16, count uint32, b []byte) {
		es = append(es, entry{tag: tag, typ: typ, count: count, value: at + uint32(len(extra))})
		extra = append(extra, b...)
		if len(extra)%2 == 1 {
			extra = append(extra, 0) // values start on a word boundary
		}
	}
	text := func(tag uint16, s string) {
		b := append([]byte(s), 0) // NUL-terminated; always more than 4 bytes here
		put(tag, typeASCII, uint32(len(b)), b)
	}
	desc, _ := m.description()
	if desc != "" {
		text(tagImageDescription, desc)
	}
	if m.NmPerPx > 0 {
		num, den := rational(1 / m.NmPerPx)
		r := make([]byte, 8)
		bo.PutUint32(r, num)
		bo.PutUint32(r[4:], den)
		put(tagXResolution, typeRational, 1, r)
		put(tagYResolution, typeRational, 1, r)
		es = append(es, entry{tag: tagResolutionUnit, typ: typeShort, count: 1, value: 1})
		double := func(tag uint16, v float64) {
			b := make([]byte, 8)
			bo.PutUint64(b, math.Float64bits(v))
			put(tag, typeDouble, 1, b)
		}
		for _, tag := range []uint16{tagAxisUnitX, tagAxisUnitY} {
			// Three bytes: they go in the entry itself (TIFF 6.0, section 2).
			es = append(es, entry{tag: tag, typ: typeASCII, count: 3, inline: []byte("nm\x00")})
		}
		double(tagAxisOriginX, 0)
		double(tagAxisOriginY, 0)
		double(tagAxisScaleX, m.NmPerPx)
		double(tagAxisScaleY, m.NmPerPx)
	}
	if desc != "" {
		text(tagSoftware, "Faultline")
	}
	return extra, es
}
