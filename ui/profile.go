package ui

import (
	"fmt"
	"image"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"faultline/export"
	"faultline/figure"
)

// profileLine is a straight line across the images, from (X0, Y0) to
// (X1, Y1) in nm of the image frame.
type profileLine struct {
	X0, Y0, X1, Y1 float64
	Set            bool
}

func (l profileLine) lengthNm() float64 { return l.line().LengthNm() }

// line is the geometry of l for the export package.
func (l profileLine) line() export.Line { return export.Line{X0: l.X0, Y0: l.Y0, X1: l.X1, Y1: l.Y1} }

// profilePlot is the plot of a profile: BF and DF along the line, the
// micrograph along the same line when one is shown (micro, NaN where the
// line leaves it, already scaled), the y-axis scaled to the data or fixed
// at 0–1.
func profilePlot(p export.LineProfile, unit bool, micro []float64, microName string) figure.Plot {
	pl := figure.Plot{
		XLabel: "distance along the line (nm)",
		YLabel: "intensity / incident",
		Series: []figure.Series{
			{Name: "BF", X: p.DistNm, Y: p.BF},
			{Name: "DF", X: p.DistNm, Y: p.DF},
		},
	}
	if micro != nil {
		pl.Series = append(pl.Series, figure.Series{Name: microName, X: p.DistNm, Y: micro, Dashed: true})
	}
	if unit {
		pl.Y = figure.YUnit
	}
	return pl
}

// profilePanel is the line-profile plot under the images.
type profilePanel struct {
	ws     *Workspace
	raster *canvas.Raster
	hint   *widget.Label
	info   *widget.Label
	unit   *widget.Check
	cur    export.LineProfile
	micro  []float64 // the micrograph along the line, scaled; nil if none
	mName  string
	have   bool
}

// profilePanelObject returns the profile plot.
func profilePanelObject(ws *Workspace) fyne.CanvasObject {
	pp := &profilePanel{ws: ws}
	ws.prof = pp
	pp.raster = canvas.NewRaster(pp.draw)
	pp.raster.ScaleMode = canvas.ImageScaleSmooth
	pp.hint = widget.NewLabel("Choose \"Profile line\" above and drag across an image to plot BF and DF along the line.")
	pp.hint.TextStyle = fyne.TextStyle{Italic: true}
	pp.info = widget.NewLabel("")
	pp.info.TextStyle = fyne.TextStyle{Italic: true}
	pp.unit = widget.NewCheck("y 0–1", func(bool) { pp.raster.Refresh() })
	ws.view.onLine = append(ws.view.onLine, pp.update)
	plotBox := container.NewStack(pp.raster, container.NewCenter(pp.hint))
	box := container.NewBorder(container.NewBorder(nil, nil, nil, pp.unit, pp.info), nil, nil, nil, plotBox)
	pp.update(true)
	return container.New(minHeight(230), box)
}

// update samples the current render along the current line.
func (pp *profilePanel) update(final bool) {
	v := pp.ws.view
	if !v.line.Set || v.res == nil || v.line.lengthNm() == 0 {
		pp.have = false
		pp.hint.Show()
		pp.info.SetText("Line profile")
		pp.raster.Refresh()
		return
	}
	pp.cur = export.SampleLine(v.res.Image, v.line.line())
	pp.have = len(pp.cur.DistNm) >= 2
	if pp.have {
		pp.hint.Hide()
	} else {
		pp.hint.Show()
	}
	pp.micro, pp.mName = nil, ""
	if m := pp.ws.micro; pp.have && m != nil && m.img != nil && m.Compare != compareOff {
		raw := make([]float64, len(pp.cur.DistNm))
		for k := range raw {
			val, ok := m.valueAt(pp.cur.XNm[k], pp.cur.YNm[k], v.simGAngleDeg())
			raw[k] = math.NaN()
			if ok {
				raw[k] = val
			}
		}
		ref, name := pp.cur.BF, "BF"
		if m.Compare == compareBlend && !m.BlendBF {
			ref, name = pp.cur.DF, "DF"
		}
		if scaled, ok := export.ScaleToRange(raw, ref); ok {
			pp.micro, pp.mName = scaled, "micrograph, scaled to "+name
		}
	}
	l := v.line
	pp.info.SetText(fmt.Sprintf("Line profile from (%.1f, %.1f) to (%.1f, %.1f) nm, %.1f nm long",
		l.X0, l.Y0, l.X1, l.Y1, l.lengthNm()))
	pp.raster.Refresh()
}

func (pp *profilePanel) draw(w, h int) image.Image {
	if !pp.have || w < 50 || h < 50 {
		img := image.NewRGBA(image.Rect(0, 0, max(w, 1), max(h, 1)))
		return img
	}
	scale := 1.0
	if s := pp.raster.Size(); s.Width > 0 {
		scale = float64(w) / float64(s.Width)
	}
	img, err := profilePlot(pp.cur, pp.unit.Checked, pp.micro, pp.mName).Image(w, h, 96*scale)
	if err != nil {
		return image.NewRGBA(image.Rect(0, 0, w, h))
	}
	return img
}

// minHeight is a stack layout whose minimum height is at least h.
type minHeight float32

func (m minHeight) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	for _, o := range objs {
		o.Move(fyne.NewPos(0, 0))
		o.Resize(size)
	}
}

func (m minHeight) MinSize(objs []fyne.CanvasObject) fyne.Size {
	var s fyne.Size
	for _, o := range objs {
		s = s.Max(o.MinSize())
	}
	return fyne.NewSize(s.Width, max(s.Height, float32(m)))
}
