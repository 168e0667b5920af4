package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// halfPlane is the cut surface of a straight dislocation: the points
// at + s·line + λ·dir with λ > 0, s any. Its normal is line × dir.
type halfPlane struct {
	at, line, dir, normal r3.Vec
}

func newHalfPlane(at, line, dir r3.Vec) halfPlane {
	return halfPlane{at: at, line: line, dir: dir, normal: r3.Unit(r3.Cross(line, dir))}
}

// crossing returns the depth at which the column through (x, y) crosses
// the half-plane, and whether it does so inside (z0, z1). A column lying in
// the plane of the half-plane (plane parallel to z) never crosses it.
func (h halfPlane) crossing(x, y, z0, z1 float64) (float64, bool) {
	z, ok := planeCrossing(h.at, h.normal, x, y)
	if !ok || !(z > z0 && z < z1) {
		return 0, false
	}
	d := r3.Sub(r3.Vec{X: x, Y: y, Z: z}, h.at)
	if r3.Dot(d, h.dir) <= 0 {
		return 0, false
	}
	return z, true
}

// planeCrossing returns the depth z at which the column through (x, y)
// meets the plane through at with unit normal n: n·((x, y, z) − at) = 0.
// Planes within 1e-12 of containing z are reported as not crossed.
func planeCrossing(at, n r3.Vec, x, y float64) (float64, bool) {
	if math.Abs(n.Z) < 1e-12 {
		return 0, false
	}
	return at.Z - (n.X*(x-at.X)+n.Y*(y-at.Y))/n.Z, true
}
