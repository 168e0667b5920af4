package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Phaser is the fast-path capability the simulator looks for
// (sim.Phaser): Phase(g) returns a function that gives g·R(p) in cycles
// directly, for one reciprocal vector g (1/nm, image frame). Fields that do
// not offer it are evaluated through R.
type Phaser interface {
	Phase(g r3.Vec) func(p r3.Vec) float64
}

// PhaseOf returns the g·R function of f: its own fast path when f is a
// Phaser, otherwise g·R(p) through R.
func PhaseOf(f Field, g r3.Vec) func(p r3.Vec) float64 {
	if ph, ok := f.(Phaser); ok {
		return ph.Phase(g)
	}
	return func(p r3.Vec) float64 { return r3.Dot(g, f.R(p)) }
}

// phaseTermer is implemented by the fields of this package whose fast
// path joins a phaseSum as plain data (a line table, an inclusion), so
// that a sum of them is evaluated in one loop with no call per member.
type phaseTermer interface {
	addPhase(g r3.Vec, s *phaseSum)
}

// phaseSum is the flattened fast path of a set of fields for one g: the
// straight lines' tables, the inclusions, and the g·R functions of every
// other member (their own Phase, or through R), evaluated in that order
// and added.
type phaseSum struct {
	lines []lineTable
	incs  []inclusionPhase
	rest  []func(p r3.Vec) float64
}

// add appends f's fast path to s.
func (s *phaseSum) add(f Field, g r3.Vec) {
	if t, ok := f.(phaseTermer); ok {
		t.addPhase(g, s)
		return
	}
	s.rest = append(s.rest, PhaseOf(f, g))
}

// phaseOf returns the g·R function of the fields fs, flattened.
func phaseOf(g r3.Vec, fs ...Field) func(p r3.Vec) float64 {
	s := &phaseSum{}
	for _, f := range fs {
		s.add(f, g)
	}
	switch {
	case len(s.lines)+len(s.incs)+len(s.rest) == 0:
		return func(r3.Vec) float64 { return 0 }
	case len(s.lines)+len(s.incs) == 0 && len(s.rest) == 1:
		return s.rest[0]
	}
	return s.phase()
}

// phase returns the function that sums the terms' g·R at p (a closure
// rather than the method value, which would add a call per evaluation).
//
// The bodies of the line and inclusion terms are written out in their
// loops rather than called (a call costs about as much again as a line:
// every live register is saved around it). A line (see lineTable) is
// g·R = k ln r² + F(ψ), (x', y') rounded as in Dislocation.frame, ex·p
// and ey·p shared with the line before when the frames are the same. The
// pseudo-angle is read as the table coordinate u = (ψ + 2)·n directly:
// with q = n·y'/(|x'| + |y'|) ∈ [−n, n] (n a power of two, so n·y' is
// exact), u = 2n + q for x' ≥ 0, 4n − q for x' < 0 ≤ y', −q for x' < 0,
// y' < 0 (y' = −0 included: the side θ = −π of the cut); the four sign
// cases spell out |x'| + |y'|. u lies in [0, 4n] for every finite input;
// NaN ends at the last entry rather than outside the table. Where r²
// is 0 (on the line, or within 1e-154 nm of it, where r² underflows) the
// direction is +x', as Dislocation.R takes it; elsewhere |x'| + |y'| > 0.
//
// (Not inlined: the compiler would then copy the closure into the caller
// without inlining lnPos into it.)
//
//go:noinline
func (s *phaseSum) phase() func(p r3.Vec) float64 {
	lines, incs, rest := s.lines, s.incs, s.rest
	return func(p r3.Vec) float64 {
		v := 0.0
		var px, py float64 // ex·p, ey·p of the last line
		for k := range lines {
			l := &lines[k]
			if !l.shared {
				px = p.X*l.ex.X + p.Y*l.ex.Y + p.Z*l.ex.Z
				py = p.X*l.ey.X + p.Y*l.ey.Y + p.Z*l.ey.Z
			}
			x, y := px-l.cx, py-l.cy
			r2 := x*x + y*y
			if r2 < coreR2Nm2 {
				if r2 == 0 {
					x, y = 1, 0 // as Dislocation.R: +x' where r² is 0
				}
				r2 = coreR2Nm2
			}
			var u float64
			switch {
			case !(x < 0):
				if y >= 0 {
					u = 2*l.n + l.n*y/(x+y)
				} else {
					u = 2*l.n + l.n*y/(x-y)
				}
			case math.Signbit(y):
				u = l.n * y / (x + y)
			default:
				u = 4*l.n - l.n*y/(y-x)
			}
			i := int(u)
			if uint(i) > l.last {
				i = int(l.last)
			}
			t := u - float64(i)
			c := &l.poly[i]
			v += l.k*lnPos(r2) + (c[0] + t*(c[1]+t*(c[2]+t*c[3])))
		}
		for k := range incs {
			c := &incs[k]
			x, y, z := p.X-c.at.X, p.Y-c.at.Y, p.Z-c.at.Z
			gr := c.ge.X*x + c.ge.Y*y + c.ge.Z*z
			d2 := x*x + y*y + z*z
			if d2 > c.r02 {
				gr *= c.r03 / (d2 * math.Sqrt(d2))
			}
			v += gr
		}
		for _, f := range rest {
			v += f(p)
		}
		return v
	}
}

