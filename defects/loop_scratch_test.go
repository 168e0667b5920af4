package defects

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestScratchFar(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, f := range []float64{2, 3, 4, 5, 6, 8, 10, 15, 20} {
		worst, wd := 0.0, 0.0
		for range 3000 {
			n, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
			l, _ := NewLoop(r3.Vec{}, n, b, 10, cuIso)
			q := r3.Scale(10*f, randUnit(rng))
			e := r3.Norm(r3.Sub(l.near(q), l.far(q))) / bCu
			dip := r3.Norm(r3.Sub(l.near(q), l.dipole(q, math.Pi*100))) / bCu
			wd = math.Max(wd, dip)
			worst = math.Max(worst, e)
		}
		t.Logf("|q|=%gr: far err %.3g |b|  (r/q)^6=%.3g dip %.3g", f, worst, math.Pow(f, -6), wd)
	}
}

func BenchmarkScratchNear(b *testing.B) {
	l, _ := NewLoop(r3.Vec{Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.18, Y: 0.18}, 10, cuIso)
	q := r3.Vec{X: 3, Y: 5, Z: 2}
	for i := 0; b.Loop(); i++ {
		q.Z = float64(i%100) * 0.1
		sink = l.near(q)
	}
}
func BenchmarkScratchFar(b *testing.B) {
	l, _ := NewLoop(r3.Vec{Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.18, Y: 0.18}, 10, cuIso)
	q := r3.Vec{X: 30, Y: 50, Z: 2}
	for i := 0; b.Loop(); i++ {
		q.Z = float64(i%100) * 0.1
		sink = l.far(q)
	}
}
