package scene

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// α = 360°·g·R reduced to (−180°, 180°]: a fault vector that is a whole
// lattice vector away gives the same angle.
func TestFaultAngleDeg(t *testing.T) {
	for _, c := range []struct{ cycles, want float64 }{
		{1.0 / 3, 120}, {-1.0 / 3, -120}, {2.0 / 3, -120}, {-2.0 / 3, 120},
		{4.0 / 3, 120}, {0.5, 180}, {-0.5, 180}, {3, 0}, {-1, 0}, {0.25, 90},
	} {
		if got := faultAngleDeg(c.cycles); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("faultAngleDeg(%g) = %g, want %g", c.cycles, got, c.want)
		}
	}
}

// Directions in the picture: x to the right, y down; with the picture
// turned (image.x_axis), g and every direction turn with it.
func TestPictureDirection(t *testing.T) {
	for _, c := range []struct {
		v    r3.Vec
		want string
	}{
		{r3.Vec{X: 1}, "right"}, {r3.Vec{X: -1}, "left"}, {r3.Vec{Y: 1}, "lower"}, {r3.Vec{Y: -1}, "upper"},
		{r3.Vec{X: 1, Y: 1}, "lower right"}, {r3.Vec{X: -1, Y: -1}, "upper left"}, {r3.Vec{X: 1, Y: -0.3}, "right"},
	} {
		if got := (&Setup{}).pictureDirection(c.v); got != c.want {
			t.Errorf("pictureDirection(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}

func TestFmtFrac(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{{1, "+1"}, {-2, "-2"}, {1.0 / 3, "+1/3"}, {-2.0 / 3, "-2/3"}, {0.5, "+1/2"}, {0.123, "+0.12"}} {
		if got := fmtFrac(c.v); got != c.want {
			t.Errorf("fmtFrac(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}

func TestPictureDirectionTurned(t *testing.T) {
	st := &Setup{GAngleDeg: 90}
	if got := st.gWord(); got != "upper" {
		t.Errorf("g at 90°: %q, want upper", got)
	}
	if got := st.pictureDirection(r3.Vec{Y: 1}); got != "right" {
		t.Errorf("+y of the frame of g with g at 90°: %q, want right", got)
	}
	if got := (&Setup{GAngleDeg: -135}).gWord(); got != "lower left" {
		t.Errorf("g at −135°: %q, want lower left", got)
	}
}
