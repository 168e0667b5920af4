package crystal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// Cell is a unit cell: lengths in nm, angles in degrees.
//
// Its Cartesian frame (the crystal frame of the whole program) has a along
// x, b in the xy plane and c completing a right-handed set:
//
//	a = a (1, 0, 0)
//	b = b (cos γ, sin γ, 0)
//	c = c (cos β, (cos α − cos β cos γ)/sin γ, V/(a b c sin γ))
//
// with V = a b c sqrt(1 − cos²α − cos²β − cos²γ + 2 cos α cos β cos γ)
// (International Tables for Crystallography Vol. B, ch. 1.1).
type Cell struct{ A, B, C, Alpha, Beta, Gamma float64 }

// NewCell returns the cell with lengths a, b, c (nm) and angles α, β, γ
// (degrees), or an error when a length is not positive and finite or the
// three angles cannot close a parallelepiped (each in (0, 180), each smaller
// than the sum of the other two, and their sum below 360).
// Limits on a cell edge, nm: 0.1 nm is below any interatomic distance
// (the shortest cell edges of real crystals are about 0.25 nm), and 20 nm
// holds more atoms than MaxAtoms at the density of a metal, beyond any
// structure a diffraction-contrast image is simulated for.
const (
	MinCellNm = 0.1
	MaxCellNm = 20.0
)

func NewCell(a, b, c, alphaDeg, betaDeg, gammaDeg float64) (Cell, error) {
	for _, l := range []struct {
		name string
		v    float64
	}{{"a", a}, {"b", b}, {"c", c}} {
		if !(l.v >= MinCellNm && l.v <= MaxCellNm) {
			return Cell{}, fmt.Errorf("cell: length %s = %g nm must lie from %g to %g nm", l.name, l.v, MinCellNm, MaxCellNm)
		}
	}
	for _, an := range []struct {
		name string
		v    float64
	}{{"alpha", alphaDeg}, {"beta", betaDeg}, {"gamma", gammaDeg}} {
		if !(an.v > 0 && an.v < 180) {
			return Cell{}, fmt.Errorf("cell: angle %s = %g° must lie strictly between 0 and 180", an.name, an.v)
		}
	}
	cl := Cell{a, b, c, alphaDeg, betaDeg, gammaDeg}
	// The volume factor vanishes exactly when one angle equals the sum of the
	// other two or the three sum to 360°; below a small margin the cell is flat.
	if v := cl.volumeFactor(); !(v > 1e-6) {
		return Cell{}, fmt.Errorf("cell: angles alpha = %g°, beta = %g°, gamma = %g° are impossible (no parallelepiped has them: each must be smaller than the sum of the other two and all three must sum below 360°)", alphaDeg, betaDeg, gammaDeg)
	}
	return cl, nil
}

// Cubic returns the cubic cell of edge a (nm). It panics if a is not
// positive: a preset or test passing a bad edge is a programmer error.
func Cubic(a float64) Cell {
	c, err := NewCell(a, a, a, 90, 90, 90)
	if err != nil {
		panic("crystal: Cubic: " + err.Error())
	}
	return c
}

// Hexagonal returns the hexagonal cell with edges a and c (nm), γ = 120°.
// It panics on non-positive lengths (programmer error).
func Hexagonal(a, c float64) Cell {
	cl, err := NewCell(a, a, c, 90, 90, 120)
	if err != nil {
		panic("crystal: Hexagonal: " + err.Error())
	}
	return cl
}

func cosd(deg float64) float64 {
	// Exact zeros for right angles keep cubic cells free of 1e-17 noise.
	switch deg {
	case 90:
		return 0
	case 60:
		return 0.5
	case 120:
		return -0.5
	}
	return math.Cos(deg * math.Pi / 180)
}

func sind(deg float64) float64 {
	if deg == 90 {
		return 1
	}
	return math.Sin(deg * math.Pi / 180)
}

// volumeFactor is V/(abc) = sqrt(1 − cos²α − cos²β − cos²γ + 2 cos α cos β cos γ),
// or NaN/≤0 when the angles are impossible.
func (c Cell) volumeFactor() float64 {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	return math.Sqrt(1 - ca*ca - cb*cb - cg*cg + 2*ca*cb*cg)
}

// Volume returns the cell volume in nm³.
func (c Cell) Volume() float64 { return c.A * c.B * c.C * c.volumeFactor() }

// Basis returns the cell edges a, b, c as Cartesian vectors in nm.
func (c Cell) Basis() (a, b, cv r3.Vec) {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	sg := sind(c.Gamma)
	a = r3.Vec{X: c.A}
	b = r3.Vec{X: c.B * cg, Y: c.B * sg}
	cy := (ca - cb*cg) / sg
	cv = r3.Vec{X: c.C * cb, Y: c.C * cy, Z: c.C * c.volumeFactor() / sg}
	return a, b, cv
}

