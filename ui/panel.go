package ui

import (
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"

	"faultline/figure"
)

// Colours of the image panels.
var (
	panelBackground = color.NRGBA{0x26, 0x28, 0x2b, 0xff}
	plateColour     = color.NRGBA{0, 0, 0, 0x9a}
	overlayColour   = color.NRGBA{0xff, 0xff, 0xff, 0xff}
	lineColour      = color.NRGBA{0xff, 0xc8, 0x1e, 0xff}
	tagColour       = color.NRGBA{0xff, 0xd8, 0x70, 0xff}
)

// imagePanel shows one source in the shared viewport with the g arrow, a
// scale bar, its title and the profile line drawn over it. Scrolling
// zooms about the pointer, dragging pans or draws the profile line (by
// the tool chosen), and the pointer position is reported for the
// intensity read-out.
type imagePanel struct {
	widget.BaseWidget
	view  *imageView
	title string
	src   source
	tag   string // a note in the corner ("preview 64 × 64")
	// grey says how the panel's grey relates to intensity, under the
	// title ("stretched over 0.412–0.587"); warn marks a panel without
	// contrast.
	grey string
	warn bool

	drawing    bool
	dragStartX float64
	dragStartY float64
}

func newImagePanel(v *imageView, title string) *imagePanel {
	p := &imagePanel{view: v, title: title}
	p.ExtendBaseWidget(p)
	return p
}

// MinSize keeps the panels usable in a small window.
func (p *imagePanel) MinSize() fyne.Size { return fyne.NewSize(200, 200) }

// Scrolled zooms about the pointer.
func (p *imagePanel) Scrolled(e *fyne.ScrollEvent) {
	// One notch of a wheel scrolls by 10 (Fyne's desktop drivers).
	f := 1.0
	switch {
	case e.Scrolled.DY > 0:
		f = 1.15
	case e.Scrolled.DY < 0:
		f = 1 / 1.15
	}
	p.view.vp.zoom(f, e.Position)
	p.view.viewChanged()
}

// Dragged pans, or draws the profile line.
func (p *imagePanel) Dragged(e *fyne.DragEvent) {
	vp := p.view.vp
	if p.view.lineTool() {
		if !p.drawing {
			p.drawing = true
			p.dragStartX, p.dragStartY = vp.toNm(e.Position.Subtract(e.Dragged))
		}
		x, y := vp.toNm(e.Position)
		p.view.autoLine = false
		p.view.setLine(profileLine{X0: p.dragStartX, Y0: p.dragStartY, X1: x, Y1: y, Set: true}, false)
		return
	}
	vp.pan(e.Dragged)
	p.view.viewChanged()
}

// DragEnd finishes a profile line.
func (p *imagePanel) DragEnd() {
	if p.drawing {
		p.drawing = false
		p.view.setLine(p.view.line, true)
	}
}

// MouseIn is part of desktop.Hoverable.
func (p *imagePanel) MouseIn(e *desktop.MouseEvent) { p.MouseMoved(e) }

// MouseMoved reports the specimen position under the pointer.
func (p *imagePanel) MouseMoved(e *desktop.MouseEvent) {
	x, y := p.view.vp.toNm(e.Position)
	p.view.hover(x, y, true)
}

// MouseOut clears the read-out.
func (p *imagePanel) MouseOut() { p.view.hover(0, 0, false) }

// Cursor is a cross hair over the images.
func (p *imagePanel) Cursor() desktop.Cursor { return desktop.CrosshairCursor }

func (p *imagePanel) CreateRenderer() fyne.WidgetRenderer {
	r := &panelRenderer{p: p}
	r.bg = canvas.NewRectangle(panelBackground)
	r.raster = canvas.NewRaster(r.draw)
	r.raster.ScaleMode = canvas.ImageScalePixels
	r.titlePlate = canvas.NewRectangle(plateColour)
	r.titleText = canvas.NewText(p.title, overlayColour)
	r.titleText.TextStyle = fyne.TextStyle{Bold: true}
	r.tagText = canvas.NewText("", tagColour)
	r.tagText.TextSize = 11
	r.tagPlate = canvas.NewRectangle(plateColour)
	r.greyText = canvas.NewText("", overlayColour)
	r.greyText.TextSize = 11
	r.greyPlate = canvas.NewRectangle(plateColour)
	r.barPlate = canvas.NewRectangle(plateColour)
	r.bar = canvas.NewRectangle(overlayColour)
	r.barText = canvas.NewText("", overlayColour)
	r.barText.TextSize = 12
	r.arrowPlate = canvas.NewRectangle(plateColour)
	r.shaft = canvas.NewLine(overlayColour)
	r.head1 = canvas.NewLine(overlayColour)
	r.head2 = canvas.NewLine(overlayColour)
	for _, l := range []*canvas.Line{r.shaft, r.head1, r.head2} {
		l.StrokeWidth = 2
	}
	r.gText = canvas.NewText("g", overlayColour)
	r.gText.TextStyle = fyne.TextStyle{Bold: true}
	r.gText.TextSize = 12
	r.profile = canvas.NewLine(lineColour)
	r.profile.StrokeWidth = 2
	r.end0 = canvas.NewCircle(lineColour)
	r.end1 = canvas.NewCircle(color.Transparent)
	r.end1.StrokeColor = lineColour
	r.end1.StrokeWidth = 2
	r.objects = []fyne.CanvasObject{r.bg, r.raster, r.profile, r.end0, r.end1,
		r.titlePlate, r.titleText, r.tagPlate, r.tagText, r.greyPlate, r.greyText,
		r.barPlate, r.bar, r.barText, r.arrowPlate, r.shaft, r.head1, r.head2, r.gText}
	return r
}

