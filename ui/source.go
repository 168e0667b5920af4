package ui

import (
	"image"
	"math"

	xdraw "golang.org/x/image/draw"

	"faultline/micrograph"
	"faultline/sim"
)

// A source is what an image panel shows: a grey level at every specimen
// position (nm in the image frame), or nothing.
type source interface {
	at(xNm, yNm float64) (v uint8, ok bool)
}

// gridSource is a grey image covering a field centred on the origin, one
// image pixel per simulated column (sim.Grid's pixel centres), each shown
// as a square of one grey.
type gridSource struct {
	img  *image.Gray
	grid sim.Grid
}

func newGridSource(img *image.Gray, wNm, hNm float64) *gridSource {
	b := img.Bounds()
	return &gridSource{img: img, grid: sim.Grid{NX: b.Dx(), NY: b.Dy(), WidthNm: wNm, HeightNm: hNm}}
}

func (s *gridSource) at(x, y float64) (uint8, bool) {
	i, j, ok := s.grid.PixelAt(x, y)
	if !ok {
		return 0, false
	}
	return s.img.Pix[j*s.img.Stride+i], true
}

// smoothed returns img enlarged by bilinear interpolation to at least
// about minPx on its longer side, for showing a coarse preview without
// blocks (it covers the same field, so it is shown the same way).
func smoothed(img *image.Gray, minPx int) *image.Gray {
	b := img.Bounds()
	k := (minPx + max(b.Dx(), b.Dy()) - 1) / max(b.Dx(), b.Dy())
	if k <= 1 {
		return img
	}
	out := image.NewGray(image.Rect(0, 0, k*b.Dx(), k*b.Dy()))
	xdraw.BiLinear.Scale(out, out.Bounds(), img, b, xdraw.Src, nil)
	return out
}

// rotatedSource shows a grey picture (a micrograph) placed on the
// specimen as micrograph.Placement says.
type rotatedSource struct {
	img *image.Gray
	p   micrograph.Placement
}

func newRotatedSource(img *image.Gray, p micrograph.Placement) *rotatedSource {
	return &rotatedSource{img: img, p: p}
}

func (s *rotatedSource) at(x, y float64) (uint8, bool) {
	b := s.img.Bounds()
	i, j, ok := s.p.PixelIndex(x, y, b.Dx(), b.Dy())
	if !ok {
		return 0, false
	}
	return s.img.Pix[j*s.img.Stride+i], true
}

// blendSource mixes two sources: (1−w)·a + w·b where both cover the point,
// whichever does elsewhere.
type blendSource struct {
	a, b source
	w    float64
}

func (s *blendSource) at(x, y float64) (uint8, bool) {
	va, oka := s.a.at(x, y)
	vb, okb := s.b.at(x, y)
	switch {
	case oka && okb:
		return uint8(math.Round((1-s.w)*float64(va) + s.w*float64(vb))), true
	case oka:
		return va, true
	case okb:
		return vb, true
	}
	return 0, false
}
