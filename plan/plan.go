package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/defects"
	"faultline/scene"
	"faultline/sim"
)

// Options set the ranges of a plan; a nil range takes its default.
type Options struct {
	// ThicknessNm is the thickness range of the thickness curve and the
	// visibility grid; default 0 to 5 ξ_g (the grid from ξ_g/4).
	ThicknessNm *Range
	// SPerNm is the excitation-error range of the rocking curve and the
	// visibility grid; default ±3/ξ_g.
	SPerNm *Range
	// Candidates are Burgers-vector families for the g·b table
	// ("1/2<110>"), expanded by the crystal's symmetry.
	Candidates []string
	// Workers as in sim.Options.
	Workers int
}

// Curve is a perfect-crystal curve: bright and dark field against X.
type Curve struct {
	X, BF, DF []float64
}

// Visibility is the defects' visibility over a (t, s) grid; V[i][k] is at
// ThicknessNm[i], SPerNm[k].
type Visibility struct {
	ThicknessNm, SPerNm []float64
	V                   [][]float64
}

// WeakBeamPoint is the weak-beam image of the scene's first dislocation
// at the condition g(ng): its peak's position from the core along the
// profile and its full width at half height, and, for a dissociated
// dislocation, the separation of its two peaks against the partials'
// projected separation.
type WeakBeamPoint struct {
	N                 int
	SPerNm, W         float64
	PeakNm, WidthNm   float64 // NaN: no image found (imagePeak), width not resolved in the profile
	MeasuredSepNm     float64 // NaN unless dissociated (or two peaks not found)
	ProjectedSepNm    float64 // the partials' separation seen along the beam
	SeparationNm      float64 // the partials' separation in their plane
	Beams             int     // of the model used
	ProfileHalfNm     float64
	ReachNm           float64 // how far from a core its image is sought
	PeakIntensity, BG float64 // PeakIntensity NaN without an image
}

// Reuse reports the measured saving of replaying the field samples.
type Reuse struct {
	Points, Columns     int
	FreshColumns        int     // replayed columns that had to be integrated afresh
	RecordSeconds       float64 // the one render that records the samples
	ReplaySeconds       float64 // all the replays
	FreshPointSeconds   float64 // one point rendered afresh, for comparison
	ReplayPointSeconds  float64 // the same point replayed
	MaxReplayDifference float64 // at that point, replay against fresh
}

// Plan is the result of Make.
type Plan struct {
	Setup      *scene.Setup
	Thickness  Curve // against thickness (nm) at the scene's s
	Rocking    Curve // against s (1/nm) at the scene's thickness
	Visibility *Visibility
	WeakBeam   []WeakBeamPoint
	GB         *GBTable
	// PlotFormat, "pdf" or "svg", also writes every plot in that format
	// beside its PNG (figure.Plot.EncodeVector); "" writes PNGs only.
	PlotFormat string
	Reuse      Reuse
	// Suggestions are conditions to try, each with its reason.
	Suggestions []Suggestion
	// Skipped says what was not computed and why.
	Skipped []string
}

// Suggestion is a suggested condition and the reason for it.
type Suggestion struct{ What, Why string }

// reachFactor times the distance at which s + g·dR/dz = 0 on the column
// through a partial's core bounds where its weak-beam image is sought. The
// two-beam peak of a single dislocation lies inside that distance (0.3–0.6
// of it), the many-beam one near the core at 0.5–0.9 of it, but with the
// systematic row the highest maximum can lie further out: measured up to
// 2.25 times it (sim.TestRowWeakBeamPeakPosition, 9 beams) and 1.4 times
// it for each partial of a pair in g(3g)
// (tests.TestWeakBeamDissociatedPairAgainstNumpy). 2.5 covers those, a
// choice from those measurements, not from a source.
const reachFactor = 2.5

// minRise is the least height above the background, as a fraction of the
// profile's highest, of a maximum taken for a dislocation's or a
// partial's weak-beam image:
// a choice of this program (not from a source), above the rounding-level
// wiggles of a flat background and below the weaker partial's image in
// the cases tested (11 % and more of the stronger).
const minRise = 0.05

// profilePixels is the number of columns of a profile; profileHalfNm its
// default half length.
const (
	profilePixels = 161
	profileHalfNm = 20
)

