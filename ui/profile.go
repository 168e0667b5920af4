package ui

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"faultline/export"
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

// Colours of the two beams in the plot.
var (
	bfColour = color.NRGBA{0x20, 0x20, 0x20, 0xff}
	dfColour = color.NRGBA{0x1f, 0x6f, 0xc0, 0xff}
)

// plotProfile draws the profile into a w × h pixel image at dpi.
func plotProfile(p export.LineProfile, w, h int, dpi float64) (image.Image, error) {
	pl := plot.New()
	pl.X.Label.Text = "distance along the line (nm)"
	pl.Y.Label.Text = "intensity / incident"
	pl.Add(plotter.NewGrid())
	bf, df := make(plotter.XYs, len(p.DistNm)), make(plotter.XYs, len(p.DistNm))
	for k := range p.DistNm {
		bf[k] = plotter.XY{X: p.DistNm[k], Y: p.BF[k]}
		df[k] = plotter.XY{X: p.DistNm[k], Y: p.DF[k]}
	}
	lb, err := plotter.NewLine(bf)
	if err != nil {
		return nil, err
	}
	lb.Color, lb.Width = bfColour, vg.Points(1.5)
	ld, err := plotter.NewLine(df)
	if err != nil {
		return nil, err
	}
	ld.Color, ld.Width = dfColour, vg.Points(1.5)
	pl.Add(lb, ld)
	pl.Legend.Add("BF", lb)
	pl.Legend.Add("DF", ld)
	pl.Legend.Top = true
	pl.Legend.Left = true
	pl.Legend.XOffs = vg.Points(8)
	pl.Y.Min = 0
	// Room above the curves for the legend.
	pl.Y.Max = 1.2 * math.Max(1, pl.Y.Max)
	pl.X.Tick.Marker = niceTicks{}
	pl.Y.Tick.Marker = niceTicks{}
	pts := func(px int) vg.Length { return vg.Length(float64(px) * 72 / dpi) }
	c := vgimg.NewWith(vgimg.UseWH(pts(w), pts(h)), vgimg.UseDPI(int(dpi)))
	pl.Draw(draw.New(c))
	return c.Image(), nil
}

// niceTicks labels an axis at steps of 1, 2 or 5 × 10^n, five to ten of
// them, with unlabelled ticks between.
type niceTicks struct{}

func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return []plot.Tick{{Value: lo, Label: formatNumber(lo)}}
	}
	raw := (hi - lo) / 6
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	step := p
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw {
			step = m * p
			break
		}
	}
	var out []plot.Tick
	minor := step / 2
	for v := math.Ceil(lo/minor) * minor; v <= hi+minor*1e-9; v += minor {
		t := plot.Tick{Value: v}
		if k := v / step; math.Abs(k-math.Round(k)) < 1e-6 {
			t.Label = strconv.FormatFloat(math.Round(k)*step, 'g', 6, 64)
		}
		out = append(out, t)
	}
	return out
}

// profilePanel is the line-profile plot under the images.
type profilePanel struct {
	ws     *Workspace
	raster *canvas.Raster
	hint   *widget.Label
	info   *widget.Label
	cur    export.LineProfile
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
	ws.view.onLine = append(ws.view.onLine, pp.update)
	plotBox := container.NewStack(pp.raster, container.NewCenter(pp.hint))
	box := container.NewBorder(pp.info, nil, nil, nil, plotBox)
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
	img, err := plotProfile(pp.cur, w, h, 96*scale)
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
