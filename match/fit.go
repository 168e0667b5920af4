package match

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"faultline/scene"
	"faultline/sim"
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
	// Renders counts the simulations computed from the field, Replays
	// those replayed from recorded field samples (sim.Samples) because
	// only the thickness or s had changed.
	Renders, Replays int
	// ErrorMethod says how the errors were obtained.
	ErrorMethod string
}

// fitter holds what the evaluations of one fit share: the scene, a
// Builder (crystal and Stroh solutions built once) and the field samples
// of the last depth rendered, replayed while only t and s change.
type fitter struct {
	ctx     context.Context
	base    *scene.Scene
	dir     string
	k       int
	at      []float64
	opt     FitOptions
	builder scene.Builder
	tMax    float64 // the largest thickness searched

	// The recorded field samples: for micrograph recMic and depth recZ,
	// through the turned field recField.
	samples  *sim.Samples
	recMic   *Micrograph
	recZ     float64
	recField sim.Displacement

	renders, replays int
	err              error
}

// score renders the scene with thickness t, excitation error s and the
// defect at depth z on the micrograph's raster and compares.
func (f *fitter) score(mic *Micrograph, t, s, z float64) (Cell, error) {
	sc, err := cloneScene(f.base)
	if err != nil {
		return Cell{}, err
	}
	if err := scene.SetAll(sc,
		scene.Edit{Path: "foil.thickness_nm", Value: t},
		scene.Edit{Path: "diffraction.s_per_nm", Value: s},
		scene.Edit{Path: fmt.Sprintf("defects[%d].at_nm", f.k), Value: []float64{f.at[0], f.at[1], z}}); err != nil {
		return Cell{}, err
	}
	st, err := f.builder.Build(sc, f.dir)
	if err != nil {
		return Cell{}, err
	}
	v := View{W: mic.Raster.W, H: mic.Raster.H, NmPerPx: mic.Raster.NmPerPx, GAngleDeg: mic.GAngleDeg}
	grid := sim.Grid{NX: v.W, NY: v.H, WidthNm: float64(v.W) * v.NmPerPx, HeightNm: float64(v.H) * v.NmPerPx}
	p := sim.Turn(st.Problem, rotation(SceneGAngleDeg(st), v.GAngleDeg), grid)
	var im *sim.Image
	if f.samples != nil && f.recMic == mic && f.recZ == z && t <= f.samples.MaxThicknessNm() {
		// The same defect geometry: only the conditions changed.
		p.Field = f.recField
		if !f.samples.Serves(p) {
			return Cell{}, fmt.Errorf("fit: recorded field samples do not serve the problem (internal)")
		}
		if im, _, err = f.samples.Replay(f.ctx, p.Model, t, sim.Options{Workers: f.opt.Workers}); err != nil {
			return Cell{}, err
		}
		f.replays++
	} else {
		rec := math.Min(f.tMax, 1.3*t)
		var smp *sim.Samples
		if im, smp, err = sim.Record(f.ctx, p, sim.RecordOptions{Options: sim.Options{Workers: f.opt.Workers}, MaxThicknessNm: rec}); err != nil {
			return Cell{}, err
		}
		f.samples, f.recMic, f.recZ, f.recField = smp, mic, z, p.Field
		f.renders++
	}
	if f.opt.BlurNm > 0 {
		sim.Blur(im, f.opt.BlurNm)
	}
	plane := im.BF()
	if mic.Kind == DarkField {
		plane = im.DF()
	}
	return compare(mic, &Raster{W: v.W, H: v.H, Pix: plane, NmPerPx: v.NmPerPx}, Options{MaxShiftPx: max(v.W, v.H) / 4})
}

// bounded maps an unbounded variable u into [lo, hi] by
// p = lo + (hi − lo)(1 + sin u)/2 (the bounding transform of James & Roos
// 1975, MINUIT), and back.
type bounded struct{ lo, hi float64 }

func (b bounded) p(u float64) float64 { return b.lo + (b.hi-b.lo)*(1+math.Sin(u))/2 }
func (b bounded) u(p float64) float64 {
	x := 2*(p-b.lo)/(b.hi-b.lo) - 1
	return math.Asin(math.Max(-1, math.Min(1, x)))
}

