package micrograph

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strings"
)

// dmPixel describes the pixels of each DM image data type (the DataType
// tag of an image): bytes per pixel, the simple type of one value, and
// words for the user. RGB pixels are 4 bytes: blue, green, red, then one
// unused byte.
var dmPixel = map[int]struct {
	size int64
	typ  uint64
	kind string
}{
	1:  {2, dmInt16, "16-bit signed integer"},
	2:  {4, dmFloat32, "32-bit float"},
	6:  {1, dmUint8, "8-bit unsigned integer"},
	7:  {4, dmInt32, "32-bit signed integer"},
	8:  {4, 0, "RGB"},
	9:  {1, dmInt8, "8-bit signed integer"},
	10: {2, dmUint16, "16-bit unsigned integer"},
	11: {4, dmUint32, "32-bit unsigned integer"},
	12: {8, dmFloat64, "64-bit float"},
	14: {1, dmUint8, "binary"},
	23: {4, 0, "RGB"},
}

// dmComplex are the complex data types, refused with a message.
var dmComplex = map[int]bool{3: true, 4: true, 5: true, 13: true}

// decodeDM reads the largest 2-D image of a DM3 or DM4 file, with its
// spatial calibration converted to nm and the microscope's settings.
func decodeDM(r io.ReaderAt, size int64) (*Image, error) {
	var h [16]byte
	if n, _ := r.ReadAt(h[:], 0); n < 16 {
		return nil, errTruncated("DM")
	}
	d := &dmReader{r: r, size: size}
	version := binary.BigEndian.Uint32(h[:])
	var order uint32
	switch version {
	case 3:
		d.format, d.off = "DM3", 12
		order = binary.BigEndian.Uint32(h[8:])
	case 4:
		d.format, d.v4, d.off = "DM4", true, 16
		order = binary.BigEndian.Uint32(h[12:])
	}
	switch order {
	case 0:
		d.bo = binary.BigEndian
	case 1:
		d.bo = binary.LittleEndian
	default:
		return nil, errorf("%s: byte-order flag %d; want 0 or 1 (is this a DM file?)", d.format, order)
	}
	root := &dmTag{}
	if err := d.group(root, 0); err != nil {
		return nil, err
	}
	list := root.child("ImageList")
	if list == nil {
		return nil, errorf("%s: no ImageList: the file holds no image", d.format)
	}
	// The largest 2-D image: files usually hold a small thumbnail first.
	var best *dmTag
	var bw, bh int64
	var seen []string
	for _, item := range list.children {
		dims := item.path("ImageData", "Dimensions")
		if dims == nil || item.path("ImageData", "Data") == nil {
			continue
		}
		var sz []int64
		for _, c := range dims.children {
			sz = append(sz, int64(c.num))
		}
		for len(sz) > 2 && sz[len(sz)-1] == 1 {
			sz = sz[:len(sz)-1]
		}
		if len(sz) != 2 {
			s := make([]string, len(sz))
			for k, v := range sz {
				s[k] = fmt.Sprint(v)
			}
			seen = append(seen, fmt.Sprintf("%d-D (%s)", len(sz), strings.Join(s, " × ")))
			continue
		}
		if best == nil || sz[0]*sz[1] > bw*bh {
			best, bw, bh = item, sz[0], sz[1]
		}
	}
	if best == nil {
		if len(seen) == 0 {
			return nil, errorf("%s: no 2-D image in the file", d.format)
		}
		return nil, errorf("%s: no 2-D image in the file (it holds %s)", d.format, strings.Join(seen, ", "))
	}
	if err := checkSize(d.format, bw, bh); err != nil {
		return nil, err
	}
	id := best.child("ImageData")
	dtTag := id.child("DataType")
	if dtTag == nil {
		return nil, errorf("%s: the image has no DataType tag", d.format)
	}
	dt := int(dtTag.num)
	if dmComplex[dt] {
		return nil, errorf("%s: complex image data (data type %d) is not supported; want a real image", d.format, dt)
	}
	px, ok := dmPixel[dt]
	if !ok {
		return nil, errorf("%s: image data type %d is not one this program reads", d.format, dt)
	}
	data := id.child("Data")
	if data.arrCount*data.arrSize != bw*bh*px.size {
		return nil, errorf("%s: image data of %d bytes does not make a %d × %d image of %s", d.format, data.arrCount*data.arrSize, bw, bh, px.kind)
	}
	m := &Image{Width: int(bw), Height: int(bh), Format: strings.ToLower(d.format), Kind: px.kind}
	if err := readDMPixels(d, data.arrOff, px.size, px.typ, m); err != nil {
		return nil, err
	}
	if px.typ == 0 {
		m.Notices = append(m.Notices, "RGB image: converted to grey as 0.299 R + 0.587 G + 0.114 B (ITU-R BT.601 luma)")
	}
	if err := dmCalibration(d.format, id, m); err != nil {
		return nil, err
	}
	dmMetadata(best.child("ImageTags"), m)
	return m, nil
}

