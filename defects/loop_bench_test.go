package defects

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// Benchmarks of the loop field: per call at points near the line (within
// one radius of it), at middle distances (2 to 4 radii from the centre),
// far away (8 to 20 radii), and averaged over the points a column
// integrator samples in a typical image.

// benchLoop is a 10 nm loop on an inclined plane in the middle of a
// 100 nm foil, b = a/2[1 1 0] of copper in the image frame.
func benchLoop() *Loop {
	l, err := NewLoop(r3.Vec{X: 20, Y: -10, Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Scale(bCu, r3.Unit(r3.Vec{X: 1, Y: 1})), 10, cuIso)
	if err != nil {
		panic(err)
	}
	return l
}

// shellPoints returns n points at distances in [d0, d1) from the loop's
// centre (in radii), or, with line set, at distances in [d0, d1) radii
// from its line.
func shellPoints(l *Loop, n int, d0, d1 float64, line bool) []r3.Vec {
	rng := rand.New(rand.NewPCG(5, 6))
	pts := make([]r3.Vec, 0, n)
	for len(pts) < n {
		u := randUnit(rng)
		d := l.radius * (d0 + (d1-d0)*rng.Float64())
		if !line {
			pts = append(pts, r3.Add(l.c, r3.Scale(d, u)))
			continue
		}
		phi := 2 * math.Pi * rng.Float64()
		e := r3.Add(r3.Scale(math.Cos(phi), l.a1), r3.Scale(math.Sin(phi), l.a2))
		at := r3.Add(l.c, r3.Scale(l.radius, e))
		psi := 2 * math.Pi * rng.Float64()
		pts = append(pts, r3.Add(at, r3.Add(r3.Scale(d*math.Cos(psi), e), r3.Scale(d*math.Sin(psi), l.n))))
	}
	return pts
}

func benchPoints(b *testing.B, f Field, pts []r3.Vec) {
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		sink = f.R(pts[i%len(pts)])
	}
}

// benchPhasePoints is benchPoints through the fast path (Loop.Phase),
// g = 200 of copper along x.
func benchPhasePoints(b *testing.B, f Field, pts []r3.Vec) {
	ph := PhaseOf(f, r3.Vec{X: 2 / 0.3615})
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		sinkF = ph(pts[i%len(pts)])
	}
}

// imageSamples returns the depths at which an adaptive column integrator
// samples g·R for every column of an nx × ny image of w × w nm over a foil
// of thickness t: each slab of a column is bisected until g·R at its
// quarter points lies within tol cycles of its chord (slabs start at t/4,
// end at 1e-3 nm, and are split where the column crosses the disc). This
// mimics the step control of a column integrator without being one.
func imageSamples(f Field, jumps func(x, y, z0, z1 float64) []float64, g float64, w, t float64, nx int, tol float64) []r3.Vec {
	var pts []r3.Vec
	gam := func(x, y, z float64) float64 {
		p := r3.Vec{X: x, Y: y, Z: z}
		pts = append(pts, p)
		return g * f.R(p).X
	}
	var slab func(x, y, a, b, ga, gb float64)
	slab = func(x, y, a, b, ga, gb float64) {
		q1 := gam(x, y, a+(b-a)/4)
		q3 := gam(x, y, a+3*(b-a)/4)
		if b-a <= 1e-3 || math.Max(math.Abs(q1-(0.75*ga+0.25*gb)), math.Abs(q3-(0.25*ga+0.75*gb))) <= tol {
			return
		}
		m := (a + b) / 2
		gm := gam(x, y, m)
		slab(x, y, a, m, ga, gm)
		slab(x, y, m, b, gm, gb)
	}
	for i := range nx {
		for j := range nx {
			x := (float64(i) + 0.5 - float64(nx)/2) * w / float64(nx)
			y := (float64(j) + 0.5 - float64(nx)/2) * w / float64(nx)
			br := append([]float64{0, t}, jumps(x, y, 0, t)...)
			sort.Float64s(br)
			for k := 0; k+1 < len(br); k++ {
				for s := range 4 {
					a := br[k] + float64(s)*(br[k+1]-br[k])/4 + 1e-9
					b := br[k] + float64(s+1)*(br[k+1]-br[k])/4 - 1e-9
					slab(x, y, a, b, gam(x, y, a), gam(x, y, b))
				}
			}
		}
	}
	return pts
}

// loopShells are the shells about the loop's line of the point benchmarks
// (shellPoints): within a radius of its line, a few radii off, far away.
var loopShells = []struct {
	name     string
	r0, r1   float64
	nearLine bool
}{{"Near", 0.05, 1, true}, {"Mid", 2, 4, false}, {"Far", 8, 20, false}}

// BenchmarkLoop and BenchmarkPhaseLoop: one evaluation of the loop's R
// (benchPoints) and of its g·R by the fast path (benchPhasePoints) at
// points of each shell.
func BenchmarkLoop(b *testing.B)      { benchShells(b, benchPoints) }
func BenchmarkPhaseLoop(b *testing.B) { benchShells(b, benchPhasePoints) }

// benchShells runs bench on the loop at the points of each of loopShells.
func benchShells(b *testing.B, bench func(*testing.B, Field, []r3.Vec)) {
	for _, sh := range loopShells {
		b.Run(sh.name, func(b *testing.B) {
			l := benchLoop()
			bench(b, l, shellPoints(l, 4096, sh.r0, sh.r1, sh.nearLine))
		})
	}
}

// BenchmarkLoopImage averages over the samples of a 64 × 64 image,
// 200 nm × 200 nm, of a 100 nm foil holding only the loop, g = 200 of
// copper (|g| = 2/a, a = 0.3615 nm).
func BenchmarkLoopImage(b *testing.B) {
	l := benchLoop()
	pts := imageSamples(l, func(x, y, z0, z1 float64) []float64 { return l.Jumps(x, y, z0, z1, nil) }, 2/0.3615, 200, 100, 64, 1e-4)
	benchPoints(b, l, pts)
	b.ReportMetric(float64(len(pts)), "samples")
}

// BenchmarkLoopImageGrid averages over every nanometre of depth of every
// column of the same image: the samples a scene with other defects (whose
// fields set the steps) makes the loop answer too.
func BenchmarkLoopImageGrid(b *testing.B)      { benchPoints(b, benchLoop(), imageGrid()) }
func BenchmarkPhaseLoopImageGrid(b *testing.B) { benchPhasePoints(b, benchLoop(), imageGrid()) }

// imageGrid is the centre of every nanometre of depth of every column of
// a 64 × 64 image over 200 nm × 200 nm of a 100 nm foil.
func imageGrid() []r3.Vec {
	var pts []r3.Vec
	for i := range 64 {
		for j := range 64 {
			for k := range 100 {
				pts = append(pts, r3.Vec{X: (float64(i) - 31.5) * 200 / 64, Y: (float64(j) - 31.5) * 200 / 64, Z: float64(k) + 0.5})
			}
		}
	}
	return pts
}
