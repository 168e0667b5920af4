package sim

import (
	"context"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// phasedLine offers the Phaser fast path over a lineField and counts its
// use: the integrator must take it, and must give the same image as the
// field seen through R alone.
type phasedLine struct {
	*lineField
	calls *int
}

func (f phasedLine) Phase(g r3.Vec) func(p r3.Vec) float64 {
	*f.calls++
	return func(p r3.Vec) float64 { return r3.Dot(g, f.R(p)) }
}

func TestPhaserIsOptional(t *testing.T) {
	line := newLineField(r3.Vec{Z: 40}, r3.Vec{X: 0.3, Y: 1, Z: 0.6}, 0.2, 0.15)
	calls := 0
	p := &Problem{Model: TwoBeam{SPerNm: 0.01, XiGNm: 42, XiGAbsNm: 420, Xi0AbsNm: 420},
		GPerNm: 4.9, Field: phasedLine{line, &calls}, ThicknessNm: 80, Grid: Grid{NX: 12, NY: 12, WidthNm: 60, HeightNm: 60}}
	fast, err := Render(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if calls != 1 {
		t.Fatalf("Phase called %d times in one render, want once", calls)
	}
	q := *p
	q.Field = line // R only
	slow, err := Render(context.Background(), &q, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for k := range fast.Intensity {
		for n := range fast.Intensity[k] {
			if fast.Intensity[k][n] != slow.Intensity[k][n] {
				t.Fatalf("beam %d pixel %d: %g through Phase, %g through R", k, n, fast.Intensity[k][n], slow.Intensity[k][n])
			}
		}
	}
}
