package scene

import "math"

// Reflection is one g of the zone with the excitation error and w it has in
// the scene's orientation.
type Reflection struct {
	// HKL is g as three indices, or as four (hkil) for a hexagonal cell.
	HKL          []float64 `json:"hkl"`
	DNm          float64   `json:"d_nm"`
	FgNm         float64   `json:"fg_nm"`                   // |F_g|, nm (with the relativistic factor)
	ExtinctionNm *float64  `json:"extinction_nm,omitempty"` // nil when forbidden
	SPerNm       float64   `json:"s_per_nm"`
	W            *float64  `json:"w,omitempty"` // nil when forbidden
	Forbidden    bool      `json:"forbidden"`
}

// ZoneLimitFactor is the default |g| limit of Reflections, in units of the
// scene's |g|.
const ZoneLimitFactor = 3

// Reflections lists the scene's g first, then every other g of the zone of
// the beam direction with |g| up to factor·|g_scene|, in order of |g|.
//
// The excitation errors follow from the orientation: the beam is tilted
// from the zone axis, about the axis perpendicular to g, until g has the
// scene's s. With K the incident wave vector, s_h = −k̂·h − λh²/2, which for
// that tilt is
//
//	s_h = (h·g/g²)(s_g + λg²/2) − λh²/2
//
// and gives s_n = n s_g + n(1−n)λg²/2 along the systematic row.
func (st *Setup) Reflections(factor float64) ([]Reflection, error) {
	if !(factor > 0) {
		factor = ZoneLimitFactor
	}
	zone, err := st.Crystal.Zone(st.Beam, factor*st.GPerNm*(1+1e-9))
	if err != nil {
		return nil, err
	}
	out := []Reflection{st.reflection(st.G, st.Crystal.Forbidden(st.G))}
	if st.Scene.Diffraction.ExtinctionNm != nil {
		xi := st.XiGNm
		w := st.W
		out[0].ExtinctionNm, out[0].W = &xi, &w
	}
	for _, r := range zone {
		if r.HKL == st.G {
			continue
		}
		out = append(out, st.reflection(r.HKL, r.Forbidden))
	}
	return out, nil
}

func (st *Setup) reflection(hkl [3]float64, forbidden bool) Reflection {
	cell := st.Crystal.Cell
	h := cell.Reciprocal(hkl)
	g := cell.Reciprocal(st.G)
	hg := h.X*g.X + h.Y*g.Y + h.Z*g.Z
	h2 := h.X*h.X + h.Y*h.Y + h.Z*h.Z
	lam := st.WavelengthNm
	s := hg/(st.GPerNm*st.GPerNm)*(st.SPerNm+lam*st.GPerNm*st.GPerNm/2) - lam*h2/2
	r := Reflection{HKL: hkl[:], DNm: 1 / math.Sqrt(h2), SPerNm: s, Forbidden: forbidden}
	if cell.IsHexagonal() {
		if four, err := cell.FourIndexPlane(hkl); err == nil {
			r.HKL = four[:]
		}
	}
	r.FgNm = cmplxAbs(st.Crystal.StructureFactor(hkl, st.VoltageKV))
	// A forbidden (or unreachable) reflection has no extinction distance.
	if xi, err := st.Crystal.ExtinctionDistance(hkl, st.VoltageKV); err == nil {
		w := s * xi
		r.ExtinctionNm, r.W = &xi, &w
	}
	return r
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }
