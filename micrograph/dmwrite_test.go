package micrograph

import (
	"bytes"
	"encoding/binary"
	"math"
	"unicode/utf16"
)

// A test-only writer of DM3 and DM4 files, from the same description of
// the tag format the reader follows (see doc.go): a header, then the root
// tag group; each tag entry a kind byte (20 group, 21 data), a big-endian
// name length and the name, in DM4 an 8-byte size of what follows; a group
// is a sorted byte, an open byte and the number of tags; a data tag is
// "%%%%", the number of encoded-type words, the words, then the value in
// the header's byte order. Counts and encoded-type words are 4 bytes in
// DM3 and 8 in DM4, big-endian.

// dmNode is one tag to write.
type dmNode struct {
	name     string
	children []dmNode // a group when non-nil
	enc      []uint64 // encoded type of a data tag
	data     []byte   // its value, already in the file's byte order
}

func dmGroupOf(name string, children ...dmNode) dmNode {
	if children == nil {
		children = []dmNode{}
	}
	return dmNode{name: name, children: children}
}

// dmNum is a simple value of type typ.
func dmNum(name string, typ uint64, v float64) dmNode {
	b := make([]byte, dmSimpleSize[typ])
	putDM(typ, b, v)
	return dmNode{name: name, enc: []uint64{typ}, data: b}
}

// dmTextNode is text as an array of 16-bit characters, as DM stores it.
func dmTextNode(name, s string) dmNode {
	u := utf16.Encode([]rune(s))
	b := make([]byte, 2*len(u))
	for k, c := range u {
		binary.LittleEndian.PutUint16(b[2*k:], c)
	}
	return dmNode{name: name, enc: []uint64{dmArray, dmUint16, uint64(len(u))}, data: b}
}

// dmArrayNode is an array of count values of type elem, already encoded.
func dmArrayNode(name string, elem uint64, count int, b []byte) dmNode {
	return dmNode{name: name, enc: []uint64{dmArray, elem, uint64(count)}, data: b}
}

// putDM encodes v as one little-endian value of type typ.
func putDM(typ uint64, b []byte, v float64) {
	le := binary.LittleEndian
	switch typ {
	case dmInt16:
		le.PutUint16(b, uint16(int16(v)))
	case dmInt32:
		le.PutUint32(b, uint32(int32(v)))
	case dmUint16:
		le.PutUint16(b, uint16(v))
	case dmUint32:
		le.PutUint32(b, uint32(v))
	case dmFloat32:
		le.PutUint32(b, math.Float32bits(float32(v)))
	case dmFloat64:
		le.PutUint64(b, math.Float64bits(v))
	case dmBool, dmUint8:
		b[0] = uint8(v)
	case dmInt8:
		b[0] = uint8(int8(v))
	case dmInt64:
		le.PutUint64(b, uint64(int64(v)))
	case dmUint64:
		le.PutUint64(b, uint64(v))
	}
}

type dmWriter struct {
	v4  bool
	buf bytes.Buffer
}

func (w *dmWriter) count(n uint64) {
	if w.v4 {
		binary.Write(&w.buf, binary.BigEndian, n)
	} else {
		binary.Write(&w.buf, binary.BigEndian, uint32(n))
	}
}

// content writes a tag's content (group or data) into a fresh buffer.
func (w *dmWriter) content(n dmNode) []byte {
	sub := &dmWriter{v4: w.v4}
	if n.children != nil {
		sub.group(n.children)
	} else {
		sub.buf.WriteString("%%%%")
		sub.count(uint64(len(n.enc)))
		for _, e := range n.enc {
			sub.count(e)
		}
		sub.buf.Write(n.data)
	}
	return sub.buf.Bytes()
}

func (w *dmWriter) group(children []dmNode) {
	w.buf.Write([]byte{1, 0}) // sorted, open
	w.count(uint64(len(children)))
	for _, c := range children {
		kind := byte(dmData)
		if c.children != nil {
			kind = dmGroup
		}
		w.buf.WriteByte(kind)
		binary.Write(&w.buf, binary.BigEndian, uint16(len(c.name)))
		w.buf.WriteString(c.name)
		body := w.content(c)
		if w.v4 {
			binary.Write(&w.buf, binary.BigEndian, uint64(len(body)))
		}
		w.buf.Write(body)
	}
}

// encodeDM returns a whole DM3 (v4 false) or DM4 file, little-endian data,
// whose root group holds the given tags.
func encodeDM(v4 bool, root []dmNode) []byte {
	w := &dmWriter{v4: v4}
	w.group(root)
	body := w.buf.Bytes()
	var out bytes.Buffer
	if v4 {
		binary.Write(&out, binary.BigEndian, uint32(4))
		binary.Write(&out, binary.BigEndian, uint64(len(body)))
	} else {
		binary.Write(&out, binary.BigEndian, uint32(3))
		binary.Write(&out, binary.BigEndian, uint32(len(body)))
	}
	binary.Write(&out, binary.BigEndian, uint32(1)) // little-endian data
	out.Write(body)
	out.Write(make([]byte, 8)) // end of file: eight zero bytes
	return out.Bytes()
}

