package sim

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"
)

// Step control of the column integrator. Within a slab the phase
// γ(z) = g·R(z) is replaced by its chord, with the departures d1, d2 from
// the chord at the two Gauss nodes handed to the fourth-order step. The
// error indicator of a slab is
//
//	e = max(|d1|, |d2|) · (floorWeight + (c/beatScale)²),
//
// c the number of beat cycles (Stepper.Beat) the slab holds: the step's
// error per unit departure grows as c² while the slab holds less than
// about a cycle and stays bounded beyond (measured against sub-stepped
// slabs, TestSlabErrorModel). A slab is accepted when e ≤ the tolerance
// (in cycles); otherwise it is retried at the length predicted from e,
// taking d ∝ h² and c ∝ h (or, when that is at least reuseFrom of it, at
// the slab's second Gauss node, where γ is known). The next slab's length
// is predicted the same way from the accepted one (at most tripling), and
// the first slab of a stretch holds firstCycles of the beat. With a perfect crystal the chord
// is exact and the column is crossed in one closed-form slab.
//
// The systematic row's Bloch-wave step (rowbloch.go) errs differently.
// For a departure that the two Gauss nodes see (quadratic or cubic in
// depth) its error is of second order in the departure, at most
// rowSecondOrder·D² whatever the beat, where the two-beam step's is
// 12 c² D (TestRowSlabErrorModel). What limits its slabs is the content
// the nodes do not see. For a column whose steppers all take that step
// (secondOrderStepper) the indicator is therefore
//
//	e = max(D·(rowFloorWeight + rowSecondOrder·D), midWeight·m),
//
// D = max(|d1|, |d2|) and m the departure at the slab's midpoint from the
// cubic through the ends and the nodes (one more sample of g·R, taken
// only when the first term passes): the quartic content, which the nodes
// miss. m ∝ h⁴ in the prediction of the next slab's length. The beat does
// not enter, so slabs recorded under this indicator serve every
// systematic row alike (beatWithin).
const (
	// DefaultTolerance is the tolerance in cycles. With it the exit
	// intensities agree with a converged solution to better than 1e-4 of
	// the incident beam (TestAccuracyAgainstConverged and, on real scenes,
	// tests.TestDefaultToleranceAgainstConverged).
	DefaultTolerance = 5e-5
	// minSlabNm is the smallest slab: it only matters within a few
	// hundredths of a nanometre of a dislocation core, where the elastic
	// field itself is not meaningful.
	minSlabNm = 1e-3
	// inset keeps phase evaluations off the surfaces across which R jumps.
	inset = 1e-9
	// beatScale is the number of beat cycles at which the error indicator
	// doubles: 1/√12, from the measured error of the step, ≈ 12 c² per
	// unit departure (TestSlabErrorModel).
	beatScale = 0.29
	// firstCycles is the length of the first slab of a stretch, in beat
	// cycles.
	firstCycles = 0.5
	// safety is the fraction of the tolerance a predicted slab aims at.
	safety = 0.7
	// rowSafety is safety for the Bloch-wave step: a rejected attempt
	// costs it a few field evaluations, a tenth of a slab, so its slabs aim
	// closer to the tolerance (measured: 4 % less time for the 7-beam
	// render of tests.BenchmarkRender256AnisotropicRow7 than with safety).
	rowSafety = 0.95
	// reuseFrom: a rejected slab whose retry is predicted at least this
	// fraction of its length is retried ending at its second Gauss node
	// (0.789 of it), where γ is already known, saving one evaluation of
	// the field (2.5 % of them on the demo scene).
	reuseFrom = 0.75
	// floorWeight weighs the departure of a slab that holds few beat
	// cycles. The step is of fourth order, so a departure that is
	// quadratic or cubic in depth costs little error there (≈ 12 c² per
	// unit departure); the floor bounds the content of higher order that
	// the two nodes do not see.
	floorWeight = 0.1
	// rowFloorWeight is floorWeight for the Bloch-wave step, half of it:
	// the quartic part of the content the nodes miss is measured at the
	// midpoint (midWeight), so the floor has only what lies beyond to
	// cover. On the scenes of tests.TestRowDefaultToleranceAgainstConverged
	// it takes 12 % fewer slabs than floorWeight, the largest difference
	// from converged rising from 1.32e-5 to 1.39e-5.
	rowFloorWeight = 0.05
	// rowSecondOrder bounds the Bloch-wave step's error per squared
	// departure, K in K·D² (amplitude per cycle²): measured at most 55
	// with 7 and 15 beams, at the Bragg position and g(3g), over 1–50 nm
	// slabs, 0.02–4 beat cycles and departures of 1e-5 to 1e-3 cycles
	// (TestRowSlabErrorModel); 80 with a margin.
	rowSecondOrder = 80
	// midWeight weighs the quartic content m seen at a slab's midpoint:
	// the Bloch-wave step's amplitude error per unit of it is at most 4.5
	// (measured over the same range); about twice that, for the quintic content
	// the midpoint does not see either.
	midWeight = 10
)

