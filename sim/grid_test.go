package sim

import (
	"math"
	"testing"
)

// Index inverts X and Y (the pixel-centre rule in Grid's doc), and
// PixelAt maps every point of a pixel's square, and only those, to it.
func TestGridInverse(t *testing.T) {
	for _, g := range []Grid{{NX: 4, NY: 2, WidthNm: 40, HeightNm: 20}, {NX: 7, NY: 5, WidthNm: 3.5, HeightNm: 2.5}, {NX: 1, NY: 1, WidthNm: 1, HeightNm: 1}} {
		dx, dy := g.WidthNm/float64(g.NX), g.HeightNm/float64(g.NY)
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				fi, fj := g.Index(g.X(i), g.Y(j))
				if math.Abs(fi-float64(i)) > 1e-12 || math.Abs(fj-float64(j)) > 1e-12 {
					t.Errorf("%v: Index(X(%d), Y(%d)) = %g, %g", g, i, j, fi, fj)
				}
				for _, d := range [][2]float64{{-0.499, -0.499}, {0.499, 0.499}, {0, 0}} {
					ii, jj, ok := g.PixelAt(g.X(i)+d[0]*dx, g.Y(j)+d[1]*dy)
					if !ok || ii != i || jj != j {
						t.Errorf("%v: point %v of pixel (%d, %d) gives (%d, %d, %v)", g, d, i, j, ii, jj, ok)
					}
				}
			}
		}
		for _, p := range [][2]float64{{-g.WidthNm/2 - 1e-9, 0}, {g.WidthNm / 2, 0}, {0, g.HeightNm / 2}, {math.NaN(), 0}} {
			if _, _, ok := g.PixelAt(p[0], p[1]); ok {
				t.Errorf("%v: point %v outside the field has a pixel", g, p)
			}
		}
	}
}
