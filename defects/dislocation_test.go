package defects

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// Copper, isotropic (Voigt-averaged) constants, from memory: μ ≈ 48 GPa,
// ν ≈ 0.34; b = a/√2 with a = 0.3615 nm (Cu lattice parameter, from memory).
var (
	cuIso = Medium{ShearGPa: 48, Poisson: 0.34}
	bCu   = 0.3615 / math.Sqrt2
)

// hlScrew and hlEdge are Hirth & Lothe (1982) eq. 3-2 and eq. 3-45: line
// along +z, b along +z (screw) or +x (edge), θ = atan2(y, x).
func hlScrew(x, y, b float64) r3.Vec {
	return r3.Vec{Z: b * math.Atan2(y, x) / (2 * math.Pi)}
}

func hlEdge(x, y, b, nu float64) r3.Vec {
	r2 := x*x + y*y
	return r3.Vec{
		X: b / (2 * math.Pi) * (math.Atan2(y, x) + x*y/(2*(1-nu)*r2)),
		Y: -b / (2 * math.Pi) * ((1-2*nu)/(4*(1-nu))*math.Log(r2) + (x*x-y*y)/(4*(1-nu)*r2)),
	}
}

// hlMixed is the field of a mixed dislocation of line sense u through at,
// from eqs. 3-2 and 3-45 in the frame x̃ = edge part of b, ỹ = u × x̃.
func hlMixed(p, at, u, b r3.Vec, nu float64) r3.Vec {
	bs := r3.Dot(b, u)
	be := r3.Sub(b, r3.Scale(bs, u))
	var xt r3.Vec
	if r3.Norm(be) > 1e-12 {
		xt = r3.Unit(be)
	} else {
		xt = anyPerp(u)
	}
	yt := r3.Cross(u, xt)
	d := r3.Sub(p, at)
	x, y := r3.Dot(d, xt), r3.Dot(d, yt)
	e := hlEdge(x, y, r3.Norm(be), nu)
	s := hlScrew(x, y, bs)
	return r3.Add(r3.Add(r3.Scale(e.X, xt), r3.Scale(e.Y, yt)), r3.Scale(s.Z, u))
}

// hlStress is the stress of a mixed dislocation (Hirth & Lothe 1982,
// eq. 3-43 for the edge part and eq. 3-5 for the screw part) in the image
// frame, written in the frame x̃, ỹ, u of hlMixed and rotated back.
func hlStress(p, at, u, b r3.Vec, mu, nu float64) [3][3]float64 {
	bs := r3.Dot(b, u)
	be := r3.Sub(b, r3.Scale(bs, u))
	xt := anyPerp(u)
	if r3.Norm(be) > 1e-12 {
		xt = r3.Unit(be)
	}
	yt := r3.Cross(u, xt)
	d := r3.Sub(p, at)
	x, y := r3.Dot(d, xt), r3.Dot(d, yt)
	r2 := x*x + y*y
	D := mu * r3.Norm(be) / (2 * math.Pi * (1 - nu))
	var s [3][3]float64 // in (x̃, ỹ, u)
	s[0][0] = -D * y * (3*x*x + y*y) / (r2 * r2)
	s[1][1] = D * y * (x*x - y*y) / (r2 * r2)
	s[0][1] = D * x * (x*x - y*y) / (r2 * r2)
	s[2][2] = nu * (s[0][0] + s[1][1])
	s[0][2] = -mu * bs / (2 * math.Pi) * y / r2
	s[1][2] = mu * bs / (2 * math.Pi) * x / r2
	s[1][0], s[2][0], s[2][1] = s[0][1], s[0][2], s[1][2]
	basis := [3]r3.Vec{xt, yt, u}
	var out [3][3]float64
	for i := range 3 {
		for j := range 3 {
			for a := range 3 {
				for c := range 3 {
					out[i][j] += comp(basis[a], i) * s[a][c] * comp(basis[c], j)
				}
			}
		}
	}
	return out
}

