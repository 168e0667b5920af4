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
