package ui

import (
	"fmt"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"faultline/export"
	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// Grey mappings offered for the display (and used for exported figures).
var greyChoices = []struct {
	name string
	m    figure.Mapping
}{
	{"Stretch, 0.5 % clipped", figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5}},
	{"Stretch, full range", figure.Mapping{Mode: figure.ModeAuto}},
	{"Fixed, incident = white", figure.Mapping{Mode: figure.ModeFixed}},
}

// Tools of the image panels.
const (
	toolPan  = "Pan / zoom"
	toolLine = "Profile line"
)

// imageView is the centre of the window: the bright field and the dark
// field side by side (and the micrograph, or a blend of it with the
// simulation, as a third panel), the controls of the display above them
// and the intensity read-out under them.
type imageView struct {
	ws     *Workspace
	vp     *viewport
	BF, DF *imagePanel
	Extra  *imagePanel
	grid   *fyne.Container

	Grey   *widget.Select
	Invert *widget.Check
	// Outlines draws the defects over the images (off by default).
	Outlines *widget.Check
	Tool     *widget.RadioGroup
	Readout  *widget.Label

	mapping  figure.Mapping
	outlines []scene.Outline // of the newest setup that built
	gLabel   string
	line     profileLine
	res      *Result
	stale    bool
	onLine   []func(final bool)
	// autoLine: the line is the default one across the middle, which
	// follows the field until the user draws or clears a line.
	autoLine bool
}

// imagesPanel returns the image view.
func imagesPanel(ws *Workspace) fyne.CanvasObject {
	v := &imageView{ws: ws, vp: &viewport{fitted: true}, gLabel: "g", mapping: greyChoices[0].m, autoLine: true}
	ws.view = v
	v.BF = newImagePanel(v, "BF")
	v.DF = newImagePanel(v, "DF")
	v.Extra = newImagePanel(v, "Micrograph")
	v.Extra.Hide()
	v.grid = container.NewGridWithColumns(2, v.BF, v.DF, v.Extra)

	names := make([]string, len(greyChoices))
	for i, g := range greyChoices {
		names[i] = g.name
	}
	v.Grey = widget.NewSelect(names, func(name string) {
		if k := indexOf(names, name); k >= 0 {
			inv := v.mapping.Invert
			v.mapping = greyChoices[k].m
			v.mapping.Invert = inv
			v.redraw()
		}
	})
	v.Grey.SetSelected(names[0])
	v.Invert = widget.NewCheck("Invert", func(on bool) {
		v.mapping.Invert = on
		v.redraw()
	})
	v.Outlines = widget.NewCheck("Draw the defects", func(bool) { v.refreshAll() })
	v.Tool = widget.NewRadioGroup([]string{toolPan, toolLine}, nil)
	v.Tool.Horizontal = true
	v.Tool.Required = true
	v.Tool.SetSelected(toolPan)
	fit := widget.NewButtonWithIcon("", theme.ZoomFitIcon(), func() { v.fit() })
	zin := widget.NewButtonWithIcon("", theme.ZoomInIcon(), func() { v.zoomBy(1.25) })
	zout := widget.NewButtonWithIcon("", theme.ZoomOutIcon(), func() { v.zoomBy(1 / 1.25) })
	clear := widget.NewButton("Clear line", func() {
		v.autoLine = false
		v.setLine(profileLine{}, true)
	})

	bar := container.NewBorder(nil, nil,
		container.NewHBox(widget.NewLabel("Grey"), container.NewGridWrap(fyne.NewSize(205, v.Grey.MinSize().Height), v.Grey), v.Invert, widget.NewSeparator()),
		container.NewHBox(widget.NewSeparator(), zout, fit, zin),
		container.NewHBox(v.Tool, clear),
	)
	v.Readout = widget.NewLabel(" ")
	v.Readout.TextStyle = fyne.TextStyle{Monospace: true}

	ws.ctrl.OnResult(v.show)
	ws.ctrl.OnBuilt(func(st *scene.Setup, err error) {
		stale := err != nil
		if stale != v.stale {
			v.stale = stale
			v.updateTags()
		}
		if st != nil {
			v.outlines, _ = st.Outlines()
			v.gLabel = "g = " + export.Indices(st.Scene.Diffraction.G)
			w := st.Scene.Image.WidthNm
			if v.autoLine {
				v.line = profileLine{X0: -0.45 * w, X1: 0.45 * w, Set: true}
			}
			if v.vp.setField(w, st.Scene.Image.HeightNm) {
				v.refreshAll()
			}
		}
	})
	return container.NewBorder(bar, container.NewBorder(nil, nil, nil, v.Outlines, v.Readout), nil, nil, v.grid)
}

func (v *imageView) lineTool() bool { return v.Tool.Selected == toolLine }

// toggleTool switches between panning and drawing the profile line.
func (v *imageView) toggleTool() {
	if v.lineTool() {
		v.Tool.SetSelected(toolPan)
	} else {
		v.Tool.SetSelected(toolLine)
	}
}

// show puts a render on the panels.
func (v *imageView) show(r *Result) {
	v.res = r
	v.redraw()
}