func TestIsotropicScrewAndEdgeAlongZ(t *testing.T) {
	pts := []r3.Vec{{X: 3, Y: 1, Z: 7}, {X: -2, Y: 5, Z: 0}, {X: -4, Y: -4, Z: 40}, {X: 0.5, Y: -6, Z: 1}}
	p0 := r3.Vec{X: 1, Y: 2, Z: 0}
	for _, tc := range []struct {
		name string
		b    r3.Vec
		ref  func(x, y float64) r3.Vec
	}{
		{"screw", r3.Vec{Z: bCu}, func(x, y float64) r3.Vec { return hlScrew(x, y, bCu) }},
		{"edge", r3.Vec{X: bCu}, func(x, y float64) r3.Vec { return hlEdge(x, y, bCu, cuIso.Poisson) }},
	} {
		d, err := NewDislocation(tc.b, r3.Vec{Z: 1}, r3.Vec{}, cuIso, false)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range pts {
			got := r3.Sub(d.R(p), d.R(p0))
			want := r3.Sub(tc.ref(p.X, p.Y), tc.ref(p0.X, p0.Y))
			// Differences remove the constant of ln r²; modB the θ branch.
			if diff := modB(r3.Sub(got, want), tc.b); r3.Norm(diff) > 1e-12 {
				t.Errorf("%s at %v: R−R0 = %v, Hirth & Lothe %v", tc.name, p, got, want)
			}
		}
	}
}

func TestIsotropicMixedAnyLine(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for range 20 {
		u := randUnit(rng)
		b := r3.Scale(bCu, randUnit(rng))
		at := r3.Vec{X: 3, Y: -2, Z: 50}
		d, err := NewDislocation(b, r3.Scale(2.5, u), at, cuIso, false)
		if err != nil {
			t.Fatal(err)
		}
		p0 := r3.Add(at, r3.Scale(4, anyPerp(u)))
		for range 10 {
			p := r3.Add(at, r3.Scale(1+9*rng.Float64(), randUnit(rng)))
			got := r3.Sub(d.R(p), d.R(p0))
			want := r3.Sub(hlMixed(p, at, u, b, cuIso.Poisson), hlMixed(p0, at, u, b, cuIso.Poisson))
			if diff := modB(r3.Sub(got, want), b); r3.Norm(diff) > 1e-11 {
				t.Fatalf("u=%v b=%v p=%v: R−R0 = %v, Hirth & Lothe %v", u, b, p, got, want)
			}
		}
	}
}

// The stress from finite differences of R through Hooke's law must equal
// the closed-form stresses of Hirth & Lothe. Tolerance: 1e-6 of μb/(2πr),
// the finite-difference error at h = 1e-4 nm, r ≥ 1 nm is ~1e-8.
func TestIsotropicStressHirthLothe(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	c := isoVoigt(cuIso.ShearGPa, cuIso.Poisson)
	for range 20 {
		u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		at := r3.Vec{Z: 30}
		d, err := NewDislocation(b, u, at, cuIso, false)
		if err != nil {
			t.Fatal(err)
		}
		for range 5 {
			dir := randUnit(rng)
			dir = r3.Unit(r3.Sub(dir, r3.Scale(r3.Dot(dir, u), u)))
			r := 1 + 9*rng.Float64()
			p := r3.Add(at, r3.Add(r3.Scale(r, dir), r3.Scale(5*rng.Float64(), u)))
			got := stress(d, c, p, 1e-4)
			want := hlStress(p, at, u, b, cuIso.ShearGPa, cuIso.Poisson)
			scale := cuIso.ShearGPa * bCu / (2 * math.Pi * r)
			for i := range 3 {
				for j := range 3 {
					if math.Abs(got[i][j]-want[i][j]) > 1e-6*scale {
						t.Fatalf("u=%v b=%v r=%.2f σ%d%d = %g GPa, Hirth & Lothe %g", u, b, r, i+1, j+1, got[i][j], want[i][j])
					}
				}
			}
		}
	}
}

