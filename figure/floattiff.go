package figure

import (
	"encoding/binary"
	"errors"
	"faultline/internal/atomicfile"
	"fmt"
	"io"
	"math"
	"slices"
)

// TIFF tags used by the float TIFF (TIFF 6.0, sections 8 and 19).
const (
	tagImageWidth      = 256
	tagImageLength     = 257
	tagBitsPerSample   = 258
	tagCompression     = 259
	tagPhotometric     = 262
	tagStripOffsets    = 273
	tagSamplesPerPixel = 277
	tagRowsPerStrip    = 278
	tagStripByteCounts = 279
	tagPlanarConfig    = 284
	tagTileWidth       = 322
	tagSampleFormat    = 339
)

// TIFF field types (TIFF 6.0, section 2).
const (
	typeShort = 3
	typeLong  = 4
)

// stripBytes is the size the writer aims at for one strip; TIFF 6.0
// (section 3, RowsPerStrip) recommends strips of about 8 KiB, but readers of
// today handle far larger ones and fewer strips mean a smaller directory.
const stripBytes = 64 << 10

// maxTIFFPixels bounds what the reader allocates.
const maxTIFFPixels = 1 << 28

// WriteFloatTIFF writes an nx × ny image, stored row by row (data[j*nx+i] is
// pixel (i, j)), as a 32-bit float TIFF at path, atomically. Values are
// rounded to the nearest float32. It returns an error if nx or ny is not
// positive or len(data) != nx·ny.
func WriteFloatTIFF(path string, data []float64, nx, ny int) error {
	if err := checkRaster(len(data), nx, ny); err != nil {
		return err
	}
	return atomicfile.Write(path, func(w io.Writer) error { return EncodeFloatTIFF(w, data, nx, ny) })
}

// EncodeFloatTIFF writes the float TIFF of WriteFloatTIFF to w.
func EncodeFloatTIFF(w io.Writer, data []float64, nx, ny int) error {
	if err := checkRaster(len(data), nx, ny); err != nil {
		return err
	}
	return encodeFloatTIFF(w, data, nx, ny, binary.LittleEndian, TIFFMeta{})
}

func checkRaster(n, nx, ny int) error {
	if nx <= 0 || ny <= 0 {
		return fmt.Errorf("figure: image size %d×%d: both must be positive", nx, ny)
	}
	if nx > maxTIFFPixels/ny || n != nx*ny {
		return fmt.Errorf("figure: %d values do not make a %d×%d image", n, nx, ny)
	}
	return nil
}

// entry is one IFD entry as written.
type entry struct {
	tag, typ uint16
	count    uint32
	value    uint32 // the value itself, or the offset of the values
	inline   []byte // values of at most 4 bytes kept in the entry, if set
}

