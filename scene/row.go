package scene

import (
	"fmt"
	"math"
	"math/cmplx"

	"faultline/sim"
)

// Weak-beam rule of thumb (common practice, after Cockayne, Ray & Whelan
// 1969): the image is narrow and close to the core when |s_g| is at least
// 0.2 /nm and |w| = |s_g| ξ_g at least 5.
const (
	WeakBeamMinSPerNm = 0.2
	WeakBeamMinW      = 5
)

// DefaultRowBeams is the number of beams of the systematic row when a
// scene asks for the row (or a weak-beam condition) without giving beams.
const DefaultRowBeams = 7

// StrongW is the |w| below which a reflection of the zone outside the
// systematic row counts as strongly excited (common practice: a beam with
// |w| ≲ 2 takes a noticeable share of the intensity).
const StrongW = 2

// scatteringReachPerNm is the largest |g| the scattering-factor fits are
// made for: s = |g|/2 ≤ 2 1/Å (International Tables Vol. C, Table
// 4.3.2.2), that is |g| ≤ 40 /nm.
const scatteringReachPerNm = 40

// RowBeam is one beam n·g of the systematic row as the scene's model uses
// it.
type RowBeam struct {
	N      int     `json:"n"`
	SPerNm float64 `json:"s_per_nm"`
	// XiNm is the extinction distance of n·g (0 for the transmitted beam
	// and for a forbidden reflection); W = s ξ.
	XiNm float64 `json:"extinction_nm"`
	W    float64 `json:"w"`
}

// rowModel builds the systematic-row model of the scene: 2N+1 beams n·g,
// excitation errors s_n = n s_g + n(1−n)λg²/2 (sim.RowExcitation), the
// couplings λU_{hg} from the crystal's structure factors with their phases
// (1/ξ_{hg} in size; ξ_g itself as the scene uses it, so extinction_nm
// applies to g and −g), absorptive parts ratio × the elastic ones, and the
// mean absorption ξ'_0 = ξ'_g of the imaged g, the convention of every
// model.
func (st *Setup) rowModel(beams int, ratio float64) (sim.SystematicRow, error) {
	n := beams / 2
	if r := float64(n) * st.GPerNm; r > scatteringReachPerNm {
		max := int(scatteringReachPerNm / st.GPerNm)
		return sim.SystematicRow{}, fieldErr("diffraction.beams", "%d beams reach %g·g, |g| = %.1f /nm, beyond the scattering-factor table's reach (|g| ≤ %d /nm, sinθ/λ ≤ 2/Å); with this g use at most %d beams", beams, float64(n), r, scatteringReachPerNm, 2*max+1)
	}
	m := sim.SystematicRow{
		SPerNm:  sim.RowExcitation(n, st.SPerNm, st.WavelengthNm, st.GPerNm),
		LambdaU: make([]complex128, 4*n+1),
	}
	if ratio > 0 {
		m.LambdaUAbs = make([]complex128, 4*n+1)
		m.Xi0AbsNm = st.Xi0AbsNm // the mean absorption of every model
	}
	beyond := 0
	for h := 1; h <= 2*n; h++ {
		hkl := [3]float64{float64(h) * st.G[0], float64(h) * st.G[1], float64(h) * st.G[2]}
		for _, sign := range []float64{1, -1} {
			k := [3]float64{sign * hkl[0], sign * hkl[1], sign * hkl[2]}
			u, err := st.Crystal.FourierCoefficient(k, st.VoltageKV)
			if err != nil {
				return sim.SystematicRow{}, wrapErr("diffraction", err)
			}
			var c complex128
			switch {
			case h == 1:
				// g and −g: the extinction distance the scene uses.
				ph := complex(1, 0)
				if a := cmplx.Abs(u); a > 0 {
					ph = u / complex(a, 0)
				}
				c = ph * complex(1/st.XiGNm, 0)
			case !st.Crystal.Forbidden(k):
				xi, err := st.Crystal.ExtinctionDistance(k, st.VoltageKV)
				if err != nil {
					return sim.SystematicRow{}, wrapErr("diffraction", fmt.Errorf("coupling %g·g: %w", sign*float64(h), err))
				}
				c = u / complex(cmplx.Abs(u)*xi, 0)
			}
			idx := int(sign)*h + 2*n
			m.LambdaU[idx] = c
			if ratio > 0 {
				m.LambdaUAbs[idx] = c * complex(ratio, 0)
			}
		}
		if float64(h)*st.GPerNm > scatteringReachPerNm {
			beyond++
		}
	}
	if beyond > 0 {
		st.Notes = append(st.Notes, fmt.Sprintf("systematic row: the %d highest coupling orders (up to %d·g) lie beyond the scattering-factor fits' range (sinθ/λ > 2/Å); their small values come from the fits' smooth tails", beyond, 2*n))
	}
	st.Row = make([]RowBeam, 2*n+1)
	for k := range st.Row {
		b := RowBeam{N: k - n, SPerNm: m.SPerNm[k]}
		if b.N != 0 {
			if c := m.LambdaU[b.N+2*n]; c != 0 {
				b.XiNm = 1 / cmplx.Abs(c)
				b.W = b.SPerNm * b.XiNm
			}
		}
		st.Row[k] = b
	}
	return m, nil
}

