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
	// Weak beam: the smallest n meeting the common-practice rule, or the
	// largest n scanned if none does.
	rule := fmt.Sprintf("|s_g| ≥ %g /nm and |w| ≥ %g (common practice)", scene.WeakBeamMinSPerNm, float64(scene.WeakBeamMinW))
	for k, w := range p.WeakBeam {
		meets := math.Abs(w.SPerNm) >= scene.WeakBeamMinSPerNm && math.Abs(w.W) >= scene.WeakBeamMinW
		if !meets && k < len(p.WeakBeam)-1 {
			continue
		}
		why := "the smallest n with " + rule + ", so the image lies close to the core (Cockayne, Ray & Whelan 1969)"
		if !meets {
			why = "the largest n scanned; none of g(2g) … g(" + fmt.Sprint(w.N) + "g) meets " + rule + ": the image lies further from the core and is wider than in a true weak-beam condition (Cockayne, Ray & Whelan 1969)"
		}
		p.Suggestions = append(p.Suggestions, Suggestion{What: weakBeamWhat(w), Why: why})
		break
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

// weakBeamWhat describes the weak-beam image at one condition: its peak
// and width, or that they were not found or not resolved, and for a
// dissociated dislocation the partials' peak separation.
func weakBeamWhat(w WeakBeamPoint) string {
	what := fmt.Sprintf("weak beam g(%dg): s = %.3f /nm, w = %.1f; ", w.N, w.SPerNm, w.W)
	from, near := "the core", "the core"
	if !math.IsNaN(w.ProjectedSepNm) {
		from, near = "the ribbon's middle", "either partial's core"
	}
	switch {
	case math.IsNaN(w.PeakNm):
		what += fmt.Sprintf("image peak not found: no maximum rising %g %% of the profile's peak above the background on the side where s + g·dR/dz = 0 within %.2f nm of %s", 100*minRise, w.ReachNm, near)
	case math.IsNaN(w.WidthNm):
		what += fmt.Sprintf("image peak %.2f nm from %s, its width not resolved (half height not reached within the ±%.1f nm profile)", w.PeakNm, from, w.ProfileHalfNm)
	default:
		what += fmt.Sprintf("image peak %.2f nm from %s, %.2f nm wide", w.PeakNm, from, w.WidthNm)
	}
	if !math.IsNaN(w.MeasuredSepNm) {
		what += fmt.Sprintf("; the partials' peaks %.2f nm apart for a projected separation of %.2f nm (multiply a measured width by %.2f)", w.MeasuredSepNm, w.ProjectedSepNm, w.ProjectedSepNm/w.MeasuredSepNm)
	} else if !math.IsNaN(w.ProjectedSepNm) {
		what += fmt.Sprintf("; the partials' images are not resolved here (projected separation %.2f nm)", w.ProjectedSepNm)
	}
	return what
}
