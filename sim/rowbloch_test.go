package sim

import (
	"context"
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
	st.toBeams(got) // out of the Bloch basis the slab leaves psi in
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

func TestRowBlochContinuation(t *testing.T) {
	// Bloch waves continued from an anchor slope by Newton's method
	// (rowcontinue.go) reproduce the perfect-crystal matrix, V Λ V⁻¹ = A(β)
	// to 1e-12 of ‖A‖, and have the eigenvalues that gonum's eigensolver
	// finds at that slope directly (each within 1e-12 of ‖A‖). Where the
	// continuation gives up, bloch decomposes from scratch; it must succeed
	// for most slopes (the cases here: 44 of 45).
	fails, cases := 0, 0
	c := testLambdaNm * testGPerNm * testGPerNm / 2
	for _, s1 := range []float64{0, 2 * c, -c} {
		for _, n := range []int{1, 3, 7} {
			m := testRow(n, s1, 0.1)
			st := m.NewStepper().(*rowStepper)
			nb := st.nb
			for _, k := range []int64{3, -57, 128, 300, -1001} {
				a := blochAnchorEvery * int64(math.Round(float64(k)/blochAnchorEvery))
				anchor := st.eigenBloch(float64(a) * blochSlopeStep)
				b := st.continueBloch(anchor, float64(k-a)*blochSlopeStep)
				cases++
				if b == nil {
					t.Logf("%d beams, s_g %g, k %d: continuation gave up", nb, s1, k)
					fails++
					continue
				}
				st.fill(1, float64(k)*blochSlopeStep, nil)
				scale := norm1(st.f, nb)
				worst := 0.0
				for i := 0; i < nb; i++ {
					for j := 0; j < nb; j++ {
						var acc complex128
						for l := 0; l < nb; l++ {
							acc += b.v[i*nb+l] * b.lam[l] * b.vinv[l*nb+j]
						}
						worst = math.Max(worst, cmplxAbs(acc-st.f[i*nb+j]))
					}
				}
				if worst > 1e-12*scale {
					t.Errorf("%d beams, s_g %g, k %d: |VΛV⁻¹ − A| = %.2e (‖A‖ %.2e)", nb, s1, k, worst, scale)
				}
				direct := st.eigenBloch(float64(k) * blochSlopeStep)
				for _, l := range b.lam {
					best := math.Inf(1)
					for _, d := range direct.lam {
						best = math.Min(best, cmplxAbs(l-d))
					}
					if best > 1e-12*scale {
						t.Errorf("%d beams, s_g %g, k %d: eigenvalue %v is %.2e from gonum's", nb, s1, k, l, best)
					}
				}
			}
		}
	}
	if fails*10 > cases {
		t.Errorf("continuation gave up for %d of %d slopes", fails, cases)
	}
}

func TestRowRenderSameWhateverTheWorkers(t *testing.T) {
	// The kept Bloch waves depend on the grid slope alone (anchors from
	// scratch, the rest continued from their anchor), so a render is the
	// same to the bit with one worker and a fresh store as with three
	// workers sharing a store that other renders have filled.
	p := benchRowProblem(24)
	m := p.Model.(SystematicRow)
	m.SPerNm = RowExcitation(3, 0.0171, 0.002508, 4.9) // a row no other test uses
	p.Model = m
	a, err := Render(context.Background(), p, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []int{3, 2} {
		b, err := Render(context.Background(), p, Options{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		for k := range a.Intensity {
			for i := range a.Intensity[k] {
				if a.Intensity[k][i] != b.Intensity[k][i] {
					t.Fatalf("%d workers: beam %d pixel %d: %v, one worker %v", w, k, i, b.Intensity[k][i], a.Intensity[k][i])
				}
			}
		}
	}
}
