package ui

import (
	"errors"
	"fmt"
	"image"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"faultline/assets"
	"faultline/figure"
	"faultline/micrograph"
)

// Ways of showing the micrograph.
const (
	compareOff   = "Hidden"
	compareSide  = "Side by side"
	compareBlend = "Blend"
)

// micrographView is a recorded image shown beside the simulation: the
// image as the micrograph package read it, the grey picture made of it,
// and how it sits on the specimen.
type micrographView struct {
	Name string
	img  *micrograph.Image
	gray *image.Gray
	inv  *image.Gray

	micrograph.Placement
	// PixelSizeFrom says where NmPerPx came from: the file, the user, or
	// a first guess spanning the simulated field.
	PixelSizeFrom string

	Compare string
	Blend   float64 // weight of the micrograph in the blend
	BlendBF bool    // blend with BF (else DF)
}

// Where a micrograph's pixel size came from, as the panel says it.
const (
	sizeFromFile  = "from the file"
	sizeFromUser  = "typed in"
	sizeFromField = "a guess: spans the simulated field; type the real one"
	sizeFromDemo  = "of the demo"
)

// newMicrographView makes the grey pictures of a micrograph: stretched to
// its range with 0.5 % clipped at each end, as a micrograph's
// intensities have no fixed scale.
func newMicrographView(name string, img *micrograph.Image) *micrographView {
	m := &micrographView{Name: name, img: img, Compare: compareSide, Blend: 0.5}
	data := make([]float64, len(img.Pix))
	for k, v := range img.Pix {
		data[k] = float64(v)
	}
	mp := figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5}
	m.gray = figure.Gray(data, img.Width, img.Height, mp)
	mp.Invert = true
	m.inv = figure.Gray(data, img.Width, img.Height, mp)
	if img.NmPerPx > 0 {
		m.NmPerPx, m.PixelSizeFrom = img.NmPerPx, sizeFromFile
	}
	return m
}

func (m *micrographView) displayGray(invert bool) *image.Gray {
	if invert {
		return m.inv
	}
	return m.gray
}

// valueAt returns the micrograph's value at the point (x, y) of a
// simulated picture whose g points at simGAngleDeg.
func (m *micrographView) valueAt(x, y, simGAngleDeg float64) (float64, bool) {
	v, ok := m.img.ValueAt(m.placementOn(simGAngleDeg), x, y)
	return float64(v), ok
}

// placementOn is the micrograph's placement beside a simulated picture
// whose g points at simGAngleDeg (0 unless the scene fixes the picture to
// the specimen with image.x_axis): the micrograph is turned so that its g
// points the same way.
func (m *micrographView) placementOn(simGAngleDeg float64) micrograph.Placement {
	p := m.Placement
	p.GAngleDeg -= simGAngleDeg
	return p
}

// describe is the panel's line about the file.
func (m *micrographView) describe() string {
	s := fmt.Sprintf("%s: %d × %d pixels, %s %s", m.Name, m.img.Width, m.img.Height, m.img.Kind, strings.ToUpper(m.img.Format))
	if m.img.Meta.StackSize > 1 {
		s += fmt.Sprintf(", image #%d of %d", m.img.Meta.StackIndex, m.img.Meta.StackSize)
	}
	for _, n := range m.img.Notices {
		s += "; " + n
	}
	return s
}

// pixelSizeNote is what the panel says about the pixel size.
func (m *micrographView) pixelSizeNote() string {
	return fmt.Sprintf("%.4g nm/px, %s", m.NmPerPx, m.PixelSizeFrom)
}

