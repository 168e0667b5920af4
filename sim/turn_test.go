package sim

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// screwField is a screw dislocation along y at depth zc, x-offset xc, with
// b along y: the displacement is along the line, so g·R = 0 for g ∥ x —
// give it an x-component instead so that it shows: R_x = b/2π · atan2.
type tiltedField struct{ xc, zc, b float64 }

func (f tiltedField) R(p r3.Vec) r3.Vec {
	return r3.Vec{X: f.b / (2 * math.Pi) * math.Atan2(p.Z-f.zc, p.X-f.xc+0.3*p.Y)}
}

// Turning the raster by 90° is a transposition of the picture: pixel (i, j)
// of the turned render is pixel (j, N−1−i) of the original (for a square
// grid), to rounding.
func TestTurnQuarterIsTransposition(t *testing.T) {
	const n = 16
	p := &Problem{
		Model:       TwoBeam{SPerNm: 0.01, XiGNm: 40, XiGAbsNm: 400, Xi0AbsNm: 400},
		GPerNm:      5,
		Field:       tiltedField{xc: 2, zc: 30, b: 0.25},
		ThicknessNm: 60,
		Normal:      r3.Unit(r3.Vec{X: 0.1, Y: 0.05, Z: 1}),
		Grid:        Grid{NX: n, NY: n, WidthNm: 32, HeightNm: 32},
	}
	a, err := Render(context.Background(), p, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Render(context.Background(), Turn(p, math.Pi/2, p.Grid), Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	// Content turned 90° counter-clockwise as displayed (y down): the
	// pixel right of the centre moves above it. Turned (i, j) shows the
	// original at x = −Y, y = X, i.e. original pixel (n−1−j, i).
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			want := a.BF()[i*n+(n-1-j)]
			got := b.BF()[j*n+i]
			if math.Abs(got-want) > 1e-9 {
				t.Fatalf("pixel (%d, %d): %v, original (%d, %d) %v", i, j, got, n-1-j, i, want)
			}
		}
	}
}

// phasedField offers the Phaser fast path and counts its use.
type phasedField struct {
	tiltedField
	calls *int
}

func (f phasedField) Phase(g r3.Vec) func(p r3.Vec) float64 {
	*f.calls++
	return func(p r3.Vec) float64 { return g.X * f.R(p).X }
}

// A turned field keeps its inner field's fast path for g·R.
func TestTurnKeepsPhaser(t *testing.T) {
	n := 0
	p := &Problem{
		Model:       TwoBeam{SPerNm: 0.01, XiGNm: 40, XiGAbsNm: 400, Xi0AbsNm: 400},
		GPerNm:      5,
		Field:       phasedField{tiltedField{xc: 2, zc: 30, b: 0.25}, &n},
		ThicknessNm: 60,
		Grid:        Grid{NX: 8, NY: 8, WidthNm: 16, HeightNm: 16},
	}
	q := Turn(p, 0.3, p.Grid)
	if _, ok := q.Field.(Phaser); !ok {
		t.Fatal("the turned field lost the Phaser fast path")
	}
	if _, err := Render(context.Background(), q, Options{Workers: 1}); err != nil {
		t.Fatal(err)
	}
	if n == 0 {
		t.Error("the render did not use the fast path through the turn")
	}
}
