package figure

import (
	"fmt"
	"image"
	"math"
	"slices"
)

// Mapping modes.
const (
	ModeFixed = "fixed"
	ModeAuto  = "auto"
)

// ContrastFloor is the smallest intensity range, as a fraction of the
// incident beam, that a figure stretches or a plot spreads over its axis.
// A narrower range is taken as no contrast at all: the variations a
// column integration leaves in a field that should be uniform are rounding
// noise (order 1e-16), far below it, and a real contrast a microscope can
// record (a few per cent of the beam) lies far above it.
const ContrastFloor = 1e-3

// Mapping turns intensities (fractions of the incident beam intensity) into
// 8-bit grey levels. The zero value is the fixed mapping 0..1 -> 0..255.
//
//   - Mode "fixed" (or ""): intensity I maps to 255·I/Max, so 0 is black and
//     Max (1, the incident beam, when Max is zero) is white. Values outside
//     0..Max clamp to black or white. The same intensity always gives the
//     same grey, so images made under one mapping can be compared by eye.
//   - Mode "auto": the range lo..hi of the image is stretched over 0..255.
//     With ClipPercent = 0, lo and hi are the smallest and largest finite
//     values; with ClipPercent = p > 0 they are the p-th and (100−p)-th
//     percentiles (linear interpolation between ranks), so a few extreme
//     pixels (a dislocation core) do not flatten the rest. A stretch never
//     invents contrast: an image whose whole range (minimum to maximum)
//     is below ContrastFloor is drawn flat, at the grey the fixed mapping
//     gives its middle value, and a clipped range narrower than
//     ContrastFloor is widened to it about its middle (see Stretch).
//
// The grey level is floor(255·clamp(q, 0, 1) + 0.5) for the fraction q
// above; Invert then replaces it by 255 minus itself. NaN gives 0 (before
// Invert); +Inf and −Inf clamp to the ends. Max is ignored in auto mode and
// ClipPercent in fixed mode.
type Mapping struct {
	// Mode is "fixed" (also the empty string) or "auto".
	Mode string
	// Max is the intensity shown as white in fixed mode; 0 means 1.
	Max float64
	// ClipPercent is the percentage of pixels clipped at each end in auto
	// mode, in [0, 50).
	ClipPercent float64
	// Invert swaps black and white.
	Invert bool
}

// Validate reports whether the mapping can be used, naming the field that
// is wrong.
func (m Mapping) Validate() error {
	switch m.Mode {
	case "", ModeFixed:
		if math.IsNaN(m.Max) || math.IsInf(m.Max, 0) || m.Max < 0 {
			return fmt.Errorf("figure: Mapping.Max: want a positive intensity (fraction of the incident beam) or 0 for 1, got %v", m.Max)
		}
	case ModeAuto:
		if !(m.ClipPercent >= 0 && m.ClipPercent < 50) {
			return fmt.Errorf("figure: Mapping.ClipPercent: want a percentage in [0, 50), got %v", m.ClipPercent)
		}
	default:
		return fmt.Errorf("figure: Mapping.Mode: unknown mode %q (want %q or %q)", m.Mode, ModeFixed, ModeAuto)
	}
	return nil
}

// Stretch is what a mapping does to one image: the intensities Lo and Hi
// sent to black and white (before Invert), and whether the image was
// found to hold no contrast and drawn flat.
type Stretch struct {
	Lo, Hi float64
	// Auto: the range is the image's own (auto mode), not fixed.
	Auto bool
	// Flat: auto mode found the image's whole range below ContrastFloor;
	// every pixel is drawn at the fixed grey of Level.
	Flat bool
	// Level is the intensity a flat image is drawn at: the middle of its
	// range.
	Level float64
	// Span is the image's whole range, maximum − minimum of the finite
	// values (auto mode only).
	Span float64
}