// micrographPanel returns the panel that opens a micrograph and places it
// on the specimen.
func micrographPanel(ws *Workspace) fyne.CanvasObject {
	info := widget.NewLabel("No micrograph. Open a DM3, DM4, MRC, TIFF or PNG file to compare it with the simulation.")
	info.Wrapping = fyne.TextWrapWord
	errl := errorLabel()
	px := widget.NewEntry()
	pxFrom := widget.NewLabel("")
	pxFrom.Wrapping = fyne.TextWrapWord
	angle := widget.NewEntry()
	offX, offY := widget.NewEntry(), widget.NewEntry()
	show := widget.NewRadioGroup([]string{compareOff, compareSide, compareBlend}, nil)
	show.Required = true
	show.Horizontal = true
	blendWith := widget.NewRadioGroup([]string{"BF", "DF"}, nil)
	blendWith.Horizontal = true
	blendWith.Required = true
	weight := widget.NewSlider(0, 1)
	weight.Step = 0.05
	syncing := false
	fields := container.NewVBox()

	fill := func() {
		m := ws.micro
		syncing = true
		defer func() { syncing = false }()
		if m == nil {
			fields.Hide()
			return
		}
		fields.Show()
		info.SetText(m.describe())
		px.SetText(formatNumber(m.NmPerPx))
		pxFrom.SetText(m.pixelSizeNote())
		angle.SetText(formatNumber(m.GAngleDeg))
		offX.SetText(formatNumber(m.OffXNm))
		offY.SetText(formatNumber(m.OffYNm))
		show.SetSelected(m.Compare)
		if m.BlendBF {
			blendWith.SetSelected("BF")
		} else {
			blendWith.SetSelected("DF")
		}
		weight.SetValue(m.Blend)
	}
	number := func(e *widget.Entry, positive bool, set func(m *micrographView, v float64)) {
		e.OnChanged = func(text string) {
			if syncing || ws.micro == nil {
				return
			}
			v, err := parseNumber(text)
			if err == nil && positive && !(v > 0) {
				err = errors.New("must be positive")
			}
			if err != nil {
				setError(errl, err.Error())
				return
			}
			setError(errl, "")
			set(ws.micro, v)
			ws.view.redraw()
		}
	}
	number(px, true, func(m *micrographView, v float64) {
		if v != m.NmPerPx {
			m.NmPerPx, m.PixelSizeFrom = v, sizeFromUser
			pxFrom.SetText(m.pixelSizeNote())
		}
	})
	number(angle, false, func(m *micrographView, v float64) { m.GAngleDeg = v })
	number(offX, false, func(m *micrographView, v float64) { m.OffXNm = v })
	number(offY, false, func(m *micrographView, v float64) { m.OffYNm = v })
	show.OnChanged = func(s string) {
		if syncing || ws.micro == nil {
			return
		}
		ws.micro.Compare = s
		ws.view.redraw()
	}
	blendWith.OnChanged = func(s string) {
		if syncing || ws.micro == nil {
			return
		}
		ws.micro.BlendBF = s == "BF"
		ws.view.redraw()
	}
	weight.OnChanged = func(v float64) {
		if syncing || ws.micro == nil {
			return
		}
		ws.micro.Blend = v
		ws.view.redraw()
	}

	fields.Add(form(
		formRow("Pixel size", unit(px, "nm per pixel")),
		formRow("", pxFrom),
		formRow("g direction", unit(angle, "° counter-clockwise from →")),
		formRow("Centre offset", container.NewGridWithColumns(2, unit(offX, "x"), unit(offY, "y nm"))),
		formRow("Show", show),
		formRow("Blend with", blendWith),
		formRow("Micrograph weight", weight),
	))
	fields.Add(errl)
	note := widget.NewLabel("The micrograph is turned so that its g points right, as in the simulated images, and drawn at its pixel size on the same scale.")
	note.Wrapping = fyne.TextWrapWord
	note.TextStyle = fyne.TextStyle{Italic: true}
	fields.Add(note)

	open := widget.NewButton("Open micrograph…", func() { ws.openMicrographDialog() })
	ws.onMicrograph = append(ws.onMicrograph, fill)
	fill()
	return container.NewVScroll(container.NewPadded(container.NewVBox(open, info, fields)))
}

// openMicrographDialog asks for a micrograph file.
func (ws *Workspace) openMicrographDialog() {
	ws.openFileDialog([]string{".png", ".tif", ".tiff", ".jpg", ".jpeg", ".dm3", ".dm4", ".mrc", ".mrcs", ".PNG", ".TIF", ".TIFF", ".DM3", ".DM4", ".MRC"}, nil, func(path string) {
		if err := ws.OpenMicrograph(path); err != nil {
			dialog.ShowError(err, ws.win)
		}
	})
}

// OpenMicrograph loads the micrograph at path (a "#N" suffix picks an
// image of a stack) and shows it beside the simulation. Its pixel size is
// the file's where the file records one; otherwise it starts so that the
// micrograph spans the simulated field, to be set in the micrograph panel.
func (ws *Workspace) OpenMicrograph(path string) error {
	img, err := micrograph.Read(path)
	if err != nil {
		return err
	}
	ws.showMicrograph(newMicrographView(filepath.Base(path), img), true)
	return nil
}

// Geometry of the built-in demo micrograph (see assets.DemoMicrograph).
const (
	demoMicrographNmPerPx = 1.25
	demoMicrographGDeg    = 30
)

// OpenDemoMicrograph shows the invented micrograph that ships with the
// program, with its pixel size and direction of g set.
func (ws *Workspace) OpenDemoMicrograph() error {
	img, err := micrograph.DecodeBytes(assets.DemoMicrograph, micrograph.Options{})
	if err != nil {
		return fmt.Errorf("demo micrograph: %w", err)
	}
	m := newMicrographView("demo (invented)", img)
	m.NmPerPx, m.GAngleDeg, m.PixelSizeFrom = demoMicrographNmPerPx, demoMicrographGDeg, sizeFromDemo
	ws.showMicrograph(m, false)
	return nil
}

// showMicrograph makes m the micrograph beside the simulation. With
// keepGeometry, a micrograph of the same size as the one shown keeps its
// pixel size, direction and offset; otherwise a new one starts spanning
// the simulated field, unless m has its pixel size already.
func (ws *Workspace) showMicrograph(m *micrographView, keepGeometry bool) {
	old := ws.micro
	if keepGeometry && old != nil && old.img.Width == m.img.Width && old.img.Height == m.img.Height {
		fromFile := m.NmPerPx
		m.Placement, m.PixelSizeFrom = old.Placement, old.PixelSizeFrom
		if fromFile > 0 {
			m.NmPerPx, m.PixelSizeFrom = fromFile, sizeFromFile
		}
	} else {
		w := 100.0
		if sc := ws.ctrl.Scene(); sc != nil && sc.Image.WidthNm > 0 {
			w = sc.Image.WidthNm
		}
		if m.NmPerPx == 0 {
			m.NmPerPx, m.PixelSizeFrom = w/float64(m.img.Width), sizeFromField
		}
	}
	ws.micro = m
	for _, f := range ws.onMicrograph {
		f()
	}
	ws.view.redraw()
}
