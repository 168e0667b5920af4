package ui

import (
	"bytes"
	"errors"
	"faultline/assets"
	"fmt"
	"image"
	"image/color"
	_ "image/jpeg" // micrographs saved as JPEG open too
	_ "image/png"
	"io"
	"os"
	"path/filepath"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
	"golang.org/x/image/tiff"

	"faultline/figure"
)

// Ways of showing the micrograph.
const (
	compareOff   = "Hidden"
	compareSide  = "Side by side"
	compareBlend = "Blend"
)

// maxMicrographBytes bounds the file read (a 16-bit 8k × 8k TIFF is
// 128 MiB).
const maxMicrographBytes = 512 << 20

// micrograph is a recorded image shown beside the simulation: its
// intensities as read, the grey picture made of them, and how it sits on
// the specimen (pixel size, direction of g in it, offset of its centre).
type micrograph struct {
	Name   string
	Format string // "8-bit grey PNG", "32-bit float TIFF", ...
	data   []float64
	nx, ny int
	gray   *image.Gray
	inv    *image.Gray

	NmPerPx   float64
	GAngleDeg float64
	OffXNm    float64
	OffYNm    float64

	Compare string
	Blend   float64 // weight of the micrograph in the blend
	BlendBF bool    // blend with BF (else DF)
}

// loadMicrograph reads a PNG, JPEG or TIFF: 8- or 16-bit grey (or colour,
// taken as its luminance) and 32-bit float TIFF. Integer samples are
// scaled to 0..1 of their range; float samples are kept as they are.
func loadMicrograph(path string) (*micrograph, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxMicrographBytes+1))
	if err != nil {
		return nil, fmt.Errorf("micrograph %s: %w", path, err)
	}
	if len(data) > maxMicrographBytes {
		return nil, fmt.Errorf("micrograph %s: larger than %d MiB", path, maxMicrographBytes>>20)
	}
	m, err := decodeMicrograph(data)
	if err != nil {
		return nil, fmt.Errorf("micrograph %s: %w", filepath.Base(path), err)
	}
	m.Name = filepath.Base(path)
	return m, nil
}

func decodeMicrograph(data []byte) (*micrograph, error) {
	m := &micrograph{Compare: compareSide, Blend: 0.5}
	isTIFF := bytes.HasPrefix(data, []byte("II*\x00")) || bytes.HasPrefix(data, []byte("MM\x00*"))
	if isTIFF {
		if fl, nx, ny, err := figure.ReadFloatTIFF(bytes.NewReader(data)); err == nil {
			m.data = make([]float64, len(fl))
			for i, v := range fl {
				m.data[i] = float64(v)
			}
			m.nx, m.ny, m.Format = nx, ny, "32-bit float TIFF"
			return m, m.finish()
		}
	}
	var (
		img    image.Image
		format string
		err    error
	)
	if isTIFF {
		img, err = tiff.Decode(bytes.NewReader(data))
		format = "tiff"
	} else {
		img, format, err = image.Decode(bytes.NewReader(data))
	}
	if err != nil {
		return nil, fmt.Errorf("not a PNG, JPEG or TIFF this program reads: %w", err)
	}
	b := img.Bounds()
	m.nx, m.ny = b.Dx(), b.Dy()
	if m.nx == 0 || m.ny == 0 {
		return nil, errors.New("the image is empty")
	}
	m.data = make([]float64, m.nx*m.ny)
	switch im := img.(type) {
	case *image.Gray:
		m.Format = "8-bit grey " + format
		for j := 0; j < m.ny; j++ {
			for i := 0; i < m.nx; i++ {
				m.data[j*m.nx+i] = float64(im.GrayAt(b.Min.X+i, b.Min.Y+j).Y) / 255
			}
		}
	case *image.Gray16:
		m.Format = "16-bit grey " + format
		for j := 0; j < m.ny; j++ {
			for i := 0; i < m.nx; i++ {
				m.data[j*m.nx+i] = float64(im.Gray16At(b.Min.X+i, b.Min.Y+j).Y) / 65535
			}
		}
	default:
		m.Format = "colour " + format + " (luminance)"
		for j := 0; j < m.ny; j++ {
			for i := 0; i < m.nx; i++ {
				g := color.Gray16Model.Convert(img.At(b.Min.X+i, b.Min.Y+j)).(color.Gray16)
				m.data[j*m.nx+i] = float64(g.Y) / 65535
			}
		}
	}
	return m, m.finish()
}

