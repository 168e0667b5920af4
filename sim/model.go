package sim

// A Model is a way of computing the beams leaving one column: the
// kinematical approximation, the two-beam dynamical theory, or (in the same
// shape) a many-beam systematic row. A model carries the constants of the
// perfect crystal (excitation errors, extinction and absorption lengths);
// the displacement field enters only through the phase g·R that the column
// integrator hands to its Stepper.
type Model interface {
	// Name is the scene-file name of the model ("two-beam", ...).
	Name() string
	// Beams lists the beams the model follows as multiples n of g.
	Beams() []int
	// Validate reports a model constant that cannot be used.
	Validate() error
	// NewStepper returns a Stepper with its own scratch space; each worker
	// of the pool owns one.
	NewStepper() Stepper
}

// A Stepper advances the beam amplitudes of one column, slab by slab.
//
// The amplitudes it holds are χ_n = φ_n exp(2πi (s_n z + n g·R(z))), where
// φ_n are the amplitudes of the beams n·g in the phase-factor form of the
// column equations (see doc.go). In that representation a slab of crystal
// in which g·R changes linearly with depth is a perfect crystal with the
// excitation errors shifted by n·d(g·R)/dz, which has a closed-form transfer
// matrix; a jump of g·R (a stacking fault) is an exact phase factor; and the
// intensities |χ_n|² equal |φ_n|².
type Stepper interface {
	// Start sets psi to the amplitudes at the entrance surface: 1 in the
	// transmitted beam, 0 in the others.
	Start(psi []complex128)
	// Crystal advances psi through h nm of crystal in which g·R (in
	// cycles) follows its chord, rising at slope cycles per nm, apart from
	// departures d1 and d2 (cycles) at the two Gauss–Legendre nodes
	// z = h(1/2 ∓ √3/6) of the slab. With d1 = d2 = 0 the slab is a
	// perfect crystal with shifted excitation errors and must be exact.
	Crystal(psi []complex128, h, slope, d1, d2 float64)
	// Vacuum advances psi through h nm with no crystal (a cavity).
	Vacuum(psi []complex128, h float64)
	// Shift applies a jump of g·R by dGamma cycles.
	Shift(psi []complex128, dGamma float64)
	// Beat returns the fastest beat between the beams, in cycles per nm, in
	// a slab whose g·R rises at slope cycles per nm: the step control keeps
	// the slabs short against it.
	Beat(slope float64) float64
	// Intensities writes the exit intensity of each beam, in the order of
	// the model's Beams, into out.
	Intensities(psi []complex128, out []float64)
}
