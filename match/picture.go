package match

import (
	"image"

	"faultline/figure"
)

// Picture maps a raster onto grey levels between its 0.5th and 99.5th
// percentiles, for contact sheets and the window. A simulation (simulated
// true: intensities as fractions of the incident beam) whose range is
// under ContrastFloor is drawn flat grey: a picture never shows contrast
// the numbers do not hold. NaN pixels (no data) are black.
func Picture(r *Raster, simulated bool) *image.Gray {
	if simulated {
		if lo, hi := rangeOf(r); !(hi-lo >= ContrastFloor) {
			g := image.NewGray(image.Rect(0, 0, r.W, r.H))
			for k := range g.Pix {
				g.Pix[k] = 128
			}
			return g
		}
	}
	return figure.Gray(r.Pix, r.W, r.H, figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5})
}
