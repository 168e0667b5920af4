package ui

import (
	"context"
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"
	"sync"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"faultline/figure"
	"faultline/plan"
	"faultline/scene"
)

// planPanel shows the planner's curves, suggestions and g·b table for the
// current scene (the plan package's work, the same as `faultline plan`),
// run off the UI goroutine. Clicking a curve sets that thickness or s.
type planPanel struct {
	ws     *Workspace
	mu     sync.Mutex
	cancel context.CancelFunc
	result *plan.Plan

	cands   *widget.Entry
	run     *widget.Button
	status  *widget.Label
	errl    *widget.Label
	bar     *widget.ProgressBarInfinite
	stop    *widget.Button
	thick   *plotView
	rocking *plotView
	vis     *plotView // the defects' visibility against s
	weak    *plotView // the weak-beam peak against s
	suggest *widget.Label
	table   *widget.Label
	notes   *widget.Label
}

// planPanelObject returns the Plan tab.
func planPanelObject(ws *Workspace) fyne.CanvasObject {
	pp := &planPanel{ws: ws}
	ws.plan = pp
	pp.cands = widget.NewEntry()
	pp.cands.SetPlaceHolder("none (e.g. 1/2<110>, 1/3<111>)")
	pp.run = widget.NewButton("Plan the current scene", func() {
		if err := pp.start(); err != nil {
			setError(pp.errl, oneLine(err.Error()))
			return
		}
		setError(pp.errl, "")
	})
	pp.status = widget.NewLabel("")
	pp.status.Wrapping = fyne.TextWrapWord
	pp.errl = errorLabel()
	pp.bar = widget.NewProgressBarInfinite()
	pp.bar.Stop()
	pp.bar.Hide()
	pp.stop = widget.NewButton("Cancel", func() { pp.cancelWork() })
	pp.stop.Hide()
	pp.thick = newPlotView(func(t float64) { pp.pick("foil.thickness_nm", "thickness", t, "nm") })
	pp.rocking = newPlotView(func(s float64) { pp.pick("diffraction.s_per_nm", "s", s, "/nm") })
	pp.vis = newPlotView(func(s float64) { pp.pick("diffraction.s_per_nm", "s", s, "/nm") })
	pp.weak = newPlotView(func(s float64) { pp.pick("diffraction.s_per_nm", "s", s, "/nm") })
	for _, v := range []*plotView{pp.thick, pp.rocking, pp.vis, pp.weak} {
		v.Hide()
	}
	ws.ctrl.OnBuilt(func(st *scene.Setup, _ error) { pp.markScene(st) })
	pp.suggest = widget.NewLabel("")
	pp.suggest.Wrapping = fyne.TextWrapWord
	pp.table = widget.NewLabel("")
	pp.table.TextStyle = fyne.TextStyle{Monospace: true}
	pp.notes = widget.NewLabel("")
	pp.notes.Wrapping = fyne.TextWrapWord
	pp.notes.TextStyle = fyne.TextStyle{Italic: true}

	intro := widget.NewLabel("Plans the imaging conditions of the scene as the command “faultline plan” does: thickness fringes and rocking curve of the perfect crystal, the defects' visibility and the weak-beam conditions, and with candidate Burgers-vector families the g·b table. Click a curve to set the thickness or s under the pointer.")
	intro.Wrapping = fyne.TextWrapWord
	intro.TextStyle = fyne.TextStyle{Italic: true}
	return container.NewVScroll(container.NewPadded(container.NewVBox(
		intro,
		form(formRow("Candidates", pp.cands)),
		container.NewHBox(pp.run),
		container.NewBorder(nil, nil, nil, pp.stop, pp.bar),
		pp.status, pp.errl,
		pp.thick, pp.rocking, pp.vis, pp.weak,
		pp.suggest,
		container.NewHScroll(pp.table),
		pp.notes,
	)))
}