// encodeFloatTIFF lays the file out as header, image strips, strip tables,
// then the image file directory (IFD); the order is free in TIFF as long as
// every value starts on a word boundary (TIFF 6.0, section 2).
func encodeFloatTIFF(w io.Writer, data []float64, nx, ny int, bo binary.ByteOrder, meta TIFFMeta) error {
	rowBytes := 4 * nx
	rowsPerStrip := max(1, stripBytes/rowBytes)
	rowsPerStrip = min(rowsPerStrip, ny)
	nStrips := (ny + rowsPerStrip - 1) / rowsPerStrip
	imageBytes := uint32(4 * nx * ny)

	offsets := make([]uint32, nStrips)
	counts := make([]uint32, nStrips)
	for s := range nStrips {
		offsets[s] = 8 + uint32(s*rowsPerStrip*rowBytes)
		rows := min(rowsPerStrip, ny-s*rowsPerStrip)
		counts[s] = uint32(rows * rowBytes)
	}
	// Arrays of more than one LONG do not fit in the 4-byte value field of
	// an IFD entry and go after the image data, as do the resolutions and
	// the texts.
	tables := uint32(8) + imageBytes
	offsetsAt, countsAt := tables, tables+4*uint32(nStrips)
	ifdAt := tables
	if nStrips > 1 {
		ifdAt += 8 * uint32(nStrips)
	}
	extra, extraEntries := meta.entries(ifdAt, bo)
	ifdAt += uint32(len(extra))

	entries := []entry{
		{tagImageWidth, typeLong, 1, uint32(nx), nil},
		{tagImageLength, typeLong, 1, uint32(ny), nil},
		{tagBitsPerSample, typeShort, 1, 32, nil},
		{tagCompression, typeShort, 1, 1, nil}, // none
		{tagPhotometric, typeShort, 1, 1, nil}, // BlackIsZero
		{tagStripOffsets, typeLong, uint32(nStrips), offsetsAt, nil},
		{tagSamplesPerPixel, typeShort, 1, 1, nil},
		{tagRowsPerStrip, typeLong, 1, uint32(rowsPerStrip), nil},
		{tagStripByteCounts, typeLong, uint32(nStrips), countsAt, nil},
		{tagPlanarConfig, typeShort, 1, 1, nil}, // chunky
		{tagSampleFormat, typeShort, 1, 3, nil}, // IEEE floating point
	}
	if nStrips == 1 {
		entries[5].value = offsets[0]
		entries[8].value = counts[0]
	}
	entries = append(entries, extraEntries...)
	// TIFF 6.0 (section 2) wants the entries sorted by tag.
	slices.SortStableFunc(entries, func(a, b entry) int { return int(a.tag) - int(b.tag) })

	var hdr [8]byte
	if bo == binary.LittleEndian {
		copy(hdr[:2], "II")
	} else {
		copy(hdr[:2], "MM")
	}
	bo.PutUint16(hdr[2:], 42)
	bo.PutUint32(hdr[4:], ifdAt)
	if _, err := w.Write(hdr[:]); err != nil {
		return err
	}
	row := make([]byte, rowBytes)
	for j := range ny {
		for i, v := range data[j*nx : (j+1)*nx] {
			bo.PutUint32(row[4*i:], math.Float32bits(float32(v)))
		}
		if _, err := w.Write(row); err != nil {
			return err
		}
	}
	if nStrips > 1 {
		tab := make([]byte, 8*nStrips)
		for s := range nStrips {
			bo.PutUint32(tab[4*s:], offsets[s])
			bo.PutUint32(tab[4*(nStrips+s):], counts[s])
		}
		if _, err := w.Write(tab); err != nil {
			return err
		}
	}
	if _, err := w.Write(extra); err != nil {
		return err
	}
	ifd := make([]byte, 2+12*len(entries)+4)
	bo.PutUint16(ifd, uint16(len(entries)))
	for k, e := range entries {
		p := ifd[2+12*k:]
		bo.PutUint16(p[0:], e.tag)
		bo.PutUint16(p[2:], e.typ)
		bo.PutUint32(p[4:], e.count)
		switch {
		case e.inline != nil:
			copy(p[8:12], e.inline)
		case e.typ == typeShort && e.count == 1:
			bo.PutUint16(p[8:], uint16(e.value)) // left-justified in the field
		default:
			bo.PutUint32(p[8:], e.value)
		}
	}
	// The next-IFD offset (last 4 bytes) stays 0: one image.
	_, err := w.Write(ifd)
	return err
}

// ReadFloatTIFF reads the first image of a TIFF holding one 32-bit IEEE
// float sample per pixel, uncompressed, in strips, in either byte order:
// what WriteFloatTIFF writes and what most image tools write for a 32-bit
// float image. Other layouts (integer samples, several samples per pixel,
// compression, tiles, BigTIFF) are rejected with an error naming the tag.
// data[j*nx+i] is pixel (i, j).
func ReadFloatTIFF(r io.Reader) (data []float32, nx, ny int, err error) {
	b, err := io.ReadAll(r)
	if err != nil {
		return nil, 0, 0, fmt.Errorf("figure: read TIFF: %w", err)
	}
	return decodeFloatTIFF(b)
}

// tiffFile reads the values of IFD entries from the whole file.
type tiffFile struct {
	b  []byte
	bo binary.ByteOrder
}

var errTIFFShort = errors.New("figure: TIFF truncated or offset out of range")

func (t tiffFile) u16(off uint64) (uint16, error) {
	if off+2 > uint64(len(t.b)) {
		return 0, errTIFFShort
	}
	return t.bo.Uint16(t.b[off:]), nil
}

// field is one IFD entry: its type, count and where its values are.
type field struct {
	typ   uint16
	count uint32
	at    uint64 // offset of the first value in the file
}

// values returns the entry's values as unsigned integers (SHORT or LONG).
func (t tiffFile) values(tag uint16, f field) ([]uint32, error) {
	size := uint64(2)
	switch f.typ {
	case typeShort:
	case typeLong:
		size = 4
	default:
		return nil, fmt.Errorf("figure: TIFF tag %d: field type %d, want SHORT or LONG", tag, f.typ)
	}
	if f.at+size*uint64(f.count) > uint64(len(t.b)) {
		return nil, fmt.Errorf("figure: TIFF tag %d: values run past the end of the file", tag)
	}
	out := make([]uint32, f.count)
	for k := range out {
		p := f.at + size*uint64(k)
		if size == 2 {
			out[k] = uint32(t.bo.Uint16(t.b[p:]))
		} else {
			out[k] = t.bo.Uint32(t.b[p:])
		}
	}
	return out, nil
}

func decodeFloatTIFF(b []byte) (data []float32, nx, ny int, err error) {
	if len(b) < 8 {
		return nil, 0, 0, errors.New("figure: not a TIFF file (too short)")
	}
	t := tiffFile{b: b}
	switch string(b[:2]) {
	case "II":
		t.bo = binary.LittleEndian
	case "MM":
		t.bo = binary.BigEndian
	default:
		return nil, 0, 0, errors.New("figure: not a TIFF file (bad byte-order mark)")
	}
	switch t.bo.Uint16(b[2:]) {
	case 42:
	case 43:
		return nil, 0, 0, errors.New("figure: BigTIFF is not supported; want a classic TIFF")
	default:
		return nil, 0, 0, errors.New("figure: not a TIFF file (bad magic number)")
	}
	ifd := uint64(t.bo.Uint32(b[4:]))
	n, err := t.u16(ifd)
	if err != nil {
		return nil, 0, 0, err
	}
	fields := map[uint16]field{}
	for k := range uint64(n) {
		p := ifd + 2 + 12*k
		if p+12 > uint64(len(b)) {
			return nil, 0, 0, errTIFFShort
		}
		tag, typ, count := t.bo.Uint16(b[p:]), t.bo.Uint16(b[p+2:]), t.bo.Uint32(b[p+4:])
		f := field{typ: typ, count: count, at: p + 8}
		if typ == typeShort && count > 2 || typ == typeLong && count > 1 {
			f.at = uint64(t.bo.Uint32(b[p+8:]))
		}
		fields[tag] = f
	}
	// one returns the single value of a tag, or def when the tag is absent
	// and def >= 0.
	one := func(tag uint16, name string, def int64) (uint32, error) {
		f, ok := fields[tag]
		if !ok {
			if def < 0 {
				return 0, fmt.Errorf("figure: TIFF: required tag %s (%d) missing", name, tag)
			}
			return uint32(def), nil
		}
		v, err := t.values(tag, f)
		if err != nil {
			return 0, err
		}
		if len(v) != 1 {
			return 0, fmt.Errorf("figure: TIFF tag %s (%d): %d values, want 1", name, tag, len(v))
		}
		return v[0], nil
	}
	if _, ok := fields[tagTileWidth]; ok {
		return nil, 0, 0, errors.New("figure: TIFF: tiled image (TileWidth present); only strips are supported")
	}
	want := []struct {
		tag  uint16
		name string
		def  int64
		want uint32
		what string
	}{
		{tagSamplesPerPixel, "SamplesPerPixel", 1, 1, "one sample per pixel (a grey image)"},
		{tagBitsPerSample, "BitsPerSample", 1, 32, "32-bit samples"},
		{tagSampleFormat, "SampleFormat", 1, 3, "3 (IEEE floating point)"},
		{tagCompression, "Compression", 1, 1, "1 (uncompressed)"},
		{tagPlanarConfig, "PlanarConfiguration", 1, 1, "1 (chunky)"},
	}
	for _, c := range want {
		v, err := one(c.tag, c.name, c.def)
		if err != nil {
			return nil, 0, 0, err
		}
		if v != c.want {
			return nil, 0, 0, fmt.Errorf("figure: TIFF tag %s (%d) = %d; want %s", c.name, c.tag, v, c.what)
		}
	}
	if p, err := one(tagPhotometric, "PhotometricInterpretation", 1); err != nil {
		return nil, 0, 0, err
	} else if p != 1 {
		return nil, 0, 0, fmt.Errorf("figure: TIFF tag PhotometricInterpretation (%d) = %d; want 1 (BlackIsZero)", tagPhotometric, p)
	}
	w, err := one(tagImageWidth, "ImageWidth", -1)
	if err != nil {
		return nil, 0, 0, err
	}
	h, err := one(tagImageLength, "ImageLength", -1)
	if err != nil {
		return nil, 0, 0, err
	}
	if w == 0 || h == 0 || uint64(w)*uint64(h) > maxTIFFPixels {
		return nil, 0, 0, fmt.Errorf("figure: TIFF image size %d×%d out of range", w, h)
	}
	rps, err := one(tagRowsPerStrip, "RowsPerStrip", int64(h))
	if err != nil {
		return nil, 0, 0, err
	}
	rps = max(1, min(rps, h))
	nStrips := (uint64(h) + uint64(rps) - 1) / uint64(rps)
	fo, ok := fields[tagStripOffsets]
	if !ok {
		return nil, 0, 0, errors.New("figure: TIFF: required tag StripOffsets (273) missing")
	}
	fc, ok := fields[tagStripByteCounts]
	if !ok {
		return nil, 0, 0, errors.New("figure: TIFF: required tag StripByteCounts (279) missing")
	}
	if uint64(fo.count) != nStrips || uint64(fc.count) != nStrips {
		return nil, 0, 0, fmt.Errorf("figure: TIFF: %d strip offsets and %d byte counts for %d strips", fo.count, fc.count, nStrips)
	}
	offs, err := t.values(tagStripOffsets, fo)
	if err != nil {
		return nil, 0, 0, err
	}
	counts, err := t.values(tagStripByteCounts, fc)
	if err != nil {
		return nil, 0, 0, err
	}
	nx, ny = int(w), int(h)
	rowBytes := uint64(4 * nx)
	if rowBytes*uint64(ny) > uint64(len(b)) {
		return nil, 0, 0, fmt.Errorf("figure: TIFF: a %d×%d float image needs %d bytes, the file has %d", nx, ny, rowBytes*uint64(ny), len(b))
	}
	data = make([]float32, 0, nx*ny)
	for s := range nStrips {
		rows := min(uint64(rps), uint64(h)-s*uint64(rps))
		need := rows * rowBytes
		if uint64(counts[s]) < need {
			return nil, 0, 0, fmt.Errorf("figure: TIFF strip %d: %d bytes, want %d", s, counts[s], need)
		}
		start := uint64(offs[s])
		if start+need > uint64(len(b)) {
			return nil, 0, 0, fmt.Errorf("figure: TIFF strip %d runs past the end of the file", s)
		}
		for p := start; p < start+need; p += 4 {
			data = append(data, math.Float32frombits(t.bo.Uint32(b[p:])))
		}
	}
	return data, nx, ny, nil
}