// ReciprocalBasis returns a*, b*, c* in 1/nm (no factor 2π):
// a* = (b × c)/V, b* = (c × a)/V, c* = (a × b)/V, so that a_i·a*_j = δ_ij.
func (c Cell) ReciprocalBasis() (as, bs, cs r3.Vec) {
	a, b, cv := c.Basis()
	v := r3.Dot(a, r3.Cross(b, cv))
	return r3.Scale(1/v, r3.Cross(b, cv)), r3.Scale(1/v, r3.Cross(cv, a)), r3.Scale(1/v, r3.Cross(a, b))
}

// Direction returns the lattice vector u a + v b + w c in Cartesian nm.
func (c Cell) Direction(uvw [3]float64) r3.Vec {
	a, b, cv := c.Basis()
	return r3.Add(r3.Add(r3.Scale(uvw[0], a), r3.Scale(uvw[1], b)), r3.Scale(uvw[2], cv))
}

// Reciprocal returns g = h a* + k b* + l c* in Cartesian 1/nm (no 2π), the
// normal of the (hkl) planes with |g| = 1/d.
func (c Cell) Reciprocal(hkl [3]float64) r3.Vec {
	as, bs, cs := c.ReciprocalBasis()
	return r3.Add(r3.Add(r3.Scale(hkl[0], as), r3.Scale(hkl[1], bs)), r3.Scale(hkl[2], cs))
}

// DSpacing returns the spacing of the (hkl) planes in nm, 1/|g|, or +Inf
// for (000).
func (c Cell) DSpacing(hkl [3]float64) float64 { return 1 / r3.Norm(c.Reciprocal(hkl)) }

// Metric returns the metric tensor G_ij = a_i·a_j (nm²), so that the squared
// length of [uvw] is uᵀ G u.
func (c Cell) Metric() *mat.SymDense {
	a, b, cv := c.Basis()
	return gram(a, b, cv)
}

// ReciprocalMetric returns G* = G⁻¹, G*_ij = a*_i·a*_j (1/nm²), so that
// 1/d²(hkl) = hᵀ G* h.
func (c Cell) ReciprocalMetric() *mat.SymDense {
	as, bs, cs := c.ReciprocalBasis()
	return gram(as, bs, cs)
}

func gram(v ...r3.Vec) *mat.SymDense {
	g := mat.NewSymDense(3, nil)
	for i := range v {
		for j := i; j < 3; j++ {
			g.SetSym(i, j, r3.Dot(v[i], v[j]))
		}
	}
	return g
}

// AngleBetweenPlanes returns the angle in degrees between the normals of
// (h1) and (h2): cos φ = h1ᵀ G* h2 / (|g1| |g2|).
func (c Cell) AngleBetweenPlanes(h1, h2 [3]float64) float64 {
	return angleDeg(c.Reciprocal(h1), c.Reciprocal(h2))
}

// AngleBetweenDirections returns the angle in degrees between [u1] and [u2]:
// cos φ = u1ᵀ G u2 / (|u1| |u2|).
func (c Cell) AngleBetweenDirections(u1, u2 [3]float64) float64 {
	return angleDeg(c.Direction(u1), c.Direction(u2))
}

// AngleBetweenPlaneAndDirection returns the angle in degrees between the
// normal of (hkl) and the direction [uvw].
func (c Cell) AngleBetweenPlaneAndDirection(hkl, uvw [3]float64) float64 {
	return angleDeg(c.Reciprocal(hkl), c.Direction(uvw))
}

func angleDeg(p, q r3.Vec) float64 {
	cs := r3.Cos(p, q)
	return math.Acos(math.Max(-1, math.Min(1, cs))) * 180 / math.Pi
}

// IsHexagonal reports whether the cell has hexagonal metric: a = b,
// α = β = 90°, γ = 120° (within 1e-6 relative / 1e-6°).
func (c Cell) IsHexagonal() bool {
	return math.Abs(c.A-c.B) <= 1e-6*c.A && math.Abs(c.Alpha-90) < 1e-6 &&
		math.Abs(c.Beta-90) < 1e-6 && math.Abs(c.Gamma-120) < 1e-6
}

// System names the crystal system the cell metric is compatible with
// ("cubic", "tetragonal", "orthorhombic", "hexagonal", "rhombohedral",
// "monoclinic", "triclinic"); a metric can only tell the highest system it
// allows, not the symmetry of the atoms in it.
func (c Cell) System() string {
	eqL := func(x, y float64) bool { return math.Abs(x-y) <= 1e-6*math.Max(x, y) }
	eqA := func(x, y float64) bool { return math.Abs(x-y) < 1e-6 }
	right := func(x float64) bool { return eqA(x, 90) }
	switch {
	case right(c.Alpha) && right(c.Beta) && right(c.Gamma):
		switch {
		case eqL(c.A, c.B) && eqL(c.B, c.C):
			return "cubic"
		case eqL(c.A, c.B):
			return "tetragonal"
		}
		return "orthorhombic"
	case c.IsHexagonal():
		return "hexagonal"
	case eqL(c.A, c.B) && eqL(c.B, c.C) && eqA(c.Alpha, c.Beta) && eqA(c.Beta, c.Gamma):
		return "rhombohedral"
	case (right(c.Alpha) && right(c.Gamma)) || (right(c.Alpha) && right(c.Beta)) || (right(c.Beta) && right(c.Gamma)):
		return "monoclinic"
	}
	return "triclinic"
}
