package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// BoundedFault is a planar fault occupying the strip of its plane between
// two parallel lines, with a rigid shift and no elastic field of its own
// (the bounding partials' strain is left out; add them as dislocations, or
// use Dissociated, where it matters). A fault that runs out of the foil is
// bounded by the foil surfaces simply because the column stops there; use
// infinite limits for that.
//
// Geometry: plane through at with unit normal n̂; bounding lines parallel to
// ê (made to lie in the plane); in-plane coordinate w = (n̂ × ê)·(q − at) of
// a point q of the plane; the fault is fromNm < w < toNm.
//
// Displacement: for a plane not containing the beam, R(p) = shift when p
// is on the n̂ side and the column through p meets the plane inside the
// strip, otherwise 0. The discontinuity surfaces are then the strip and the
// vertical walls above its edges; columns never cross a vertical wall, so
// Jumps reports only the strip crossing. For an edge-on plane (containing
// the beam) the strip is tested at the point's own projection along n̂, and
// Jumps reports the crossings of the walls {w = from, w = to} on the n̂ side.
type BoundedFault struct {
	at, n, shift, w r3.Vec
	from, to        float64
	edgeOn          bool
}

// NewBoundedFault returns the fault on the plane through at (nm) with the
// given normal, rigid shift (nm), edge direction of the bounding lines, and
// strip limits fromNm < toNm (nm; ±Inf allowed for a half-plane or the whole
// plane).
func NewBoundedFault(at, normal, shift, edge r3.Vec, fromNm, toNm float64) (*BoundedFault, error) {
	if err := checkVec("at_nm", "position", at, false); err != nil {
		return nil, err
	}
	if err := checkVec("plane", "fault plane normal", normal, true); err != nil {
		return nil, err
	}
	if err := checkVec("shift", "fault vector", shift, false); err != nil {
		return nil, err
	}
	if err := checkVec("edge", "bounding-line direction", edge, true); err != nil {
		return nil, err
	}
	if math.IsNaN(fromNm) || math.IsNaN(toNm) || !(fromNm < toNm) {
		return nil, inputErr("bounds_nm", fmt.Sprintf("strip limits [%g, %g] nm must satisfy from < to", fromNm, toNm))
	}
	n := r3.Unit(normal)
	e := r3.Sub(edge, r3.Scale(r3.Dot(edge, n), n))
	if r3.Norm(e) < 1e-6*r3.Norm(edge) {
		return nil, inputErr("edge", fmt.Sprintf("bounding-line direction %v is normal to the fault plane", edge))
	}
	e = r3.Unit(e)
	return &BoundedFault{at: at, n: n, shift: shift, w: r3.Cross(n, e), from: fromNm, to: toNm, edgeOn: math.Abs(n.Z) < 1e-12}, nil
}

func (f *BoundedFault) inStrip(q r3.Vec) bool {
	w := r3.Dot(f.w, r3.Sub(q, f.at))
	return w > f.from && w < f.to
}

// R returns shift on the faulted side of the strip, zero elsewhere.
func (f *BoundedFault) R(p r3.Vec) r3.Vec {
	h := r3.Dot(r3.Sub(p, f.at), f.n)
	if h <= 0 {
		return r3.Vec{}
	}
	var q r3.Vec
	if f.edgeOn {
		q = r3.Sub(p, r3.Scale(h, f.n))
	} else {
		z, _ := planeCrossing(f.at, f.n, p.X, p.Y)
		q = r3.Vec{X: p.X, Y: p.Y, Z: z}
	}
	if f.inStrip(q) {
		return f.shift
	}
	return r3.Vec{}
}

// Jumps appends the depths in (z0, z1) where the column crosses a surface
// across which R jumps (see BoundedFault).
func (f *BoundedFault) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if !f.edgeOn {
		z, _ := planeCrossing(f.at, f.n, x, y)
		if z > z0 && z < z1 && f.inStrip(r3.Vec{X: x, Y: y, Z: z}) {
			dst = append(dst, z)
		}
		return dst
	}
	var zs []float64
	for _, lim := range []float64{f.from, f.to} {
		if math.IsInf(lim, 0) || math.Abs(f.w.Z) < 1e-12 {
			continue
		}
		// w·((x, y, z) − at) = lim.
		z := f.at.Z + (lim-f.w.X*(x-f.at.X)-f.w.Y*(y-f.at.Y))/f.w.Z
		p := r3.Vec{X: x, Y: y, Z: z}
		if z > z0 && z < z1 && r3.Dot(r3.Sub(p, f.at), f.n) > 0 {
			zs = append(zs, z)
		}
	}
	if len(zs) == 2 && zs[0] > zs[1] {
		zs[0], zs[1] = zs[1], zs[0]
	}
	return append(dst, zs...)
}