// column integrates one column; each worker owns one.
type column struct {
	p      *Problem
	st     Stepper
	psi    []complex128
	out    []float64
	tol    float64
	jumper Jumper
	voider Voider
	breaks []float64
	voids  [][2]float64
	x, y   float64
	phase  func(p r3.Vec) float64
	nEvals int
	nSlabs int
	// nRejects counts retried slab attempts.
	nRejects int
	gNorm    float64
	hasFld   bool
	// rec, when not nil, receives every step the column takes (Record).
	rec *recorder
	// also are the steppers of further models whose beats also limit the
	// slabs (Record for several models).
	also []Stepper
	// sq is st if it gives its squared beat directly.
	sq beatSquarer
	// check says whether replay re-checks each recorded slab with the
	// model's beat.
	check bool
	// mid says that the column's steppers all take the Bloch-wave step,
	// whose slabs are checked at their midpoints (see the step control
	// above); set by run.
	mid bool
}

// secondOrderStepper is implemented by steppers whose slab error is of
// second order in a departure the Gauss nodes see (the systematic row's
// Bloch-wave step), so that the step control above need not weigh the
// beat.
type secondOrderStepper interface {
	secondOrder()
}

// midChecked reports whether st and every stepper of also are
// secondOrderSteppers.
func midChecked(st Stepper, also []Stepper) bool {
	if _, ok := st.(secondOrderStepper); !ok {
		return false
	}
	for _, a := range also {
		if _, ok := a.(secondOrderStepper); !ok {
			return false
		}
	}
	return true
}

// newColumn returns a column integrator for p; phase is g·R of p.Field
// (from phaseFunc, shared by the workers), nil for a perfect crystal.
func newColumn(p *Problem, phase func(r3.Vec) float64) *column {
	c := &column{
		p:     p,
		st:    p.Model.NewStepper(),
		psi:   make([]complex128, len(p.Model.Beams())),
		out:   make([]float64, len(p.Model.Beams())),
		tol:   p.Tolerance,
		gNorm: p.GPerNm,
		phase: phase,
	}
	if c.tol <= 0 {
		c.tol = DefaultTolerance
	}
	c.sq, _ = c.st.(beatSquarer)
	if p.Field != nil {
		c.hasFld = true
		c.jumper, _ = p.Field.(Jumper)
		c.voider, _ = p.Field.(Voider)
	}
	return c
}

// beat is the fastest beat of the column's model and of the further
// models, in cycles per nm, at chord slope slope.
func (c *column) beat(slope float64) float64 {
	b := c.st.Beat(slope)
	for _, s := range c.also {
		b = math.Max(b, s.Beat(slope))
	}
	return b
}

// beatSquarer is implemented by steppers that give the square of their
// beat without a square root (the step control needs only the square).
type beatSquarer interface {
	beat2(slope float64) float64
}

// beat2 is the square of beat(slope).
func (c *column) beat2(slope float64) float64 {
	if c.sq != nil && len(c.also) == 0 {
		return c.sq.beat2(slope)
	}
	b := c.beat(slope)
	return b * b
}

