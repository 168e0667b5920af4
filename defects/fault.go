package defects

import "gonum.org/v1/gonum/spatial/r3"

// Fault is an infinite planar fault (stacking fault, antiphase boundary):
// the crystal on the side the normal points to is displaced rigidly by the
// fault vector, R = shift for n·(p − at) > 0 and R = 0 otherwise. In the
// column the fault is a phase jump α = 2π g·shift at the crossing depth.
type Fault struct {
	at, n, shift r3.Vec
}

// NewFault returns the infinite fault plane through at (nm) with the given
// normal (any length) and shift (nm), all in the image frame.
func NewFault(at, normal, shift r3.Vec) (*Fault, error) {
	if err := checkVec("at_nm", "position", at, false); err != nil {
		return nil, err
	}
	if err := checkVec("plane", "fault plane normal", normal, true); err != nil {
		return nil, err
	}
	if err := checkVec("shift", "fault vector", shift, false); err != nil {
		return nil, err
	}
	return &Fault{at: at, n: r3.Unit(normal), shift: shift}, nil
}

// R returns shift on the side the normal points to and zero elsewhere (on
// the plane itself: zero).
func (f *Fault) R(p r3.Vec) r3.Vec {
	if r3.Dot(r3.Sub(p, f.at), f.n) > 0 {
		return f.shift
	}
	return r3.Vec{}
}

// Jumps appends the depth in (z0, z1) at which the column through (x, y)
// crosses the fault plane; a plane containing the beam direction is never
// crossed.
func (f *Fault) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if z, ok := planeCrossing(f.at, f.n, x, y); ok && z > z0 && z < z1 {
		dst = append(dst, z)
	}
	return dst
}
