package sim

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// The Chebyshev coefficients of the interpolant through the
// Chebyshev–Lobatto points (chebTails, by gonum's DCT-I) and their sum by
// Clenshaw's recurrence agree with numpy's: numpy.polynomial.chebyshev
// chebfit of degree N through the same N+1 points (the interpolant) and
// chebval at 50 random x, to 1e-12.
func TestChebyshevAgainstNumpy(t *testing.T) {
	pyref.Require(t, "python3-numpy", "numpy")
	const n = 20
	f := func(x float64) float64 { return math.Exp(x)*math.Cos(5*x) + 1/(2.5+x) }
	vals := make([]float64, n+1)
	var xs []string
	for j := range vals {
		x := math.Cos(math.Pi * float64(j) / n)
		vals[j] = f(x)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	probe := make([]float64, 50)
	for k := range probe {
		probe[k] = 2*rng.Float64() - 1
		xs = append(xs, strconv.FormatFloat(probe[k], 'g', 17, 64))
	}
	chebTails(vals, 1, n, true)
	script := `
import sys, numpy as np
from numpy.polynomial import chebyshev as C
n = int(sys.argv[1])
x = np.cos(np.pi*np.arange(n+1)/n)
f = np.exp(x)*np.cos(5*x) + 1/(2.5+x)
c = C.chebfit(x, f, n)
p = np.array([float(v) for v in sys.argv[2].split(",")])
print(" ".join(repr(float(v)) for v in c))
print(" ".join(repr(float(v)) for v in C.chebval(p, c)))
`
	out := strings.Split(strings.TrimSpace(string(pyref.Run(t, nil, script, fmt.Sprint(n), strings.Join(xs, ",")))), "\n")
	if len(out) != 2 {
		t.Fatalf("numpy printed %q", out)
	}
	parse := func(s string) []float64 {
		var v []float64
		for _, f := range strings.Fields(s) {
			x, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatal(err)
			}
			v = append(v, x)
		}
		return v
	}
	wantC, wantV := parse(out[0]), parse(out[1])
	for k, c := range vals {
		if math.Abs(c-wantC[k]) > 1e-12 {
			t.Errorf("c_%d = %.15g, numpy %.15g", k, c, wantC[k])
		}
	}
	for k, x := range probe {
		if got := clenshaw(vals, x); math.Abs(got-wantV[k]) > 1e-12 {
			t.Errorf("p(%g) = %.15g, numpy %.15g", x, got, wantV[k])
		}
		if got := clenshaw(vals, x); math.Abs(got-f(x)) > 1e-10 {
			t.Errorf("p(%g) = %.15g, f = %.15g: the interpolant of degree %d is not converged", x, got, f(x), n)
		}
	}
}

// tableProblem returns the replay test problem recorded 1.5 times deeper
// with slabs serving s in [lo, hi], and the two-beam model at any s.
func tableProblem(t *testing.T, lo, hi float64) (*Problem, *Samples, func(float64) Model) {
	p := replayProblem()
	base := p.Model.(TwoBeam)
	model := func(s float64) Model { m := base; m.SPerNm = s; return m }
	_, smp, err := Record(context.Background(), p, RecordOptions{MaxThicknessNm: 150, Also: []Model{model(lo), model(hi)}})
	if err != nil || smp == nil {
		t.Fatalf("record: %v, samples %v", err, smp != nil)
	}
	return p, smp, model
}

