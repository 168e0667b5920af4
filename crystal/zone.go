package crystal

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"
)

// Reflection is one g of a zone.
type Reflection struct {
	HKL       [3]float64
	GPerNm    float64 // |g|, 1/nm
	DNm       float64 // d = 1/|g|, nm
	Forbidden bool    // kinematically forbidden (|F_g| ≈ 0)
}

// maxZoneIndex bounds the index search of Zone; beyond it the zone would
// list hundreds of thousands of reflections.
const maxZoneIndex = 400

// Zone lists every g = (hkl) ≠ 0 of the zone [uvw] (the Weiss zone law
// h u + k v + l w = 0, which holds in every crystal system) with
// |g| ≤ gMaxPerNm, allowed and forbidden, sorted by |g| and then by
// decreasing h, k, l.
func (c *Crystal) Zone(beam [3]float64, gMaxPerNm float64) ([]Reflection, error) {
	m := 0
	for i, b := range beam {
		if math.IsNaN(b) || math.IsInf(b, 0) {
			return nil, fmt.Errorf("zone axis %v is not finite", beam)
		}
		if math.Abs(b) > math.Abs(beam[m]) {
			m = i
		}
	}
	if beam[m] == 0 {
		return nil, fmt.Errorf("zone axis [0 0 0] has no direction")
	}
	if !(gMaxPerNm > 0) || math.IsInf(gMaxPerNm, 0) {
		return nil, fmt.Errorf("|g| limit %g 1/nm must be positive and finite", gMaxPerNm)
	}
	// h = g·a, so |h| ≤ |g| |a|, and likewise for k, l.
	bound := [3]int{
		int(math.Floor(gMaxPerNm * c.Cell.A)),
		int(math.Floor(gMaxPerNm * c.Cell.B)),
		int(math.Floor(gMaxPerNm * c.Cell.C)),
	}
	for _, b := range bound {
		if b > maxZoneIndex {
			return nil, fmt.Errorf("|g| limit %g 1/nm reaches index %d, above the limit of %d", gMaxPerNm, b, maxZoneIndex)
		}
	}
	p, q := (m+1)%3, (m+2)%3
	var out []Reflection
	for i := -bound[p]; i <= bound[p]; i++ {
		for j := -bound[q]; j <= bound[q]; j++ {
			var hkl [3]float64
			hkl[p], hkl[q] = float64(i), float64(j)
			x := -(hkl[p]*beam[p] + hkl[q]*beam[q]) / beam[m]
			r := math.Round(x)
			if math.Abs(x-r) > 1e-9 || math.Abs(r) > float64(bound[m]) {
				continue
			}
			hkl[m] = r + 0 // +0 turns −0 into 0
			if hkl == [3]float64{} {
				continue
			}
			g := r3.Norm(c.Cell.Reciprocal(hkl))
			if g > gMaxPerNm*(1+1e-12) {
				continue
			}
			out = append(out, Reflection{HKL: hkl, GPerNm: g, DNm: 1 / g, Forbidden: c.Forbidden(hkl)})
		}
	}
	sort.Slice(out, func(a, b int) bool {
		ra, rb := out[a], out[b]
		if math.Abs(ra.GPerNm-rb.GPerNm) > 1e-9*ra.GPerNm {
			return ra.GPerNm < rb.GPerNm
		}
		for k := 0; k < 3; k++ {
			if ra.HKL[k] != rb.HKL[k] {
				return ra.HKL[k] > rb.HKL[k]
			}
		}
		return false
	})
	return out, nil
}

// ZoneReflections returns the indices of Zone(beam, gMax): every g with
// g·B = 0 and |g| ≤ gMax (1/nm), allowed and forbidden (ask Forbidden, or
// use Zone, which flags them). It returns nil when Zone reports an error (a
// zero or non-finite beam, a non-positive or excessive limit).
func (c *Crystal) ZoneReflections(beam [3]float64, gMax float64) [][3]float64 {
	refl, err := c.Zone(beam, gMax)
	if err != nil {
		return nil
	}
	out := make([][3]float64, len(refl))
	for i, r := range refl {
		out[i] = r.HKL
	}
	return out
}
