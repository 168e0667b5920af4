package defects

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// Copper single-crystal stiffness, GPa, room temperature: C11 = 168.4,
// C12 = 121.4, C44 = 75.4 (Simmons & Wang 1971, Single Crystal Elastic
// Constants; from memory). Zener ratio 2C44/(C11−C12) ≈ 3.2.
const cuC11, cuC12, cuC44 = 168.4, 121.4, 75.4

// Magnesium (hexagonal) stiffness, GPa: C11 = 59.4, C12 = 25.6, C13 = 21.4,
// C33 = 61.6, C44 = 16.4 (Simmons & Wang 1971; from memory).
func mgVoigt() [6][6]float64 {
	c11, c12, c13, c33, c44 := 59.4, 25.6, 21.4, 61.6, 16.4
	return [6][6]float64{
		{c11, c12, c13}, {c12, c11, c13}, {c13, c13, c33},
		{3: c44}, {4: c44}, {5: (c11 - c12) / 2},
	}
}

func cuMedium(c [6][6]float64) Medium {
	return Medium{ShearGPa: 48, Poisson: 0.34, C: &c}
}

// randomRotation returns a random orthogonal matrix (rows: new axes).
func randomRotation(rng *rand.Rand) [3][3]float64 {
	x := randUnit(rng)
	y := r3.Unit(r3.Cross(randUnit(rng), x))
	return rotation(x, y, r3.Cross(x, y))
}

// rotateVec returns rot·v.
func rotateVec(rot [3][3]float64, v r3.Vec) r3.Vec {
	return r3.Vec{
		X: rot[0][0]*v.X + rot[0][1]*v.Y + rot[0][2]*v.Z,
		Y: rot[1][0]*v.X + rot[1][1]*v.Y + rot[1][2]*v.Z,
		Z: rot[2][0]*v.X + rot[2][1]*v.Y + rot[2][2]*v.Z,
	}
}

// Anisotropic Burgers circuit: +b right-handed about u, −b about −u, for
// copper in random orientations with random lines and Burgers vectors.
func TestBurgersCircuitStroh(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for range 20 {
		c := RotateStiffness(cubicVoigt(cuC11, cuC12, cuC44), randomRotation(rng))
		u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		at := r3.Vec{X: 2, Y: 1, Z: 40}
		d, err := NewDislocation(b, u, at, cuMedium(c), true)
		if err != nil {
			t.Fatal(err)
		}
		if !d.Anisotropic() || d.stroh.fallback != nil {
			t.Fatalf("copper took the degenerate rule: %v", d.stroh)
		}
		for _, tc := range []struct {
			n    r3.Vec
			want r3.Vec
		}{{u, b}, {r3.Scale(-1, u), r3.Scale(-1, b)}, {r3.Unit(r3.Add(u, r3.Scale(0.8, anyPerp(u)))), b}} {
			if got := circuit(d, at, tc.n, 1.5+3*rng.Float64(), 256, 1e-5); !vecClose(got, tc.want, 1e-8) {
				t.Fatalf("u=%v b=%v circuit about %v = %v, want %v", u, b, tc.n, got, tc.want)
			}
		}
	}
}

