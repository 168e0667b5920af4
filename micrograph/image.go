package micrograph

import (
	"errors"
	"fmt"
)

// MaxSide is the longest side, in pixels, of an image this package reads:
// 16384 (a 16384² image of float32 is 1 GiB). Larger images are refused
// before anything is allocated for them.
const MaxSide = 16384

// ErrInvalid is matched (errors.Is) by every error about a file's content:
// a truncated file, a format or variant this package does not read, a
// header out of range, a unit it cannot convert.
var ErrInvalid = errors.New("invalid micrograph")

// fileError is an error about the content of a file.
type fileError struct{ msg string }

func (e *fileError) Error() string        { return e.msg }
func (e *fileError) Is(target error) bool { return target == ErrInvalid }

// errorf returns an error matching ErrInvalid.
func errorf(format string, args ...any) error {
	return &fileError{fmt.Sprintf(format, args...)}
}

// errTruncated is the error for a file that ends before its header says.
func errTruncated(format string) error {
	return errorf("%s: the file is truncated (it ends before the data its header describes)", format)
}

// Image is a micrograph as read: grey values, their size on the specimen
// where the file records it, and what else the file says about how it was
// taken.
type Image struct {
	Width, Height int
	// Pix holds the grey values row by row from the top: Pix[j*Width+i]
	// is pixel (i, j). Integer PNG and TIFF samples are fractions of their
	// full scale (0..1); DM, MRC and float TIFF values are the numbers the
	// file stores (counts, electrons, ...).
	Pix []float32
	// NmPerPx is the pixel size recorded in the file, 0 when it records
	// none. PixelSizeFrom says where it was found.
	NmPerPx       float64
	PixelSizeFrom string
	// Format is the file format: png, jpeg, tiff, dm3, dm4 or mrc. Kind
	// describes the samples ("16-bit unsigned", "32-bit float", ...).
	Format, Kind string
	Meta         Metadata
	// Notices say what was done to the data on the way in (colour taken
	// as luminance, a stack's other images left out, ...).
	Notices []string
}

// Metadata is what a file records about the acquisition. Zero values mean
// "not recorded".
type Metadata struct {
	VoltageKV      float64 `json:"voltage_kv,omitempty"`
	Magnification  float64 `json:"magnification,omitempty"`
	CameraLengthMm float64 `json:"camera_length_mm,omitempty"`
	Date           string  `json:"date,omitempty"`
	// StackIndex is the image of a stack that was read, counted from 0;
	// StackSize is the number of images in the stack (0 or 1: no stack).
	StackIndex int `json:"stack_index"`
	StackSize  int `json:"stack_size,omitempty"`
	// OriginNm is the calibrated position of pixel (0, 0), where the file
	// records one.
	OriginNm []float64 `json:"origin_nm,omitempty"`
	// Description is free text the file carries (a TIFF ImageDescription
	// or the first MRC label).
	Description string `json:"description,omitempty"`
}

// checkSize refuses sizes that are not positive or exceed MaxSide; format
// names the file format in the message.
func checkSize(format string, w, h int64) error {
	if w <= 0 || h <= 0 {
		return errorf("%s: image size %d × %d: both sides must be positive", format, w, h)
	}
	if w > MaxSide || h > MaxSide {
		return errorf("%s: image size %d × %d is over the limit of %d pixels a side", format, w, h, MaxSide)
	}
	return nil
}

// At returns pixel (i, j).
func (m *Image) At(i, j int) float32 { return m.Pix[j*m.Width+i] }
