package plan

import (
	"fmt"

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
