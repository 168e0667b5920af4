package match

import (
	"context"

	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"faultline/scene"
)

// FitOptions control Fit.
type FitOptions struct {
	Workers int
	// Defect is the index of the defect whose position and depth are
	// fitted.
	Defect int
	// BlurNm is the σ of the Gaussian applied to every simulation.
	BlurNm float64
	// Progress, if not nil, receives a line at each stage.
	Progress func(msg string)
}

// Estimate is a fitted value with its uncertainty.
type Estimate struct {
	Value, Error float64
}

// FitResult is the outcome of Fit. Errors are one standard error from the
// curvature of the score at its maximum (see Fit); at_nm x and y come from
// the registration and carry half a pixel.
type FitResult struct {
	ThicknessNm Estimate
	SPerNm      Estimate
	AtNm        [3]Estimate
	Score       float64
	// Evaluations counts the simulations rendered.
	Evaluations int
	// ErrorMethod says how the errors were obtained.
	ErrorMethod string
}

// The fitted parameters, in order: thickness (nm), s (1/nm) and the
// defect's depth as a fraction of the thickness. The ranges searched, from
// the starting scene: thickness within a factor 2 either way, s within
// ±2/ξ_g (two fringes of the rocking curve) of the start, and the depth
// anywhere in the foil. The depth of a fault that crosses the whole foil
// is not fitted: moving its plane along the beam is a shift of its image,
// which the registration takes up.
type fitBounds struct {
	lo, hi [3]float64
	n      int // parameters fitted: 2 or 3
}

