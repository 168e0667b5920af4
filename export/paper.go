package export

import (
	"fmt"
	"image"
	"io"

	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// PaperFigure writes the labelled bright-field/dark-field pair (or the one
// panel of o.Panels) at a physical size for a journal page, in format png, pdf or svg (see
// figure.EncodePaper): the same panels, caption and grey mapping as
// Figure, with the labels, scale bar, g arrow and conditions drawn as
// vectors around the embedded images. text goes into the PNG's text
// chunks.
func PaperFigure(w io.Writer, format string, st *scene.Setup, im *sim.Image, o Options, p figure.Print, text map[string]string) error {
	bf, df, err := Grays(im, o.FigureMapping)
	if err != nil {
		return err
	}
	px, err := figure.PixelSizeNm(im.Grid)
	if err != nil {
		return err
	}
	imgs, beams, labels := []*image.Gray{bf, df}, []int{0, 1}, []string{"BF", "DF"}
	switch o.Panels {
	case PanelsPair:
	case PanelsBF:
		imgs, beams, labels = imgs[:1], beams[:1], labels[:1]
	case PanelsDF:
		imgs, beams, labels = imgs[1:], beams[1:], labels[1:]
	default:
		return fmt.Errorf("export: Options.Panels: unknown %q (want %q, %q or %q)", o.Panels, PanelsPair, PanelsBF, PanelsDF)
	}
	c := captionLines(st, o)
	c.Lines = append(c.Lines, GreyNote(im, o.FigureMapping, beams, labels))
	l := figure.Layout{NmPerPx: px, GAngleDeg: st.GAngleDeg, Caption: o.Caption}
	if err := figure.EncodePaper(w, format, imgs, labels, c, l, p, text); err != nil {
		return fmt.Errorf("figure.%s: %w", format, err)
	}
	return nil
}