type panelRenderer struct {
	p                         *imagePanel
	bg                        *canvas.Rectangle
	raster                    *canvas.Raster
	titlePlate, tagPlate      *canvas.Rectangle
	titleText, tagText        *canvas.Text
	greyPlate                 *canvas.Rectangle
	greyText                  *canvas.Text
	barPlate, bar, arrowPlate *canvas.Rectangle
	barText, gText            *canvas.Text
	shaft, head1, head2       *canvas.Line
	profile                   *canvas.Line
	end0, end1                *canvas.Circle
	objects                   []fyne.CanvasObject
	size                      fyne.Size
}

func (r *panelRenderer) Destroy() {}

func (r *panelRenderer) Objects() []fyne.CanvasObject { return r.objects }

func (r *panelRenderer) MinSize() fyne.Size { return r.p.MinSize() }

func (r *panelRenderer) Layout(size fyne.Size) {
	r.size = size
	if r.p.view.vp.setPanel(size) {
		// The first panel to learn its size fits the view for all.
		defer r.p.view.refreshOthers(r.p)
	}
	r.bg.Resize(size)
	r.bg.Move(fyne.NewPos(0, 0))
	r.raster.Resize(size)
	r.raster.Move(fyne.NewPos(0, 0))
	r.place()
}

// place puts the overlays where the view puts them.
func (r *panelRenderer) place() {
	size := r.size
	const pad = 6
	// Title, top left.
	r.titleText.Text = r.p.title
	ts := r.titleText.MinSize()
	r.titlePlate.Move(fyne.NewPos(pad, pad))
	r.titlePlate.Resize(fyne.NewSize(ts.Width+12, ts.Height+4))
	r.titleText.Move(fyne.NewPos(pad+6, pad+2))
	// Grey range (or the no-contrast mark), under the title.
	r.greyText.Text = r.p.grey
	if r.p.grey == "" {
		r.greyText.Hide()
		r.greyPlate.Hide()
	} else {
		r.greyText.Show()
		r.greyPlate.Show()
		r.greyText.Color = overlayColour
		r.greyText.TextStyle = fyne.TextStyle{}
		r.greyPlate.FillColor = plateColour
		if r.p.warn {
			r.greyText.Color = color.NRGBA{0x20, 0x10, 0x00, 0xff}
			r.greyText.TextStyle = fyne.TextStyle{Bold: true}
			r.greyPlate.FillColor = tagColour
		}
		gs := r.greyText.MinSize()
		y := pad + ts.Height + 8
		r.greyPlate.Move(fyne.NewPos(pad, y))
		r.greyPlate.Resize(fyne.NewSize(gs.Width+12, gs.Height+4))
		r.greyText.Move(fyne.NewPos(pad+6, y+2))
	}
	// Tag, top right.
	r.tagText.Text = r.p.tag
	if r.p.tag == "" {
		r.tagText.Hide()
		r.tagPlate.Hide()
	} else {
		r.tagText.Show()
		r.tagPlate.Show()
		gs := r.tagText.MinSize()
		r.tagPlate.Move(fyne.NewPos(size.Width-pad-gs.Width-10, pad))
		r.tagPlate.Resize(fyne.NewSize(gs.Width+10, gs.Height+4))
		r.tagText.Move(fyne.NewPos(size.Width-pad-gs.Width-5, pad+2))
	}

	vp := r.p.view.vp
	ready := vp.nmPerDp > 0 && r.p.src != nil
	for _, o := range []fyne.CanvasObject{r.barPlate, r.bar, r.barText, r.arrowPlate, r.shaft, r.head1, r.head2, r.gText} {
		if ready {
			o.Show()
		} else {
			o.Hide()
		}
	}
	if ready {
		// Scale bar, bottom left: a round length of about a fifth of the
		// visible width.
		barNm := figure.ScaleBarNm(vp.visibleWidthNm())
		barDp := float32(barNm / vp.nmPerDp)
		r.barText.Text = figure.LengthLabel(barNm)
		bs := r.barText.MinSize()
		w := max(barDp, bs.Width) + 12
		r.barPlate.Move(fyne.NewPos(pad, size.Height-pad-bs.Height-16))
		r.barPlate.Resize(fyne.NewSize(w, bs.Height+16))
		r.bar.Move(fyne.NewPos(pad+6, size.Height-pad-10))
		r.bar.Resize(fyne.NewSize(barDp, 5))
		r.barText.Move(fyne.NewPos(pad+6, size.Height-pad-bs.Height-14))

		// g arrow, bottom right: g points right unless the scene fixes
		// the picture to the specimen (image.x_axis), when it points at
		// its angle, counter-clockwise as displayed.
		r.gText.Text = r.p.view.gLabel
		gs := r.gText.MinSize()
		const arrow = 36
		a := r.p.view.simGAngleDeg() * math.Pi / 180
		dx, dy := float32(math.Cos(a)), float32(-math.Sin(a))
		ph := max(24, float32(math.Abs(float64(dy)))*arrow+16)
		pw := arrow + 10 + gs.Width + 12
		x0 := size.Width - pad - pw
		yMid := size.Height - pad - ph/2
		cx := x0 + 6 + arrow/2
		r.arrowPlate.Move(fyne.NewPos(x0, size.Height-pad-ph))
		r.arrowPlate.Resize(fyne.NewSize(pw, ph))
		tip := fyne.NewPos(cx+dx*arrow/2, yMid+dy*arrow/2)
		r.shaft.Position1 = fyne.NewPos(cx-dx*arrow/2, yMid-dy*arrow/2)
		r.shaft.Position2 = tip
		// The head: two strokes 8 dp back from the tip, 5 dp either side.
		r.head1.Position1 = fyne.NewPos(tip.X-8*dx-5*dy, tip.Y-8*dy+5*dx)
		r.head1.Position2 = tip
		r.head2.Position1 = fyne.NewPos(tip.X-8*dx+5*dy, tip.Y-8*dy-5*dx)
		r.head2.Position2 = tip
		r.gText.Move(fyne.NewPos(x0+6+arrow+8, yMid-gs.Height/2))
	}

	// Profile line.
	l := r.p.view.line
	if l.Set && vp.nmPerDp > 0 {
		a, b := vp.toDp(l.X0, l.Y0), vp.toDp(l.X1, l.Y1)
		r.profile.Position1, r.profile.Position2 = a, b
		r.end0.Move(a.Subtract(fyne.NewPos(4, 4)))
		r.end0.Resize(fyne.NewSize(8, 8))
		r.end1.Move(b.Subtract(fyne.NewPos(5, 5)))
		r.end1.Resize(fyne.NewSize(10, 10))
		r.profile.Show()
		r.end0.Show()
		r.end1.Show()
	} else {
		r.profile.Hide()
		r.end0.Hide()
		r.end1.Hide()
	}
}

