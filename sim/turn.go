package sim

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Turn returns the problem p seen on a raster turned by phi radians,
// counter-clockwise as displayed (x to the right, y down the picture),
// about the beam: pixel (i, j) of the returned problem's grid is the
// column of p at
//
//	x = X cos φ − Y sin φ,  y = X sin φ + Y cos φ,
//
// with (X, Y) the pixel's position on grid (X right, Y down). The picture
// it renders is p's picture with its content turned by φ, so that g, which
// points along +x in p, points at φ counter-clockwise in the result; the
// defects and the foil turn with it. grid is the raster of the result.
//
// The field is wrapped, not rebuilt: the integrator reads only the
// component of R along g, which the wrapper leaves in p's frame. Jumper,
// Voider and Phaser (the fast path for g·R) are passed through.
func Turn(p *Problem, phi float64, grid Grid) *Problem {
	q := *p
	q.Grid = grid
	c, s := math.Cos(phi), math.Sin(phi)
	if n := p.Normal; n != (r3.Vec{}) {
		q.Normal = r3.Vec{X: n.X*c + n.Y*s, Y: -n.X*s + n.Y*c, Z: n.Z}
	}
	if p.Field != nil {
		t := &turned{f: p.Field, c: c, s: s}
		t.j, _ = p.Field.(Jumper)
		t.v, _ = p.Field.(Voider)
		if ph, ok := p.Field.(Phaser); ok {
			q.Field = &turnedPhaser{turned: t, ph: ph}
		} else {
			q.Field = t
		}
	}
	return &q
}

type turned struct {
	f    Displacement
	j    Jumper
	v    Voider
	c, s float64
}

func (t *turned) at(x, y float64) (float64, float64) {
	return x*t.c - y*t.s, x*t.s + y*t.c
}

func (t *turned) R(p r3.Vec) r3.Vec {
	x, y := t.at(p.X, p.Y)
	return t.f.R(r3.Vec{X: x, Y: y, Z: p.Z})
}

func (t *turned) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if t.j == nil {
		return dst
	}
	u, v := t.at(x, y)
	return t.j.Jumps(u, v, z0, z1, dst)
}

func (t *turned) Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64 {
	if t.v == nil {
		return dst
	}
	u, v := t.at(x, y)
	return t.v.Voids(u, v, z0, z1, dst)
}

// turnedPhaser is a turned field whose inner field has the Phaser fast
// path: the phase at a turned position is the inner phase at the position
// it shows, g unchanged (g·R is read in p's frame).
type turnedPhaser struct {
	*turned
	ph Phaser
}

func (t *turnedPhaser) Phase(g r3.Vec) func(p r3.Vec) float64 {
	f := t.ph.Phase(g)
	return func(p r3.Vec) float64 {
		x, y := t.at(p.X, p.Y)
		return f(r3.Vec{X: x, Y: y, Z: p.Z})
	}
}
