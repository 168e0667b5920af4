package micrograph

import "math"

// Placement says how a micrograph sits on the specimen in the simulation's
// image frame: its square pixels of NmPerPx, turned so that its g, at
// GAngleDeg counter-clockwise from the picture's +x (right), points along
// +x of the image frame as in every simulated image, with its centre at
// (OffXNm, OffYNm). The turn is a rotation, never a mirror.
type Placement struct {
	NmPerPx   float64
	GAngleDeg float64
	OffXNm    float64
	OffYNm    float64
}

// Pixel returns the position in an nx × ny picture (pixels, x right, y
// down, from its top-left corner) that shows the specimen point (x, y) nm
// of the image frame.
//
// The picture's g is the unit vector u = (cos a, −sin a) in its pixel
// frame (y runs down, so counter-clockwise on the screen is −y), and
// y = z × x of the image frame is u turned a quarter clockwise on the
// screen, v = (sin a, cos a). The point x·u + y·v from the centre is then
// the one shown at (x, y).
func (p Placement) Pixel(x, y float64, nx, ny int) (px, py float64) {
	a := p.GAngleDeg * math.Pi / 180
	c, s := math.Cos(a), math.Sin(a)
	x, y = (x-p.OffXNm)/p.NmPerPx, (y-p.OffYNm)/p.NmPerPx
	return float64(nx)/2 + x*c + y*s, float64(ny)/2 - x*s + y*c
}

// PixelIndex returns the pixel (i, j) of an nx × ny picture that shows the
// specimen point (x, y), and false when the point lies outside it.
func (p Placement) PixelIndex(x, y float64, nx, ny int) (i, j int, ok bool) {
	px, py := p.Pixel(x, y, nx, ny)
	if !(px >= 0 && py >= 0) || px >= float64(nx) || py >= float64(ny) {
		return 0, 0, false
	}
	return int(px), int(py), true
}

// ValueAt returns the micrograph's value at the specimen point (x, y) nm,
// and false outside the micrograph.
func (m *Image) ValueAt(p Placement, x, y float64) (float32, bool) {
	i, j, ok := p.PixelIndex(x, y, m.Width, m.Height)
	if !ok {
		return 0, false
	}
	return m.Pix[j*m.Width+i], true
}
