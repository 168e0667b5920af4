package ui

import (
	"image"
	"image/color"
	"image/draw"
	"math"

	"golang.org/x/image/vector"

	"faultline/scene"
)

// outlineColour draws the defects over the images: a cyan that stands
// apart from grey and from the profile line's amber.
var outlineColour = color.NRGBA{0x3c, 0xd0, 0xff, 0xff}

// toPx maps a specimen position (nm) to device pixels of a panel.
type toPx func(x, y float64) (px, py float64)

// drawOutlines strokes the projected defects (scene.Setup.Outlines: the
// geometry is the library's, the window only draws it) into img: lines
// and polygon edges, loops' ellipses and spheres' circles, widthPx wide.
func drawOutlines(img *image.RGBA, outlines []scene.Outline, at toPx, widthPx float64) {
	b := img.Bounds()
	r := vector.NewRasterizer(b.Dx(), b.Dy())
	any := false
	stroke := func(pts []scene.Point, closed bool) {
		n := len(pts)
		if n == 0 {
			return
		}
		segs := n - 1
		if closed {
			segs = n
		}
		for k := 0; k < segs; k++ {
			p, q := pts[k], pts[(k+1)%n]
			x0, y0 := at(p.X, p.Y)
			x1, y1 := at(q.X, q.Y)
			segment(r, x0, y0, x1, y1, widthPx/2)
			any = true
		}
		if n == 1 || segs == 0 {
			// A line seen end on: a dot.
			x0, y0 := at(pts[0].X, pts[0].Y)
			segment(r, x0-widthPx, y0, x0+widthPx, y0, widthPx)
			any = true
		}
	}
	for _, o := range outlines {
		for _, l := range o.Lines {
			stroke(l, false)
		}
		for _, p := range o.Polygons {
			stroke(p, true)
		}
		for _, e := range o.Ellipses {
			stroke(ellipsePoints(e.Center, e.SemiMajor, e.SemiMinor, e.AngleDeg), true)
		}
		for _, c := range o.Circles {
			stroke(ellipsePoints(c.Center, c.Radius, c.Radius, 0), true)
		}
	}
	if !any {
		return
	}
	mask := image.NewAlpha(image.Rect(0, 0, b.Dx(), b.Dy()))
	r.Draw(mask, mask.Bounds(), image.Opaque, image.Point{})
	draw.DrawMask(img, b, image.NewUniform(outlineColour), image.Point{}, mask, image.Point{}, draw.Over)
}

// segment adds the rectangle of half-width hw about the segment from
// (x0, y0) to (x1, y1), always wound the same way so that overlapping
// segments add up instead of cancelling.
func segment(r *vector.Rasterizer, x0, y0, x1, y1, hw float64) {
	dx, dy := x1-x0, y1-y0
	l := math.Hypot(dx, dy)
	if l == 0 {
		dx, dy, l = 1, 0, 1
	}
	nx, ny := -dy/l*hw, dx/l*hw
	// Extend by hw at both ends so joints close.
	ex, ey := dx/l*hw, dy/l*hw
	x0, y0, x1, y1 = x0-ex, y0-ey, x1+ex, y1+ey
	r.MoveTo(float32(x0+nx), float32(y0+ny))
	r.LineTo(float32(x1+nx), float32(y1+ny))
	r.LineTo(float32(x1-nx), float32(y1-ny))
	r.LineTo(float32(x0-nx), float32(y0-ny))
	r.ClosePath()
}

// ellipsePoints is an ellipse as a polygon of 72 points, its major axis
// at angleDeg from x toward y.
func ellipsePoints(c scene.Point, a, b, angleDeg float64) []scene.Point {
	const n = 72
	s, co := math.Sincos(angleDeg * math.Pi / 180)
	pts := make([]scene.Point, n)
	for k := range pts {
		t := 2 * math.Pi * float64(k) / n
		u, v := a*math.Cos(t), b*math.Sin(t)
		pts[k] = scene.Point{X: c.X + u*co - v*s, Y: c.Y + u*s + v*co}
	}
	return pts
}
