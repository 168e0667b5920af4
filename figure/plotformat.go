package figure

import (
	"fmt"
	"io"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// EncodeVector writes the plot as PDF or SVG (format "pdf" or "svg"),
// wPt × hPt points, drawn by gonum/plot's vgpdf or vgsvg with the same
// style and fonts as Image: the planner's plots in the formats of the print
// figures.
func (p Plot) EncodeVector(w io.Writer, format string, wPt, hPt float64) error {
	if !(wPt > 0 && hPt > 0) {
		return fmt.Errorf("figure: plot of %g×%g pt: sizes must be positive", wPt, hPt)
	}
	var c interface {
		vg.CanvasSizer
		io.WriterTo
	}
	switch format {
	case PaperPDF:
		c = vgpdf.New(vg.Length(wPt), vg.Length(hPt))
	case PaperSVG:
		c = vgsvg.New(vg.Length(wPt), vg.Length(hPt))
	default:
		return fmt.Errorf("figure: plot format %q: want pdf or svg", format)
	}
	if _, err := p.drawOn(c); err != nil {
		return err
	}
	_, err := c.WriteTo(w)
	return err
}
