package sim

import "math"

// Grid is the raster of columns: NX × NY pixels over WidthNm × HeightNm,
// centred on the optical axis. Pixel (i, j) is the column at
// x = (i + 0.5 − NX/2)·WidthNm/NX, y = (j + 0.5 − NY/2)·HeightNm/NY, with x
// along g and y = z × x running down the picture.
type Grid struct {
	NX, NY            int
	WidthNm, HeightNm float64
}

// X returns the x coordinate (nm) of pixel column i.
func (g Grid) X(i int) float64 {
	return (float64(i) + 0.5 - float64(g.NX)/2) * g.WidthNm / float64(g.NX)
}

// Y returns the y coordinate (nm) of pixel row j.
func (g Grid) Y(j int) float64 {
	return (float64(j) + 0.5 - float64(g.NY)/2) * g.HeightNm / float64(g.NY)
}

// Index returns the continuous pixel coordinates of the point (x, y) nm:
// the inverse of X and Y, so that the centre of pixel (i, j) is at
// (fi, fj) = (i, j) and its square spans fi in [i − 0.5, i + 0.5).
//
//	fi = x·NX/WidthNm + NX/2 − 0.5,   fj = y·NY/HeightNm + NY/2 − 0.5
func (g Grid) Index(x, y float64) (fi, fj float64) {
	fi = x*float64(g.NX)/g.WidthNm + float64(g.NX)/2 - 0.5
	fj = y*float64(g.NY)/g.HeightNm + float64(g.NY)/2 - 0.5
	return fi, fj
}

// PixelAt returns the pixel whose square holds the point (x, y) nm, and
// false when the point lies outside the field.
func (g Grid) PixelAt(x, y float64) (i, j int, ok bool) {
	fi, fj := g.Index(x, y)
	fi, fj = math.Floor(fi+0.5), math.Floor(fj+0.5)
	if !(fi >= 0 && fj >= 0 && fi < float64(g.NX) && fj < float64(g.NY)) {
		return 0, 0, false
	}
	return int(fi), int(fj), true
}

// Image holds the exit-surface intensities of every beam of every column,
// as fractions of the incident beam intensity.
type Image struct {
	Grid Grid
	// Beams lists the beam of each plane of Intensity as a multiple n of g:
	// 0 is the transmitted beam, 1 the diffracted beam g.
	Beams []int
	// Intensity[k][j*NX+i] is the intensity of beam Beams[k] at pixel (i, j).
	Intensity [][]float64
}

// Beam returns the intensity plane of beam n·g, or nil if it was not
// computed.
func (im *Image) Beam(n int) []float64 {
	for k, b := range im.Beams {
		if b == n {
			return im.Intensity[k]
		}
	}
	return nil
}

// BF returns the bright-field image: the transmitted beam's intensity.
func (im *Image) BF() []float64 { return im.Beam(0) }

// DF returns the dark-field image: the intensity of the diffracted beam g.
func (im *Image) DF() []float64 { return im.Beam(1) }

// MaxDifference returns the largest difference between the intensities of
// a and b, over every beam plane and pixel: images of the same grid and
// beams (the difference of a replay, a table or a looser tolerance from a
// fresh render).
func MaxDifference(a, b *Image) float64 {
	worst := 0.0
	for k := range a.Intensity {
		bk := b.Intensity[k]
		for n, v := range a.Intensity[k] {
			worst = math.Max(worst, math.Abs(v-bk[n]))
		}
	}
	return worst
}

// At returns the intensity of beam plane k at pixel (i, j).
func (im *Image) At(k, i, j int) float64 { return im.Intensity[k][j*im.Grid.NX+i] }