// Burgers circuit: ∮ dR on a right-handed circuit about the line sense u
// equals +b (the convention of doc.go); about −u it is −b. Circuits both
// perpendicular to the line and tilted by up to ~60° from it.
func TestBurgersCircuitIsotropic(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for range 20 {
		u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		at := r3.Vec{X: -5, Y: 7, Z: 20}
		d, err := NewDislocation(b, u, at, cuIso, false)
		if err != nil {
			t.Fatal(err)
		}
		tilt := r3.Unit(r3.Add(u, r3.Scale(1.5*rng.Float64(), anyPerp(u))))
		for _, n := range []r3.Vec{u, tilt} {
			got := circuit(d, at, n, 2+3*rng.Float64(), 256, 1e-5)
			// Trapezoid rule on a smooth periodic integrand converges
			// exponentially; 1e-8 nm is the finite-difference error.
			if !vecClose(got, b, 1e-8) {
				t.Fatalf("u=%v b=%v circuit about %v gives %v, want +b", u, b, n, got)
			}
		}
		if got := circuit(d, at, r3.Scale(-1, u), 3, 256, 1e-5); !vecClose(got, r3.Scale(-1, b), 1e-8) {
			t.Fatalf("circuit about −u gives %v, want −b = %v", got, r3.Scale(-1, b))
		}
	}
}

// Burgers-vector sense in the simplest case (doc.go): a right-handed screw
// along +z with b = +|b| z: walking anticlockwise seen from +z (x → y → −x)
// R_z increases.
func TestBurgersSenseScrew(t *testing.T) {
	d, err := NewDislocation(r3.Vec{Z: bCu}, r3.Vec{Z: 1}, r3.Vec{}, cuIso, false)
	if err != nil {
		t.Fatal(err)
	}
	// Quarter-turn steps from angle 10° (the cut is along +x for a line along
	// z, so this path never crosses it).
	prev := d.R(r3.Vec{X: 2 * math.Cos(0.17), Y: 2 * math.Sin(0.17)}).Z
	for k := 1; k <= 3; k++ {
		a := 0.17 + float64(k)*math.Pi/2
		z := d.R(r3.Vec{X: 2 * math.Cos(a), Y: 2 * math.Sin(a)}).Z
		if math.Abs(z-prev-bCu/4) > 1e-12 {
			t.Fatalf("quarter turn %d: R_z grew by %g, want +b/4 = %g", k, z-prev, bCu/4)
		}
		prev = z
	}
}

// Equilibrium: ∂_j σ_ij = 0 away from the core (Navier's equation), by
// second differences. Tolerance 1e-5 of μb/r², the scale of ∂σ.
func TestIsotropicEquilibrium(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	c := isoVoigt(cuIso.ShearGPa, cuIso.Poisson)
	for range 10 {
		u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		d, _ := NewDislocation(b, u, r3.Vec{}, cuIso, false)
		p := r3.Scale(2+3*rng.Float64(), r3.Unit(r3.Cross(u, randUnit(rng))))
		div := divStress(d, c, p, 1e-3)
		scale := cuIso.ShearGPa * bCu / r3.Norm2(p)
		if r3.Norm(div) > 1e-5*scale {
			t.Fatalf("u=%v b=%v: |div σ| = %g GPa/nm, scale %g", u, b, r3.Norm(div), scale)
		}
	}
}

// With the default cut, no column crosses the cut surface: Jumps reports
// nothing and R varies smoothly down every column, even for lines inclined
// through the foil.
func TestDefaultCutNotCrossed(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for range 10 {
		u, b := randUnit(rng), r3.Scale(bCu, randUnit(rng))
		at := r3.Vec{Z: 50}
		d, _ := NewDislocation(b, u, at, cuIso, false)
		for range 10 {
			x, y := 40*rng.Float64()-20, 40*rng.Float64()-20
			if j := d.Jumps(x, y, 0, 100, nil); len(j) != 0 {
				t.Fatalf("u=%v column (%g,%g): jumps %v, want none", u, x, y, j)
			}
			prev := d.R(r3.Vec{X: x, Y: y})
			for z := 0.01; z <= 100; z += 0.01 {
				r := d.R(r3.Vec{X: x, Y: y, Z: z})
				// A crossed cut would show a step of |b|; the elastic field
				// changes by far less than |b|/20 per 0.01 nm away from the core.
				if q := r3.Sub(r3.Vec{X: x, Y: y, Z: z}, at); r3.Norm(r3.Cross(q, u)) > 0.2 && r3.Norm(r3.Sub(r, prev)) > bCu/20 {
					t.Fatalf("u=%v column (%g,%g): R steps by %v at z=%g", u, x, y, r3.Sub(r, prev), z)
				}
				prev = r
			}
		}
	}
}

