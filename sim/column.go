package sim

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"
)

// Step control of the column integrator. Within a slab the phase
// γ(z) = g·R(z) is replaced by its chord; a slab is accepted when γ at its
// quarter points departs from the chord by no more than the tolerance (in
// cycles), otherwise it is halved. Accepted slabs double for the next try.
// With a perfect crystal the chord is exact and the column is crossed in a
// few closed-form slabs.
const (
	// DefaultTolerance is the phase tolerance in cycles. With it the exit
	// intensities agree with a converged solution to better than 1e-4 of
	// the incident beam (TestAccuracyAgainstConverged).
	DefaultTolerance = 5e-5
	// minSlabNm is the smallest slab: it only matters within a few
	// hundredths of a nanometre of a dislocation core, where the elastic
	// field itself is not meaningful.
	minSlabNm = 1e-3
	// inset keeps phase evaluations off the surfaces across which R jumps.
	inset = 1e-9
	// beatCycles is the number of beat cycles a slab may hold before the
	// error indicator is scaled up.
	beatCycles = 0.5
)

// column integrates one column; each worker owns one.
type column struct {
	p      *Problem
	st     Stepper
	psi    []complex128
	out    []float64
	tol    float64
	hMax   float64
	jumper Jumper
	voider Voider
	breaks []float64
	voids  [][2]float64
	x, y   float64
	phase  func(p r3.Vec) float64
	nEvals int
	nSlabs int
	gNorm  float64
	hasFld bool
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
	c.hMax = p.ThicknessNm / 4
	if p.Field != nil {
		c.hasFld = true
		c.jumper, _ = p.Field.(Jumper)
		c.voider, _ = p.Field.(Voider)
	}
	return c
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
			continue
		}
		ga := c.gamma(a + inset)
		if !first && ga != prevEnd {
			c.st.Shift(c.psi, ga-prevEnd)
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
// Each slab samples γ at its end and at its two Gauss nodes. The
// departures from the chord at the nodes feed the fourth-order slab
// propagator; the larger departure is the error indicator,
// which for a smooth γ scales as h². A slab whose indicator exceeds the
// tolerance is retried shorter; the next slab's length is predicted from the
// indicator (a standard step-size controller, at most doubling).
func (c *column) segment(a, b, ga float64) float64 {
	if !c.hasFld {
		c.st.Crystal(c.psi, b-a, 0, 0, 0)
		c.nSlabs++
		return 0
	}
	za := a
	h := math.Min(c.hMax, b-a)
	for b-za > 1e-12 {
		var gb, d1, d2, err float64
		for {
			last := za+h >= b-1e-12
			if last {
				h = b - za
				gb = c.gamma(b - inset)
			} else {
				gb = c.gamma(za + h)
			}
			d := gb - ga
			d1 = c.gamma(za+gaussNodes[0]*h) - ga - gaussNodes[0]*d
			d2 = c.gamma(za+gaussNodes[1]*h) - ga - gaussNodes[1]*d
			err = math.Max(math.Abs(d1), math.Abs(d2))
			// The Gauss nodes resolve the departures only while the slab
			// holds less than about one cycle of the beat between the
			// beams; beyond that the indicator grows with the square of
			// the number of cycles.
			if cyc := c.st.Beat(d/h) * h; cyc > beatCycles {
				err *= (cyc / beatCycles) * (cyc / beatCycles)
			}
			if math.IsNaN(err) || math.IsInf(err, 0) {
				// The field is not finite here: poison the amplitudes so
				// Render reports the column, and stop.
				c.psi[0] = complex(math.NaN(), 0)
				return math.NaN()
			}
			if err <= c.tol || h <= minSlabNm {
				break
			}
			h *= math.Max(0.2, 0.9*math.Sqrt(c.tol/err))
			if h < minSlabNm {
				h = minSlabNm
			}
		}
		c.st.Crystal(c.psi, h, (gb-ga)/h, d1, d2)
		c.nSlabs++
		za += h
		ga = gb
		grow := 2.0
		if err > 0 {
			grow = math.Min(2, 0.9*math.Sqrt(c.tol/err))
		}
		h = math.Min(h*math.Max(grow, 0.5), c.hMax)
	}
	return ga
}
