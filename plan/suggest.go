package plan

import (
	"fmt"
	"math"
	"strings"

	"faultline/scene"
)

// suggest fills p.Suggestions from the curves.
func (p *Plan) suggest() {
	st := p.Setup
	xi := st.XiGNm
	// Thickness: where the scene's foil lies on the fringes.
	t := st.Problem.ThicknessNm
	seff := math.Hypot(st.SPerNm, 1/xi)
	p.Suggestions = append(p.Suggestions, Suggestion{
		What: fmt.Sprintf("thickness %.0f nm is %.2f effective extinction distances (1/√(s² + ξ_g⁻²) = %.1f nm)", t, t*seff, 1/seff),
		Why:  "thickness fringes repeat with this period (Hirsch et al. 1965); a defect's contrast depends on its depth in units of it, and with absorption foils thicker than about 5 ξ_g transmit little in bright field",
	})
	// Rocking curve: where the dark field is strongest at this thickness.
	if len(p.Rocking.X) > 0 {
		ib := 0
		for i := range p.Rocking.DF {
			if p.Rocking.DF[i] > p.Rocking.DF[ib] {
				ib = i
			}
		}
		p.Suggestions = append(p.Suggestions, Suggestion{
			What: fmt.Sprintf("s = %.4f /nm (w = %.2f) for the brightest dark-field background at t = %.0f nm (dark field %.3f)", p.Rocking.X[ib], p.Rocking.X[ib]*xi, t, p.Rocking.DF[ib]),
			Why:  "the rocking curve's maximum at this thickness (rocking.csv)",
		})
	}
	// Visibility: the best (t, s) and the best s at the scene's t.
	if v := p.Visibility; v != nil {
		bi, bk := 0, 0
		for i := range v.V {
			for k := range v.V[i] {
				if v.V[i][k] > v.V[bi][bk] {
					bi, bk = i, k
				}
			}
		}
		p.Suggestions = append(p.Suggestions, Suggestion{
			What: fmt.Sprintf("t = %.0f nm, s = %.4f /nm (w = %.2f): visibility %.2f", v.ThicknessNm[bi], v.SPerNm[bk], v.SPerNm[bk]*xi, v.V[bi][bk]),
			Why:  "the highest visibility of the defects over the (t, s) grid (visibility.csv; visibility as defined in the README)",
		})
	}
	// Weak beam: the smallest n meeting the common-practice rule.
	for _, w := range p.WeakBeam {
		if math.Abs(w.SPerNm) >= scene.WeakBeamMinSPerNm && math.Abs(w.W) >= scene.WeakBeamMinW {
			what := fmt.Sprintf("weak beam g(%dg): s = %.3f /nm, w = %.1f; image peak %.2f nm from the core, %.2f nm wide", w.N, w.SPerNm, w.W, w.PeakNm, w.WidthNm)
			if !math.IsNaN(w.MeasuredSepNm) {
				what += fmt.Sprintf("; the partials' peaks %.2f nm apart for a projected separation of %.2f nm (multiply a measured width by %.2f)", w.MeasuredSepNm, w.ProjectedSepNm, w.ProjectedSepNm/w.MeasuredSepNm)
			} else if !math.IsNaN(w.ProjectedSepNm) {
				what += fmt.Sprintf("; the partials' images are not resolved here (projected separation %.2f nm)", w.ProjectedSepNm)
			}
			p.Suggestions = append(p.Suggestions, Suggestion{What: what,
				Why: fmt.Sprintf("the smallest n with |s_g| ≥ %g /nm and |w| ≥ %g (common practice), so the image lies close to the core (Cockayne, Ray & Whelan 1969)", scene.WeakBeamMinSPerNm, float64(scene.WeakBeamMinW))})
			break
		}
	}
	// g·b: the reflections that make each candidate invisible.
	if t := p.GB; t != nil {
		for i, c := range t.Candidates {
			gb0, both := t.Invisible(i)
			switch {
			case len(both) > 0:
				p.Suggestions = append(p.Suggestions, Suggestion{What: fmt.Sprintf("b = %s: image with %s", c, strings.Join(both, ", ")),
					Why: "g·b = 0 and g·(b×u) = 0 there: the dislocation is out of contrast, which identifies b"})
			case len(gb0) > 0:
				p.Suggestions = append(p.Suggestions, Suggestion{What: fmt.Sprintf("b = %s: image with %s", c, strings.Join(gb0, ", ")),
					Why: "g·b = 0 there (residual contrast from g·(b×u) may remain)"})
			default:
				p.Suggestions = append(p.Suggestions, Suggestion{What: fmt.Sprintf("b = %s: no low-order reflection of this zone gives g·b = 0", c),
					Why: "tilt to another zone to make it invisible"})
			}
		}
	}
}
