package defects

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// Equilibrium of Burgers' loop field: ∂_j σ_ij = 0 away from the loop line.
func TestLoopEquilibrium(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	c := isoVoigt(cuIso.ShearGPa, cuIso.Poisson)
	for range 6 {
		n, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		l, err := NewLoop(r3.Vec{Z: 50}, n, b, 8, cuIso)
		if err != nil {
			t.Fatal(err)
		}
		for range 4 {
			p := r3.Add(r3.Vec{Z: 50}, r3.Scale(3+12*rng.Float64(), randUnit(rng)))
			if math.Abs(r3.Norm(r3.Sub(p, r3.Vec{Z: 50}))-8) < 2 {
				continue
			}
			div := divStress(l, c, p, 1e-3)
			if scale := cuIso.ShearGPa * bCu / 4; r3.Norm(div) > 1e-5*scale {
				t.Fatalf("n=%v b=%v p=%v: |div σ| = %g GPa/nm, scale %g", n, b, p, r3.Norm(div), scale)
			}
		}
	}
}

// The loop's line sense is right-handed about n̂, so a right-handed circuit
// about it gains +b (doc.go); across the disc R(n̂ side) − R(other) = −b
// inside and 0 outside, and Jumps reports the disc crossing only.
func TestLoopCircuitAndJump(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	for range 6 {
		n, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		if math.Abs(n.Z) < 0.2 {
			continue
		}
		c := r3.Vec{X: 3, Y: -4, Z: 50}
		l, err := NewLoop(c, n, b, 10, cuIso)
		if err != nil {
			t.Fatal(err)
		}
		a1 := anyPerp(n)
		edge := r3.Add(c, r3.Scale(10, a1))
		sense := r3.Cross(n, a1) // line sense at that point
		if got := circuit(l, edge, sense, 1.5, 512, 1e-5); !vecClose(got, b, 1e-7) {
			t.Fatalf("n=%v b=%v: circuit about the loop line = %v, want +b", n, b, got)
		}
		for _, tc := range []struct {
			rad  float64
			want r3.Vec
		}{{0, r3.Scale(-1, b)}, {6, r3.Scale(-1, b)}, {14, r3.Vec{}}, {30, r3.Vec{}}} {
			q := r3.Add(c, r3.Scale(tc.rad, r3.Unit(r3.Add(a1, r3.Scale(0.3, sense)))))
			// Column through q: it meets the loop plane at q.
			j := l.Jumps(q.X, q.Y, 0, 100, nil)
			inside := tc.rad < 10
			if (len(j) == 1) != inside || (inside && math.Abs(j[0]-q.Z) > 1e-9) {
				t.Fatalf("radius %g: Jumps %v (crossing at %g)", tc.rad, j, q.Z)
			}
			jump := r3.Sub(l.R(r3.Add(q, r3.Scale(1e-7, n))), l.R(r3.Sub(q, r3.Scale(1e-7, n))))
			if !vecClose(jump, tc.want, 1e-6) {
				t.Fatalf("n=%v radius %g: jump across the plane %v, want %v", n, tc.rad, jump, tc.want)
			}
		}
	}
}

// Near its line a large loop looks like a straight dislocation: a loop of
// radius 10 µm, probed 1 to 4 nm from the middle of one polygon side,
// against the straight dislocation along that side (Hirth & Lothe 1982,
// eqs. 3-2, 3-45, through hlMixed). Curvature corrections are of order
// (d/r) ln(8r/d) ≈ 0.4% here (the loop self-field's logarithm; from
// memory): the displacement gradients must agree to 1% of their size.
func TestLoopNearEdgeIsStraight(t *testing.T) {
	for _, tc := range []struct{ n, b r3.Vec }{
		{r3.Vec{Z: 1}, r3.Vec{Z: -bCu}}, // prismatic
		{r3.Vec{Z: 1}, r3.Vec{X: bCu}},  // shear
		{r3.Unit(r3.Vec{X: 1, Y: 1, Z: 1}), r3.Scale(bCu, r3.Unit(r3.Vec{X: 1, Y: -1}))}, // shear, inclined
	} {
		c := r3.Vec{Z: 50}
		l, err := NewLoop(c, tc.n, tc.b, 10000, cuIso)
		if err != nil {
			t.Fatal(err)
		}
		// The point of the circle along a1, where the line runs along a2.
		out, u := l.a1, l.a2
		at := r3.Add(c, r3.Scale(l.radius, out))
		for _, d := range []float64{1, 2, 4} {
			for _, ang := range []float64{0.3, 1.9, 3.5, 5.0} {
				dir := r3.Add(r3.Scale(math.Cos(ang), out), r3.Scale(math.Sin(ang), tc.n))
				p := r3.Add(at, r3.Scale(d, dir))
				gl := gradR(l, p, 1e-4)
				ref := fieldFunc(func(q r3.Vec) r3.Vec { return hlMixed(q, at, u, tc.b, cuIso.Poisson) })
				gs := gradR(ref, p, 1e-4)
				var diff, size float64
				for i := range 3 {
					for j := range 3 {
						diff = math.Max(diff, math.Abs(gl[i][j]-gs[i][j]))
						size = math.Max(size, math.Abs(gs[i][j]))
					}
				}
				if diff > 0.01*size {
					t.Fatalf("n=%v b=%v d=%g angle %g: |∇R loop − ∇R straight| = %g, |∇R| = %g", tc.n, tc.b, d, ang, diff, size)
				}
			}
		}
	}
}

type fieldFunc func(r3.Vec) r3.Vec

func (f fieldFunc) R(p r3.Vec) r3.Vec { return f(p) }