// Equilibrium ∂_j C_ijkl ∂_k R_l = 0 away from the core, with the full
// stiffness: copper (cubic) in random orientations and magnesium
// (hexagonal) with the line along c (the degenerate rule) and in random
// directions. Tolerance 1e-5 of C44 b/r², the scale of the stress gradient.
func TestStrohEquilibrium(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	type cs struct {
		name string
		c    [6][6]float64
		u    r3.Vec
	}
	var cases []cs
	for range 8 {
		cases = append(cases, cs{"Cu", RotateStiffness(cubicVoigt(cuC11, cuC12, cuC44), randomRotation(rng)), randUnit(rng)})
		cases = append(cases, cs{"Mg", mgVoigt(), randUnit(rng)})
	}
	cases = append(cases, cs{"Mg along c", mgVoigt(), r3.Vec{Z: 1}}, cs{"Mg along c, inclined frame", mgVoigt(), r3.Vec{Z: -1}})
	for _, tc := range cases {
		b := r3.Scale(0.3, randUnit(rng))
		d, err := NewDislocation(b, tc.u, r3.Vec{}, cuMedium(tc.c), true)
		if err != nil {
			t.Fatal(err)
		}
		for range 3 {
			p := r3.Scale(2+3*rng.Float64(), r3.Unit(r3.Cross(tc.u, randUnit(rng))))
			div := divStress(d, tc.c, p, 1e-3)
			if scale := tc.c[3][3] * 0.3 / r3.Norm2(p); r3.Norm(div) > 1e-5*scale {
				t.Fatalf("%s u=%v (%v): |div σ| = %g GPa/nm, scale %g", tc.name, tc.u, d.stroh, r3.Norm(div), scale)
			}
		}
		if tc.name == "Mg along c" && d.stroh.fallback == nil {
			t.Fatalf("Mg along c did not take the degenerate rule: %s", d.Elasticity())
		}
		if got := circuit(d, r3.Vec{}, tc.u, 2, 256, 1e-5); !vecClose(got, b, 1e-8) {
			t.Fatalf("%s u=%v circuit %v, want %v", tc.name, tc.u, got, b)
		}
	}
}

// An isotropic crystal written as a cubic one (C12 = C11 − 2C44) must give
// Hirth & Lothe's isotropic field with μ = C44, ν = C12/(2(C12 + C44)). At
// exact isotropy the sextic is degenerate (the stated rule applies); at
// C12 = C11 − 2C44(1+ε) the Stroh solution proper is used and must differ
// from the isotropic field by O(ε) only (tolerance ε|b|).
func TestStrohIsotropicLimit(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	c11, c44 := 168.4, 75.4
	for _, eps := range []float64{0, 1e-9, 1e-7, 1e-5, 1e-3} {
		c12 := c11 - 2*c44*(1+eps)
		nu := c12 / (2 * (c12 + c44))
		for range 5 {
			c := RotateStiffness(cubicVoigt(c11, c12, c44), randomRotation(rng))
			m := Medium{ShearGPa: c44, Poisson: nu, C: &c}
			u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
			da, err := NewDislocation(b, u, r3.Vec{}, m, true)
			if err != nil {
				t.Fatal(err)
			}
			di, _ := NewDislocation(b, u, r3.Vec{}, m, false)
			// The rule: exact isotropy is degenerate; ε ≥ 1e-5 is not.
			if fb := da.stroh.fallback != nil; (eps == 0 && !fb) || (eps >= 1e-5 && fb) {
				t.Fatalf("ε=%g: %s", eps, da.Elasticity())
			}
			p0 := r3.Scale(3, anyPerp(u))
			tol := math.Max(eps*bCu, 1e-12)
			for range 5 {
				p := r3.Add(r3.Scale(1+5*rng.Float64(), randUnit(rng)), r3.Scale(2, u))
				ga := r3.Sub(da.R(p), da.R(p0))
				gi := r3.Sub(di.R(p), di.R(p0))
				if diff := modB(r3.Sub(ga, gi), b); !finiteVec(ga) || r3.Norm(diff) > tol {
					t.Fatalf("ε=%g (%v): anisotropic %v, isotropic %v, |diff| %g > %g", eps, da.stroh, ga, gi, r3.Norm(diff), tol)
				}
			}
		}
	}
}

// A screw dislocation along a cube axis of a cubic crystal has exactly the
// isotropic screw field u_z = bθ/2π and no in-plane displacement
// (Hirth & Lothe 1982, ch. 13: the anti-plane problem decouples and
// C44 = C55 makes it isotropic).
func TestStrohScrewCubeAxis(t *testing.T) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	for _, u := range []r3.Vec{{Z: 1}, {X: 1}, {Y: -1}} {
		d, err := NewDislocation(r3.Scale(bCu, u), u, r3.Vec{}, cuMedium(c), true)
		if err != nil {
			t.Fatal(err)
		}
		iso, _ := NewDislocation(r3.Scale(bCu, u), u, r3.Vec{}, cuIso, false)
		p0 := r3.Add(r3.Scale(2, anyPerp(u)), r3.Scale(0.7, u))
		for _, p := range []r3.Vec{{X: 1, Y: 2, Z: 3}, {X: -3, Y: 0.5, Z: -1}, {X: 0.2, Y: -4, Z: 2}} {
			got := r3.Sub(d.R(p), d.R(p0))
			want := r3.Sub(iso.R(p), iso.R(p0))
			if diff := modB(r3.Sub(got, want), r3.Scale(bCu, u)); r3.Norm(diff) > 1e-12 {
				t.Fatalf("screw along %v at %v: Stroh %v, isotropic screw %v", u, p, got, want)
			}
		}
	}
}

