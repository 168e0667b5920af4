package sim

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// hirschPerfect is the two-beam solution for a perfect crystal with
// absorption (Hirsch, Howie, Nicholson, Pashley & Whelan 1965, ch. 8):
// with 1/ξ̃ = 1/ξ_g + i/ξ'_g and σ = sqrt(s² + 1/ξ̃²),
//
//	φ_0 = [cos(πσt) − i (s/σ) sin(πσt)] exp(−πt/ξ'_0) exp(iπst)
//	φ_g = (i/(ξ̃σ)) sin(πσt) exp(−πt/ξ'_0) exp(−iπst)
func hirschPerfect(s, xi, xiAbs, xi0Abs, t float64) (bf, df float64) {
	invXi := complex(1/xi, inverse(xiAbs))
	sigma := cmplx.Sqrt(complex(s*s, 0) + invXi*invXi)
	arg := complex(math.Pi*t, 0) * sigma
	damp := complex(math.Exp(-math.Pi*t*inverse(xi0Abs)), 0)
	p0 := (cmplx.Cos(arg) - complex(0, s)/sigma*cmplx.Sin(arg)) * damp
	pg := complex(0, 1) * invXi / sigma * cmplx.Sin(arg) * damp
	return sq(p0), sq(pg)
}

func perfectProblem(m Model, t float64) *Problem {
	return &Problem{Model: m, GPerNm: 5, ThicknessNm: t, Grid: Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
}

func TestPerfectCrystalMatchesHirschClosedForm(t *testing.T) {
	for _, c := range []struct{ s, xi, ratio, t float64 }{
		{0, 40, 0.1, 55}, {0.01, 40, 0.1, 120}, {-0.02, 28, 0.08, 200}, {0.05, 60, 0.05, 33}, {0, 25, 0, 75},
	} {
		m := TwoBeam{SPerNm: c.s, XiGNm: c.xi}
		if c.ratio > 0 {
			m.XiGAbsNm = c.xi / c.ratio
			m.Xi0AbsNm = m.XiGAbsNm
		}
		got := perfectProblem(m, c.t).Column(0, 0)
		bf, df := hirschPerfect(c.s, c.xi, m.XiGAbsNm, m.Xi0AbsNm, c.t)
		// Same equations solved two ways: agreement to rounding.
		if math.Abs(got[0]-bf) > 1e-12 || math.Abs(got[1]-df) > 1e-12 {
			t.Errorf("%+v: got BF %.15f DF %.15f, closed form %.15f %.15f", c, got[0], got[1], bf, df)
		}
	}
}

func TestConservationWithoutAbsorptionWithDislocation(t *testing.T) {
	m := TwoBeam{SPerNm: 0.004, XiGNm: 41}
	f := sum{newLineField(r3.Vec{Z: 60}, r3.Vec{X: 0.3, Y: 1, Z: 0.8}, 0.2, 0.25)}
	p := &Problem{Model: m, GPerNm: 4.9, Field: f, ThicknessNm: 130,
		Grid: Grid{NX: 33, NY: 9, WidthNm: 80, HeightNm: 40}}
	im, err := Render(context.Background(), p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for n := range im.BF() {
		// Without absorption the two-beam equations conserve |T|²+|S|²
		// exactly (Hirsch et al. 1965); each slab matrix is unitary.
		if d := im.BF()[n] + im.DF()[n] - 1; math.Abs(d) > 1e-9 {
			t.Fatalf("pixel %d: |T|²+|S|² − 1 = %g", n, d)
		}
	}
}

func TestThicknessFringePeriod(t *testing.T) {
	for _, c := range []struct{ s, xi float64 }{{0, 40}, {0.01, 40}, {0.02, 28}} {
		m := TwoBeam{SPerNm: c.s, XiGNm: c.xi}
		// Effective extinction distance 1/sqrt(s² + ξ_g⁻²) (Hirsch et al.
		// 1965): the dark field is a maximum at half of it and zero at it.
		period := 1 / math.Sqrt(c.s*c.s+1/(c.xi*c.xi))
		zero := perfectProblem(m, period).Column(0, 0)[1]
		half := perfectProblem(m, period/2).Column(0, 0)[1]
		want := 1 / (1 + c.s*c.s*c.xi*c.xi) // 1/(1+w²) at the maximum
		if zero > 1e-12 || math.Abs(half-want) > 1e-12 {
			t.Errorf("s=%g ξ=%g: DF(period)=%g DF(period/2)=%g want 0, %g", c.s, c.xi, zero, half, want)
		}
	}
}

func TestAccuracyAgainstConverged(t *testing.T) {
	m := TwoBeam{SPerNm: 0.002, XiGNm: 35, XiGAbsNm: 350, Xi0AbsNm: 350}
	g := 4.9
	f := sum{
		newLineField(r3.Vec{Z: 75}, r3.Vec{X: 0.4, Y: 1, Z: 1.2}, 0.18, 0.2),
		sphereStrain{at: r3.Vec{X: 20, Y: -10, Z: 60}, r0: 6, ep: 0.01},
	}
	p := &Problem{Model: m, GPerNm: g, Field: f, ThicknessNm: 150, Grid: Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
	worst := 0.0
	cols := [][2]float64{{0.3, 0.1}, {1.5, -2}, {-4, 3}, {8, 0}, {-12, 20}, {21, -9}, {14, -10}, {26, -10}, {3, 7}, {-0.8, 0.4}}
	for i := 0; i < 30; i++ { // a scan across the dislocation and the inclusion
		cols = append(cols, [2]float64{-30 + 2*float64(i), -10 + 0.7*float64(i)})
	}
	for _, xy := range cols {
		got := p.Column(xy[0], xy[1])
		bf, df := rk4Column(m, g, f, xy[0], xy[1], 150, 0.005)
		worst = math.Max(worst, math.Max(math.Abs(got[0]-bf), math.Abs(got[1]-df)))
	}
	// The accuracy stated in DefaultTolerance's doc: 1e-4 of the incident
	// intensity against a converged solution (RK4 at dz = 0.005 nm).
	t.Logf("worst intensity difference from converged RK4: %.2e", worst)
	if worst > 1e-4 {
		t.Errorf("worst intensity difference %.2e > 1e-4", worst)
	}
}

func TestFaultJumpIsExact(t *testing.T) {
	m := TwoBeam{SPerNm: 0, XiGNm: 30, XiGAbsNm: 300, Xi0AbsNm: 300}
	f := stepFault{at: r3.Vec{Z: 40}, n: r3.Vec{X: 0.5, Z: 1}, shift: r3.Vec{X: 1.0 / 3 / 4.9}}
	p := &Problem{Model: m, GPerNm: 4.9, Field: f, ThicknessNm: 100, Grid: Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
	got := p.Column(10, 0)
	bf, df := rk4Column(m, 4.9, f, 10, 0, 100, 0.002)
	if math.Abs(got[0]-bf) > 2e-4 || math.Abs(got[1]-df) > 2e-4 {
		t.Errorf("fault column: got %v, RK4 %g %g", got, bf, df)
	}
}

func TestKinematicalLimitOfDynamical(t *testing.T) {
	// At large w = sξ_g the dynamical dark field tends to the kinematical
	// one with s replaced by the effective excitation error
	// s_eff = sqrt(s² + ξ_g⁻²) (Hirsch et al. 1965, ch. 8; Cockayne, Ray &
	// Whelan 1969 for weak-beam images): the relative difference is of
	// order 1/w².
	f := sum{newLineField(r3.Vec{Z: 50}, r3.Vec{X: 0.2, Y: 1, Z: 0.9}, 0.2, 0.1)}
	for _, w := range []float64{10, 20} {
		xi := 40.0
		s := w / xi
		dyn := &Problem{Model: TwoBeam{SPerNm: s, XiGNm: xi}, GPerNm: 5, Field: f, ThicknessNm: 100, Grid: Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
		kin := *dyn
		kin.Model = Kinematical{SPerNm: math.Sqrt(s*s + 1/(xi*xi)), XiGNm: xi}
		for _, x := range []float64{-3, -1, 0.5, 2, 6} {
			d := dyn.Column(x, 0)[1]
			k := kin.Column(x, 0)[1]
			if rel := math.Abs(d-k) / math.Max(k, 1e-6); rel > 3/(w*w)+0.02 {
				t.Errorf("w=%g x=%g: dynamical DF %g kinematical %g (rel %g)", w, x, d, k, rel)
			}
		}
		// Perfect crystal: the kinematical closed form.
		perfect := perfectProblem(Kinematical{SPerNm: s, XiGNm: xi}, 100).Column(0, 0)[1]
		want := math.Pow(math.Sin(math.Pi*100*s)/(xi*s), 2)
		if math.Abs(perfect-want) > 1e-12 {
			t.Errorf("kinematical perfect crystal %g, closed form %g", perfect, want)
		}
	}
}

// csqrt against the standard library's principal square root over all
// four quadrants and the axes.
func TestCsqrt(t *testing.T) {
	for _, z := range []complex128{0, 4, -4, 4i, -4i, complex(3, 4), complex(-3, 4), complex(-3, -4), complex(3, -4), complex(1e-9, -7), complex(-1e6, 1e-3)} {
		got, abs := csqrt(z)
		if want := cmplx.Sqrt(z); cmplx.Abs(got-want) > 1e-14*(1+cmplx.Abs(want)) {
			t.Errorf("csqrt(%v) = %v, cmplx.Sqrt %v", z, got, want)
		}
		if math.Abs(abs-cmplx.Abs(z)) > 1e-14*cmplx.Abs(z) {
			t.Errorf("|%v| = %v, want %v", z, abs, cmplx.Abs(z))
		}
	}
}

// expi against math.Sincos on both sides of its series threshold.
func TestExpi(t *testing.T) {
	for _, x := range []float64{0, 1e-9, -3e-5, 0.0031, -0.0099, 0.00999999, 0.01, -0.02, 1, -3} {
		s, c := math.Sincos(x)
		if d := cmplx.Abs(expi(x) - complex(c, s)); d > 2e-16 {
			t.Errorf("expi(%g) = %v, sincos gives %v (difference %.2g)", x, expi(x), complex(c, s), d)
		}
	}
}

// coshSinhc against the standard library's cosh and sinh of the principal
// square root, on both sides of the series bound and in every direction,
// and the bound on the terms its series omit.
func TestCoshSinhc(t *testing.T) {
	tail := 0.0 // Σ_{n≥10} W^n/(2n)!, W = seriesMaxW
	term := 1.0
	for n := 1; n < 40; n++ {
		term *= seriesMaxW / float64((2*n-1)*(2*n))
		if n >= 10 {
			tail += term
		}
	}
	if tail > 2.5e-17 {
		t.Errorf("series tail %.3g above the stated 2.5e-17", tail)
	}
	for _, r := range []float64{0, 1e-9, 1e-3, 0.1599, 0.16, 0.1601, 0.3, 0.4999, 0.5, 0.5001, 1, 1.4999, 1.5, 1.5001, 2.4, 10, 80} {
		for k := 0; k < 16; k++ {
			w := cmplx.Rect(r, 2*math.Pi*float64(k)/16+0.1)
			ch, sh := coshSinhc(w)
			l := cmplx.Sqrt(w)
			wantC := cmplx.Cosh(l)
			wantS := complex(1, 0)
			if l != 0 {
				wantS = cmplx.Sinh(l) / l
			}
			// A few units of rounding of either side.
			tol := 2e-15 * math.Max(1, cmplx.Abs(wantC))
			if d := cmplx.Abs(ch - wantC); d > tol {
				t.Errorf("cosh√w at w = %v: %v, cmplx gives %v (difference %.2g)", w, ch, wantC, d)
			}
			if d := cmplx.Abs(sh - wantS); d > tol {
				t.Errorf("sinh√w/√w at w = %v: %v, cmplx gives %v (difference %.2g)", w, sh, wantS, d)
			}
		}
	}
}
