package export

import (
	"fmt"
	"image"
	"io"

	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// PaperFigure writes the labelled bright-field/dark-field pair at a
// physical size for a journal page, in format png, pdf or svg (see
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
	c := captionLines(st, o)
	c.Lines = append(c.Lines, MappingNote(o.FigureMapping))
	l := figure.Layout{NmPerPx: px, GAngleDeg: st.GAngleDeg, Caption: o.Caption}
	if err := figure.EncodePaper(w, format, []*image.Gray{bf, df}, []string{"BF", "DF"}, c, l, p, text); err != nil {
		return fmt.Errorf("figure.%s: %w", format, err)
	}
	return nil
}