// A screw dislocation along [110] of a cubic crystal is normal to the
// (110) mirror plane; the anti-plane problem decouples and
// u_z = (b/2π) arctan(√(C55/C44) y/x) (Hirth & Lothe 1982, ch. 13) in the
// frame x = [1-10], y = [00-1], z = [110], with C55 = (C11 − C12)/2 and
// C44 = C44 (cubic) there. No in-plane displacement.
func TestStrohScrewMirrorPlane(t *testing.T) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	u := r3.Unit(r3.Vec{X: 1, Y: 1})
	xh := r3.Unit(r3.Vec{X: 1, Y: -1})
	yh := r3.Cross(u, xh)
	d, err := NewDislocation(r3.Scale(bCu, u), u, r3.Vec{}, cuMedium(c), true)
	if err != nil {
		t.Fatal(err)
	}
	k := math.Sqrt((cuC11 - cuC12) / 2 / cuC44)
	ref := func(p r3.Vec) float64 {
		return bCu / (2 * math.Pi) * math.Atan2(k*r3.Dot(p, yh), r3.Dot(p, xh))
	}
	p0 := r3.Scale(2, xh)
	for _, p := range []r3.Vec{{X: 1, Y: 2, Z: 3}, {X: -3, Y: 0.5, Z: -1}, {X: 0.2, Y: -4, Z: 2}, {X: 4, Y: 1, Z: 0.3}} {
		got := r3.Sub(d.R(p), d.R(p0))
		want := r3.Scale(ref(p)-ref(p0), u)
		if diff := modB(r3.Sub(got, want), r3.Scale(bCu, u)); r3.Norm(diff) > 1e-12 {
			t.Fatalf("at %v: Stroh %v, closed form %v", p, got, want)
		}
	}
}

// Energy factors against closed forms for cubic crystals (Hirth & Lothe
// 1982, ch. 13; from memory): screw along [110],
// K = √(C44 (C11 − C12)/2); edge along [001] with b along [100],
// K = (C11 + C12) √(C44 (C11 − C12) / (C11 (C11 + C12 + 2 C44)))
// (Eshelby, Read & Shockley 1953).
func TestStrohEnergyFactorCubic(t *testing.T) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	kScrew := math.Sqrt(cuC44 * (cuC11 - cuC12) / 2)
	kEdge := (cuC11 + cuC12) * math.Sqrt(cuC44*(cuC11-cuC12)/(cuC11*(cuC11+cuC12+2*cuC44)))
	for _, tc := range []struct {
		name string
		u, b r3.Vec
		want float64
	}{
		{"screw [110]", r3.Vec{X: 1, Y: 1}, r3.Vec{X: 1, Y: 1}, kScrew},
		{"edge [001], b [100]", r3.Vec{Z: 1}, r3.Vec{X: 1}, kEdge},
		{"edge [001], b [010]", r3.Vec{Z: 1}, r3.Vec{Y: 1}, kEdge},
	} {
		b := r3.Unit(tc.b)
		got, err := energyFactor(b, b, tc.u, cuMedium(c), true)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-tc.want) > 1e-9*tc.want {
			t.Errorf("%s: K = %.6f GPa, closed form %.6f", tc.name, got, tc.want)
		}
	}
}

func TestStrohBadStiffness(t *testing.T) {
	c := cubicVoigt(100, 120, 50) // C12 > C11: not positive definite
	_, err := NewDislocation(r3.Vec{X: 0.25}, r3.Vec{Z: 1}, r3.Vec{}, cuMedium(c), true)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != "elastic" {
		t.Fatalf("non-positive-definite C: error %v, want one on elastic", err)
	}
}
