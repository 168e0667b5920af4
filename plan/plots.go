package plan

import (
	"fmt"
	"math"

	"faultline/figure"
)

// ThicknessPlot is the plot of the thickness fringes: bright and dark
// field of the perfect crystal against thickness at the scene's s, the
// one the command line writes and the window shows.
func (p *Plan) ThicknessPlot() figure.Plot {
	return figure.Plot{Title: fmt.Sprintf("Thickness fringes, perfect crystal, s = %.4g /nm", p.Setup.SPerNm), XLabel: "thickness (nm)", YLabel: "intensity (of the incident beam)", Y: figure.YUnit,
		Series: []figure.Series{{Name: "bright field", X: p.Thickness.X, Y: p.Thickness.BF}, {Name: "dark field", X: p.Thickness.X, Y: p.Thickness.DF}}}
}

// RockingPlot is the plot of the rocking curve: bright and dark field of
// the perfect crystal against s at the scene's thickness.
func (p *Plan) RockingPlot() figure.Plot {
	return figure.Plot{Title: fmt.Sprintf("Rocking curve, perfect crystal, t = %g nm", p.Setup.Problem.ThicknessNm), XLabel: "s (1/nm)", YLabel: "intensity (of the incident beam)", Y: figure.YUnit,
		Series: []figure.Series{{Name: "bright field", X: p.Rocking.X, Y: p.Rocking.BF}, {Name: "dark field", X: p.Rocking.X, Y: p.Rocking.DF}}}
}

// VisibilityPlot is the plot of the defects' visibility against s at up
// to four thicknesses of the grid; ok is false without a visibility grid.
func (p *Plan) VisibilityPlot() (pl figure.Plot, ok bool) {
	v := p.Visibility
	if v == nil {
		return pl, false
	}
	var series []figure.Series
	for _, i := range coarseIdx(len(v.ThicknessNm), 4) {
		series = append(series, figure.Series{Name: fmt.Sprintf("t = %.0f nm", v.ThicknessNm[i]), X: v.SPerNm, Y: v.V[i]})
	}
	return figure.Plot{Title: "Defect visibility (dark-field Michelson contrast)", XLabel: "s (1/nm)", YLabel: "visibility", Y: figure.YUnit, Series: series}, true
}

// WeakBeamPlot is the plot of the weak-beam image's peak position, width
// and (for a dissociated dislocation) peak separation against s; ok is
// false without weak-beam results.
func (p *Plan) WeakBeamPlot() (pl figure.Plot, ok bool) {
	if len(p.WeakBeam) == 0 {
		return pl, false
	}
	var s, pk, wd, ms, ps []float64
	for _, x := range p.WeakBeam {
		s = append(s, x.SPerNm)
		pk = append(pk, math.Abs(x.PeakNm))
		wd = append(wd, x.WidthNm)
		ms = append(ms, x.MeasuredSepNm)
		ps = append(ps, x.ProjectedSepNm)
	}
	series := []figure.Series{{Name: "|peak − core|", X: s, Y: pk}, {Name: "peak width (FWHM)", X: s, Y: wd}}
	if !math.IsNaN(p.WeakBeam[0].ProjectedSepNm) {
		series = append(series, figure.Series{Name: "peak separation", X: s, Y: ms}, figure.Series{Name: "partials' separation", X: s, Y: ps, Dashed: true})
	}
	return figure.Plot{Title: "Weak-beam image at g(ng), n = 2…" + fmt.Sprint(p.WeakBeam[len(p.WeakBeam)-1].N), XLabel: "s (1/nm)", YLabel: "nm", Series: series}, true
}
