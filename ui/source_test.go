package ui

import (
	"image"
	"math"
	"testing"

	"faultline/export"
	"faultline/micrograph"
	"faultline/sim"
)

// The panel shows what micrograph.Placement maps to a specimen point.
func TestRotatedSourceUsesPlacement(t *testing.T) {
	img := image.NewGray(image.Rect(0, 0, 41, 41))
	img.Pix[10*img.Stride+20] = 200 // 10 px above the centre
	s := newRotatedSource(img, micrograph.Placement{NmPerPx: 2, GAngleDeg: 90})
	if v, ok := s.at(20, 0); !ok || v != 200 {
		t.Errorf("at(20, 0) nm = %d (inside %v), want 200", v, ok)
	}
	if _, ok := s.at(100, 0); ok {
		t.Error("a point outside the picture reads as inside")
	}
}

// gridSource puts pixel (i, j) of an nx × ny grid at the column centre
// of sim.Grid (i + 0.5 − nx/2)·width/nx, and intensityAt reads the same
// pixel there.
func TestGridSourceMatchesSimGrid(t *testing.T) {
	g := sim.Grid{NX: 7, NY: 5, WidthNm: 70, HeightNm: 50}
	img := image.NewGray(image.Rect(0, 0, g.NX, g.NY))
	bf := make([]float64, g.NX*g.NY)
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			img.Pix[j*img.Stride+i] = uint8(10*j + i)
			bf[j*g.NX+i] = float64(10*j + i)
		}
	}
	im := &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{bf, make([]float64, len(bf))}}
	s := newGridSource(img, g.WidthNm, g.HeightNm)
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			v, ok := s.at(g.X(i), g.Y(j))
			if !ok || int(v) != 10*j+i {
				t.Errorf("at the centre of pixel (%d, %d): %d, %v", i, j, v, ok)
			}
			b, _, ok := intensityAt(im, g.X(i), g.Y(j))
			if !ok || b != float64(10*j+i) {
				t.Errorf("intensityAt pixel (%d, %d) = %g, %v", i, j, b, ok)
			}
		}
	}
	if _, ok := s.at(35.1, 0); ok {
		t.Error("a point beyond the right edge of the field reads as inside")
	}
}

// Bilinear interpolation reproduces an affine function exactly (a
// property of the interpolant; e.g. Press et al., Numerical Recipes,
// §3.6), so a profile across a ramp is the ramp.
func TestProfileOfRamp(t *testing.T) {
	g := sim.Grid{NX: 40, NY: 30, WidthNm: 80, HeightNm: 60}
	f := func(x, y float64) float64 { return 0.3 + 0.004*x - 0.002*y }
	bf, df := make([]float64, g.NX*g.NY), make([]float64, g.NX*g.NY)
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			bf[j*g.NX+i] = f(g.X(i), g.Y(j))
			df[j*g.NX+i] = 1 - bf[j*g.NX+i]
		}
	}
	im := &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{bf, df}}
	l := profileLine{X0: -30, Y0: -20, X1: 35, Y1: 25, Set: true}
	p := export.SampleLine(im, l.line())
	if len(p.DistNm) < 2*int(l.lengthNm()/2) {
		t.Fatalf("%d samples over %g nm with 2 nm pixels, want about two per pixel", len(p.DistNm), l.lengthNm())
	}
	for k := range p.DistNm {
		want := f(p.XNm[k], p.YNm[k])
		if math.Abs(p.BF[k]-want) > 1e-12 || math.Abs(p.DF[k]-(1-want)) > 1e-12 {
			t.Fatalf("sample %d at (%g, %g): BF %g DF %g, want %g and %g", k, p.XNm[k], p.YNm[k], p.BF[k], p.DF[k], want, 1-want)
		}
		if d := math.Hypot(p.XNm[k]-l.X0, p.YNm[k]-l.Y0); math.Abs(d-p.DistNm[k]) > 1e-9 {
			t.Fatalf("sample %d: distance %g, want %g", k, p.DistNm[k], d)
		}
	}
	// A line leaving the field keeps only the points inside it.
	out := export.SampleLine(im, profileLine{X0: 0, Y0: 0, X1: 100, Y1: 0, Set: true}.line())
	for k := range out.XNm {
		if out.XNm[k] > g.WidthNm/2 {
			t.Fatalf("sample at x = %g nm, outside the %g nm field", out.XNm[k], g.WidthNm)
		}
	}
}

func TestViewportZoomKeepsPointUnderPointer(t *testing.T) {
	v := &viewport{}
	v.setField(300, 300)
	v.setPanel(fyneSize(400, 300))
	if want := 1.04 * 300 / 300.0; math.Abs(v.nmPerDp-want) > 1e-12 {
		t.Fatalf("fit: %g nm per dp, want %g (the field's height over the panel's, with 4 %% margin)", v.nmPerDp, want)
	}
	at := fynePos(310, 70)
	x0, y0 := v.toNm(at)
	v.zoom(2, at)
	x1, y1 := v.toNm(at)
	if math.Abs(x1-x0) > 1e-9 || math.Abs(y1-y0) > 1e-9 {
		t.Errorf("zoom moved the point under the pointer from (%g, %g) to (%g, %g)", x0, y0, x1, y1)
	}
	p := v.toDp(x0, y0)
	if math.Abs(float64(p.X-at.X)) > 1e-3 || math.Abs(float64(p.Y-at.Y)) > 1e-3 {
		t.Errorf("toDp(toNm(p)) = %v, want %v", p, at)
	}
	if v.fitted {
		t.Error("still following the field after a zoom")
	}
}
