package sim

import "gonum.org/v1/gonum/spatial/r3"

// Displacement is a displacement field R(r) of the crystal: position in nm
// in the image frame (x along g, z along the beam into the foil), R in nm.
type Displacement interface {
	R(p r3.Vec) r3.Vec
}

// Jumper is implemented by displacement fields that are discontinuous
// across surfaces (planar faults, the cut surface of a partial dislocation
// or of a loop). Jumps appends to dst, in increasing order, every depth z in
// the open interval (z0, z1) at which the column through (x, y) crosses such
// a surface, and returns the extended slice. The integrator splits the
// column there and applies the jump of g·R as an exact phase change, so a
// fault needs no special case and no small steps.
type Jumper interface {
	Jumps(x, y, z0, z1 float64, dst []float64) []float64
}

// Voider is implemented by fields that contain regions with no crystal
// (cavities). Voids appends to dst, in increasing order and without
// overlap, the depth intervals [a, b] within [z0, z1] of the column through
// (x, y) that hold no crystal: no scattering and no absorption there.
type Voider interface {
	Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64
}

// Phaser is implemented by fields that can evaluate the phase g·R
// directly, faster than through R (a straight dislocation's K ln r + F(θ)
// from a table, for one). Phase is called once per render with the
// reciprocal vector g (1/nm, image frame; the integrator's g lies along
// +x) and returns a function giving g·R(p) in cycles, which must agree
// with g·R(p) to 1e-7 cycles and be safe for concurrent use.
type Phaser interface {
	Phase(g r3.Vec) func(p r3.Vec) float64
}

// phaseFunc returns g·R(p) of f for g = (gNorm, 0, 0): f's own fast path
// if it is a Phaser, otherwise through R.
func phaseFunc(f Displacement, gNorm float64) func(p r3.Vec) float64 {
	if ph, ok := f.(Phaser); ok {
		return ph.Phase(r3.Vec{X: gNorm})
	}
	return func(p r3.Vec) float64 { return gNorm * f.R(p).X }
}
