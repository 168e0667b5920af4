package sim

import (
	"math"
	"testing"
)

// slabDiff advances the unit transmitted beam through [z, z+h] of a column
// with g·R = γ(z), once by Crystal (one slab) and once by the Magnus–Taylor
// step over 256 sub-slabs (a converged reference: its local error falls as
// the fifth power of the sub-slab), and returns the largest difference of
// the amplitudes and whether the single slab took the Bloch-wave step.
func slabDiff(m SystematicRow, gamma func(float64) float64, z, h float64, magnus bool) (float64, bool) {
	nb := len(m.SPerNm)
	step := func(st *rowStepper, psi []complex128, a, hh float64, mag bool) bool {
		ga, gb := gamma(a), gamma(a+hh)
		d := gb - ga
		d1 := gamma(a+gaussNodes[0]*hh) - ga - gaussNodes[0]*d
		d2 := gamma(a+gaussNodes[1]*hh) - ga - gaussNodes[1]*d
		if mag {
			st.crystalMagnus(psi, hh, d/hh, d1, d2)
			return false
		}
		return st.crystalBloch(psi, hh, d/hh, d1, d2)
	}
	st := m.NewStepper().(*rowStepper)
	got := make([]complex128, nb)
	st.Start(got)
	bloch := step(st, got, z, h, magnus)
	if !bloch && !magnus {
		st.crystalMagnus(got, h, (gamma(z+h)-gamma(z))/h, 0, 0)
	}
	ref := make([]complex128, nb)
	st.Start(ref)
	const sub = 256
	for k := 0; k < sub; k++ {
		step(st, ref, z+float64(k)*h/sub, h/sub, true)
	}
	worst := 0.0
	for k := range got {
		worst = math.Max(worst, cmplxAbs(got[k]-ref[k]))
	}
	return worst, bloch
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }

func TestRowBlochSlab(t *testing.T) {
	// Order and error constant of the Bloch-wave slab (rowbloch.go),
	// measured against 256 Magnus–Taylor sub-slabs on the phase of a
	// dislocation-like column γ(z) = 0.3·atan((z − 40)/6) cycles, 7 beams at
	// the Bragg position and at g(3g). A step whose local error is O(h⁵)
	// (fourth order, as the Magnus integrator of Blanes & Moan 2006 that it
	// replaces; Blanes, Casas, Oteo & Ros 2009) would divide the error by 32
	// on halving h; measured here: 15–35 once h ≤ 1 nm (about h⁴: the
	// outer beams' fast phases turn the dropped terms' extra factor of h
	// into one of 1/|λ_k − λ_j|), so at least 12 is required. And at the
	// same slab the Bloch-wave step must be at least 5 times more accurate
	// than the Magnus–Taylor step (measured: 18–80 times). Errors below
	// 1e-8 (the rounding of the chord slope to its grid) are not compared.
	gamma := func(z float64) float64 { return 0.3 * math.Atan((z-40)/6) }
	c := testLambdaNm * testGPerNm * testGPerNm / 2
	for _, s1 := range []float64{0, 2 * c} {
		m := testRow(3, s1, 0.1)
		for _, z := range []float64{20, 33, 38} {
			prev := 0.0
			for _, h := range []float64{4, 2, 1, 0.5} {
				e, bloch := slabDiff(m, gamma, z, h, false)
				em, _ := slabDiff(m, gamma, z, h, true)
				t.Logf("s_g %.3f z %g h %g: Bloch-wave slab %.2e (taken: %v), Magnus–Taylor %.2e; error ratio on halving %.1f",
					s1, z, h, e, bloch, em, prev/e)
				if bloch && e > 1e-8 && e > em/5 {
					t.Errorf("s_g %g z %g h %g: Bloch-wave slab error %.2e, Magnus–Taylor %.2e", s1, z, h, e, em)
				}
				if h <= 1 && e > 1e-8 && prev/e < 12 {
					t.Errorf("s_g %g z %g h %g: error %.2e fell by only %.1f on halving the slab", s1, z, h, e, prev/e)
				}
				prev = e
			}
		}
	}
}
