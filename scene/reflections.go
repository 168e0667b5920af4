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
	// Row is n for the beam n·g of the systematic row that the scene's
	// systematic-row model follows (nil otherwise).
	Row *int `json:"row,omitempty"`
	// Systematic is true for the multiples of g (the systematic row),
	// whether or not the model follows them.
	Systematic bool `json:"systematic"`
}

// ZoneLimitFactor is the default |g| limit of Reflections, in units of the
// scene's |g|.
const ZoneLimitFactor = 3

// Reflections lists the scene's g first, then every other g of the zone of
// the beam direction with |g| up to factor·|g_scene|, in order of |g|.
//
// The excitation errors follow from the orientation: the beam is tilted
// from the zone axis, about the axis perpendicular to g, until g has the
// scene's s, then rotated about g by tilt_off_zone_deg = φ. With k̂ the
// unit incident wave vector, s_h = −k̂·h − λh²/2 (the Ewald sphere to
// second order), which for that tilt is
//
//	s_h = (h·g/g²)(s_g + λg²/2) + sin φ (ŷ·h) − λh²/2
//
// with ŷ = B̂ × ĝ the image y direction. It gives s_n = n s_g + n(1−n)λg²/2
// along the systematic row whatever φ, and moves the other reflections of
// the zone off the Bragg condition as φ grows, as a real two-beam tilt
// does. For the systematic-row model every beam of the row is listed,
// marked with its n.
func (st *Setup) Reflections(factor float64) ([]Reflection, error) {
	if !(factor > 0) {
		factor = ZoneLimitFactor
	}
	gMax := factor * st.GPerNm * (1 + 1e-9)
	zone, err := st.zones.zone(gMax)
	if st.zones == nil {
		zone, err = st.Crystal.Zone(st.Beam, gMax)
	}
	if err != nil {
		return nil, err
	}
	out := []Reflection{st.reflection(st.G, st.Crystal.Forbidden(st.G))}
	out[0].Systematic = true
	if st.Scene.Diffraction.ExtinctionNm != nil {
		xi := st.XiGNm
		w := st.W
		out[0].ExtinctionNm, out[0].W = &xi, &w
	}
	n := len(st.Row) / 2
	if n > 0 {
		one := 1
		out[0].Row = &one
	}
	seen := map[[3]float64]bool{st.G: true}
	for _, r := range zone {
		if r.HKL == st.G {
			continue
		}
		seen[r.HKL] = true
		out = append(out, st.mark(st.reflection(r.HKL, r.Forbidden), r.HKL))
	}
	// The row's beams beyond the zone's limit.
	for k := -n; k <= n; k++ {
		hkl := [3]float64{float64(k) * st.G[0], float64(k) * st.G[1], float64(k) * st.G[2]}
		if k == 0 || seen[hkl] {
			continue
		}
		out = append(out, st.mark(st.reflection(hkl, st.Crystal.Forbidden(hkl)), hkl))
	}
	return out, nil
}

// mark sets Systematic for a multiple of g, and Row for a beam the
// scene's row model follows.
func (st *Setup) mark(r Reflection, hkl [3]float64) Reflection {
	g := st.G
	k := math.Round((hkl[0]*g[0] + hkl[1]*g[1] + hkl[2]*g[2]) / (g[0]*g[0] + g[1]*g[1] + g[2]*g[2]))
	r.Systematic = hkl == [3]float64{k * g[0], k * g[1], k * g[2]}
	if n := len(st.Row) / 2; r.Systematic && n > 0 && math.Abs(k) <= float64(n) {
		kk := int(k)
		r.Row = &kk
	}
	return r
}

func (st *Setup) reflection(hkl [3]float64, forbidden bool) Reflection {
	cell := st.Crystal.Cell
	h := cell.Reciprocal(hkl)
	g := cell.Reciprocal(st.G)
	hg := h.X*g.X + h.Y*g.Y + h.Z*g.Z
	h2 := h.X*h.X + h.Y*h.Y + h.Z*h.Z
	lam := st.WavelengthNm
	s := hg/(st.GPerNm*st.GPerNm)*(st.SPerNm+lam*st.GPerNm*st.GPerNm/2) - lam*h2/2
	if st.TiltOffZoneDeg != 0 {
		y := st.rotate(h).Y // ŷ·h in the image frame
		s += math.Sin(st.TiltOffZoneDeg*math.Pi/180) * y
	}
	r := Reflection{HKL: hkl[:], DNm: 1 / math.Sqrt(h2), SPerNm: s, Forbidden: forbidden}
	if cell.IsHexagonal() {
		if four, err := cell.FourIndexPlane(hkl); err == nil {
			r.HKL = four[:]
		}
	}
	var f sfEntry
	if st.zones != nil {
		f = st.zones.factors(hkl, st.VoltageKV)
	} else {
		f = newZoneCache(st.Crystal, st.Beam).factors(hkl, st.VoltageKV)
	}
	r.FgNm = f.fg
	// A forbidden (or unreachable) reflection has no extinction distance.
	if f.xiOK {
		xi := f.xi
		w := s * xi
		r.ExtinctionNm, r.W = &xi, &w
	}
	return r
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }
