package micrograph

import (
	"encoding/binary"
	"io"
	"math"
	"unicode/utf16"
)

// DM tag file structure (see the package doc for the description worked
// from). Everything that describes the structure is big-endian; the values
// of data tags are in the byte order the header names.
const (
	dmGroup = 20 // tag entry: a group of tags
	dmData  = 21 // tag entry: data
	dmEnd   = 0  // end marker some writers leave in place of a tag
)

// DM value types, as numbered in the encoded-type arrays of data tags.
const (
	dmInt16   = 2
	dmInt32   = 3
	dmUint16  = 4
	dmUint32  = 5
	dmFloat32 = 6
	dmFloat64 = 7
	dmBool    = 8
	dmInt8    = 9
	dmUint8   = 10
	dmInt64   = 11
	dmUint64  = 12
	dmStruct  = 15
	dmString  = 18
	dmArray   = 20
)

// dmSimpleSize is the size in bytes of each simple DM type.
var dmSimpleSize = map[uint64]int64{
	dmInt16: 2, dmInt32: 4, dmUint16: 2, dmUint32: 4, dmFloat32: 4, dmFloat64: 8,
	dmBool: 1, dmInt8: 1, dmUint8: 1, dmInt64: 8, dmUint64: 8,
}

// Bounds on the structure, so that a damaged file cannot make the reader
// recurse without end or allocate what the file cannot hold.
const (
	dmMaxDepth  = 64
	dmMaxInfo   = 1 << 12 // words of one encoded type
	dmMaxTags   = 1 << 20 // tags in the whole file
	dmMaxStruct = 256     // fields of a struct
)

// dmTag is one entry of the tag tree: a group (children) or data.
type dmTag struct {
	name     string
	children []*dmTag // groups only
	isGroup  bool
	// Data tags: a number (simple type), a struct's fields, or an array
	// left in the file (arrOff, arrCount elements of arrElem).
	typ      uint64
	num      float64
	fields   []float64
	arrElem  uint64
	arrCount int64
	arrOff   int64
	arrSize  int64  // bytes of one element
	text     string // short arrays of characters, decoded
}

// dmMaxText is the longest character array decoded as text.
const dmMaxText = 1024

// dmText decodes a character array: UTF-16 code units or bytes (Latin-1).
func dmText(elem uint64, b []byte, bo binary.ByteOrder) string {
	if elem != dmUint16 {
		r := make([]rune, len(b))
		for k, c := range b {
			r[k] = rune(c)
		}
		return string(r)
	}
	u := make([]uint16, len(b)/2)
	for k := range u {
		u[k] = bo.Uint16(b[2*k:])
	}
	return string(utf16.Decode(u))
}

// textValue is the text of a character-array tag, "" for none.
func (t *dmTag) textValue() string {
	if t == nil {
		return ""
	}
	return t.text
}

// child returns the first child named name.
func (t *dmTag) child(name string) *dmTag {
	if t == nil {
		return nil
	}
	for _, c := range t.children {
		if c.name == name {
			return c
		}
	}
	return nil
}

// path follows names from t.
func (t *dmTag) path(names ...string) *dmTag {
	for _, n := range names {
		t = t.child(n)
	}
	return t
}

// dmReader walks the tag structure through a small window over the file.
type dmReader struct {
	r      io.ReaderAt
	size   int64
	off    int64
	v4     bool             // DM4: 8-byte counts and a size before each tag
	bo     binary.ByteOrder // of the data values
	buf    []byte
	bufOff int64
	tags   int
	format string
}

// bytes returns the next n bytes (n small) and advances.
func (d *dmReader) bytes(n int64) ([]byte, error) {
	if n < 0 || d.off+n > d.size {
		return nil, errTruncated(d.format)
	}
	if d.off < d.bufOff || d.off+n > d.bufOff+int64(len(d.buf)) {
		want := max(n, 64<<10)
		want = min(want, d.size-d.off)
		if int64(cap(d.buf)) < want {
			d.buf = make([]byte, want)
		}
		d.buf = d.buf[:want]
		if k, err := d.r.ReadAt(d.buf, d.off); int64(k) < n {
			if err != nil && err != io.EOF {
				return nil, err
			}
			return nil, errTruncated(d.format)
		}
		d.bufOff = d.off
	}
	p := d.buf[d.off-d.bufOff : d.off-d.bufOff+n]
	d.off += n
	return p, nil
}

func (d *dmReader) u8() (uint8, error) {
	b, err := d.bytes(1)
	if err != nil {
		return 0, err
	}
	return b[0], nil
}

func (d *dmReader) u16() (uint16, error) {
	b, err := d.bytes(2)
	if err != nil {
		return 0, err
	}
	return binary.BigEndian.Uint16(b), nil
}

// count reads a structural count: 4 bytes in DM3, 8 in DM4, big-endian.
func (d *dmReader) count() (uint64, error) {
	if d.v4 {
		b, err := d.bytes(8)
		if err != nil {
			return 0, err
		}
		return binary.BigEndian.Uint64(b), nil
	}
	b, err := d.bytes(4)
	if err != nil {
		return 0, err
	}
	return uint64(binary.BigEndian.Uint32(b)), nil
}