// start plans a copy of the current scene off the UI goroutine; the
// result comes back through the controller's post.
func (pp *planPanel) start() error {
	sc := pp.ws.ctrl.Scene()
	if sc == nil || pp.ws.ctrl.Setup() == nil {
		return fmt.Errorf("the scene does not build; mend it first")
	}
	c, err := scene.Clone(sc)
	if err != nil {
		return err
	}
	opt := plan.Options{Candidates: splitList(pp.cands.Text)}
	dir := pp.ws.ctrl.Dir()
	pp.cancelWork()
	ctx, cancel := context.WithCancel(context.Background())
	pp.mu.Lock()
	pp.cancel = cancel
	pp.mu.Unlock()
	post := pp.ws.ctrl.Post
	pp.bar.Show()
	pp.bar.Start()
	pp.stop.Show()
	pp.run.Disable()
	pp.status.SetText("planning…")
	began := time.Now()
	go func() {
		p, err := plan.Make(ctx, c, dir, opt)
		post(func() {
			pp.bar.Stop()
			pp.bar.Hide()
			pp.stop.Hide()
			pp.run.Enable()
			switch {
			case ctx.Err() != nil:
				pp.status.SetText("planning: cancelled")
			case err != nil:
				pp.status.SetText("")
				setError(pp.errl, oneLine(err.Error()))
			default:
				pp.show(p, time.Since(began))
			}
		})
	}()
	return nil
}

func (pp *planPanel) cancelWork() {
	pp.mu.Lock()
	defer pp.mu.Unlock()
	if pp.cancel != nil {
		pp.cancel()
		pp.cancel = nil
	}
}

// show puts a finished plan in the panel.
func (pp *planPanel) show(p *plan.Plan, took time.Duration) {
	pp.result = p
	if err := pp.thick.set(p.ThicknessPlot()); err != nil {
		setError(pp.errl, "thickness curve: "+err.Error())
	}
	if err := pp.rocking.set(p.RockingPlot()); err != nil {
		setError(pp.errl, "rocking curve: "+err.Error())
	}
	pp.thick.Show()
	pp.rocking.Show()
	for _, c := range []struct {
		v  *plotView
		pl func() (figure.Plot, bool)
	}{{pp.vis, p.VisibilityPlot}, {pp.weak, p.WeakBeamPlot}} {
		pl, ok := c.pl()
		if !ok {
			c.v.Hide()
			continue
		}
		if err := c.v.set(pl); err != nil {
			setError(pp.errl, err.Error())
		}
		c.v.Show()
	}
	pp.markScene(pp.ws.ctrl.Setup())
	var b strings.Builder
	b.WriteString("Suggested conditions:\n")
	for _, s := range p.Suggestions {
		fmt.Fprintf(&b, "• %s — because %s\n", s.What, s.Why)
	}
	pp.suggest.SetText(strings.TrimSpace(b.String()))
	pp.table.SetText("")
	if p.GB != nil {
		var t strings.Builder
		if err := p.GB.WriteText(&t); err == nil {
			pp.table.SetText(strings.TrimRight(t.String(), "\n"))
		}
	}
	var n []string
	if r := p.Reuse; r.Points > 0 {
		n = append(n, fmt.Sprintf("Visibility over %d (t, s) points from field samples recorded once (%.2f s) and replayed (%.2f s).", r.Points, r.RecordSeconds, r.ReplaySeconds))
	}
	for _, s := range p.Skipped {
		n = append(n, "Not computed: "+s+".")
	}
	pp.notes.SetText(strings.Join(n, "\n"))
	pp.status.SetText(fmt.Sprintf("Planned in %.1f s (%s). Click the thickness curve to set the foil's thickness, any curve against s to set s (the rocking curve is for t = %g nm).",
		took.Seconds(), p.Setup.Describe(), p.Setup.Problem.ThicknessNm))
}

// markScene marks the scene's thickness and s on the curves.
func (pp *planPanel) markScene(st *scene.Setup) {
	if pp.result == nil || st == nil {
		return
	}
	pp.thick.setMark(st.Problem.ThicknessNm)
	pp.rocking.setMark(st.SPerNm)
	pp.vis.setMark(st.SPerNm)
	pp.weak.setMark(st.SPerNm)
}

// pick sets the scene field path to the value v picked on a curve.
func (pp *planPanel) pick(path, name string, v float64, unit string) {
	if err := pp.ws.ctrl.Set(scene.Edit{Path: path, Value: v}); err != nil {
		setError(pp.errl, oneLine(err.Error()))
		return
	}
	setError(pp.errl, "")
	pp.status.SetText(fmt.Sprintf("%s set to %g %s (%s), marked on the curve; plan again for the other curve at this value", name, v, unit, path))
}