// Make computes the plan of the scene sc (dir: the directory relative
// paths of the scene are relative to).
func Make(ctx context.Context, sc *scene.Scene, dir string, opt Options) (*Plan, error) {
	b := new(scene.Builder)
	st, err := b.Build(sc, dir)
	if err != nil {
		return nil, err
	}
	p := &Plan{Setup: st}
	xi := st.XiGNm
	tr := Range{0, 5 * xi, xi / 40}
	if opt.ThicknessNm != nil {
		tr = *opt.ThicknessNm
	}
	sr := Range{-3 / xi, 3 / xi, 0.05 / xi}
	if opt.SPerNm != nil {
		sr = *opt.SPerNm
	}
	// Perfect-crystal curves: one column each.
	perfect := func(m sim.Model, t float64) []float64 {
		q := &sim.Problem{Model: m, GPerNm: st.GPerNm, ThicknessNm: t, Grid: sim.Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
		return q.Column(0, 0)
	}
	for _, t := range tr.Values() {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		bf, df := 1.0, 0.0
		if t > 0 {
			v := perfect(st.Problem.Model, t)
			bf, df = beam(st.Problem.Model, v, 0), beam(st.Problem.Model, v, 1)
		}
		p.Thickness.X = append(p.Thickness.X, t)
		p.Thickness.BF = append(p.Thickness.BF, bf)
		p.Thickness.DF = append(p.Thickness.DF, df)
	}
	models := map[float64]sim.Model{}
	modelAt := func(s float64) (sim.Model, error) {
		if m, ok := models[s]; ok {
			return m, nil
		}
		c, err := withDeviation(sc, st, s, 0)
		if err != nil {
			return nil, err
		}
		sst, err := b.Build(c, dir)
		if err != nil {
			return nil, err
		}
		models[s] = sst.Problem.Model
		return sst.Problem.Model, nil
	}
	for _, s := range sr.Values() {
		m, err := modelAt(s)
		if err != nil {
			return nil, err
		}
		v := perfect(m, st.Problem.ThicknessNm)
		p.Rocking.X = append(p.Rocking.X, s)
		p.Rocking.BF = append(p.Rocking.BF, beam(m, v, 0))
		p.Rocking.DF = append(p.Rocking.DF, beam(m, v, 1))
	}
	if st.Problem.Field == nil {
		p.Skipped = append(p.Skipped, "visibility and weak beam: the scene has no defects")
	} else {
		if err := p.visibility(ctx, st, tr, sr, modelAt, opt); err != nil {
			return nil, err
		}
		if err := p.weakBeam(ctx, sc, st, b, dir, opt); err != nil {
			return nil, err
		}
	}
	if len(opt.Candidates) > 0 {
		if p.GB, err = gbTable(st, opt.Candidates); err != nil {
			return nil, err
		}
	}
	p.suggest()
	return p, nil
}

// beam returns the intensity of beam n from a column's output.
func beam(m sim.Model, v []float64, n int) float64 {
	for k, b := range m.Beams() {
		if b == n {
			return v[k]
		}
	}
	return math.NaN()
}

// withDeviation returns a copy of sc at excitation error s, with the model
// the scene used (and its beams, at least minBeams for a systematic row).
func withDeviation(sc *scene.Scene, st *scene.Setup, s float64, minBeams int) (*scene.Scene, error) {
	c, err := scene.Clone(sc)
	if err != nil {
		return nil, err
	}
	edits := []scene.Edit{{Path: "diffraction.s_per_nm", Value: s}, {Path: "diffraction.model", Value: st.Model}}
	if st.Model == "systematic-row" {
		n := len(st.Row)
		if minBeams > n {
			n = minBeams
		}
		edits = append(edits, scene.Edit{Path: "diffraction.beams", Value: n})
	}
	if err := scene.SetAll(c, edits...); err != nil {
		return nil, err
	}
	return c, nil
}

// profileLine returns the middle, direction and half length of the
// profile across the scene's first defect, and the cores' positions
// along it (two for a dissociated dislocation).
func profileLine(st *scene.Setup) (at, e1 r3.Vec, cores []float64, kind string, index int, err error) {
	outs, err := st.Outlines()
	if err != nil {
		return at, e1, nil, "", 0, err
	}
	e1 = r3.Vec{X: 1}
	for _, o := range outs {
		switch {
		case len(o.Lines) > 0:
			l := o.Lines[0]
			p0, p1 := l[0], l[len(l)-1]
			d := r3.Vec{X: p1.X - p0.X, Y: p1.Y - p0.Y}
			at = r3.Vec{X: (p0.X + p1.X) / 2, Y: (p0.Y + p1.Y) / 2}
			if r3.Norm(d) > 1e-9 {
				d = r3.Unit(d)
				e1 = r3.Vec{X: d.Y, Y: -d.X}
				if e1.X < 0 || (e1.X == 0 && e1.Y < 0) {
					e1 = r3.Scale(-1, e1)
				}
			}
			for _, l := range o.Lines {
				// Where the line crosses the profile: its offset along e1.
				q := l[0]
				cores = append(cores, (q.X-at.X)*e1.X+(q.Y-at.Y)*e1.Y)
			}
			return at, e1, cores, o.Type, o.Index, nil
		case len(o.Circles) > 0:
			c := o.Circles[0].Center
			return r3.Vec{X: c.X, Y: c.Y}, e1, []float64{0}, o.Type, o.Index, nil
		case len(o.Ellipses) > 0:
			c := o.Ellipses[0].Center
			return r3.Vec{X: c.X, Y: c.Y}, e1, []float64{0}, o.Type, o.Index, nil
		case len(o.Polygons) > 0:
			return r3.Vec{}, e1, []float64{0}, o.Type, o.Index, nil
		}
	}
	return at, e1, nil, "", 0, errors.New("no defect lies in the imaged part of the foil")
}

// visibility fills p.Visibility by recording the profile's field samples
// once and replaying them at every (t, s).
func (p *Plan) visibility(ctx context.Context, st *scene.Setup, tr, sr Range, modelAt func(float64) (sim.Model, error), opt Options) error {
	at, e1, _, _, _, err := profileLine(st)
	if err != nil {
		p.Skipped = append(p.Skipped, "visibility: "+err.Error())
		return nil
	}
	ts := coarse(tr.Values(), 16)
	ss := coarse(sr.Values(), 21)
	var tsPos []float64
	for _, t := range ts {
		if t > 0 {
			tsPos = append(tsPos, t)
		}
	}
	if len(tsPos) == 0 || len(ss) == 0 {
		p.Skipped = append(p.Skipped, "visibility: empty thickness or s range")
		return nil
	}
	half := math.Max(profileHalfNm, 0.1*st.Problem.Grid.WidthNm)
	prof := profileProblem(st.Problem, at, e1, half, profilePixels)
	prof.ThicknessNm = tsPos[len(tsPos)-1]
	lo, err := modelAt(ss[0])
	if err != nil {
		return err
	}
	hi, err := modelAt(ss[len(ss)-1])
	if err != nil {
		return err
	}
	rec := time.Now()
	_, samples, err := sim.Record(ctx, prof, sim.RecordOptions{Options: sim.Options{Workers: opt.Workers}, Also: []sim.Model{lo, hi}})
	if err != nil {
		return err
	}
	p.Reuse.RecordSeconds = time.Since(rec).Seconds()
	v := &Visibility{ThicknessNm: tsPos, SPerNm: ss, V: make([][]float64, len(tsPos))}
	start := time.Now()
	for i, t := range tsPos {
		v.V[i] = make([]float64, len(ss))
		for k, s := range ss {
			m, err := modelAt(s)
			if err != nil {
				return err
			}
			var im *sim.Image
			fresh := 0
			if samples != nil {
				im, fresh, err = samples.Replay(ctx, m, t, sim.Options{Workers: opt.Workers})
			} else {
				q := *prof
				q.Model, q.ThicknessNm = m, t
				im, err = sim.Render(ctx, &q, sim.Options{Workers: opt.Workers})
				fresh = profilePixels
			}
			if err != nil {
				return err
			}
			p.Reuse.FreshColumns += fresh
			p.Reuse.Points++
			p.Reuse.Columns += profilePixels
			v.V[i][k] = michelson(im.DF())
		}
	}
	p.Reuse.ReplaySeconds = time.Since(start).Seconds()
	// One point both ways, for the measured saving and agreement.
	mid := tsPos[len(tsPos)/2]
	m, _ := modelAt(ss[len(ss)/2])
	q := *prof
	q.Model, q.ThicknessNm = m, mid
	t0 := time.Now()
	fim, err := sim.Render(ctx, &q, sim.Options{Workers: opt.Workers})
	if err != nil {
		return err
	}
	p.Reuse.FreshPointSeconds = time.Since(t0).Seconds()
	if samples != nil {
		t0 = time.Now()
		rim, _, err := samples.Replay(ctx, m, mid, sim.Options{Workers: opt.Workers})
		if err != nil {
			return err
		}
		p.Reuse.ReplayPointSeconds = time.Since(t0).Seconds()
		p.Reuse.MaxReplayDifference = sim.MaxDifference(fim, rim)
	}
	p.Visibility = v
	return nil
}

// coarse thins vals to at most n values, keeping both ends.
func coarse(vals []float64, n int) []float64 {
	if len(vals) <= n {
		return vals
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = vals[int(math.Round(float64(i)*float64(len(vals)-1)/float64(n-1)))]
	}
	return out
}

// weakBeam scans the weak-beam conditions g(ng), n = 2…6, on a profile
// across the scene's first dislocation, at the scene's thickness. The
// image of the dislocation (of each partial of a dissociated one) is
// sought by one rule, imagePeak: on the side of its core where
// s + g·dR/dz = 0, within reachFactor times the distance at which that
// happens on the column through the core (Cockayne, Ray & Whelan 1969).
func (p *Plan) weakBeam(ctx context.Context, sc *scene.Scene, st *scene.Setup, b *scene.Builder, dir string, opt Options) error {
	at, e1, cores, kind, index, err := profileLine(st)
	if err != nil || (kind != "dislocation" && kind != "dissociated") {
		p.Skipped = append(p.Skipped, "weakbeam.csv: the scene's first defect in view is not a dislocation")
		return nil
	}
	lines := imagedLines(st, index)
	if len(lines) != len(cores) {
		p.Skipped = append(p.Skipped, "weakbeam.csv: the scene's first dislocation's lines were not found in its field")
		return nil
	}
	mid := 0.0
	for _, c := range cores {
		mid += c / float64(len(cores))
	}
	proj := math.NaN()
	sep := math.NaN()
	if len(cores) == 2 {
		proj = math.Abs(cores[0] - cores[1])
		if sep, err = st.PartialSeparationNm(index); err != nil {
			return err
		}
	}
	// dist/|s| is the distance of the rule, the larger of the lines'
	// (shared by a pair's partials); sides[k] the side of line k along e1
	// for s > 0.
	dist := 0.0
	sides := make([]float64, len(lines))
	for k, l := range lines {
		var d float64
		sides[k], d = imageRule(l, st.GPerNm, st.Crystal.Elastic.Poisson, e1)
		dist = math.Max(dist, d)
	}
	lam, g := st.WavelengthNm, st.GPerNm
	// The profile reaches reachFactor times the rule's distance at the
	// smallest s (n = 2) beyond the farther core, and wbMarginNm more for
	// the image's half height, at wbPixelNm per column.
	spread := 0.0
	for _, c := range cores {
		spread = math.Max(spread, math.Abs(c-mid))
	}
	half := math.Max(wbMinHalfNm, spread+reachFactor*dist/(lam*g*g/2)+wbMarginNm)
	npx := 2*int(math.Ceil(half/wbPixelNm)) + 1
	half = float64(npx-1) * wbPixelNm / 2
	prof := profileProblem(st.Problem, r3.Add(at, r3.Scale(mid, e1)), e1, half, npx)
	var samples *sim.Samples
	for n := 2; n <= 6; n++ {
		s := float64(n-1) * lam * g * g / 2
		c, err := withDeviation(sc, st, s, 2*n+1)
		if err != nil {
			return err
		}
		if st.Model == "systematic-row" && 2*n+1 > 2*sim.MaxRowOrder+1 {
			break
		}
		sst, err := b.Build(c, dir)
		if err != nil {
			var fe *scene.FieldError
			if errors.As(err, &fe) && fe.Path == "diffraction.beams" {
				p.Skipped = append(p.Skipped, fmt.Sprintf("weakbeam.csv: g(%dg) and beyond: %v", n, err))
				break
			}
			return err
		}
		m := sst.Problem.Model
		var im *sim.Image
		if samples == nil {
			q := *prof
			q.Model = m
			im, samples, err = sim.Record(ctx, &q, sim.RecordOptions{Options: sim.Options{Workers: opt.Workers}})
		} else {
			im, _, err = samples.Replay(ctx, m, prof.ThicknessNm, sim.Options{Workers: opt.Workers})
		}
		if err != nil {
			return err
		}
		bgp := &sim.Problem{Model: m, GPerNm: g, ThicknessNm: prof.ThicknessNm, Grid: sim.Grid{NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}}
		bg := beam(m, bgp.Column(0, 0), 1)
		df := im.DF()
		xs := make([]float64, len(df))
		for i := range xs {
			xs[i] = prof.Grid.X(i)
		}
		reach := reachFactor * dist / math.Abs(s)
		pt := WeakBeamPoint{N: n, SPerNm: s, W: s * st.XiGNm, Beams: len(m.Beams()), ProjectedSepNm: proj, SeparationNm: sep, MeasuredSepNm: math.NaN(),
			ProfileHalfNm: half, ReachNm: reach, BG: bg, PeakNm: math.NaN(), WidthNm: math.NaN(), PeakIntensity: math.NaN()}
		px := xs[1] - xs[0]
		sg := math.Copysign(1, s)
		ib := -1
		if len(cores) == 2 {
			var two [2]int
			pt.MeasuredSepNm, two = twoPeaks(df, xs, bg, [2]float64{cores[0] - mid, cores[1] - mid}, [2]float64{sg * sides[0], sg * sides[1]}, reach, px)
			// The stronger partial's image stands for the pair's.
			for _, i := range two {
				if i >= 0 && (ib < 0 || df[i] > df[ib]) {
					ib = i
				}
			}
		} else {
			c := cores[0] - mid
			ib = imagePeak(df, xs, bg, searchTop(df, xs, bg, []float64{c}, reach, px), c, sg*sides[0], reach, px)
		}
		// Position from the core (for a dissociated dislocation, from the
		// middle of the ribbon).
		if ib >= 0 {
			pt.PeakNm, pt.PeakIntensity = xs[ib], df[ib]
			pt.WidthNm = fwhm(df, xs, bg, ib)
		}
		p.WeakBeam = append(p.WeakBeam, pt)
	}
	return nil
}

// The weak-beam profile: at least ±wbMinHalfNm, sampled every wbPixelNm,
// and wbMarginNm beyond the farthest point where an image is sought (for
// its half height). Choices of this program: the pixel resolves the
// narrowest images measured (0.6 nm wide at g(5g)) with four samples.
const (
	wbMinHalfNm = 12.0
	wbPixelNm   = 0.15
	wbMarginNm  = 4.0
)

// imagedLines returns the dislocation lines of the scene's defect index:
// itself, or the two partials of a dissociated dislocation in the order of
// its outline's lines (profileLine's cores); nil if the field is not one of
// those.
func imagedLines(st *scene.Setup, index int) []*defects.Dislocation {
	fs, ok := st.Problem.Field.(defects.Sum)
	if !ok || index >= len(fs) {
		return nil
	}
	switch d := fs[index].(type) {
	case *defects.Dislocation:
		return []*defects.Dislocation{d}
	case *defects.Dissociated:
		lead, trail := d.Partials()
		return []*defects.Dislocation{lead, trail}
	}
	return nil
}

// imageRule returns where the weak-beam image of the dislocation d is
// sought, by the rule of Cockayne, Ray & Whelan (1969, Phil. Mag. 20,
// 1265): on the column through the core's depth, s + g·dR/dz = 0 at the
// distance |g·b|/(2π|s|) from the core for a screw and (1 + 1/(2(1−ν)))
// times that for an edge (isotropic elasticity, the edge's glide plane
// normal to the beam); dist is the larger, |g·b|(1 + 1/(2(1−ν)))/(2π),
// to be divided by |s|: a bound for any character. The side is where
// g·dR/dz has the sign opposite to s, along sign((g·b)s)·(u × z) (the
// side rule of TestDislocationImageSide): side is that direction's sign
// along e1 for s > 0, 0 where it is not defined (g·b = 0, or u × z normal
// to the profile). g is along x (the defects are built in the frame of g).
func imageRule(d *defects.Dislocation, gPerNm, nu float64, e1 r3.Vec) (side, dist float64) {
	gb := gPerNm * d.BurgersNm().X
	dist = (1 + 1/(2*(1-nu))) * math.Abs(gb) / (2 * math.Pi)
	if sd := r3.Dot(r3.Cross(d.Line(), r3.Vec{Z: 1}), e1); math.Abs(gb) > 1e-6 && math.Abs(sd) > 1e-6 {
		side = math.Copysign(1, gb*sd)
	}
	return side, dist
}

// minRiseAbs is the least rise above the background, in units of the
// incident beam, of a maximum taken for an image, whatever the profile's
// highest: a guard against rounding-level maxima of a nearly flat
// profile, a choice of this program set at the rendered weak-beam
// profiles' measured agreement with the independent numpy integration
// (below 1e-6, README "Dislocation image side"). It is below the render's
// stated accuracy (1e-4): the fainter partial's image of a screw pair in
// g(5g) (TestWeakBeamDissociatedSeparation) rises 3e-5–1e-4 above the
// background, its position agreeing with the other partial's shift.
const minRiseAbs = 1e-6

// searchTop returns the highest of bg and of v within reach (plus a
// pixel px) of any of the cores, on either side: the profile's peak of
// imagePeak's threshold, taken where images are sought so that it does not
// depend on how far the profile extends.
func searchTop(v, x []float64, bg float64, cores []float64, reach, px float64) float64 {
	top := bg
	for i, y := range v {
		for _, c := range cores {
			if math.Abs(x[i]-c) <= reach+px {
				top = math.Max(top, y)
			}
		}
	}
	return top
}

// imagePeak returns the index of the weak-beam image of a dislocation
// (or a partial) whose core lies at core along x: the highest maximum of v
// that stands above bg by more than minRise of top − bg (top from
// searchTop) and by more than minRiseAbs, and lies within reach of the
// core on side (+1 or −1 along x, 0 for either), a pixel px allowed on the
// other. It is −1 when there is none (reach 0 included): a far maximum, one
// on the wrong side, or the window's edge is never taken for the image.
// A maximum is a sample above its left neighbour (or equal) and above its
// right one, so neither end of the profile is one.
func imagePeak(v, x []float64, bg, top, core, side, reach, px float64) int {
	if !(reach > 0) {
		return -1
	}
	lo, hi := -reach-px, reach+px
	switch {
	case side > 0:
		lo = -px
	case side < 0:
		hi = px
	}
	best := -1
	for i := 1; i+1 < len(v); i++ {
		if !(v[i] >= v[i-1] && v[i] > v[i+1]) || v[i]-bg <= minRise*(top-bg) || v[i]-bg <= minRiseAbs {
			continue
		}
		if d := x[i] - core; d >= lo && d <= hi && (best < 0 || v[i] > v[best]) {
			best = i
		}
	}
	return best
}

// fwhm returns the full width at half height above bg of the maximum of v
// at index i, its half-height crossings interpolated linearly between
// samples; NaN when a crossing lies beyond an end of the profile (the
// width is not resolved in the window, never clipped by it).
func fwhm(v, x []float64, bg float64, i int) float64 {
	half := bg + (v[i]-bg)/2
	lo, hi := i, i
	for lo > 0 && v[lo] > half {
		lo--
	}
	for hi < len(v)-1 && v[hi] > half {
		hi++
	}
	if v[lo] > half || v[hi] > half {
		return math.NaN()
	}
	cross := func(j, k int) float64 { return x[j] + (half-v[j])*(x[k]-x[j])/(v[k]-v[j]) }
	return cross(hi-1, hi) - cross(lo, lo+1)
}

// twoPeaks returns the distance between the images of two partials whose
// cores lie at cores (positions along x), each found by imagePeak on its
// side (sides) within reach, and their indices (−1: none). The distance
// is NaN when a partial has no image or both take the same maximum (the
// pair is not resolved).
func twoPeaks(v, x []float64, bg float64, cores, sides [2]float64, reach, px float64) (float64, [2]int) {
	var best [2]int
	top := searchTop(v, x, bg, cores[:], reach, px)
	for k := range best {
		best[k] = imagePeak(v, x, bg, top, cores[k], sides[k], reach, px)
	}
	if best[0] < 0 || best[1] < 0 || best[0] == best[1] {
		return math.NaN(), best
	}
	return math.Abs(x[best[1]] - x[best[0]]), best
}
