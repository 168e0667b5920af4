package scene

import (
	"fmt"
	"math"
)

// DeviationForms lists the four ways a scene gives the deviation, by
// their field names under diffraction; they exclude each other (Set of one
// clears the others).
var DeviationForms = []string{"s_per_nm", "w", "weak_beam", "deviation_from_kikuchi"}

// DeviationForm returns which of DeviationForms d uses ("s_per_nm" when
// none is set).
func DeviationForm(d *Diffraction) string {
	switch {
	case d.W != nil:
		return "w"
	case d.WeakBeam != nil:
		return "weak_beam"
	case d.Kikuchi != nil:
		return "deviation_from_kikuchi"
	}
	return "s_per_nm"
}

// DeviationAs returns the value of the deviation form (one of
// DeviationForms) that gives the excitation error this setup derived, as
// near as the form can hold it, ready for Set(sc, "diffraction."+form, v):
//
//   - s_per_nm: s;
//   - w: s ξ_g;
//   - weak_beam: {"n": n} with s = (n − 1) λ g²/2 (Cockayne, Ray & Whelan
//     1969), n = 3 unless s lies beyond the Bragg position of 2g, then the
//     nearest whole n (the form holds whole n only);
//   - deviation_from_kikuchi: {"offset": s/(λ g²), "spacing": 1}, the
//     excess line's offset from g in units of the 000–g spacing
//     (Hirsch et al. 1965, ch. 4).
func (st *Setup) DeviationAs(form string) (any, error) {
	s := st.SPerNm
	lg2 := st.WavelengthNm * st.GPerNm * st.GPerNm
	switch form {
	case "s_per_nm":
		return s, nil
	case "w":
		return s * st.XiGNm, nil
	case "weak_beam":
		n := 3.0
		if lg2 > 0 && s > lg2/2 {
			n = math.Min(20, math.Round(1+2*s/lg2))
		}
		return map[string]any{"n": n}, nil
	case "deviation_from_kikuchi":
		return map[string]any{"offset": s / lg2, "spacing": 1.0}, nil
	}
	return nil, fieldErr("diffraction", "%q is not a deviation form; use one of s_per_nm, w, weak_beam, deviation_from_kikuchi", form)
}

// Describe is a one-line account of the numbers the conditions come to,
// for display: λ, d, ξ_g (computed or given), s and w.
func (st *Setup) Describe() string {
	given := ""
	if !st.XiGComputed {
		given = " (given)"
	}
	return fmt.Sprintf("λ = %.4g pm, d = %.4g nm, ξg = %.4g nm%s; s = %.4g /nm, w = s·ξg = %.3g",
		st.WavelengthNm*1000, st.DSpacingNm, st.XiGNm, given, st.SPerNm, st.W)
}
