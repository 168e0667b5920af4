package defects

import "gonum.org/v1/gonum/spatial/r3"

// Field is a displacement field R(p) of the crystal: position p in nm in the
// image frame (x along g, z along the beam into the foil), R in nm.
type Field interface {
	R(p r3.Vec) r3.Vec
}

// jumper is the discontinuity report the simulator asks for (sim.Jumper):
// every depth z in (z0, z1), increasing, at which the column through (x, y)
// crosses a surface across which R jumps.
type jumper interface {
	Jumps(x, y, z0, z1 float64, dst []float64) []float64
}

// voider is the cavity report the simulator asks for (sim.Voider).
type voider interface {
	Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64
}