// rowBeams returns the number of beams of the systematic row for the
// scene: the scene's beams, or by default DefaultRowBeams, widened to hold
// the weak beam's n·g.
func rowBeams(d *Diffraction) int {
	if d.Beams != 0 {
		return d.Beams
	}
	b := DefaultRowBeams
	if wb := d.WeakBeam; wb != nil {
		if k := 2*int(math.Abs(wb.N)) + 1; k > b {
			b = k
		}
	}
	if b > 2*sim.MaxRowOrder+1 {
		b = 2*sim.MaxRowOrder + 1
	}
	return b
}

// warnConditions adds the warnings of the imaging condition: a weak-beam
// condition weaker than the common-practice rule, and reflections of the
// zone outside the systematic row that are strongly excited (which the
// column models leave out).
func (st *Setup) warnConditions() {
	d := &st.Scene.Diffraction
	if wb := d.WeakBeam; wb != nil {
		var weak []string
		if math.Abs(st.SPerNm) < WeakBeamMinSPerNm {
			weak = append(weak, fmt.Sprintf("|s_g| = %.3f /nm < %g /nm", math.Abs(st.SPerNm), WeakBeamMinSPerNm))
		}
		if math.Abs(st.W) < WeakBeamMinW {
			weak = append(weak, fmt.Sprintf("|w| = %.1f < %g", math.Abs(st.W), float64(WeakBeamMinW)))
		}
		if len(weak) > 0 {
			st.Warnings = append(st.Warnings, fmt.Sprintf("diffraction.weak_beam: g(%gg) is weaker than the common-practice weak-beam condition (%s); the image will be wider and further from the core — a larger |n| or a higher-order g helps", wb.N, joinAnd(weak)))
		}
	}
	if st.Model == "kinematical" {
		return
	}
	refl, err := st.Reflections(ZoneLimitFactor)
	if err != nil {
		return
	}
	var strong []string
	for _, r := range refl {
		if r.Row != nil || r.W == nil || r.Systematic {
			continue
		}
		if math.Abs(*r.W) < StrongW {
			strong = append(strong, fmt.Sprintf("%s (w = %.2f)", fmtPlane(r.HKL), *r.W))
		}
	}
	if len(strong) > 0 {
		if len(strong) > 4 {
			strong = append(strong[:4], fmt.Sprintf("and %d more", len(strong)-4))
		}
		st.Warnings = append(st.Warnings, fmt.Sprintf("diffraction: reflections outside the systematic row are strongly excited (|w| < %d): %s; the %s model leaves them out — tilt further off the zone axis (diffraction.tilt_off_zone_deg)", StrongW, joinList(strong), st.Model))
	}
}

func joinAnd(s []string) string {
	if len(s) == 2 {
		return s[0] + " and " + s[1]
	}
	return joinList(s)
}

func joinList(s []string) string {
	out := ""
	for i, v := range s {
		if i > 0 {
			out += ", "
		}
		out += v
	}
	return out
}