// gamma is g·R at depth z of the current column, in cycles.
func (c *column) gamma(z float64) float64 {
	if !c.hasFld {
		return 0
	}
	c.nEvals++
	return c.phase(r3.Vec{X: c.x, Y: c.y, Z: z})
}

// run integrates the column through (x, y) and leaves the exit intensities
// in c.out.
func (c *column) run(x, y float64) {
	c.x, c.y = x, y
	z0, z1 := c.p.surfaces(x, y)
	c.mid = midChecked(c.st, c.also)
	c.st.Start(c.psi)
	c.breaks = c.breaks[:0]
	c.voids = c.voids[:0]
	if c.jumper != nil {
		c.breaks = c.jumper.Jumps(x, y, z0, z1, c.breaks)
	}
	if c.voider != nil {
		c.voids = c.voider.Voids(x, y, z0, z1, c.voids)
		for _, v := range c.voids {
			c.breaks = append(c.breaks, v[0], v[1])
		}
	}
	c.breaks = append(c.breaks, z0, z1)
	sort.Float64s(c.breaks)

	prevEnd := 0.0 // γ at the end of the previous segment
	first := true
	for k := 0; k+1 < len(c.breaks); k++ {
		a, b := c.breaks[k], c.breaks[k+1]
		if a < z0 {
			a = z0
		}
		if b > z1 {
			b = z1
		}
		if !(b > a) {
			continue
		}
		if c.inVoid(a, b) {
			c.st.Vacuum(c.psi, b-a)
			c.rec.vacuum(b - a)
			continue
		}
		ga := c.gamma(a + inset)
		if first {
			c.rec.begin(ga)
		} else if ga != prevEnd {
			c.st.Shift(c.psi, ga-prevEnd)
			c.rec.shift(ga - prevEnd)
		}
		first = false
		prevEnd = c.segment(a, b, ga)
	}
	c.st.Intensities(c.psi, c.out)
}

func (c *column) inVoid(a, b float64) bool {
	m := (a + b) / 2
	for _, v := range c.voids {
		if m > v[0] && m < v[1] {
			return true
		}
	}
	return false
}

// segment integrates a stretch [a, b] of crystal over which R is continuous,
// starting with γ(a) = ga, and returns γ at its end.
//
// Each slab samples γ at its end and at its two Gauss nodes; see the step
// control above.
func (c *column) segment(a, b, ga float64) float64 {
	if !c.hasFld {
		c.st.Crystal(c.psi, b-a, 0, 0, 0)
		c.rec.slab(b-a, 0, 0, 0)
		c.nSlabs++
		return 0
	}
	za := a
	h := math.Min(b-a, firstCycles/c.beat(0))
	// aim is what predicted slabs aim at: safety, or rowSafety with mid,
	// times the tolerance.
	aim := safety * c.tol
	if c.mid {
		aim = rowSafety * c.tol
	}
	for b-za > 1e-12 {
		var gb, d1, d2, quad, quart, rm float64
		known := math.NaN() // γ(za + h) when a rejected slab sampled it
		for {
			last := za+h >= b-1e-12
			switch {
			case last:
				h = b - za
				gb = c.gamma(b - inset)
			case known == known:
				gb = known
			default:
				gb = c.gamma(za + h)
			}
			d := gb - ga
			cyc2 := 0.0
			if !c.mid {
				cyc2 = c.beat2(d/h) * (h * h) // (beat cycles)², before the nodes
			}
			g1 := c.gamma(za + gaussNodes[0]*h)
			g2 := c.gamma(za + gaussNodes[1]*h)
			d1 = g1 - ga - gaussNodes[0]*d
			d2 = g2 - ga - gaussNodes[1]*d
			dep := absMax(d1, d2)
			// The indicator's parts that grow as h² and h⁴, and the
			// factor (rm) the midpoint's content asks of h.
			quad, quart, rm = floorWeight*dep, dep*cyc2*invBeatScale2, math.Inf(1)
			if c.mid {
				quad, quart = rowFloorWeight*dep, rowSecondOrder*dep*dep
			}
			err := quad + quart
			if c.mid && err <= c.tol {
				m := math.Abs(c.gamma(za+h/2) - ga - d/2 - cubicMid(d1, d2))
				if em := midWeight * m; em > err {
					err = em
					rm = math.Sqrt(math.Sqrt(aim / em))
				}
			}
			if x := err + d1 + d2; x-x != 0 { // a NaN or an infinity
				// The field is not finite here: poison the amplitudes so
				// Render reports the column, and stop.
				c.psi[0] = complex(math.NaN(), 0)
				return math.NaN()
			}
			if accept(err, c.tol, h) {
				break
			}
			c.nRejects++
			r := clamp(math.Min(rm, predict(quad, quart, aim)), 0.1, 0.9)
			known = math.NaN()
			if r >= reuseFrom {
				// Retry ending at the second Gauss node, whose γ is known.
				r, known = gaussNodes[1], g2
			}
			h *= r
			if h < minSlabNm {
				h = minSlabNm
				known = math.NaN()
			}
		}
		// The next slab's length first: its square roots and division
		// overlap the step.
		next := h * clamp(math.Min(rm, predict(quad, quart, aim)), 0, 3)
		c.st.Crystal(c.psi, h, (gb-ga)/h, d1, d2)
		c.rec.slab(h, gb-ga, d1, d2)
		c.nSlabs++
		za += h
		ga = gb
		h = next
	}
	return ga
}

