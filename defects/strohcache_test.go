package defects

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// A cached solution gives the same field to the bit as a fresh one, and is
// solved once per line direction, whatever the Burgers vector and position.
func TestStrohCache(t *testing.T) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	cache := NewStrohCache()
	cached := cuMedium(c)
	cached.Stroh = cache
	line := r3.Vec{X: 1, Y: -1, Z: 0.5}
	for i, b := range []r3.Vec{{X: 0.18, Y: 0.18}, {X: 0.18, Z: -0.18}, {Y: 0.255}} {
		at := r3.Vec{X: float64(i), Z: 50}
		d1, err := NewDislocation(b, line, at, cached, true)
		if err != nil {
			t.Fatal(err)
		}
		d2, err := NewDislocation(b, line, at, cuMedium(c), true)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range []r3.Vec{{X: 3, Y: -2, Z: 40}, {X: -7, Y: 1, Z: 61}} {
			if d1.R(p) != d2.R(p) {
				t.Errorf("b %v: cached %v, fresh %v", b, d1.R(p), d2.R(p))
			}
		}
	}
	if n := cache.Solves(); n != 1 {
		t.Errorf("%d solves for one line direction, want 1", n)
	}
	if _, err := NewDislocation(r3.Vec{X: 0.18}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{}, cached, true); err != nil {
		t.Fatal(err)
	}
	if n := cache.Solves(); n != 2 {
		t.Errorf("%d solves for two line directions, want 2", n)
	}
}