// plotView is a plot drawn to fit its size; a tap within the data area
// reports the x value under the pointer, to a pixel's precision.
type plotView struct {
	widget.BaseWidget
	img    *canvas.Image
	plot   figure.Plot
	have   bool
	mark   float64 // x of the scene's value, marked on the plot; NaN for none
	frame  figure.PlotFrame
	px     fyne.Size // the size the image was drawn for
	pxW    int       // the image's width, pixels
	onPick func(x float64)
}

func newPlotView(onPick func(x float64)) *plotView {
	v := &plotView{onPick: onPick, mark: math.NaN(), img: canvas.NewImageFromImage(image.NewRGBA(image.Rect(0, 0, 1, 1)))}
	v.img.FillMode = canvas.ImageFillStretch
	v.img.ScaleMode = canvas.ImageScaleSmooth
	v.img.SetMinSize(fyne.NewSize(320, 240))
	v.ExtendBaseWidget(v)
	return v
}

func (v *plotView) CreateRenderer() fyne.WidgetRenderer { return widget.NewSimpleRenderer(v.img) }

// set draws pl at the view's size.
func (v *plotView) set(pl figure.Plot) error {
	v.plot, v.have = pl, true
	v.px = fyne.Size{}
	return v.draw(v.Size())
}

// Resize redraws the plot for the new size.
func (v *plotView) Resize(s fyne.Size) {
	v.BaseWidget.Resize(s)
	if v.have && s != v.px {
		_ = v.draw(s)
	}
}

// setMark marks x value x (the scene's) on the plot with a dashed line.
func (v *plotView) setMark(x float64) {
	if x == v.mark || (math.IsNaN(x) && math.IsNaN(v.mark)) {
		return
	}
	v.mark = x
	if v.have {
		v.px = fyne.Size{}
		_ = v.draw(v.Size())
	}
}

func (v *plotView) draw(s fyne.Size) error {
	if s.Width < 50 || s.Height < 50 {
		s = v.img.MinSize()
	}
	scale := float32(1)
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil && c.Scale() > 0 {
		scale = c.Scale()
	}
	w, h := int(math.Round(float64(s.Width*scale))), int(math.Round(float64(s.Height*scale)))
	pl := v.plot
	if lo, hi, ok := xSpan(pl); ok && v.mark >= lo && v.mark <= hi {
		ylo, yhi := pl.YRange()
		pl.Series = append(append([]figure.Series(nil), pl.Series...), figure.Series{Name: "this scene", X: []float64{v.mark, v.mark}, Y: []float64{ylo, yhi},
			Colour: sceneMarkColour, Dashed: true})
	}
	img, f, err := pl.Framed(w, h, 96*float64(scale))
	if err != nil {
		return err
	}
	v.img.Image, v.frame, v.px, v.pxW = img, f, s, w
	v.img.Refresh()
	return nil
}

// valueAt returns the x value under position pos of the view, and whether
// pos lies on the data area.
func (v *plotView) valueAt(pos fyne.Position) (float64, bool) {
	if !v.have || v.Size().Width <= 0 {
		return math.NaN(), false
	}
	px := float64(pos.X) * float64(v.pxW) / float64(v.Size().Width)
	x, ok := v.frame.XAt(px)
	if !ok {
		return x, false
	}
	// Round to a pixel's worth (to 1, 2 or 5 × 10^n), so a picked value
	// reads cleanly.
	step := figure.NiceStep(math.Abs(v.frame.XMax-v.frame.XMin) / float64(v.frame.Right-v.frame.Left) / 2)
	return math.Round(x/step) * step, true
}

// Tapped reports the x value under the pointer.
func (v *plotView) Tapped(ev *fyne.PointEvent) {
	if x, ok := v.valueAt(ev.Position); ok && v.onPick != nil {
		v.onPick(x)
	}
}

// sceneMarkColour is the dashed line marking the scene's value: purple,
// apart from every colour of figure.PlotColours.
var sceneMarkColour = color.NRGBA{0x98, 0x30, 0xb0, 0xff}

// xSpan returns the smallest and largest x of pl's series.
func xSpan(pl figure.Plot) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, s := range pl.Series {
		for _, x := range s.X {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	return lo, hi, lo <= hi
}