func (r *panelRenderer) Refresh() {
	r.place()
	for _, o := range r.objects {
		if o != r.raster {
			o.Refresh()
		}
	}
	r.raster.Refresh()
}

// draw renders the source into w × h device pixels of the panel.
func (r *panelRenderer) draw(w, h int) image.Image {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	bg := panelBackground
	src := r.p.src
	vp := *r.p.view.vp
	size := r.size
	if src == nil || vp.nmPerDp == 0 || size.Width <= 0 || w <= 0 || h <= 0 {
		fillRGBA(img, bg)
		return img
	}
	// Device pixels per dp, from the size the raster was asked for.
	sx := float64(size.Width) / float64(w)
	sy := float64(size.Height) / float64(h)
	xs := make([]float64, w)
	for i := range xs {
		xs[i] = vp.cxNm + ((float64(i)+0.5)*sx-float64(size.Width)/2)*vp.nmPerDp
	}
	for j := 0; j < h; j++ {
		y := vp.cyNm + ((float64(j)+0.5)*sy-float64(size.Height)/2)*vp.nmPerDp
		row := img.Pix[j*img.Stride : j*img.Stride+4*w]
		for i, x := range xs {
			k := 4 * i
			if v, ok := src.at(x, y); ok {
				row[k], row[k+1], row[k+2], row[k+3] = v, v, v, 0xff
			} else {
				row[k], row[k+1], row[k+2], row[k+3] = bg.R, bg.G, bg.B, 0xff
			}
		}
	}
	if v := r.p.view; v.Outlines != nil && v.Outlines.Checked && len(v.outlines) > 0 {
		at := func(x, y float64) (float64, float64) {
			return (float64(size.Width)/2 + (x-vp.cxNm)/vp.nmPerDp) / sx,
				(float64(size.Height)/2 + (y-vp.cyNm)/vp.nmPerDp) / sy
		}
		drawOutlines(img, v.outlines, at, 1.6/sx)
	}
	return img
}

func fillRGBA(img *image.RGBA, c color.NRGBA) {
	for i := 0; i < len(img.Pix); i += 4 {
		img.Pix[i], img.Pix[i+1], img.Pix[i+2], img.Pix[i+3] = c.R, c.G, c.B, c.A
	}
}
