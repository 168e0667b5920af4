package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// glideTol is the relative tolerance on the geometric conditions of a
// dissociation (b1 + b2 = b, partials and line in the glide plane): inputs
// converted from Miller indices are exact to rounding, so 1e-6 only absorbs
// that.
const glideTol = 1e-6

// Dissociated is a dislocation split into two parallel partials on its
// glide plane with a stacking-fault ribbon between them. The leading
// partial b1 lies at at + (d/2)ŝ, the trailing partial b2 at at − (d/2)ŝ,
// ŝ = n̂ × û (n̂ the glide-plane normal, û the line sense). Both cuts run from
// their partial along −ŝ in the glide plane, so across the glide plane
// R(n̂ side) − R(other side) is
//
//	0        beyond the leading partial (ζ > d/2, ζ = ŝ·(p − at)),
//	b1       on the ribbon (−d/2 < ζ < d/2): the fault vector,
//	b1 + b2 = b beyond the trailing partial (a lattice vector: g·b is an
//	         integer and the phase jump 2πg·b is invisible).
//
// Choose b1 so that it is the fault vector of the fault you mean (intrinsic
// or extrinsic). Jumps reports the crossing of the cuts.
type Dissociated struct {
	lead, trail *Dislocation
	sepNm       float64
	pair        Sum
}

// NewDissociated returns the dislocation b (nm) dissociated into b1 + b2 on
// the glide plane with normal planeNormal, along line, centred on at, with
// partial separation separationNm (see SeparationFromSFE). anisotropic
// selects Stroh's solution for both partials.
func NewDissociated(b, b1, b2, line, at, planeNormal r3.Vec, separationNm float64, m Medium, anisotropic bool) (*Dissociated, error) {
	for _, v := range []struct {
		field, what string
		v           r3.Vec
	}{{"b", "Burgers vector", b}, {"partials[0]", "partial Burgers vector", b1}, {"partials[1]", "partial Burgers vector", b2}, {"line", "line direction", line}, {"plane", "glide-plane normal", planeNormal}} {
		if err := checkVec(v.field, v.what, v.v, true); err != nil {
			return nil, err
		}
	}
	if err := checkVec("at_nm", "position", at, false); err != nil {
		return nil, err
	}
	if err := checkPositive("separation_nm", "partial separation", separationNm); err != nil {
		return nil, err
	}
	if sum := r3.Add(b1, b2); r3.Norm(r3.Sub(sum, b)) > glideTol*r3.Norm(b) {
		return nil, inputErr("partials", fmt.Sprintf("partials add up to %v, not to b = %v", sum, b))
	}
	n, u := r3.Unit(planeNormal), r3.Unit(line)
	if math.Abs(r3.Dot(n, u)) > glideTol {
		return nil, inputErr("line", fmt.Sprintf("line %v is not in the glide plane (normal %v): angle to the plane %.3g°", line, planeNormal, math.Asin(math.Abs(r3.Dot(n, u)))*180/math.Pi))
	}
	for i, bi := range []r3.Vec{b1, b2} {
		if math.Abs(r3.Dot(n, bi)) > glideTol*r3.Norm(bi) {
			return nil, inputErr(fmt.Sprintf("partials[%d]", i), fmt.Sprintf("partial %v is not in the glide plane (normal %v)", bi, planeNormal))
		}
	}
	// Exact in-plane line (the tolerance above admits rounding).
	u = r3.Unit(r3.Sub(u, r3.Scale(r3.Dot(u, n), n)))
	s := r3.Cross(n, u)
	cut := r3.Scale(-1, s)
	half := r3.Scale(separationNm/2, s)
	lead, err := newDislocation(b1, u, r3.Add(at, half), &cut, m, anisotropic)
	if err != nil {
		return nil, fmt.Errorf("leading partial: %w", err)
	}
	trail, err := newDislocation(b2, u, r3.Sub(at, half), &cut, m, anisotropic)
	if err != nil {
		return nil, fmt.Errorf("trailing partial: %w", err)
	}
	return &Dissociated{lead: lead, trail: trail, sepNm: separationNm, pair: Sum{lead, trail}}, nil
}

// Partials returns the leading (b1) and trailing (b2) partial.
func (d *Dissociated) Partials() (lead, trail *Dislocation) { return d.lead, d.trail }

// SeparationNm returns the partial separation used.
func (d *Dissociated) SeparationNm() float64 { return d.sepNm }

// R returns the sum of the partials' displacements.
func (d *Dissociated) R(p r3.Vec) r3.Vec { return r3.Add(d.lead.R(p), d.trail.R(p)) }

// Jumps appends the depth at which the column crosses the partials' cuts
// (the ribbon or the glide plane beyond the trailing partial), once.
func (d *Dissociated) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	return d.pair.Jumps(x, y, z0, z1, dst)
}