// dmImageSpec describes one test image.
type dmImageSpec struct {
	dataType int    // DM image data type
	elem     uint64 // array element type of Data
	nx, ny   int
	scale    float64 // per pixel, in unit
	unit     string
	origin   float64 // in pixels
}

// dmTestValue is the value of pixel k of a test image of a data type:
// distinct, within the type's range, negative where the type allows.
func dmTestValue(dataType, k int) float64 {
	switch dataType {
	case 6, 14: // uint8, binary
		if dataType == 14 {
			return float64(k % 2)
		}
		return float64((37*k + 11) % 256)
	case 9: // int8
		return float64((37*k+11)%256 - 128)
	case 1: // int16
		return float64((4099*k+7)%65536 - 32768)
	case 10: // uint16
		return float64((4099*k + 7) % 65536)
	case 7: // int32
		return float64(int32(uint32(2654435761 * uint32(k+1))))
	case 11: // uint32
		return float64(uint32(2654435761 * uint32(k+1)))
	case 2: // float32
		return float64(float32(math.Sin(float64(k)) * 1e3))
	case 12: // float64
		return math.Sin(float64(k))*1e6 + 1e-3*float64(k)
	}
	return 0
}

// dmTestRGB is pixel k of an RGB test image: blue, green, red.
func dmTestRGB(k int) [3]byte {
	return [3]byte{byte(13 * k), byte(101 + 7*k), byte(250 - 3*k)}
}

// dmTestFile builds a file holding a 3 × 2 thumbnail (listed under
// Thumbnails, as the acquisition software does) and the image of spec.
func dmTestFile(v4 bool, spec dmImageSpec) []byte {
	n := spec.nx * spec.ny
	var data []byte
	if spec.dataType == 23 || spec.dataType == 8 {
		for k := range n {
			c := dmTestRGB(k)
			data = append(data, c[0], c[1], c[2], 0)
		}
	} else {
		size := dmSimpleSize[spec.elem]
		data = make([]byte, int64(n)*size)
		for k := range n {
			putDM(spec.elem, data[int64(k)*size:], dmTestValue(spec.dataType, k))
		}
	}
	count := len(data) / int(dmSimpleSize[spec.elem])
	dim := func(scale, origin float64, unit string) dmNode {
		return dmGroupOf("", dmNum("Origin", dmFloat32, origin), dmNum("Scale", dmFloat32, scale), dmTextNode("Units", unit))
	}
	image := func(nx, ny int, dataType int, elem uint64, count int, data []byte, tags []dmNode) dmNode {
		return dmGroupOf("",
			dmGroupOf("ImageData",
				dmGroupOf("Calibrations",
					dmGroupOf("Brightness", dmNum("Origin", dmFloat32, 0), dmNum("Scale", dmFloat32, 1), dmTextNode("Units", "counts")),
					dmGroupOf("Dimension", dim(spec.scale, spec.origin, spec.unit), dim(spec.scale, spec.origin, spec.unit)),
				),
				dmArrayNode("Data", elem, count, data),
				dmNum("DataType", dmInt32, float64(dataType)),
				dmGroupOf("Dimensions", dmNum("", dmUint32, float64(nx)), dmNum("", dmUint32, float64(ny))),
				dmNum("PixelDepth", dmUint32, float64(dmPixel[dataType].size)),
			),
			dmGroupOf("ImageTags", tags...),
			dmTextNode("Name", "test image"),
		)
	}
	thumb := image(3, 2, 6, dmUint8, 6, []byte{1, 2, 3, 4, 5, 6}, nil)
	tags := []dmNode{
		dmGroupOf("DataBar", dmTextNode("Acquisition Date", "2/3/2025"), dmTextNode("Acquisition Time", "10:11:12 AM")),
		dmGroupOf("Microscope Info",
			dmNum("Voltage", dmFloat64, 200000),
			dmNum("Indicated Magnification", dmFloat64, 50000),
			dmNum("STEM Camera Length", dmFloat32, 80),
		),
	}
	main := image(spec.nx, spec.ny, spec.dataType, spec.elem, count, data, tags)
	return encodeDM(v4, []dmNode{
		dmGroupOf("ImageList", thumb, main),
		dmGroupOf("Thumbnails", dmGroupOf("", dmNum("ImageIndex", dmUint32, 0))),
	})
}