// cubic returns α and β of a slab's departure u(1−u)(α + βu), u the
// fraction of its length: the cubic through δ = 0 at its ends and d1, d2
// at its Gauss nodes u = 1/2 ∓ √3/6, where u(1−u) = 1/6.
func cubic(d1, d2 float64) (alpha, beta float64) {
	beta = 6 * (d2 - d1) / (gaussNodes[1] - gaussNodes[0])
	return 6*d1 - beta*gaussNodes[0], beta
}

// cubicMid is that cubic's departure at the slab's midpoint.
func cubicMid(d1, d2 float64) float64 {
	a, b := cubic(d1, d2)
	return (a + b/2) / 4
}

// indicator is the error indicator of a slab of length h with departures
// d1, d2 (cycles) holding cyc beat cycles (see the step control above).
func indicator(d1, d2, cyc float64) float64 {
	return absMax(d1, d2) * (floorWeight + (cyc/beatScale)*(cyc/beatScale))
}

// absMax returns max(|a|, |b|) by plain comparisons (math.Max is a call
// that handles NaN and signed zeros, which a NaN test elsewhere covers).
func absMax(a, b float64) float64 {
	if a < 0 {
		a = -a
	}
	if b < 0 {
		b = -b
	}
	if b > a {
		return b
	}
	return a
}

// clamp returns x limited to [lo, hi] (x = +Inf gives hi).
func clamp(x, lo, hi float64) float64 {
	if x < lo {
		return lo
	}
	if x > hi {
		return hi
	}
	return x
}

// accept reports whether a slab of length h with indicator err passes
// tolerance tol; the shortest slab always does.
func accept(err, tol, h float64) bool { return err <= tol || h <= minSlabNm }

// predict returns the factor r by which a slab whose indicator is
// aa + bb, aa growing as h² and bb as h⁴ (floorWeight·D and D·(c/beatScale)²,
// or rowFloorWeight·D and rowSecondOrder·D²; D ∝ h², c ∝ h), is scaled so that its
// indicator meets tol (the caller gives safety × the tolerance): the
// positive root of aa r² + bb r⁴ = tol.
func predict(aa, bb, tol float64) float64 {
	if aa == 0 {
		return math.Inf(1)
	}
	if bb < 1e-6*aa {
		return math.Sqrt(tol / aa)
	}
	r2 := 2 * tol / (aa + math.Sqrt(aa*aa+4*bb*tol))
	return math.Sqrt(r2)
}

// invBeatScale2 is 1/beatScale².
const invBeatScale2 = 1 / (beatScale * beatScale)