// Fit adjusts the foil thickness, the excitation error s and the depth of
// one defect of the scene (and, through the registration, its position in
// the picture) to maximise the score against the micrograph.
//
// The search runs on the micrograph binned to at most 64 pixels a side,
// from several starts (the scene's values, and thickness 15 % lower and
// higher, each with s at the start and ±0.5/ξ_g from it), by the
// Nelder–Mead simplex (Nelder & Mead 1965, Computer Journal 7, 308; gonum
// optimize) on variables mapped into their bounds by
// p = lo + (hi − lo)(1 + sin u)/2 (the bounding transform of James & Roos
// 1975, MINUIT); the best is refined on the full micrograph. The
// uncertainty of each value is the change that lowers the score by its own
// standard error σ_r (scoreError): with H the Hessian of the score in the
// parameters (central differences), δp_i = sqrt(2 σ_r (−H)⁻¹_ii).
func Fit(ctx context.Context, base *scene.Scene, dir string, m *Micrograph, opt FitOptions) (*FitResult, error) {
	k := opt.Defect
	if k < 0 || k >= len(base.Defects) {
		return nil, fmt.Errorf("%w: defect %d: the scene has %d defects", ErrSeries, k, len(base.Defects))
	}
	at := base.Defects[k].AtNm
	if len(at) != 3 {
		return nil, fmt.Errorf("%w: defects[%d].at_nm: the fitted defect needs a position", ErrSeries, k)
	}
	// One builder for the whole fit: a change of thickness or s re-runs
	// only the conditions stage, a change of depth the geometry.
	var builder scene.Builder
	st0, err := builder.Build(base, dir)
	if err != nil {
		return nil, err
	}
	t0, s0 := base.Foil.ThicknessNm, st0.SPerNm
	ds := 2 / st0.XiGNm
	b := fitBounds{
		lo: [3]float64{t0 / 2, s0 - ds, 0.02},
		hi: [3]float64{t0 * 2, s0 + ds, 0.98},
		n:  3,
	}
	if d := base.Defects[k]; d.Type == "fault" && len(d.BoundsNm) == 0 {
		b.n = 2
	}
	fr := &FitResult{}
	eval := func(mic *Micrograph, p [3]float64) (float64, Cell, error) {
		sc, err := cloneScene(base)
		if err != nil {
			return 0, Cell{}, err
		}
		edits := []struct {
			path string
			v    any
		}{
			{"foil.thickness_nm", p[0]},
			{"diffraction.s_per_nm", p[1]},
			{fmt.Sprintf("defects[%d].at_nm", k), []float64{at[0], at[1], p[2] * p[0]}},
		}
		for _, e := range edits {
			if err := scene.Set(sc, e.path, e.v); err != nil {
				return 0, Cell{}, err
			}
		}
		st, err := builder.Build(sc, dir)
		if err != nil {
			return 0, Cell{}, err
		}
		v := View{W: mic.Raster.W, H: mic.Raster.H, NmPerPx: mic.Raster.NmPerPx, GAngleDeg: mic.GAngleDeg}
		r, err := Simulate(ctx, st, v, mic.Kind, opt.BlurNm, opt.Workers)
		if err != nil {
			return 0, Cell{}, err
		}
		fr.Evaluations++
		c, err := compare(mic, r, Options{MaxShiftPx: max(mic.Raster.W, mic.Raster.H) / 4})
		if err != nil {
			return 0, Cell{}, err
		}
		return c.Score, c, nil
	}
	z0 := math.Max(b.lo[2], math.Min(b.hi[2], at[2]/t0))
	toP := func(u []float64) [3]float64 {
		p := [3]float64{0, 0, z0}
		for i := range u {
			p[i] = b.lo[i] + (b.hi[i]-b.lo[i])*(1+math.Sin(u[i]))/2
		}
		if b.n == 2 {
			p[2] = at[2] / p[0] // the fault keeps its point
		}
		return p
	}
	toU := func(p [3]float64) []float64 {
		u := make([]float64, b.n)
		for i := range u {
			x := 2*(p[i]-b.lo[i])/(b.hi[i]-b.lo[i]) - 1
			u[i] = math.Asin(math.Max(-1, math.Min(1, x)))
		}
		return u
	}
	var evalErr error
	objective := func(mic *Micrograph) func(u []float64) float64 {
		return func(u []float64) float64 {
			if evalErr != nil || ctx.Err() != nil {
				return math.Inf(1)
			}
			s, _, err := eval(mic, toP(u))
			if err != nil {
				evalErr = err
				return math.Inf(1)
			}
			return -s
		}
	}
	minimize := func(mic *Micrograph, start [3]float64, size float64, evals int) ([3]float64, float64, error) {
		res, err := optimize.Minimize(optimize.Problem{Func: objective(mic)}, toU(start),
			&optimize.Settings{FuncEvaluations: evals, Converger: &optimize.FunctionConverge{Absolute: 1e-5, Iterations: 15}},
			&optimize.NelderMead{SimplexSize: size})
		if evalErr != nil {
			return start, 0, evalErr
		}
		if err := ctx.Err(); err != nil {
			return start, 0, err
		}
		if err != nil && res == nil {
			return start, 0, err
		}
		return toP(res.X), -res.F, nil
	}

	// Coarse search from several starts.
	coarse := m
	if f := (max(m.Raster.W, m.Raster.H) + 63) / 64; f > 1 {
		coarse = &Micrograph{Name: m.Name, Raster: bin(m.Raster, f), GAngleDeg: m.GAngleDeg, Kind: m.Kind}
	}
	var starts [][3]float64
	for _, tf := range []float64{1, 0.85, 1.15} {
		for _, sf := range []float64{0, -0.5, 0.5} {
			starts = append(starts, [3]float64{t0 * tf, s0 + sf/st0.XiGNm, z0})
		}
	}
	best, bestScore := starts[0], math.Inf(-1)
	for i, st := range starts {
		if opt.Progress != nil {
			opt.Progress(fmt.Sprintf("fit: start %d of %d (coarse, %d × %d px)", i+1, len(starts), coarse.Raster.W, coarse.Raster.H))
		}
		p, s, err := minimize(coarse, st, 0.3, 120)
		if err != nil {
			return nil, err
		}
		if s > bestScore {
			best, bestScore = p, s
		}
	}
	// Refinement at full resolution.
	if opt.Progress != nil {
		opt.Progress("fit: refining on the full micrograph")
	}
	p, score, err := minimize(m, best, 0.05, 60)
	if err != nil {
		return nil, err
	}
	_, cell, err := eval(m, p)
	if err != nil {
		return nil, err
	}
	fr.Score = cell.Score
	_ = score

	// Uncertainty from the curvature of the score.
	if opt.Progress != nil {
		opt.Progress("fit: uncertainties from the curvature of the score")
	}
	h := [3]float64{0.02 * p[0], 0.1 / st0.XiGNm, 0.02}
	f := func(q [3]float64) (float64, error) {
		if b.n == 2 {
			q[2] = at[2] / q[0]
		}
		s, _, err := eval(m, q)
		return s, err
	}
	H := mat.NewSymDense(b.n, nil)
	f0 := cell.Score
	for i := 0; i < b.n; i++ {
		for j := i; j < b.n; j++ {
			var v float64
			if i == j {
				q1, q2 := p, p
				q1[i] += h[i]
				q2[i] -= h[i]
				a, err := f(q1)
				if err != nil {
					return nil, err
				}
				c, err := f(q2)
				if err != nil {
					return nil, err
				}
				v = (a - 2*f0 + c) / (h[i] * h[i])
			} else {
				var s [4]float64
				for n, sg := range [4][2]float64{{1, 1}, {1, -1}, {-1, 1}, {-1, -1}} {
					q := p
					q[i] += sg[0] * h[i]
					q[j] += sg[1] * h[j]
					if s[n], err = f(q); err != nil {
						return nil, err
					}
				}
				v = (s[0] - s[1] - s[2] + s[3]) / (4 * h[i] * h[j])
			}
			H.SetSym(i, j, -v)
		}
	}
	sigma := cell.Error
	var errs [3]float64
	var chol mat.Cholesky
	if chol.Factorize(H) {
		var inv mat.SymDense
		if err := chol.InverseTo(&inv); err == nil {
			for i := 0; i < b.n; i++ {
				errs[i] = math.Sqrt(2 * sigma * inv.At(i, i))
			}
			fr.ErrorMethod = "curvature of the score"
		}
	}
	if fr.ErrorMethod == "" {
		// The maximum is flat or not a maximum along some direction:
		// report the step used, and say so.
		for i := range errs {
			errs[i] = math.Inf(1)
		}
		fr.ErrorMethod = "undetermined: the score is flat along some direction at its maximum"
	}
	dx, dy := SpecimenOffset(cell.Shift.DX, cell.Shift.DY, st0.GAngleDeg, View{NmPerPx: m.Raster.NmPerPx, GAngleDeg: m.GAngleDeg})
	half := m.Raster.NmPerPx / 2
	fr.ThicknessNm = Estimate{p[0], errs[0]}
	fr.SPerNm = Estimate{p[1], errs[1]}
	depth := Estimate{p[2] * p[0], math.Hypot(errs[2]*p[0], p[2]*errs[0])}
	if b.n == 2 {
		depth = Estimate{at[2], 0} // not fitted
	}
	fr.AtNm = [3]Estimate{{at[0] + dx, half}, {at[1] + dy, half}, depth}
	return fr, nil
}

// bin averages f × f blocks of r (NaN pixels left out; a block with none
// is NaN).
func bin(r *Raster, f int) *Raster {
	w, h := r.W/f, r.H/f
	out := NewRaster(w, h, r.NmPerPx*float64(f))
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			s, n := 0.0, 0
			for v := 0; v < f; v++ {
				for u := 0; u < f; u++ {
					x := r.Pix[(j*f+v)*r.W+i*f+u]
					if !math.IsNaN(x) {
						s += x
						n++
					}
				}
			}
			if n == 0 {
				out.Pix[j*w+i] = math.NaN()
			} else {
				out.Pix[j*w+i] = s / float64(n)
			}
		}
	}
	return out
}
