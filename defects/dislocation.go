package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// coreRadiusNm is the distance from a dislocation line inside which the
// field is not evaluated at its true radius: r is held at this value, so R
// stays finite on the line itself (linear elasticity fails there anyway).
const coreRadiusNm = 1e-3

// Dislocation is a straight dislocation of any character along any line
// direction. Its displacement is that of an infinite straight line in an
// infinite medium (no surface relaxation). It is built in the dislocation
// frame (x', y', u): u the unit line sense, x' = −(cut direction), y' = u × x',
// and the θ (or ln(x'+p y')) branch cut lies on the half-plane y' = 0,
// x' < 0, i.e. along the cut direction. See the package documentation.
type Dislocation struct {
	at, u, b r3.Vec
	ex, ey   r3.Vec  // dislocation frame: x', y'; u completes it
	cx, cy   float64 // ex·at, ey·at: x' = ex·p − cx (see frame)
	cut      halfPlane
	iso      *isoEdgeScrew
	stroh    *strohField
}

// NewDislocation returns a straight dislocation with Burgers vector b (nm),
// line sense line (any length), passing through at (nm), all in the image
// frame. Its cut surface is the half-plane bounded by the line that contains
// the beam direction +z (for a line along z: the +x direction), so columns
// never cross it and Jumps reports nothing. anisotropic selects Stroh's
// solution (m.C must be set) over the isotropic one of Hirth & Lothe.
func NewDislocation(b, line, at r3.Vec, m Medium, anisotropic bool) (*Dislocation, error) {
	return newDislocation(b, line, at, nil, m, anisotropic)
}

// newDislocation builds a dislocation whose cut runs along cutDir (made
// perpendicular to the line), or, when cutDir is nil, along the default
// direction (+z projected perpendicular to the line).
func newDislocation(b, line, at r3.Vec, cutDir *r3.Vec, m Medium, anisotropic bool) (*Dislocation, error) {
	if err := checkVec("b", "Burgers vector", b, true); err != nil {
		return nil, err
	}
	if err := checkVec("line", "line direction", line, true); err != nil {
		return nil, err
	}
	if err := checkVec("at_nm", "position", at, false); err != nil {
		return nil, err
	}
	if err := m.checkIsotropic(); err != nil {
		return nil, err
	}
	u := r3.Unit(line)
	var e r3.Vec
	if cutDir != nil {
		e = perpendicularUnit(u, *cutDir, r3.Vec{Z: 1})
	} else {
		e = perpendicularUnit(u, r3.Vec{Z: 1}, r3.Vec{X: 1})
	}
	ex := r3.Scale(-1, e)
	d := &Dislocation{
		at:  at,
		u:   u,
		b:   b,
		ex:  ex,
		ey:  r3.Cross(u, ex),
		cut: newHalfPlane(at, u, e),
	}
	d.cx, d.cy = r3.Dot(d.ex, at), r3.Dot(d.ey, at)
	bl := r3.Vec{X: r3.Dot(b, d.ex), Y: r3.Dot(b, d.ey), Z: r3.Dot(b, u)}
	if anisotropic {
		if err := checkStiffness(m.C); err != nil {
			return nil, err
		}
		s, err := newStrohField(*m.C, m.Stroh, d.ex, d.ey, u, bl)
		if err != nil {
			return nil, fmt.Errorf("anisotropic dislocation: %w", err)
		}
		d.stroh = s
	} else {
		d.iso = newIsoEdgeScrew(bl, m.Poisson, m.ShearGPa)
	}
	return d, nil
}

// BurgersNm returns the Burgers vector (nm, image frame).
func (d *Dislocation) BurgersNm() r3.Vec { return d.b }

// Line returns the unit line sense u (image frame).
func (d *Dislocation) Line() r3.Vec { return d.u }

// Anisotropic reports whether the field is Stroh's anisotropic solution.
func (d *Dislocation) Anisotropic() bool { return d.stroh != nil }

// Elasticity describes the solution in use, for reports: "isotropic",
// "anisotropic (Stroh, p = ...)" or the degenerate-sextic rule.
func (d *Dislocation) Elasticity() string {
	if d.stroh != nil {
		return d.stroh.String()
	}
	return "isotropic"
}

// R returns the displacement (nm) at p (nm), both in the image frame.
func (d *Dislocation) R(p r3.Vec) r3.Vec {
	l := d.local(d.frame(p))
	return r3.Add(r3.Add(r3.Scale(l.X, d.ex), r3.Scale(l.Y, d.ey)), r3.Scale(l.Z, d.u))
}

