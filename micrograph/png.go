package micrograph

import (
	"bytes"
	"image"
	"image/color"
	_ "image/jpeg" // micrographs saved as JPEG open too
	_ "image/png"
)

// decodeStd reads a PNG or JPEG (no calibration: the pixel size must be
// given) and any TIFF of integer samples, through the standard decoders.
// Integer samples become fractions of their full scale; colour is taken as
// its luminance, with a notice.
func decodeStd(b []byte) (*Image, error) {
	cfg, format, err := image.DecodeConfig(bytes.NewReader(b))
	if err != nil {
		return nil, errorf("not a PNG or JPEG this program reads: %v", err)
	}
	if err := checkSize(format, int64(cfg.Width), int64(cfg.Height)); err != nil {
		return nil, err
	}
	img, _, err := image.Decode(bytes.NewReader(b))
	if err != nil {
		return nil, errorf("%s: %v", format, err)
	}
	return fromImage(img, format)
}

// fromImage converts a decoded image to grey values.
func fromImage(img image.Image, format string) (*Image, error) {
	b := img.Bounds()
	if err := checkSize(format, int64(b.Dx()), int64(b.Dy())); err != nil {
		return nil, err
	}
	m := &Image{Width: b.Dx(), Height: b.Dy(), Format: format}
	m.Pix = make([]float32, m.Width*m.Height)
	switch im := img.(type) {
	case *image.Gray:
		m.Kind = "8-bit grey"
		for j := range m.Height {
			for i := range m.Width {
				m.Pix[j*m.Width+i] = float32(im.GrayAt(b.Min.X+i, b.Min.Y+j).Y) / 255
			}
		}
	case *image.Gray16:
		m.Kind = "16-bit grey"
		for j := range m.Height {
			for i := range m.Width {
				m.Pix[j*m.Width+i] = float32(im.Gray16At(b.Min.X+i, b.Min.Y+j).Y) / 65535
			}
		}
	default:
		m.Kind = "colour"
		m.Notices = append(m.Notices, "colour image: its luminance is used")
		for j := range m.Height {
			for i := range m.Width {
				g := color.Gray16Model.Convert(img.At(b.Min.X+i, b.Min.Y+j)).(color.Gray16)
				m.Pix[j*m.Width+i] = float32(g.Y) / 65535
			}
		}
	}
	return m, nil
}
