package defects

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// phaseCheckPoints returns points around a straight line (at, frame ex,
// ey, u): random ones up to 300 nm away, rings from the line itself out
// through the core radius, and pairs 1e-9 nm either side of the cut
// (y' = 0, x' < 0).
func phaseCheckPoints(rng *rand.Rand, at, ex, ey, u r3.Vec) []r3.Vec {
	pt := func(x, y, s float64) r3.Vec {
		return r3.Add(at, r3.Add(r3.Scale(x, ex), r3.Add(r3.Scale(y, ey), r3.Scale(s, u))))
	}
	var ps []r3.Vec
	for range 2000 {
		ps = append(ps, r3.Add(at, r3.Scale(300*rng.Float64(), randUnit(rng))))
	}
	for _, r := range []float64{0, 1e-5, 5e-4, 1e-3, 2e-3, 0.05, 1, 17, 250} {
		for k := range 97 {
			th := -math.Pi + 2*math.Pi*float64(k)/96
			ps = append(ps, pt(r*math.Cos(th), r*math.Sin(th), rng.Float64()*40-20))
		}
	}
	for _, x := range []float64{-1e-3, -0.3, -4, -60} {
		for _, y := range []float64{1e-9, -1e-9, 1e-6, -1e-6} {
			ps = append(ps, pt(x, y, 3))
		}
	}
	return ps
}

// The tabulated g·R of a straight dislocation (the angular table of
// lineTable) agrees with g·R from the direct formula, R(p), to 1e-7 cycles
// everywhere: far, at the core, and on both sides of the cut. Isotropic
// (Hirth & Lothe), anisotropic (Stroh) in copper, in magnesium and in a
// strongly anisotropic cubic medium, and the degenerate-sextic rule.
func TestLinePhaseMatchesDirect(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	media := []struct {
		name  string
		m     Medium
		aniso bool
	}{
		{"isotropic", cuIso, false},
		{"Cu Stroh", cuMedium(cubicVoigt(cuC11, cuC12, cuC44)), true},
		{"Mg Stroh", cuMedium(mgVoigt()), true},
		// Zener ratio 2·80/(100 − 90) = 16 (invented, to stress the table).
		{"A=16 Stroh", cuMedium(cubicVoigt(100, 90, 80)), true},
		{"degenerate rule", cuMedium(isoVoigt(48, 0.34)), true},
	}
	for _, md := range media {
		worst := 0.0
		for range 6 {
			var c [6][6]float64
			m := md.m
			if md.aniso {
				c = RotateStiffness(*md.m.C, randomRotation(rng))
				m.C = &c
			}
			u, b := randUnit(rng), r3.Scale(bCu*(0.5+rng.Float64()), randUnit(rng))
			at := r3.Vec{X: 30 * rng.Float64(), Y: -20 * rng.Float64(), Z: 40 + 20*rng.Float64()}
			d, err := NewDislocation(b, u, at, m, md.aniso)
			if err != nil {
				t.Fatal(err)
			}
			g := r3.Scale(3+12*rng.Float64(), randUnit(rng))
			if d.table(g) == nil {
				t.Fatalf("%s: no angular table met the tolerance", md.name)
			}
			fast := d.Phase(g)
			for _, p := range phaseCheckPoints(rng, at, d.ex, d.ey, d.u) {
				want := r3.Dot(g, d.R(p))
				worst = math.Max(worst, math.Abs(fast(p)-want))
			}
		}
		t.Logf("%s: largest |table − direct| %.2e cycles", md.name, worst)
		if worst > 1e-7 {
			t.Errorf("%s: table differs from the direct formula by %.3g cycles", md.name, worst)
		}
	}
}

// The same for the two partials of a dissociated dislocation, whose cuts
// lie in the glide plane (columns cross them), and for an inclusion and a
// sum of fields with and without fast paths (a loop and a fault through R,
// a cavity with none) nested in it.
func TestDissociatedAndSumPhaseMatchDirect(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	c := cubicVoigt(cuC11, cuC12, cuC44)
	for _, aniso := range []bool{false, true} {
		d, err := NewDissociated(bFull, bLead, bTrail, lineAt(0.5), r3.Vec{Z: 50}, n111, 3, cuMedium(c), aniso)
		if err != nil {
			t.Fatal(err)
		}
		inc, err := NewInclusion(r3.Vec{X: 10, Y: 5, Z: 45}, 6, 0.01)
		if err != nil {
			t.Fatal(err)
		}
		loop, err := NewLoop(r3.Vec{X: -20, Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.18, Y: 0.18}, 5, cuIso)
		if err != nil {
			t.Fatal(err)
		}
		for _, pa := range []*Dislocation{d.lead, d.trail} {
			if pa.table(r3.Vec{X: 4.9}) == nil {
				t.Fatal("no angular table for a partial")
			}
		}
		cav, err := NewCavity(r3.Vec{X: 15, Y: -5, Z: 50}, 4)
		if err != nil {
			t.Fatal(err)
		}
		fault, err := NewFault(r3.Vec{X: 30, Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.12, Y: 0.12, Z: 0.12})
		if err != nil {
			t.Fatal(err)
		}
		// A nested sum and a cavity flatten into the same fast path.
		s := Sum{d, inc, Sum{loop, cav, fault}}
		g := r3.Vec{X: 4.9}
		fast := s.Phase(g)
		worst := 0.0
		var pts []r3.Vec
		for _, pa := range []*Dislocation{d.lead, d.trail} {
			pts = append(pts, phaseCheckPoints(rng, pa.at, pa.ex, pa.ey, pa.u)...)
		}
		for k := range 500 {
			pts = append(pts, r3.Add(inc.at, r3.Scale(12*float64(k)/500, randUnit(rng))))
		}
		for _, p := range pts {
			worst = math.Max(worst, math.Abs(fast(p)-r3.Dot(g, s.R(p))))
		}
		t.Logf("anisotropic %v: largest |fast − direct| %.2e cycles", aniso, worst)
		if worst > 1e-7 {
			t.Errorf("anisotropic %v: fast g·R differs from the direct one by %.3g cycles", aniso, worst)
		}
	}
}

