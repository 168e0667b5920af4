package plan

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/sim"
)

// across is a displacement field seen in a frame whose x runs along a
// profile: local (x, y, z) is the scene's point at + x·e1 + y·e2, depth
// z + dz (dz keeps the entrance surface of a tilted foil where it is at
// the profile's middle). R is returned in the scene's frame, whose x is
// along g, as the integrator expects.
type across struct {
	f      sim.Displacement
	j      sim.Jumper
	v      sim.Voider
	at     r3.Vec // the profile's middle (z: the surface offset)
	e1, e2 r3.Vec // unit vectors in the image plane
}

func newAcross(f sim.Displacement, at, e1 r3.Vec) *across {
	a := &across{f: f, at: at, e1: e1, e2: r3.Vec{X: -e1.Y, Y: e1.X}}
	a.j, _ = f.(sim.Jumper)
	a.v, _ = f.(sim.Voider)
	return a
}

func (a *across) to(x, y float64) (float64, float64) {
	return a.at.X + x*a.e1.X + y*a.e2.X, a.at.Y + x*a.e1.Y + y*a.e2.Y
}

func (a *across) R(p r3.Vec) r3.Vec {
	x, y := a.to(p.X, p.Y)
	return a.f.R(r3.Vec{X: x, Y: y, Z: p.Z + a.at.Z})
}

func (a *across) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if a.j == nil {
		return dst
	}
	X, Y := a.to(x, y)
	n := len(dst)
	dst = a.j.Jumps(X, Y, z0+a.at.Z, z1+a.at.Z, dst)
	for k := n; k < len(dst); k++ {
		dst[k] -= a.at.Z
	}
	return dst
}

func (a *across) Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64 {
	if a.v == nil {
		return dst
	}
	X, Y := a.to(x, y)
	n := len(dst)
	dst = a.v.Voids(X, Y, z0+a.at.Z, z1+a.at.Z, dst)
	for k := n; k < len(dst); k++ {
		dst[k][0] -= a.at.Z
		dst[k][1] -= a.at.Z
	}
	return dst
}

// Phase forwards the field's fast path, if it has one.
func (a *across) Phase(g r3.Vec) func(p r3.Vec) float64 {
	ph, ok := a.f.(sim.Phaser)
	if !ok {
		return func(p r3.Vec) float64 { return r3.Dot(g, a.R(p)) }
	}
	f := ph.Phase(g)
	return func(p r3.Vec) float64 {
		x, y := a.to(p.X, p.Y)
		return f(r3.Vec{X: x, Y: y, Z: p.Z + a.at.Z})
	}
}

// profileProblem is p restricted to n columns along a line of length
// 2·halfNm through at (image plane) in direction e1: a one-row grid whose
// column i lies at at + x_i·e1.
func profileProblem(p *sim.Problem, at, e1 r3.Vec, halfNm float64, n int) *sim.Problem {
	q := *p
	q.Grid = sim.Grid{NX: n, NY: 1, WidthNm: 2 * halfNm, HeightNm: 2 * halfNm / float64(n)}
	var dz float64
	if nv := p.Normal; nv != (r3.Vec{}) {
		dz = -(nv.X*at.X + nv.Y*at.Y) / nv.Z
		e2 := r3.Vec{X: -e1.Y, Y: e1.X}
		q.Normal = r3.Vec{X: nv.X*e1.X + nv.Y*e1.Y, Y: nv.X*e2.X + nv.Y*e2.Y, Z: nv.Z}
	}
	if p.Field != nil {
		q.Field = newAcross(p.Field, r3.Vec{X: at.X, Y: at.Y, Z: dz}, e1)
	}
	return &q
}

// michelson is (max − min)/(max + min) of v (0 if both are 0).
func michelson(v []float64) float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo = math.Min(lo, x)
		hi = math.Max(hi, x)
	}
	if hi+lo <= 0 {
		return 0
	}
	return (hi - lo) / (hi + lo)
}