// finish makes the grey pictures: stretched to the range with 0.5 %
// clipped at each end, as a micrograph's intensities have no fixed scale.
func (m *micrograph) finish() error {
	if m.nx*m.ny > 64<<20 {
		return fmt.Errorf("%d × %d pixels: too large to show", m.nx, m.ny)
	}
	mp := figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5}
	m.gray = figure.Gray(m.data, m.nx, m.ny, mp)
	mp.Invert = true
	m.inv = figure.Gray(m.data, m.nx, m.ny, mp)
	return nil
}

func (m *micrograph) displayGray(invert bool) *image.Gray {
	if invert {
		return m.inv
	}
	return m.gray
}

// valueAt returns the micrograph's intensity shown at the specimen point
// (x, y).
func (m *micrograph) valueAt(x, y float64) (float64, bool) {
	s := newRotatedSource(m.gray, m.NmPerPx, m.GAngleDeg, m.OffXNm, m.OffYNm)
	px, py := s.pixel(x, y)
	if px < 0 || py < 0 || int(px) >= m.nx || int(py) >= m.ny {
		return 0, false
	}
	return m.data[int(py)*m.nx+int(px)], true
}

// micrographPanel returns the panel that opens a micrograph and places it
// on the specimen.
func micrographPanel(ws *Workspace) fyne.CanvasObject {
	info := widget.NewLabel("No micrograph. Open a PNG or TIFF (8- or 16-bit grey, or 32-bit float) to compare it with the simulation.")
	info.Wrapping = fyne.TextWrapWord
	errl := errorLabel()
	px := widget.NewEntry()
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
		info.SetText(fmt.Sprintf("%s: %d × %d pixels, %s", m.Name, m.nx, m.ny, m.Format))
		px.SetText(formatNumber(m.NmPerPx))
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
	number := func(e *widget.Entry, positive bool, set func(m *micrograph, v float64)) {
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
	number(px, true, func(m *micrograph, v float64) { m.NmPerPx = v })
	number(angle, false, func(m *micrograph, v float64) { m.GAngleDeg = v })
	number(offX, false, func(m *micrograph, v float64) { m.OffXNm = v })
	number(offY, false, func(m *micrograph, v float64) { m.OffYNm = v })
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
	ws.openFileDialog([]string{".png", ".tif", ".tiff", ".jpg", ".jpeg", ".PNG", ".TIF", ".TIFF"}, nil, func(path string) {
		if err := ws.OpenMicrograph(path); err != nil {
			dialog.ShowError(err, ws.win)
		}
	})
}

// OpenMicrograph loads the micrograph at path and shows it beside the
// simulation. Its pixel size starts so that it spans the simulated field;
// set the real one in the micrograph panel.
func (ws *Workspace) OpenMicrograph(path string) error {
	m, err := loadMicrograph(path)
	if err != nil {
		return err
	}
	ws.showMicrograph(m, true)
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
	m, err := decodeMicrograph(assets.DemoMicrograph)
	if err != nil {
		return fmt.Errorf("demo micrograph: %w", err)
	}
	m.Name = "demo (invented)"
	m.NmPerPx, m.GAngleDeg = demoMicrographNmPerPx, demoMicrographGDeg
	ws.showMicrograph(m, false)
	return nil
}

// showMicrograph makes m the micrograph beside the simulation. With
// keepGeometry, a micrograph of the same size as the one shown keeps its
// pixel size, direction and offset; otherwise a new one starts spanning
// the simulated field, unless m has its pixel size already.
func (ws *Workspace) showMicrograph(m *micrograph, keepGeometry bool) {
	if old := ws.micro; keepGeometry && old != nil && old.nx == m.nx && old.ny == m.ny {
		m.NmPerPx, m.GAngleDeg, m.OffXNm, m.OffYNm = old.NmPerPx, old.GAngleDeg, old.OffXNm, old.OffYNm
	} else {
		w := 100.0
		if sc := ws.ctrl.Scene(); sc != nil && sc.Image.WidthNm > 0 {
			w = sc.Image.WidthNm
		}
		if m.NmPerPx == 0 {
			m.NmPerPx = w / float64(m.nx)
		}
	}
	ws.micro = m
	for _, f := range ws.onMicrograph {
		f()
	}
	ws.view.redraw()
}