// An explicit cut (used by partials) is reported by Jumps, and R jumps
// across it by exactly −b moving along u × e (doc.go).
func TestExplicitCutJump(t *testing.T) {
	b := r3.Vec{X: 0.1, Y: 0.2, Z: -0.05}
	u := r3.Unit(r3.Vec{X: 1, Y: 0.3})
	e := r3.Unit(r3.Cross(r3.Vec{Z: 1}, u)) // in the horizontal plane, ⊥ u
	at := r3.Vec{Z: 40}
	d, err := newDislocation(b, u, at, &e, cuIso, false)
	if err != nil {
		t.Fatal(err)
	}
	on := r3.Add(at, r3.Scale(5, e)) // point on the cut
	j := d.Jumps(on.X, on.Y, 0, 100, nil)
	if len(j) != 1 || math.Abs(j[0]-40) > 1e-12 {
		t.Fatalf("jumps %v, want [40]", j)
	}
	off := r3.Sub(at, r3.Scale(5, e)) // on the other side of the line
	if j := d.Jumps(off.X, off.Y, 0, 100, nil); len(j) != 0 {
		t.Fatalf("jumps %v on the uncut side, want none", j)
	}
	n := r3.Cross(u, e) // +z here
	jump := r3.Sub(d.R(r3.Add(on, r3.Scale(1e-9, n))), d.R(r3.Sub(on, r3.Scale(1e-9, n))))
	if !vecClose(jump, r3.Scale(-1, b), 1e-8) {
		t.Fatalf("jump along u×e = %v, want −b = %v", jump, r3.Scale(-1, b))
	}
}

func TestDislocationCoreFinite(t *testing.T) {
	d, _ := NewDislocation(r3.Vec{X: bCu}, r3.Vec{X: 1, Z: 1}, r3.Vec{Z: 10}, cuIso, false)
	for _, p := range []r3.Vec{{Z: 10}, {X: 1e-6, Z: 10}, {X: 5, Z: 15}} {
		r := d.R(p)
		if !finiteVec(r) {
			t.Fatalf("R on the line at %v = %v", p, r)
		}
	}
}

func TestDislocationErrors(t *testing.T) {
	nan := math.NaN()
	for _, tc := range []struct {
		name     string
		b, line  r3.Vec
		at       r3.Vec
		m        Medium
		aniso    bool
		wantFlds string
	}{
		{"zero b", r3.Vec{}, r3.Vec{Z: 1}, r3.Vec{}, cuIso, false, "b"},
		{"zero line", r3.Vec{X: 1}, r3.Vec{}, r3.Vec{}, cuIso, false, "line"},
		{"NaN b", r3.Vec{X: nan}, r3.Vec{Z: 1}, r3.Vec{}, cuIso, false, "b"},
		{"NaN line", r3.Vec{X: 1}, r3.Vec{Y: nan}, r3.Vec{}, cuIso, false, "line"},
		{"Inf at", r3.Vec{X: 1}, r3.Vec{Z: 1}, r3.Vec{Z: math.Inf(1)}, cuIso, false, "at_nm"},
		{"Poisson 0.5", r3.Vec{X: 1}, r3.Vec{Z: 1}, r3.Vec{}, Medium{ShearGPa: 40, Poisson: 0.5}, false, "poisson"},
		{"zero shear", r3.Vec{X: 1}, r3.Vec{Z: 1}, r3.Vec{}, Medium{Poisson: 0.3}, false, "shear_gpa"},
		{"anisotropic without C", r3.Vec{X: 1}, r3.Vec{Z: 1}, r3.Vec{}, cuIso, true, "elastic"},
	} {
		_, err := NewDislocation(tc.b, tc.line, tc.at, tc.m, tc.aniso)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.wantFlds || !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: error %v, want an InputError on %q", tc.name, err, tc.wantFlds)
		}
	}
}
