package defects

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestFaultShiftAndJump(t *testing.T) {
	// Intrinsic fault vector 1/3[111] of copper, a = 0.3615 nm (from
	// memory), on a plane inclined to the beam.
	shift := r3.Scale(0.3615/3, r3.Vec{X: 1, Y: 1, Z: 1})
	n := r3.Vec{X: 1, Y: 0, Z: 1} // plane z − 50 = −x: crosses the column at z = 50 − x
	f, err := NewFault(r3.Vec{Z: 50}, n, shift)
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range []float64{-30, -5, 0, 12} {
		j := f.Jumps(x, 7, 0, 100, nil)
		if len(j) != 1 || math.Abs(j[0]-(50-x)) > 1e-12 {
			t.Fatalf("x=%g: jumps %v, want [%g] (plane x + z = 50)", x, j, 50-x)
		}
		below := f.R(r3.Vec{X: x, Y: 7, Z: j[0] - 1e-9})
		above := f.R(r3.Vec{X: x, Y: 7, Z: j[0] + 1e-9})
		if below != (r3.Vec{}) || above != shift {
			t.Fatalf("x=%g: R below %v above %v, want 0 then the shift (normal points to +z)", x, below, above)
		}
	}
	// Outside (z0, z1): no report.
	if j := f.Jumps(60, 0, 0, 100, nil); len(j) != 0 {
		t.Fatalf("crossing at z = −10 reported: %v", j)
	}
	// A plane containing the beam is never crossed.
	v, _ := NewFault(r3.Vec{}, r3.Vec{X: 1, Y: 1}, shift)
	if j := v.Jumps(3, 4, 0, 100, nil); len(j) != 0 {
		t.Fatalf("vertical fault reported jumps %v", j)
	}
}

func TestFaultErrors(t *testing.T) {
	if _, err := NewFault(r3.Vec{}, r3.Vec{}, r3.Vec{X: 1}); !errors.Is(err, ErrInvalid) {
		t.Errorf("zero normal: %v", err)
	}
	if _, err := NewFault(r3.Vec{}, r3.Vec{Z: 1}, r3.Vec{X: math.NaN()}); !errors.Is(err, ErrInvalid) {
		t.Errorf("NaN shift: %v", err)
	}
}