// minimize runs the Nelder–Mead simplex (gonum optimize) on the bounded
// parameters from start and returns the best point and its score.
func (f *fitter) minimize(bs []bounded, start []float64, size float64, evals int, score func(p []float64) float64) ([]float64, float64) {
	toP := func(u []float64) []float64 {
		p := make([]float64, len(u))
		for i := range u {
			p[i] = bs[i].p(u[i])
		}
		return p
	}
	u0 := make([]float64, len(start))
	for i := range start {
		u0[i] = bs[i].u(start[i])
	}
	obj := func(u []float64) float64 {
		if f.err != nil || f.ctx.Err() != nil {
			return math.Inf(1)
		}
		return -score(toP(u))
	}
	res, err := optimize.Minimize(optimize.Problem{Func: obj}, u0,
		&optimize.Settings{FuncEvaluations: evals, Converger: &optimize.FunctionConverge{Absolute: 1e-5, Iterations: 15}},
		&optimize.NelderMead{SimplexSize: size})
	if err != nil && res == nil {
		if f.err == nil {
			f.err = err
		}
		return start, math.Inf(-1)
	}
	return toP(res.X), -res.F
}

// Fit adjusts the foil thickness, the excitation error s and the depth of
// one defect of the scene (and, through the registration, its position in
// the picture) to maximise the score against the micrograph.
//
// The search is nested: for a depth z, the thickness and s are fitted by
// the Nelder–Mead simplex (Nelder & Mead 1965, Computer Journal 7, 308;
// gonum optimize), every evaluation after the first replaying the field
// samples of the first (sim.Samples: only the conditions change); the
// depth is fitted around that by a one-dimensional simplex. Parameters are
// mapped into their bounds by p = lo + (hi − lo)(1 + sin u)/2 (James & Roos
// 1975, MINUIT): thickness within a factor 2 of the start, s within
// ±2/ξ_g, the depth inside the foil. The depth of a fault that crosses the
// whole foil is not fitted: moving its plane along the beam is a shift of
// its image, which the registration takes up. The search starts from nine
// points (thickness ±15 %, s ±0.5/ξ_g) on the micrograph binned to at most
// 64 pixels a side and is refined on the full micrograph.
//
// The uncertainty of each value is the change that lowers the score by its
// own standard error σ_r (scoreError): with H the Hessian of the score in
// the parameters (central differences), δp_i = sqrt(2 σ_r (−H)⁻¹_ii).
func Fit(ctx context.Context, base *scene.Scene, dir string, m *Micrograph, opt FitOptions) (*FitResult, error) {
	k := opt.Defect
	if k < 0 || k >= len(base.Defects) {
		return nil, fmt.Errorf("%w: defect %d: the scene has %d defects", ErrSeries, k, len(base.Defects))
	}
	at := base.Defects[k].AtNm
	if len(at) != 3 {
		return nil, fmt.Errorf("%w: defects[%d].at_nm: the fitted defect needs a position", ErrSeries, k)
	}
	f := &fitter{ctx: ctx, base: base, dir: dir, k: k, at: at, opt: opt}
	st0, err := f.builder.Build(base, dir)
	if err != nil {
		return nil, err
	}
	t0, s0 := base.Foil.ThicknessNm, st0.SPerNm
	f.tMax = 2 * t0
	ds := 2 / st0.XiGNm
	tb, sb := bounded{t0 / 2, f.tMax}, bounded{s0 - ds, s0 + ds}
	fitDepth := !(base.Defects[k].Type == "fault" && len(base.Defects[k].BoundsNm) == 0)
	say := func(format string, a ...any) {
		if opt.Progress != nil {
			opt.Progress(fmt.Sprintf(format, a...))
		}
	}
	eval := func(mic *Micrograph, t, s, z float64) float64 {
		if z >= t {
			return -1 // the defect would leave the foil
		}
		c, err := f.score(mic, t, s, z)
		if err != nil {
			if f.err == nil {
				f.err = err
			}
			return math.Inf(-1)
		}
		return c.Score
	}
	// inner fits t and s at depth z from (t, s), returning the best.
	inner := func(mic *Micrograph, t, s, z, size float64, evals int) (float64, float64, float64) {
		p, sc := f.minimize([]bounded{tb, sb}, []float64{t, s}, size, evals, func(p []float64) float64 {
			return eval(mic, p[0], p[1], z)
		})
		return p[0], p[1], sc
	}
	// search fits the depth around inner, from (t, s, z).
	search := func(mic *Micrograph, t, s, z, size float64, innerEvals, outerEvals int) (float64, float64, float64, float64) {
		bt, bs, bsc := inner(mic, t, s, z, size, innerEvals)
		bz := z
		if !fitDepth {
			return bt, bs, bz, bsc
		}
		zb := bounded{0.02 * t0, 0.98 * tb.hi}
		f.minimize([]bounded{zb}, []float64{z}, size, outerEvals, func(p []float64) float64 {
			t, s, sc := inner(mic, bt, bs, p[0], size/2, innerEvals/2)
			if sc > bsc {
				bt, bs, bz, bsc = t, s, p[0], sc
			}
			return sc
		})
		return bt, bs, bz, bsc
	}

	coarse := m
	if b := (max(m.Raster.W, m.Raster.H) + 63) / 64; b > 1 {
		coarse = &Micrograph{Name: m.Name, Raster: bin(m.Raster, b), GAngleDeg: m.GAngleDeg, Kind: m.Kind}
	}
	z0 := math.Max(0.02*t0, math.Min(0.98*t0, at[2]))
	// Starts at the scene's depth: t and s only, replaying one recording.
	bt, bs, bsc := t0, s0, math.Inf(-1)
	n := 0
	for _, tf := range []float64{1, 0.85, 1.15} {
		for _, sf := range []float64{0, -0.5, 0.5} {
			n++
			say("fit: start %d of 9 (coarse, %d × %d px)", n, coarse.Raster.W, coarse.Raster.H)
			t, s, sc := inner(coarse, t0*tf, s0+sf/st0.XiGNm, z0, 0.3, 100)
			if sc > bsc {
				bt, bs, bsc = t, s, sc
			}
		}
	}
	bz := z0
	if fitDepth {
		say("fit: depth (coarse)")
		bt, bs, bz, _ = search(coarse, bt, bs, z0, 0.3, 60, 14)
	}
	say("fit: refining on the full micrograph")
	bt, bs, bz, _ = search(m, bt, bs, bz, 0.05, 40, 6)
	if f.err != nil {
		return nil, f.err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	best, err := f.score(m, bt, bs, bz)
	if err != nil {
		return nil, err
	}

	// Uncertainty from the curvature of the score.
	say("fit: uncertainties from the curvature of the score")
	p := []float64{bt, bs, bz}
	h := []float64{0.02 * bt, 0.1 / st0.XiGNm, 0.02 * bt}
	np := 2
	if fitDepth {
		np = 3
	}
	at3 := func(q []float64) float64 { return eval(m, q[0], q[1], q[2]) }
	H := mat.NewSymDense(np, nil)
	f0 := best.Score
	for i := 0; i < np; i++ {
		for j := i; j < np; j++ {
			var v float64
			if i == j {
				q1 := append([]float64(nil), p...)
				q2 := append([]float64(nil), p...)
				q1[i] += h[i]
				q2[i] -= h[i]
				v = (at3(q1) - 2*f0 + at3(q2)) / (h[i] * h[i])
			} else {
				var s [4]float64
				for n, sg := range [4][2]float64{{1, 1}, {1, -1}, {-1, 1}, {-1, -1}} {
					q := append([]float64(nil), p...)
					q[i] += sg[0] * h[i]
					q[j] += sg[1] * h[j]
					s[n] = at3(q)
				}
				v = (s[0] - s[1] - s[2] + s[3]) / (4 * h[i] * h[j])
			}
			H.SetSym(i, j, -v)
		}
	}
	if f.err != nil {
		return nil, f.err
	}
	fr := &FitResult{Score: best.Score, Renders: f.renders, Replays: f.replays}
	errs := make([]float64, 3)
	var chol mat.Cholesky
	if chol.Factorize(H) {
		var inv mat.SymDense
		if err := chol.InverseTo(&inv); err == nil {
			for i := 0; i < np; i++ {
				errs[i] = math.Sqrt(2 * best.Error * inv.At(i, i))
			}
			fr.ErrorMethod = "curvature of the score"
		}
	}
	if fr.ErrorMethod == "" {
		// The maximum is flat or not a maximum along some direction.
		for i := range errs {
			errs[i] = math.Inf(1)
		}
		fr.ErrorMethod = "undetermined: the score is flat along some direction at its maximum"
	}
	dx, dy := SpecimenOffset(best.Shift.DX, best.Shift.DY, st0.GAngleDeg, View{NmPerPx: m.Raster.NmPerPx, GAngleDeg: m.GAngleDeg})
	half := m.Raster.NmPerPx / 2
	fr.ThicknessNm = Estimate{bt, errs[0]}
	fr.SPerNm = Estimate{bs, errs[1]}
	depth := Estimate{bz, errs[2]}
	if !fitDepth {
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
