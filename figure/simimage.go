package figure

import (
	"errors"
	"fmt"
	"image"
	"math"

	"faultline/sim"
)

// BeamGray maps the intensity of beam n·g of a simulation result (0 bright
// field, 1 dark field) to grey by m.
func BeamGray(im *sim.Image, n int, m Mapping) (*image.Gray, error) {
	if err := m.Validate(); err != nil {
		return nil, err
	}
	if im == nil {
		return nil, errors.New("figure: no simulated image")
	}
	plane := im.Beam(n)
	if plane == nil {
		return nil, fmt.Errorf("figure: beam %d·g was not computed (beams %v)", n, im.Beams)
	}
	gr := im.Grid
	if gr.NX <= 0 || gr.NY <= 0 || len(plane) != gr.NX*gr.NY {
		return nil, fmt.Errorf("figure: beam %d·g holds %d values for a %d×%d grid", n, len(plane), gr.NX, gr.NY)
	}
	return Gray(plane, gr.NX, gr.NY, m), nil
}

// PixelSizeNm returns the size of one pixel of the grid in nm, for
// Layout.NmPerPx. Figures need square pixels: it is an error if the pixel
// width and height differ by more than one part in 10^6.
func PixelSizeNm(g sim.Grid) (float64, error) {
	if g.NX <= 0 || g.NY <= 0 || !(g.WidthNm > 0) || !(g.HeightNm > 0) {
		return 0, fmt.Errorf("figure: grid %d×%d px over %v×%v nm: sizes must be positive", g.NX, g.NY, g.WidthNm, g.HeightNm)
	}
	px, py := g.WidthNm/float64(g.NX), g.HeightNm/float64(g.NY)
	if math.Abs(px-py) > 1e-6*math.Max(px, py) {
		return 0, fmt.Errorf("figure: pixels are %g nm wide and %g nm high; a figure needs square pixels", px, py)
	}
	return px, nil
}
