package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Cavity is a spherical void: no crystal inside, so a column passing
// through it neither scatters nor absorbs over the chord it cuts (Voids).
// It has no displacement field of its own (R = 0; no surface-tension or
// gas-pressure strain is modelled).
type Cavity struct {
	at r3.Vec
	r  float64
}

// NewCavity returns the void of radius radiusNm centred on at (nm).
func NewCavity(at r3.Vec, radiusNm float64) (*Cavity, error) {
	if err := checkVec("at_nm", "centre", at, false); err != nil {
		return nil, err
	}
	if err := checkPositive("radius_nm", "cavity radius", radiusNm); err != nil {
		return nil, err
	}
	return &Cavity{at: at, r: radiusNm}, nil
}

// R is zero: a cavity removes crystal but does not strain it.
func (c *Cavity) R(r3.Vec) r3.Vec { return r3.Vec{} }

// Voids appends the chord [zc − h, zc + h], h = √(r² − ρ²), of the column
// through (x, y) at distance ρ from the centre, clipped to [z0, z1].
func (c *Cavity) Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64 {
	dx, dy := x-c.at.X, y-c.at.Y
	h2 := c.r*c.r - dx*dx - dy*dy
	if h2 <= 0 {
		return dst
	}
	h := math.Sqrt(h2)
	a, b := math.Max(c.at.Z-h, z0), math.Min(c.at.Z+h, z1)
	if a < b {
		dst = append(dst, [2]float64{a, b})
	}
	return dst
}