// On the cut itself (y' = ±0 exactly, x' < 0) the table takes the side the
// sign of zero gives, as the direct formula's atan2 does (θ = π for +0,
// −π for −0), and on the line (x' = y' = 0) the direction +x'; far out
// (r to 1e12 nm) it still agrees; a NaN position gives NaN, not a read
// outside the table.
func TestLinePhaseOnCutAndLine(t *testing.T) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	for _, aniso := range []bool{false, true} {
		// Line along z through the origin: x' = −x, y' = −y (the cut runs
		// along +x, the frame's −x'), so exact zeros are easy to make.
		d, err := NewDislocation(r3.Vec{X: 0.18, Y: 0.1, Z: 0.05}, r3.Vec{Z: 1}, r3.Vec{}, cuMedium(c), aniso)
		if err != nil {
			t.Fatal(err)
		}
		g := r3.Vec{X: 4.9, Y: 0.7}
		fast := d.Phase(g)
		for _, p := range []r3.Vec{
			{X: 3, Y: 0, Z: 1}, {X: 3, Y: math.Copysign(0, -1), Z: 1}, {X: -3, Y: 0, Z: 1},
			{X: 0, Y: 2, Z: 1}, {X: 0, Y: -2, Z: 1}, {Z: 5}, {X: 1e-300, Z: 5}, {X: 2e-4, Y: -1e-4, Z: 2},
			// Far beyond any image: r² up to 1e24 nm² (ln r² = 55).
			{X: 1e3, Y: -7e2, Z: 1}, {X: -3e6, Y: 1e6, Z: 1}, {X: 4e11, Y: 9e11, Z: 1},
		} {
			x, y := d.frame(p)
			want := r3.Dot(g, d.R(p))
			if got := fast(p); math.Abs(got-want) > 1e-7 {
				t.Errorf("anisotropic %v: at x' = %v, y' = %v fast g·R %v, direct %v", aniso, x, y, got, want)
			}
		}
		if v := fast(r3.Vec{X: math.NaN(), Z: 1}); !math.IsNaN(v) {
			t.Errorf("anisotropic %v: NaN position gave %v", aniso, v)
		}
	}
}

// A loop's fast path (loopPhase: the closed form and the far field as
// scalars, and their blend) agrees with g·R through R to rounding: points
// from the line (and on the axis) out through the blend shell (6 to 7
// radii) to 20 radii.
func TestLoopPhaseMatchesDirect(t *testing.T) {
	rng := rand.New(rand.NewPCG(27, 28))
	for _, r := range []float64{2, 10, 50} {
		l, err := NewLoop(r3.Vec{X: -20, Y: 4, Z: 50}, randUnit(rng), r3.Scale(bCu, randUnit(rng)), r, cuIso)
		if err != nil {
			t.Fatal(err)
		}
		g := r3.Scale(3+12*rng.Float64(), randUnit(rng))
		fast := l.Phase(g)
		pts := []r3.Vec{l.c, r3.Add(l.c, r3.Scale(r/3, l.n)), r3.Add(l.c, r3.Scale(r, l.a1))}
		for range 3000 {
			pts = append(pts, r3.Add(l.c, r3.Scale(20*r*math.Sqrt(rng.Float64()), randUnit(rng))))
		}
		for _, d := range []float64{1e-4, 1e-3, 0.01, 0.3} {
			for k := range 64 {
				phi, psi := 2*math.Pi*float64(k)/64, rng.Float64()*2*math.Pi
				e := r3.Add(r3.Scale(math.Cos(phi), l.a1), r3.Scale(math.Sin(phi), l.a2))
				at := r3.Add(l.c, r3.Scale(r, e))
				pts = append(pts, r3.Add(at, r3.Add(r3.Scale(d*math.Cos(psi), e), r3.Scale(d*math.Sin(psi), l.n))))
			}
		}
		worst := 0.0
		for _, p := range pts {
			want := r3.Dot(g, l.R(p))
			worst = math.Max(worst, math.Abs(fast(p)-want)/math.Max(1, math.Abs(want)))
		}
		t.Logf("radius %g nm: largest |fast − direct| %.2e cycles (relative above 1)", r, worst)
		if worst > 1e-12 {
			t.Errorf("radius %g nm: fast g·R differs from the direct one by %.3g", r, worst)
		}
	}
}