// Phase implements Phaser: a table of g·R built once for g (see
// lineTable), or g·R through R where no table meets the tolerance.
func (d *Dislocation) Phase(g r3.Vec) func(p r3.Vec) float64 { return phaseOf(g, d) }

func (d *Dislocation) addPhase(g r3.Vec, s *phaseSum) {
	if l := d.table(g); l != nil {
		if n := len(s.lines); n > 0 && s.lines[n-1].ex == l.ex && s.lines[n-1].ey == l.ey {
			l.shared = true
		}
		s.lines = append(s.lines, *l)
		return
	}
	s.rest = append(s.rest, func(p r3.Vec) float64 { return r3.Dot(g, d.R(p)) })
}

// table returns the angular table of g·R, or nil.
func (d *Dislocation) table(g r3.Vec) *lineTable {
	gx, gy, gu := r3.Dot(g, d.ex), r3.Dot(g, d.ey), r3.Dot(g, d.u)
	gr := func(x, y float64) float64 {
		l := d.local(x, y)
		return gx*l.X + gy*l.Y + gu*l.Z
	}
	return newLineTable(gr, d.ex, d.ey, d.cx, d.cy)
}

// Phase implements Phaser: the sum of the partials' tables.
func (d *Dissociated) Phase(g r3.Vec) func(p r3.Vec) float64 { return phaseOf(g, d) }

func (d *Dissociated) addPhase(g r3.Vec, s *phaseSum) {
	d.lead.addPhase(g, s)
	d.trail.addPhase(g, s)
}

// inclusionPhase is g·R of an Inclusion for phaseSum: ε g·r inside,
// ε r0³ g·r/|r|³ outside, r = p − at, with ge = ε g.
type inclusionPhase struct {
	at, ge   r3.Vec
	r02, r03 float64
}

// Phase implements Phaser: g·R = ε g·r inside, ε r0³ g·r/|r|³ outside.
func (c *Inclusion) Phase(g r3.Vec) func(p r3.Vec) float64 { return phaseOf(g, c) }

func (c *Inclusion) addPhase(g r3.Vec, s *phaseSum) {
	s.incs = append(s.incs, inclusionPhase{at: c.at, ge: r3.Scale(c.eps, g),
		r02: c.r0 * c.r0, r03: c.r0 * c.r0 * c.r0})
}

// A cavity adds nothing to a sum's g·R (its R is zero), not even a call.
func (c *Cavity) addPhase(r3.Vec, *phaseSum) {}

// Phase implements Phaser: the sum of the members' g·R, each by its own
// fast path where it has one, the lines' tables and the inclusions of all
// members (nested sums and dissociated dislocations included) in one loop
// each.
func (s Sum) Phase(g r3.Vec) func(p r3.Vec) float64 { return phaseOf(g, s) }

func (s Sum) addPhase(g r3.Vec, ps *phaseSum) {
	for _, f := range s {
		ps.add(f, g)
	}
}