// A table is the same to the bit for any number of workers, agrees with
// replays inside its range (the fuller check on real scenes is
// tests.TestSTableAgreesWithReplay), refuses s outside it, serves only
// problems that differ in s, and reports a cap it hits as an error.
func TestSTable(t *testing.T) {
	const lo, hi = -0.005, 0.015
	p, smp, model := tableProblem(t, lo, hi)
	ctx := context.Background()
	a, err := TabulateS(ctx, smp, model, lo, hi, 100, STableOptions{Options: Options{Workers: 1}})
	if err != nil {
		t.Fatal(err)
	}
	b, err := TabulateS(ctx, smp, model, lo, hi, 100, STableOptions{Options: Options{Workers: 3}})
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.coef {
		if a.coef[k] != b.coef[k] {
			t.Fatalf("coefficient %d: %v with one worker, %v with three", k, a.coef[k], b.coef[k])
		}
	}
	t.Logf("N = %d, %d replays, %d coefficients, estimate %.2g", a.Degree(), a.Replays(), a.Coefficients(), a.ErrorEstimate())
	for _, s := range []float64{lo, 0.0031, hi} {
		im, err := a.Image(ctx, s, Options{})
		if err != nil {
			t.Fatal(err)
		}
		want, _, err := smp.Replay(ctx, model(s), 100, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if worst := MaxDifference(im, want); worst > 1e-5 {
			t.Errorf("s = %g: table differs from a replay by %.3g", s, worst)
		}
	}
	// Against the function the table interpolates (the same fixed steps
	// replayed at s), the error is within the estimate.
	rng := rand.New(rand.NewPCG(3, 4))
	pt := *p
	pt.Model = model((lo + hi) / 2)
	prep := newColumn(&pt, smp.phase)
	prep.st = model(lo).NewStepper()
	prep.also = []Stepper{model((lo + hi) / 2).NewStepper(), model(hi).NewStepper()}
	worst := 0.0
	for k := 0; k < 10; k++ {
		s := lo + (hi-lo)*rng.Float64()
		im, err := a.Image(ctx, s, Options{})
		if err != nil {
			t.Fatal(err)
		}
		st := model(s).NewStepper()
		psi, out := make([]complex128, 2), make([]float64, 2)
		g := p.Grid
		var steps []step
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				row, starts := smp.rows[j], smp.starts[j]
				steps, _ = prep.fixedSteps(g.X(i), g.Y(j), row[starts[i]:starts[i+1]], smp.gamma0[j*g.NX+i], steps, true)
				if !applySteps(st, psi, steps, prep.tol, true) {
					t.Fatalf("s = %g, column (%d, %d): a slab fails", s, i, j)
				}
				st.Intensities(psi, out)
				for b := range out {
					worst = math.Max(worst, math.Abs(out[b]-im.Intensity[b][j*g.NX+i]))
				}
			}
		}
	}
	t.Logf("10 random s: within %.2g of the interpolated function, estimate %.2g", worst, a.ErrorEstimate())
	if worst > a.ErrorEstimate() {
		t.Errorf("table differs from the function it interpolates by %.3g, above its estimate %.3g", worst, a.ErrorEstimate())
	}
	for _, s := range []float64{lo - 1e-9, hi + 1e-9, math.NaN()} {
		if _, err := a.Image(ctx, s, Options{}); !errors.Is(err, ErrSTableRange) {
			t.Errorf("s = %g: error %v, want ErrSTableRange", s, err)
		}
	}
	q := *p
	q.Model = model(0.002)
	if !a.Serves(&q, 0.002) {
		t.Error("table does not serve a change of s alone")
	}
	m := q.Model.(TwoBeam)
	m.XiGNm++
	q.Model = m
	if a.Serves(&q, 0.002) {
		t.Error("table serves a change of ξg")
	}
	q.Model = model(0.002)
	q.ThicknessNm = 99
	if a.Serves(&q, 0.002) {
		t.Error("table serves another thickness")
	}

	if _, err := TabulateS(ctx, smp, model, lo, hi, 100, STableOptions{TailBound: 1e-30, MaxDegree: 20}); !errors.Is(err, ErrSTableCap) {
		t.Errorf("unreachable tail bound: error %v, want ErrSTableCap", err)
	}
	if _, err := TabulateS(ctx, smp, model, lo, hi, 100, STableOptions{MaxBytes: 1000}); !errors.Is(err, ErrSTableCap) {
		t.Errorf("memory cap of 1000 bytes: error %v, want ErrSTableCap", err)
	}
	if _, err := TabulateS(ctx, smp, model, lo, hi, 151, STableOptions{}); !errors.Is(err, ErrReplayRange) {
		t.Errorf("thickness beyond the record: error %v, want ErrReplayRange", err)
	}
	if _, err := TabulateS(ctx, smp, model, hi, lo, 100, STableOptions{}); err == nil {
		t.Error("reversed range accepted")
	}
	// A range far wider than the recorded slabs serve: its columns are
	// integrated afresh for it, and the series does not converge within
	// the cap, which is said.
	if _, err := TabulateS(ctx, smp, model, -0.2, 0.2, 100, STableOptions{}); !errors.Is(err, ErrSTableCap) {
		t.Errorf("s in [-0.2, 0.2]: error %v, want ErrSTableCap", err)
	} else {
		t.Logf("s in [-0.2, 0.2]: %v", err)
	}
}