// Stretch returns how m maps data. In fixed mode the range is 0..Max. In
// auto mode it is the clipped range of data, with two guards so that a
// picture never shows contrast that is not in the numbers: when the whole
// range (minimum to maximum) is below ContrastFloor the image is flat;
// otherwise a clipped range narrower than ContrastFloor is widened to it
// about its middle, so no stretch magnifies more than 1/ContrastFloor.
func (m Mapping) Stretch(data []float64) Stretch {
	if m.Mode != ModeAuto {
		if m.Max == 0 {
			return Stretch{Lo: 0, Hi: 1}
		}
		return Stretch{Lo: 0, Hi: m.Max}
	}
	minV, maxV := autoRange(data, 0)
	s := Stretch{Auto: true, Span: maxV - minV}
	if !(s.Span >= ContrastFloor) {
		s.Flat = true
		s.Level = minV + (maxV-minV)/2
		s.Lo, s.Hi = minV, maxV
		return s
	}
	s.Lo, s.Hi = minV, maxV
	if m.ClipPercent > 0 {
		s.Lo, s.Hi = autoRange(data, m.ClipPercent)
	}
	if s.Hi-s.Lo < ContrastFloor {
		mid := s.Lo + (s.Hi-s.Lo)/2
		s.Lo, s.Hi = mid-ContrastFloor/2, mid+ContrastFloor/2
	}
	return s
}

// Range returns the intensities lo and hi that the mapping sends to black
// and white (before Invert) for this data (see Stretch). For an image
// drawn flat lo equals hi, the intensity it is drawn at.
func (m Mapping) Range(data []float64) (lo, hi float64) {
	s := m.Stretch(data)
	if s.Flat {
		return s.Level, s.Level
	}
	return s.Lo, s.Hi
}

// Gray maps an nx × ny intensity image, stored row by row (data[j*nx+i] is
// pixel (i, j)), to an 8-bit grey image by m. It panics if nx or ny is not
// positive, if len(data) != nx·ny, or if m does not pass Validate: check
// user input with Validate first.
func Gray(data []float64, nx, ny int, m Mapping) *image.Gray {
	if nx <= 0 || ny <= 0 || len(data) != nx*ny {
		panic(fmt.Sprintf("figure: Gray: %d values for a %d×%d image", len(data), nx, ny))
	}
	if err := m.Validate(); err != nil {
		panic(err)
	}
	st := m.Stretch(data)
	lo, hi := st.Lo, st.Hi
	img := image.NewGray(image.Rect(0, 0, nx, ny))
	flat := level(st.Level, 0, 1)
	for j := 0; j < ny; j++ {
		row := img.Pix[j*img.Stride : j*img.Stride+nx]
		for i := range row {
			g := level(data[j*nx+i], lo, hi)
			if st.Flat {
				g = flat
				if math.IsNaN(data[j*nx+i]) {
					g = 0
				}
			}
			if m.Invert {
				g = 255 - g
			}
			row[i] = g
		}
	}
	return img
}

// level is the grey level of v when lo maps to 0 and hi to 255; hi == lo
// gives mid grey.
func level(v, lo, hi float64) uint8 {
	if math.IsNaN(v) {
		return 0
	}
	if !(hi > lo) {
		return 128
	}
	q := (v - lo) / (hi - lo)
	switch {
	case q <= 0:
		return 0
	case q >= 1:
		return 255
	}
	return uint8(math.Floor(255*q + 0.5))
}

// autoRange returns the p-th and (100−p)-th percentiles of the finite
// values of data (the minimum and maximum for p = 0), with linear
// interpolation between ranks. Data without a finite value gives 0, 0.
func autoRange(data []float64, p float64) (lo, hi float64) {
	if p == 0 {
		first := true
		for _, v := range data {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				continue
			}
			if first {
				lo, hi, first = v, v, false
				continue
			}
			lo = math.Min(lo, v)
			hi = math.Max(hi, v)
		}
		return lo, hi
	}
	finite := make([]float64, 0, len(data))
	for _, v := range data {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			finite = append(finite, v)
		}
	}
	if len(finite) == 0 {
		return 0, 0
	}
	slices.Sort(finite)
	return percentile(finite, p), percentile(finite, 100-p)
}

// percentile returns the p-th percentile of sorted, non-empty x:
// h = (n−1)·p/100, x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]) (Hyndman & Fan
// 1996, definition 7).
func percentile(x []float64, p float64) float64 {
	h := float64(len(x)-1) * p / 100
	k := int(math.Floor(h))
	if k >= len(x)-1 {
		return x[len(x)-1]
	}
	return x[k] + (h-float64(k))*(x[k+1]-x[k])
}