// frame returns the dislocation-frame coordinates (x', y') of p:
// x' = ex·p − ex·at, y' = ey·p − ey·at, in this order of operations, which
// the fast path (phaseSum.phase) repeats to the bit, and which lets the
// partials of a dissociated dislocation, whose frames are the same, share
// ex·p and ey·p there. Where the direction of (x', y') is rounding noise
// (within ~1e-13 nm of the line, inside the core) both take the same one.
func (d *Dislocation) frame(p r3.Vec) (x, y float64) {
	return p.X*d.ex.X + p.Y*d.ex.Y + p.Z*d.ex.Z - d.cx, p.X*d.ey.X + p.Y*d.ey.Y + p.Z*d.ey.Z - d.cy
}

// local is the displacement in the dislocation frame at (x', y').
func (d *Dislocation) local(x, y float64) r3.Vec {
	if d.stroh != nil {
		return d.stroh.u(x, y)
	}
	return d.iso.u(x, y)
}

// Jumps appends the depth in (z0, z1) at which the column through (x, y)
// crosses the dislocation's cut surface. Crossing the cut from its y' < 0
// side to its y' > 0 side R jumps by +b (θ runs from −π to π), which is the
// statement that R gains +b on a right-handed circuit about u. With the
// default cut no column crosses it.
func (d *Dislocation) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if z, ok := d.cut.crossing(x, y, z0, z1); ok {
		dst = append(dst, z)
	}
	return dst
}

// isoEdgeScrew is the isotropic field of a straight dislocation in its own
// frame, Burgers vector (bx, by, bz) = (edge along x', edge along y', screw).
//
// The screw part is the anti-plane field u_z = bz arg(x' + p₃ y')/2π, with
// p₃ = i (θ itself) in an isotropic medium; the degenerate-sextic rule of
// the Stroh solution sets another p₃ (see newStrohField).
type isoEdgeScrew struct {
	bx, by, bz float64
	c1, c2, c3 float64 // 1/(2(1−ν)), (1−2ν)/(4(1−ν)), 1/(4(1−ν))
	p3         complex128
	nu, mu     float64 // in-plane ν and μ (GPa), for the energy factor
	mu3        float64 // anti-plane shear modulus (GPa), for the energy factor
}

func newIsoEdgeScrew(bl r3.Vec, nu, mu float64) *isoEdgeScrew {
	return &isoEdgeScrew{
		bx: bl.X, by: bl.Y, bz: bl.Z,
		c1: 1 / (2 * (1 - nu)),
		c2: (1 - 2*nu) / (4 * (1 - nu)),
		c3: 1 / (4 * (1 - nu)),
		p3: complex(0, 1),
		nu: nu, mu: mu, mu3: mu,
	}
}

// energyFactor is the energy-factor matrix in the dislocation frame,
// diag(μ/(1−ν), μ/(1−ν), μ₃) (Hirth & Lothe 1982, eqs. 3-50 and 3-51).
func (f *isoEdgeScrew) energyFactor() [3][3]float64 {
	return [3][3]float64{{f.mu / (1 - f.nu)}, {0, f.mu / (1 - f.nu)}, {0, 0, f.mu3}}
}

// u is Hirth & Lothe (1982) eqs. 3-2 (screw) and 3-45 (edge, b along x'),
// the second edge component by a quarter turn of the first:
//
//	u_x = bx/2π [θ + xy/(2(1−ν)r²)] + by/2π [(1−2ν)/(4(1−ν)) ln r² + (y²−x²)/(4(1−ν)r²)]
//	u_y = −bx/2π [(1−2ν)/(4(1−ν)) ln r² + (x²−y²)/(4(1−ν)r²)] + by/2π [θ − xy/(2(1−ν)r²)]
//	u_z = bz θ/2π
//
// θ = atan2(y, x) ∈ (−π, π], r in nm (the length unit of ln r² only adds a
// constant to R).
func (f *isoEdgeScrew) u(x, y float64) r3.Vec {
	r2 := x*x + y*y
	if r2 < coreRadiusNm*coreRadiusNm {
		// Hold r at the core radius, keep the direction (or pick +x' on the line).
		if r2 == 0 {
			x, y = coreRadiusNm, 0
		} else {
			s := coreRadiusNm / math.Sqrt(r2)
			x, y = x*s, y*s
		}
		r2 = coreRadiusNm * coreRadiusNm
	}
	th := math.Atan2(y, x) / (2 * math.Pi)
	th3 := th
	if f.p3 != complex(0, 1) {
		th3 = math.Atan2(imag(f.p3)*y, x+real(f.p3)*y) / (2 * math.Pi)
	}
	lr := math.Log(r2)
	xy, d := x*y/r2, (x*x-y*y)/r2
	k := 1 / (2 * math.Pi)
	return r3.Vec{
		X: f.bx*(th+k*f.c1*xy) + f.by*k*(f.c2*lr-f.c3*d),
		Y: -f.bx*k*(f.c2*lr+f.c3*d) + f.by*(th-k*f.c1*xy),
		Z: f.bz * th3,
	}
}
