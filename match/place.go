package match

import "math"

// View says how a picture shows the specimen: its pixel size and the
// direction of g in it, counter-clockwise from the picture's +x axis as
// displayed (x to the right, y down the screen). A simulation in the
// default frame has g along +x: GAngleDeg 0.
type View struct {
	W, H      int
	NmPerPx   float64
	GAngleDeg float64
}

// rotation returns the angle φ (radians) by which the content of a picture
// with g at angle from must be turned, counter-clockwise as displayed, to
// put g at angle to.
func rotation(fromDeg, toDeg float64) float64 { return (toDeg - fromDeg) * math.Pi / 180 }

// Cover returns the size in nm of the simulated field (in the simulation's
// own frame, g at angle simGAngleDeg) that covers every pixel of the view
// v, with a margin of one pixel on each side.
func Cover(v View, simGAngleDeg float64) (widthNm, heightNm float64) {
	phi := rotation(simGAngleDeg, v.GAngleDeg)
	c, s := math.Abs(math.Cos(phi)), math.Abs(math.Sin(phi))
	w := float64(v.W) * v.NmPerPx
	h := float64(v.H) * v.NmPerPx
	return c*w + s*h + 2*v.NmPerPx, s*w + c*h + 2*v.NmPerPx
}

// Place resamples the simulated picture sim (g at simGAngleDeg in it) onto
// the raster of the view v: same pixel size, g turned to v.GAngleDeg, both
// pictures centred on the same specimen point. Pixels the simulation does
// not cover are NaN. Sampling is bilinear.
//
// A point at display offset P = (X, Y) nm from the view's centre (Y down)
// lies in the simulation at x_s = X cos φ − Y sin φ, y_s = X sin φ + Y cos φ
// from its centre, φ the rotation from the simulation to the view: the
// inverse of turning the simulation's content by φ counter-clockwise as
// displayed.
func Place(sim *Raster, simGAngleDeg float64, v View) *Raster {
	phi := rotation(simGAngleDeg, v.GAngleDeg)
	c, s := math.Cos(phi), math.Sin(phi)
	out := NewRaster(v.W, v.H, v.NmPerPx)
	k := v.NmPerPx / sim.NmPerPx
	for j := 0; j < v.H; j++ {
		Y := (float64(j) + 0.5 - float64(v.H)/2) * k
		for i := 0; i < v.W; i++ {
			X := (float64(i) + 0.5 - float64(v.W)/2) * k
			xs := X*c - Y*s
			ys := X*s + Y*c
			out.Pix[j*v.W+i] = sim.Bilinear(xs+float64(sim.W)/2-0.5, ys+float64(sim.H)/2-0.5)
		}
	}
	return out
}

// SpecimenOffset converts a displacement of (dx, dy) pixels of the view
// (display frame, y down) into nm in the simulation's frame (g at
// simGAngleDeg): where a feature centred in the simulation lies in the
// specimen when it appears shifted by (dx, dy) in the view.
func SpecimenOffset(dx, dy float64, simGAngleDeg float64, v View) (xNm, yNm float64) {
	phi := rotation(simGAngleDeg, v.GAngleDeg)
	c, s := math.Cos(phi), math.Sin(phi)
	X, Y := dx*v.NmPerPx, dy*v.NmPerPx
	return X*c - Y*s, X*s + Y*c
}