// redraw maps the shown render to grey and updates every panel.
func (v *imageView) redraw() {
	if v.res != nil {
		im := v.res.Image
		g := im.Grid
		bf, df, err := export.Grays(im, v.mapping)
		if err == nil {
			if v.res.Preview {
				bf, df = smoothed(bf, 256), smoothed(df, 256)
			}
			v.BF.src = newGridSource(bf, g.WidthNm, g.HeightNm)
			v.DF.src = newGridSource(df, g.WidthNm, g.HeightNm)
			v.BF.grey, v.BF.warn = greyMark(v.mapping.Stretch(im.BF()))
			v.DF.grey, v.DF.warn = greyMark(v.mapping.Stretch(im.DF()))
		}
		if v.vp.setField(g.WidthNm, g.HeightNm) {
			v.refreshAll()
		}
	}
	v.updateExtra()
	v.updateTags()
	v.refreshAll()
	// The profile follows the render and the micrograph shown.
	for _, f := range v.onLine {
		f(true)
	}
}

// simGAngleDeg is the direction of g in the simulated pictures shown.
func (v *imageView) simGAngleDeg() float64 {
	if st := v.ws.ctrl.LastGoodSetup(); st != nil {
		return st.GAngleDeg
	}
	return 0
}

// greyMark is what a panel says about its grey: the range a stretch maps
// (as in the figure's caption), or a plain no-contrast mark for a panel
// whose range is below the floor (drawn flat, as in the figure).
func greyMark(s figure.Stretch) (text string, warn bool) {
	switch {
	case !s.Auto:
		return "", false
	case s.Flat:
		return fmt.Sprintf("no contrast: range below %g, drawn flat", figure.ContrastFloor), true
	}
	return "stretched over " + export.StretchRange(s), false
}

// updateExtra sets the third panel from the micrograph and the chosen
// comparison.
func (v *imageView) updateExtra() {
	m := v.ws.micro
	if m == nil || m.gray == nil || m.Compare == compareOff {
		if v.Extra.Visible() {
			v.Extra.Hide()
			v.setColumns(2)
		}
		return
	}
	ms := newRotatedSource(m.displayGray(v.mapping.Invert), m.placementOn(v.simGAngleDeg()))
	switch m.Compare {
	case compareBlend:
		base := v.DF.src
		label := "DF"
		if m.BlendBF {
			base, label = v.BF.src, "BF"
		}
		v.Extra.title = fmt.Sprintf("Blend: %s %d %% / micrograph %d %%", label, int(math.Round(100*(1-m.Blend))), int(math.Round(100*m.Blend)))
		if base == nil {
			v.Extra.src = ms
		} else {
			v.Extra.src = &blendSource{a: base, b: ms, w: m.Blend}
		}
	default:
		v.Extra.title = "Micrograph: " + m.Name
		v.Extra.src = ms
	}
	if !v.Extra.Visible() {
		v.Extra.Show()
		v.setColumns(3)
	}
}

func (v *imageView) setColumns(n int) {
	v.grid.Layout = container.NewGridWithColumns(n).Layout
	v.grid.Refresh()
}

func (v *imageView) updateTags() {
	tag := ""
	if v.res != nil && v.res.Preview {
		g := v.res.Image.Grid
		tag = fmt.Sprintf("preview %d × %d", g.NX, g.NY)
	}
	if v.stale {
		tag = "not updated: see the error on the left"
	}
	v.BF.tag, v.DF.tag = tag, tag
}

func (v *imageView) refreshAll() {
	for _, p := range []*imagePanel{v.BF, v.DF, v.Extra} {
		p.Refresh()
	}
}

// refreshOthers refreshes the panels other than p (after p fitted the
// shared view to its size).
func (v *imageView) refreshOthers(p *imagePanel) {
	for _, q := range []*imagePanel{v.BF, v.DF, v.Extra} {
		if q != p {
			q.Refresh()
		}
	}
}

func (v *imageView) viewChanged() { v.refreshAll() }

func (v *imageView) fit() {
	v.vp.fit()
	v.refreshAll()
}

func (v *imageView) zoomBy(f float64) {
	v.vp.zoom(f, fyne.NewPos(v.vp.panel.Width/2, v.vp.panel.Height/2))
	v.refreshAll()
}

// setLine sets the profile line (final when the drag ended).
func (v *imageView) setLine(l profileLine, final bool) {
	v.line = l
	v.refreshAll()
	for _, f := range v.onLine {
		f(final)
	}
}

// hover writes the intensity read-out for the specimen point (x, y).
func (v *imageView) hover(x, y float64, in bool) {
	if !in {
		v.Readout.SetText(" ")
		return
	}
	text := fmt.Sprintf("x %8.1f nm  y %8.1f nm", x, y)
	if v.res != nil {
		if bf, df, ok := intensityAt(v.res.Image, x, y); ok {
			text += fmt.Sprintf("   BF %.4f  DF %.4f", bf, df)
		}
	}
	if m := v.ws.micro; m != nil && m.gray != nil && m.Compare != compareOff {
		if val, ok := m.valueAt(x, y, v.simGAngleDeg()); ok {
			text += fmt.Sprintf("   micrograph %.4g", val)
		}
	}
	v.Readout.SetText(text)
}

// intensityAt returns the bright- and dark-field intensities of the pixel
// holding the specimen point (x, y), if it lies in the field.
func intensityAt(im *sim.Image, x, y float64) (bf, df float64, ok bool) {
	i, j, ok := im.Grid.PixelAt(x, y)
	if !ok {
		return 0, 0, false
	}
	k := j*im.Grid.NX + i
	return im.BF()[k], im.DF()[k], true
}