// readDMPixels converts the image data to float32 a block at a time.
func readDMPixels(d *dmReader, off, size int64, typ uint64, m *Image) error {
	n := int64(m.Width) * int64(m.Height)
	m.Pix = make([]float32, n)
	block := min(n, 1<<16)
	buf := make([]byte, block*size)
	for k := int64(0); k < n; k += block {
		c := min(block, n-k)
		b := buf[:c*size]
		if got, err := d.r.ReadAt(b, off+k*size); int64(got) < c*size {
			if err != nil && err != io.EOF {
				return err
			}
			return errTruncated(d.format)
		}
		for i := range c {
			p := b[i*size : (i+1)*size]
			if typ == 0 {
				m.Pix[k+i] = float32(0.299*float64(p[2]) + 0.587*float64(p[1]) + 0.114*float64(p[0]))
				continue
			}
			m.Pix[k+i] = float32(dmNumber(typ, p, d.bo))
		}
	}
	return nil
}

// dmCalibration reads the spatial calibration of the first two
// dimensions: a calibrated coordinate is Scale·(i − Origin) in Units.
// Square pixels are expected; a difference between x and y is a notice.
func dmCalibration(format string, id *dmTag, m *Image) error {
	dims := id.path("Calibrations", "Dimension")
	if dims == nil || len(dims.children) < 2 {
		return nil
	}
	var scale, origin [2]float64
	for k := range 2 {
		c := dims.children[k]
		unit := c.child("Units").textValue()
		s := c.child("Scale")
		if s == nil || unit == "" || strings.EqualFold(unit, "pixel") || strings.EqualFold(unit, "pixels") {
			return nil // not calibrated
		}
		f, err := UnitToNm(unit)
		if err != nil {
			return errorf("%s: spatial calibration of dimension %d: %s", format, k, err.(*fileError).msg)
		}
		if !(s.num > 0) || math.IsInf(s.num, 0) {
			return errorf("%s: spatial calibration of dimension %d: scale %g; want a positive number", format, k, s.num)
		}
		scale[k] = s.num * f
		if o := c.child("Origin"); o != nil {
			origin[k] = -o.num * scale[k]
		}
	}
	m.NmPerPx, m.PixelSizeFrom = scale[0], "DM spatial calibration"
	m.Meta.OriginNm = origin[:]
	if math.Abs(scale[1]-scale[0]) > 1e-6*scale[0] {
		m.Notices = append(m.Notices, fmt.Sprintf("pixels are not square (%.6g × %.6g nm): the x size is used", scale[0], scale[1]))
	}
	return nil
}

// dmMetadata picks what a user wants to see from the image's tags.
func dmMetadata(tags *dmTag, m *Image) {
	mi := tags.child("Microscope Info")
	if v := mi.child("Voltage"); v != nil && v.num > 0 {
		m.Meta.VoltageKV = v.num / 1000
	}
	for _, k := range []string{"Indicated Magnification", "Actual Magnification"} {
		if v := mi.child(k); v != nil && v.num > 0 {
			m.Meta.Magnification = v.num
			break
		}
	}
	if v := mi.child("STEM Camera Length"); v != nil && v.num > 0 {
		m.Meta.CameraLengthMm = v.num
	}
	db := tags.child("DataBar")
	date := strings.TrimSpace(db.child("Acquisition Date").textValue() + " " + db.child("Acquisition Time").textValue())
	m.Meta.Date = date
}
