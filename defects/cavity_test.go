package defects

import (
	"errors"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestCavityVoids(t *testing.T) {
	c, err := NewCavity(r3.Vec{X: 2, Y: -1, Z: 30}, 5)
	if err != nil {
		t.Fatal(err)
	}
	// Chord of a sphere at distance ρ from its centre: 2√(r² − ρ²).
	for _, tc := range []struct {
		x, y   float64
		z0, z1 float64
		want   [][2]float64
	}{
		{2, -1, 0, 100, [][2]float64{{25, 35}}},
		{5, 3, 0, 100, nil},                      // ρ = 5: tangent, no chord
		{5, -1, 0, 100, [][2]float64{{26, 34}}},  // ρ = 3: half-chord 4
		{5, -1, 28, 100, [][2]float64{{28, 34}}}, // clipped
		{20, 0, 0, 100, nil},
	} {
		got := c.Voids(tc.x, tc.y, tc.z0, tc.z1, nil)
		if !slices.EqualFunc(got, tc.want, func(a, b [2]float64) bool {
			return math.Abs(a[0]-b[0]) < 1e-12 && math.Abs(a[1]-b[1]) < 1e-12
		}) {
			t.Errorf("column (%g,%g) in [%g,%g]: voids %v, want %v", tc.x, tc.y, tc.z0, tc.z1, got, tc.want)
		}
	}
	if c.R(r3.Vec{X: 2, Y: -1, Z: 30}) != (r3.Vec{}) {
		t.Errorf("cavity has a displacement")
	}
	if _, err := NewCavity(r3.Vec{}, 0); !errors.Is(err, ErrInvalid) {
		t.Errorf("zero radius accepted")
	}
}

func TestLoopErrors(t *testing.T) {
	for _, tc := range []struct {
		n, b  r3.Vec
		r     float64
		field string
	}{
		{r3.Vec{Z: 1}, r3.Vec{Z: 0.25}, 0, "radius_nm"},
		{r3.Vec{Z: 1}, r3.Vec{Z: 0.25}, -3, "radius_nm"},
		{r3.Vec{}, r3.Vec{Z: 0.25}, 3, "normal"},
		{r3.Vec{Z: 1}, r3.Vec{}, 3, "b"},
	} {
		_, err := NewLoop(r3.Vec{}, tc.n, tc.b, tc.r, cuIso)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("n=%v b=%v r=%g: error %v, want one on %s", tc.n, tc.b, tc.r, err, tc.field)
		}
	}
}