// group reads a tag group: sorted flag, open flag, number of tags, tags.
func (d *dmReader) group(t *dmTag, depth int) error {
	if depth > dmMaxDepth {
		return errorf("%s: tags nested more than %d deep", d.format, dmMaxDepth)
	}
	if _, err := d.bytes(2); err != nil {
		return err
	}
	n, err := d.count()
	if err != nil {
		return err
	}
	t.isGroup = true
	for k := uint64(0); k < n; k++ {
		d.tags++
		if d.tags > dmMaxTags {
			return errorf("%s: more than %d tags", d.format, dmMaxTags)
		}
		kind, err := d.u8()
		if err != nil {
			return err
		}
		if kind == dmEnd {
			break
		}
		ln, err := d.u16()
		if err != nil {
			return err
		}
		name, err := d.bytes(int64(ln))
		if err != nil {
			return err
		}
		c := &dmTag{name: string(name)}
		if d.v4 {
			if _, err := d.count(); err != nil { // size of the tag's content
				return err
			}
		}
		switch kind {
		case dmGroup:
			err = d.group(c, depth+1)
		case dmData:
			err = d.data(c)
		default:
			return errorf("%s: tag entry of kind %d at byte %d; want 20 (group) or 21 (data)", d.format, kind, d.off-int64(ln)-3)
		}
		if err != nil {
			return err
		}
		t.children = append(t.children, c)
	}
	return nil
}

// data reads a data tag: "%%%%", the length of the encoded type, the
// encoded type, then the value.
func (d *dmReader) data(t *dmTag) error {
	delim, err := d.bytes(4)
	if err != nil {
		return err
	}
	if string(delim) != "%%%%" {
		return errorf("%s: data tag %q does not start with %%%%%%%%", d.format, t.name)
	}
	n, err := d.count()
	if err != nil {
		return err
	}
	if n == 0 || n > dmMaxInfo {
		return errorf("%s: data tag %q: encoded type of %d words", d.format, t.name, n)
	}
	info := make([]uint64, n)
	for k := range info {
		if info[k], err = d.count(); err != nil {
			return err
		}
	}
	t.typ = info[0]
	switch {
	case dmSimpleSize[t.typ] > 0:
		t.num, err = d.simple(t.typ)
		return err
	case t.typ == dmString && n >= 2:
		if info[1] > uint64(d.size-d.off) {
			return errTruncated(d.format)
		}
		d.off += int64(info[1])
		return nil
	case t.typ == dmStruct:
		fields, err := structFields(info[1:])
		if err != nil {
			return errorf("%s: data tag %q: %s", d.format, t.name, err.(*fileError).msg)
		}
		for _, f := range fields {
			v, err := d.simple(f)
			if err != nil {
				return err
			}
			t.fields = append(t.fields, v)
		}
		return nil
	case t.typ == dmArray && n >= 3:
		elem := info[1]
		var size int64
		switch {
		case dmSimpleSize[elem] > 0:
			size = dmSimpleSize[elem]
		case elem == dmStruct:
			fields, err := structFields(info[2 : n-1])
			if err != nil {
				return errorf("%s: data tag %q: %s", d.format, t.name, err.(*fileError).msg)
			}
			for _, f := range fields {
				size += dmSimpleSize[f]
			}
		default:
			return errorf("%s: data tag %q: array of type %d is not supported", d.format, t.name, elem)
		}
		count := info[n-1]
		if size == 0 || count > uint64(d.size)/uint64(size) || d.off+int64(count)*size > d.size {
			return errTruncated(d.format)
		}
		t.arrElem, t.arrCount, t.arrSize, t.arrOff = elem, int64(count), size, d.off
		if count <= dmMaxText && (elem == dmUint16 || elem == dmUint8 || elem == dmInt8) {
			b, err := d.bytes(int64(count) * size)
			if err != nil {
				return err
			}
			t.text = dmText(elem, b, d.bo)
			return nil
		}
		d.off += int64(count) * size
		return nil
	}
	return errorf("%s: data tag %q: encoded type %v is not one this program reads", d.format, t.name, info[:min(n, 4)])
}

// structFields reads the field types of a struct's encoded type: name
// length, number of fields, then (name length, type) per field. Every
// field must be a simple type.
func structFields(info []uint64) ([]uint64, error) {
	if len(info) < 2 {
		return nil, errorf("struct type too short")
	}
	nf := info[1]
	if nf > dmMaxStruct || uint64(len(info)) < 2+2*nf {
		return nil, errorf("struct of %d fields does not fit its type description", nf)
	}
	out := make([]uint64, nf)
	for k := range out {
		out[k] = info[2+2*k+1]
		if dmSimpleSize[out[k]] == 0 {
			return nil, errorf("struct field of type %d is not a number", out[k])
		}
	}
	return out, nil
}

// simple reads one value of a simple type as float64.
func (d *dmReader) simple(typ uint64) (float64, error) {
	b, err := d.bytes(dmSimpleSize[typ])
	if err != nil {
		return 0, err
	}
	return dmNumber(typ, b, d.bo), nil
}

// dmNumber decodes one value of a simple type.
func dmNumber(typ uint64, b []byte, bo binary.ByteOrder) float64 {
	switch typ {
	case dmInt16:
		return float64(int16(bo.Uint16(b)))
	case dmInt32:
		return float64(int32(bo.Uint32(b)))
	case dmUint16:
		return float64(bo.Uint16(b))
	case dmUint32:
		return float64(bo.Uint32(b))
	case dmFloat32:
		return float64(math.Float32frombits(bo.Uint32(b)))
	case dmFloat64:
		return math.Float64frombits(bo.Uint64(b))
	case dmBool, dmUint8:
		return float64(b[0])
	case dmInt8:
		return float64(int8(b[0]))
	case dmInt64:
		return float64(int64(bo.Uint64(b)))
	case dmUint64:
		return float64(bo.Uint64(b))
	}
	return math.NaN()
}
