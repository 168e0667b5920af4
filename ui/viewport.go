package ui

import (
	"math"

	"fyne.io/fyne/v2"
)

// viewport is the zoom and pan shared by every image panel, so the bright
// field, the dark field and the micrograph always show the same part of
// the specimen at the same scale. Positions are in nm in the image frame
// (x along g to the right, y down the picture, origin at the centre of the
// field); the panels are all the same size.
type viewport struct {
	cxNm, cyNm float64 // the point at the centre of a panel
	nmPerDp    float64 // 0 until the first fit
	// fitted: the view follows the field (and the panel size) until the
	// user zooms or pans.
	fitted             bool
	fieldWNm, fieldHNm float64
	panel              fyne.Size
}

// toNm returns the specimen position under pos (dp, in a panel).
func (v *viewport) toNm(pos fyne.Position) (x, y float64) {
	return v.cxNm + (float64(pos.X)-float64(v.panel.Width)/2)*v.nmPerDp,
		v.cyNm + (float64(pos.Y)-float64(v.panel.Height)/2)*v.nmPerDp
}

// toDp returns where the specimen position (x, y) lies in a panel.
func (v *viewport) toDp(x, y float64) fyne.Position {
	return fyne.NewPos(float32(float64(v.panel.Width)/2+(x-v.cxNm)/v.nmPerDp),
		float32(float64(v.panel.Height)/2+(y-v.cyNm)/v.nmPerDp))
}

// setPanel records the size of a panel and, while fitted, fits the field
// into it. It reports whether the view changed.
func (v *viewport) setPanel(size fyne.Size) bool {
	if size == v.panel {
		return false
	}
	v.panel = size
	if v.fitted || v.nmPerDp == 0 {
		v.fit()
	}
	return true
}

// setField records the simulated field; a fitted view follows it.
func (v *viewport) setField(wNm, hNm float64) bool {
	if wNm == v.fieldWNm && hNm == v.fieldHNm {
		return false
	}
	v.fieldWNm, v.fieldHNm = wNm, hNm
	if v.fitted || v.nmPerDp == 0 {
		v.fit()
	}
	return true
}

// fit shows the whole field with a small margin.
func (v *viewport) fit() {
	v.fitted = true
	v.cxNm, v.cyNm = 0, 0
	if v.panel.Width <= 0 || v.panel.Height <= 0 || !(v.fieldWNm > 0) || !(v.fieldHNm > 0) {
		return
	}
	v.nmPerDp = 1.04 * math.Max(v.fieldWNm/float64(v.panel.Width), v.fieldHNm/float64(v.panel.Height))
}

// zoom scales the view by factor (> 1 magnifies) about the panel point at.
func (v *viewport) zoom(factor float64, at fyne.Position) {
	if v.nmPerDp == 0 || !(factor > 0) {
		return
	}
	x, y := v.toNm(at)
	field := math.Max(v.fieldWNm, v.fieldHNm)
	n := v.nmPerDp / factor
	// From a few hundred dp across one field pixel-free zoom to ten fields
	// across a panel.
	n = clamp(n, field/2e5, 10*field/math.Max(1, float64(v.panel.Width)))
	v.nmPerDp = n
	// Keep the point under the pointer where it was.
	v.cxNm = x - (float64(at.X)-float64(v.panel.Width)/2)*n
	v.cyNm = y - (float64(at.Y)-float64(v.panel.Height)/2)*n
	v.fitted = false
}

// pan moves the view by d dp (the picture follows the pointer).
func (v *viewport) pan(d fyne.Delta) {
	v.cxNm -= float64(d.DX) * v.nmPerDp
	v.cyNm -= float64(d.DY) * v.nmPerDp
	v.fitted = false
}

// visibleWidthNm is the width of specimen a panel shows.
func (v *viewport) visibleWidthNm() float64 { return float64(v.panel.Width) * v.nmPerDp }
