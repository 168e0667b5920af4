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
	// 1e-7 are not compared: the remainder of the chord slope off the
	// step's grid of σ = s_1 + β, independent of the departure, reaches
	// 1e-7 at such slabs (TestRowSlabErrorModel).
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
				if bloch && e > 1e-7 && e > em/5 {
					t.Errorf("s_g %g z %g h %g: Bloch-wave slab error %.2e, Magnus–Taylor %.2e", s1, z, h, e, em)
				}
				if h <= 1 && e > 1e-7 && prev/e < 12 {
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
	// finds at that slope directly (each within 1e-12 of ‖A‖); slopes
	// about each s_g, on the grid of σ = s_1 + β (rowShape). Where the
	// continuation gives up, bloch decomposes from scratch; it must succeed
	// for most slopes (the cases here: 44 of 45).
	fails, cases := 0, 0
	c := testLambdaNm * testGPerNm * testGPerNm / 2
	for _, s1 := range []float64{0, 2 * c, -c} {
		for _, n := range []int{1, 3, 7} {
			m := testRow(n, s1, 0.1)
			st := m.NewStepper().(*rowStepper)
			nb := st.nb
			k0 := int64(math.Round(st.s1 / blochSlopeStep))
			for _, dk := range []int64{3, -57, 128, 300, -1001} {
				k := k0 + dk
				a := blochAnchorEvery * int64(math.Round(float64(k)/blochAnchorEvery))
				anchor := st.eigenBloch(float64(a) * blochSlopeStep)
				b := st.continueBloch(anchor, float64(k-a)*blochSlopeStep)
				cases++
				if b == nil {
					t.Logf("%d beams, s_g %g, k %d: continuation gave up", nb, s1, k)
					fails++
					continue
				}
				st.fillFrom(st.c, 1, float64(k)*blochSlopeStep, nil)
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

func TestRowSlabErrorModel(t *testing.T) {
	// The error model of the step control for the Bloch-wave step (see
	// column.go), as TestSlabErrorModel for two beams: one slab with a
	// departure δ(z) from its chord, against the same slab in 400
	// Magnus–Taylor sub-slabs, for 7 and 15 beams at the Bragg position
	// and at g(3g), slabs of 1–50 nm at three chord slopes (0.02–4 beat
	// cycles), departures D of 1e-5 to 1e-3 cycles at the Gauss nodes.
	//   - δ quadratic or cubic (what the nodes see): the amplitude error
	//     is at most rowSecondOrder·D², whatever the beat (the two-beam
	//     step's is 12 c² D);
	//   - δ quartic with zero at the nodes (what they miss): the error is
	//     at most midWeight/2 per unit of δ at the midpoint.
	// These with the chord slopes on the step's grid of σ = s_1 + β
	// (rowShape), so that they measure the departure's part alone. The
	// grid's own part, a remainder r of σ up to half the grid step taken
	// to first order, is measured apart with a departure of 1e-9: at most
	// 2e-6 for slabs of 1–100 nm whatever the departure (measured 1.5e-6),
	// a twenty-fifth of DefaultTolerance.
	c := testLambdaNm * testGPerNm * testGPerNm / 2
	shapes := []struct {
		name  string
		quart bool
		f     func(u float64) float64 // peak 1 at the nodes or, quartic, at the midpoint
	}{
		{"quadratic", false, func(u float64) float64 { return 6 * u * (1 - u) }},
		// u(1−u)(2u−1) is ∓√3/18 at the nodes.
		{"cubic", false, func(u float64) float64 { return 18 / math.Sqrt(3) * u * (1 - u) * (2*u - 1) }},
		// Zero at the ends and at the nodes, where u(1−u) = 1/6.
		{"quartic", true, func(u float64) float64 { x := u * (1 - u); return x * (x - 1.0/6) / (0.25 * (0.25 - 1.0/6)) }},
	}
	worstK, worstMid, worstGrid := 0.0, 0.0, 0.0
	for _, n := range []int{3, 7} {
		for _, s1 := range []float64{0, 2 * c} {
			m := testRow(n, s1, 0.1)
			st := m.NewStepper().(*rowStepper)
			nb := 2*n + 1
			// slabErr is the amplitude error of one slab of length h at
			// chord slope slope with departure delta.
			slabErr := func(h, slope float64, delta func(float64) float64) float64 {
				run := func(sub int) []complex128 {
					psi := make([]complex128, nb)
					st.Start(psi)
					psi[n+1], psi[n-1] = complex(0.3, -0.5), complex(0.1, 0.2)
					crystal := st.crystalMagnus
					if sub == 1 {
						crystal = st.Crystal
					}
					subSlabs(st, psi, h, slope, sub, delta, crystal)
					st.toBeams(psi)
					return psi
				}
				one, conv := run(1), run(400)
				err := 0.0
				for k := range one {
					err = math.Max(err, cmplxAbs(one[k]-conv[k]))
				}
				return err
			}
			// A slope near β whose σ lies on the grid, or r grid steps off it.
			onGrid := func(beta, r float64) float64 {
				return (math.Round((s1+beta)/blochSlopeStep)+r)*blochSlopeStep - s1
			}
			for _, beta := range []float64{0, 0.02, -0.05} {
				slope := onGrid(beta, 0.5)
				for _, h := range []float64{1, 5, 20, 50, 100} {
					err := slabErr(h, slope, func(u float64) float64 { return 6e-9 * u * (1 - u) })
					worstGrid = math.Max(worstGrid, err)
					if err > 2e-6 {
						t.Errorf("%d beams, s_g %.3f, slope %g half a grid step off, h %g nm: error %.3g > 2e-6", nb, s1, slope, h, err)
					}
				}
			}
			for _, sh := range shapes {
				for _, D := range []float64{1e-5, 1e-4, 1e-3} {
					delta := func(u float64) float64 { return D * sh.f(u) }
					for _, beta := range []float64{0, 0.02, -0.05} {
						slope := onGrid(beta, 0)
						for _, h := range []float64{1, 2, 5, 10, 20, 30, 50} {
							err := slabErr(h, slope, delta)
							cyc := st.Beat(slope) * h
							if sh.quart {
								worstMid = math.Max(worstMid, err/D)
								if err > midWeight/2*D {
									t.Errorf("%d beams, s_g %.3f, quartic δ %g at the midpoint, slope %g, h %g nm (%.2f beat cycles): error %.3g > %g per unit",
										nb, s1, D, slope, h, cyc, err, midWeight/2.0)
								}
								continue
							}
							worstK = math.Max(worstK, err/(D*D))
							if err > rowSecondOrder*D*D {
								t.Errorf("%d beams, s_g %.3f, %s δ %g at the nodes, slope %g, h %g nm (%.2f beat cycles): error %.3g > rowSecondOrder·D²",
									nb, s1, sh.name, D, slope, h, cyc, err)
							}
						}
					}
				}
			}
		}
	}
	t.Logf("largest error per squared departure %.1f (rowSecondOrder %g); per unit of midpoint content %.2f (midWeight %g); from the grid %.2g",
		worstK, float64(rowSecondOrder), worstMid, float64(midWeight), worstGrid)
}
