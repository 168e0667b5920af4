package defects

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestBoundedFaultStrip(t *testing.T) {
	// Intrinsic fault vector a/3[111] (Cu, a from memory) on an inclined
	// plane x + z = 50, bounded by lines along y at w = ±10 nm, w along
	// n̂ × ŷ.
	shift := r3.Scale(aCu/3, r3.Vec{X: 1, Y: 1, Z: 1})
	at := r3.Vec{Z: 50}
	n := r3.Unit(r3.Vec{X: 1, Z: 1})
	f, err := NewBoundedFault(at, n, shift, r3.Vec{Y: 1}, -10, 10)
	if err != nil {
		t.Fatal(err)
	}
	w := r3.Cross(n, r3.Vec{Y: 1})
	for _, tc := range []struct {
		x      float64
		inside bool
	}{{0, true}, {5, true}, {-6, true}, {8, false}, {-9, false}, {30, false}} {
		// Crossing point (x, 0, 50 − x); its w coordinate.
		q := r3.Vec{X: tc.x, Z: 50 - tc.x}
		inStrip := math.Abs(r3.Dot(w, r3.Sub(q, at))) < 10
		if inStrip != tc.inside {
			t.Fatalf("test geometry: x=%g", tc.x)
		}
		j := f.Jumps(tc.x, 3, 0, 100, nil)
		if (len(j) == 1) != tc.inside || (tc.inside && math.Abs(j[0]-(50-tc.x)) > 1e-12) {
			t.Fatalf("x=%g: jumps %v", tc.x, j)
		}
		below := f.R(r3.Vec{X: tc.x, Y: 3, Z: 50 - tc.x - 1e-6})
		above := f.R(r3.Vec{X: tc.x, Y: 3, Z: 50 - tc.x + 1e-6})
		want := r3.Vec{}
		if tc.inside {
			want = shift
		}
		if below != (r3.Vec{}) || above != want {
			t.Fatalf("x=%g: R below %v above %v, want 0 and %v", tc.x, below, above, want)
		}
		// R is constant down the column apart from the reported jump.
		if r := f.R(r3.Vec{X: tc.x, Y: 3, Z: 99}); r != want {
			t.Fatalf("x=%g: R at the exit %v, want %v", tc.x, r, want)
		}
	}
	// Infinite limits: the unbounded fault.
	all, _ := NewBoundedFault(at, n, shift, r3.Vec{Y: 1}, math.Inf(-1), math.Inf(1))
	inf, _ := NewFault(at, n, shift)
	for _, x := range []float64{-40, 0, 40} {
		p := r3.Vec{X: x, Y: 1, Z: 70}
		if all.R(p) != inf.R(p) || len(all.Jumps(x, 1, 0, 100, nil)) != len(inf.Jumps(x, 1, 0, 100, nil)) {
			t.Fatalf("x=%g: infinite strip differs from Fault", x)
		}
	}
}

// Edge-on (plane containing the beam): the walls are crossed instead.
func TestBoundedFaultEdgeOn(t *testing.T) {
	shift := r3.Vec{X: 0.1}
	// Plane x = 0, normal +x, bounded by lines along (0, 1, 1) at w = 0 and 20.
	f, err := NewBoundedFault(r3.Vec{Z: 50}, r3.Vec{X: 1}, shift, r3.Vec{Y: 1, Z: 1}, 0, 20)
	if err != nil {
		t.Fatal(err)
	}
	// Walls are planes w = const, w = n̂ × ê ∝ (0, −1, 1); column at x = 2,
	// y = 0 meets w = 0 at z = 50 and w = 20 at z = 50 + 20√2.
	j := f.Jumps(2, 0, 0, 100, nil)
	if len(j) != 2 || math.Abs(j[0]-50) > 1e-9 || math.Abs(j[1]-(50+20*math.Sqrt2)) > 1e-9 {
		t.Fatalf("edge-on jumps %v, want [50 %g]", j, 50+20*math.Sqrt2)
	}
	if r := f.R(r3.Vec{X: 2, Z: 60}); r != shift {
		t.Fatalf("inside the strip R = %v", r)
	}
	if r := f.R(r3.Vec{X: 2, Z: 40}); r != (r3.Vec{}) {
		t.Fatalf("outside the strip R = %v", r)
	}
	if j := f.Jumps(-2, 0, 0, 100, nil); len(j) != 0 {
		t.Fatalf("column on the unshifted side: jumps %v", j)
	}
}

func TestBoundedFaultErrors(t *testing.T) {
	for _, tc := range []struct {
		edge     r3.Vec
		from, to float64
		field    string
	}{
		{r3.Vec{Y: 1}, 5, 5, "bounds_nm"},
		{r3.Vec{Y: 1}, math.NaN(), 5, "bounds_nm"},
		{r3.Vec{Z: 1}, 0, 5, "edge"},
		{r3.Vec{}, 0, 5, "edge"},
	} {
		_, err := NewBoundedFault(r3.Vec{}, r3.Vec{Z: 1}, r3.Vec{X: 0.1}, tc.edge, tc.from, tc.to)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field || !errors.Is(err, ErrInvalid) {
			t.Errorf("edge %v [%g,%g]: %v, want an error on %s", tc.edge, tc.from, tc.to, err, tc.field)
		}
	}
}
