package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// finiteVec reports whether every component of v is finite.
func finiteVec(v r3.Vec) bool {
	for _, c := range [3]float64{v.X, v.Y, v.Z} {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return false
		}
	}
	return true
}

// checkVec rejects non-finite vectors and, when nonzero is set, vectors of
// zero length.
func checkVec(field, what string, v r3.Vec, nonzero bool) error {
	if !finiteVec(v) {
		return inputErr(field, what+" has a NaN or infinite component")
	}
	if nonzero && r3.Norm(v) == 0 {
		return inputErr(field, what+" is the zero vector")
	}
	return nil
}

// checkPositive rejects values that are not finite and > 0.
func checkPositive(field, what string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return inputErr(field, what+" must be a finite number > 0")
	}
	return nil
}

// perpendicularUnit returns a unit vector perpendicular to the unit vector u:
// the part of want perpendicular to u if that is not negligible, otherwise
// the part of fallback perpendicular to u.
func perpendicularUnit(u, want, fallback r3.Vec) r3.Vec {
	w := r3.Sub(want, r3.Scale(r3.Dot(want, u), u))
	if r3.Norm(w) > 1e-9*r3.Norm(want) && r3.Norm(w) > 0 {
		return r3.Unit(w)
	}
	w = r3.Sub(fallback, r3.Scale(r3.Dot(fallback, u), u))
	if r3.Norm(w) < 1e-9 {
		// fallback parallel to u too: any axis not parallel to u.
		a := r3.Vec{X: 1}
		if math.Abs(u.X) > 0.5 {
			a = r3.Vec{Y: 1}
		}
		w = r3.Sub(a, r3.Scale(r3.Dot(a, u), u))
	}
	return r3.Unit(w)
}
