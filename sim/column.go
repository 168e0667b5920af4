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
	for b-za > 1e-12 {
		var gb, d1, d2, dep, cyc2 float64
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
			cyc2 = c.beat2(d/h) * (h * h) // (beat cycles)², before the nodes
			g1 := c.gamma(za + gaussNodes[0]*h)
			g2 := c.gamma(za + gaussNodes[1]*h)
			d1 = g1 - ga - gaussNodes[0]*d
			d2 = g2 - ga - gaussNodes[1]*d
			dep = absMax(d1, d2)
			err := dep * (floorWeight + cyc2*invBeatScale2)
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
			r := clamp(predict(dep, cyc2, c.tol), 0.1, 0.9)
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
		next := h * clamp(predict(dep, cyc2, c.tol), 0, 3)
		c.st.Crystal(c.psi, h, (gb-ga)/h, d1, d2)
		c.rec.slab(h, gb-ga, d1, d2)
		c.nSlabs++
		za += h
		ga = gb
		h = next
	}
	return ga
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

// predict returns the factor r by which a slab of departure dep holding
// cyc beat cycles (cyc2 = cyc²) is scaled so that its indicator, with
// dep ∝ h² and cyc ∝ h, meets safety × tol: the positive root of
// A r² + B r⁴ = safety·tol, A = floorWeight·dep, B = dep·(cyc/beatScale)².
func predict(dep, cyc2, tol float64) float64 {
	if dep == 0 {
		return math.Inf(1)
	}
	t := safety * tol
	aa := floorWeight * dep
	bb := dep * cyc2 * invBeatScale2
	if bb < 1e-6*aa {
		return math.Sqrt(t / aa)
	}
	r2 := 2 * t / (aa + math.Sqrt(aa*aa+4*bb*t))
	return math.Sqrt(r2)
}

// invBeatScale2 is 1/beatScale².
const invBeatScale2 = 1 / (beatScale * beatScale)
