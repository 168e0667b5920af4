package ui

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// deviationNames name the forms of scene.DeviationForms in the choice.
var deviationNames = []string{
	"s, excitation error",
	"w = s·ξg",
	"weak beam g(ng)",
	"Kikuchi line position",
}

// deviationIndex is the position of the scene's deviation form in
// scene.DeviationForms.
func deviationIndex(d *scene.Diffraction) int {
	return indexOf(scene.DeviationForms, scene.DeviationForm(d))
}

// Slider ranges (the typed entry beside a slider accepts any value).
const (
	thicknessMinNm, thicknessMaxNm, thicknessStepNm = 5, 500, 1
	sMin, sMax, sStep                               = -0.2, 0.2, 0.0005
	wMin, wMax, wStep                               = -5, 5, 0.01
)

// paramsPanel holds the widgets of the conditions panel that other code
// (tests, the menus) reaches.
type paramsPanel struct {
	Material    *widget.Select
	Voltage     *widget.Entry
	G, Beam     *widget.Entry
	Reflections *widget.Select
	Deviation   *widget.Select
	S, W        *sliderField
	WeakN       *widget.Entry
	KikOffset   *widget.Entry
	KikSpacing  *widget.Entry
	Thickness   *sliderField
	Normal      *widget.Entry
	Width       *widget.Entry
	Height      *widget.Entry
	NX, NY      *widget.Entry
	Model       *widget.Select
	Beams       *widget.Entry
	Absorption  *widget.Entry
	Extinction  *widget.Entry
	Derived     *widget.Label
	CrystalInfo *widget.Label
	Notes       *widget.Label
	Sections    *widget.Accordion

	reflHKL map[string][]float64
	reflKey string
}

// conditionsPanel returns the panel of the imaging conditions: crystal,
// microscope, diffraction, foil and image field.
func conditionsPanel(ws *Workspace) fyne.CanvasObject {
	b := ws.binder
	board := ws.board
	p := &paramsPanel{reflHKL: map[string][]float64{}}
	ws.params = p

	// Crystal.
	presets := scene.Materials()
	p.Material = widget.NewSelect(presets, func(name string) {
		if name == "" || strings.HasPrefix(name, "CIF:") || name == explicitCellLabel {
			return
		}
		b.set("crystal", map[string]any{"material": name})
	})
	openCIF := widget.NewButton("Open CIF…", func() { ws.openCIF() })
	p.CrystalInfo = widget.NewLabel("")
	p.CrystalInfo.Wrapping = fyne.TextWrapWord
	p.CrystalInfo.TextStyle = fyne.TextStyle{Italic: true}
	b.reader(func(sc *scene.Scene) {
		c := sc.Crystal
		switch {
		case c.Material != "":
			p.Material.SetOptions(presets)
			p.Material.SetSelected(c.Material)
		case c.CIF != "":
			opt := "CIF: " + filepath.Base(c.CIF)
			p.Material.SetOptions(append([]string{opt}, presets...))
			p.Material.SetSelected(opt)
		default:
			p.Material.SetOptions(append([]string{explicitCellLabel}, presets...))
			p.Material.SetSelected(explicitCellLabel)
		}
	})
	crystalErr := board.label("crystal")
	crystalBox := form(formRow("Material", container.NewBorder(nil, nil, nil, openCIF, p.Material), crystalErr))

	// Microscope.
	p.Voltage = b.numberEntry("microscope.voltage_kv",
		func(sc *scene.Scene) string { return formatNumber(sc.Microscope.VoltageKV) })
	micro := form(formRow("Voltage", unit(p.Voltage, "kV"), board.label("microscope.voltage_kv")))

	// Diffraction: g, beam, the zone's reflections.
	p.G = b.indicesEntry("diffraction.g", false,
		func(sc *scene.Scene) []float64 { return sc.Diffraction.G })
	p.Beam = b.indicesEntry("diffraction.beam", false,
		func(sc *scene.Scene) []float64 { return sc.Diffraction.Beam })
	p.Reflections = widget.NewSelect(nil, func(opt string) {
		hkl, ok := p.reflHKL[opt]
		if !ok {
			return
		}
		b.set("diffraction.g", hkl)
		b.quiet(func() { p.G.SetText(formatIndices(hkl)) })
	})
	p.Reflections.PlaceHolder = "(reflections of the zone B)"

	// Deviation.
	p.S = b.sliderField("diffraction.s_per_nm", sMin, sMax, sStep,
		func(sc *scene.Scene) (float64, bool) {
			if d := sc.Diffraction.SPerNm; d != nil {
				return *d, true
			}
			return 0, false
		})
	p.W = b.sliderField("diffraction.w", wMin, wMax, wStep,
		func(sc *scene.Scene) (float64, bool) {
			if d := sc.Diffraction.W; d != nil {
				return *d, true
			}
			return 0, false
		})
	p.WeakN = b.numberEntry("diffraction.weak_beam.n",
		func(sc *scene.Scene) string {
			if w := sc.Diffraction.WeakBeam; w != nil {
				return formatNumber(w.N)
			}
			return "3"
		})
	// The offset and spacing are set as one object: the form needs both.
	kik := func(sc *scene.Scene, offset, spacing *float64) []scene.Edit {
		k := scene.Kikuchi{Spacing: 1}
		if sc.Diffraction.Kikuchi != nil {
			k = *sc.Diffraction.Kikuchi
		}
		if offset != nil {
			k.Offset = *offset
		}
		if spacing != nil {
			k.Spacing = *spacing
		}
		return []scene.Edit{{Path: "diffraction.deviation_from_kikuchi", Value: k}}
	}
	p.KikOffset = b.numberEntryTo("diffraction.deviation_from_kikuchi.offset",
		func(sc *scene.Scene) string {
			if k := sc.Diffraction.Kikuchi; k != nil {
				return formatNumber(k.Offset)
			}
			return "0"
		},
		func(sc *scene.Scene, v float64) []scene.Edit { return kik(sc, &v, nil) })
	p.KikSpacing = b.numberEntryTo("diffraction.deviation_from_kikuchi.spacing",
		func(sc *scene.Scene) string {
			if k := sc.Diffraction.Kikuchi; k != nil {
				return formatNumber(k.Spacing)
			}
			return "1"
		},
		func(sc *scene.Scene, v float64) []scene.Edit { return kik(sc, nil, &v) })

	devForms := []fyne.CanvasObject{
		form(formRow("s", p.S.object("1/nm"), board.label("diffraction.s_per_nm"))),
		form(formRow("w", p.W.object(""), board.label("diffraction.w"))),
		form(formRow("n", container.NewBorder(nil, nil, nil, widget.NewLabel("g(ng): n·g at the Bragg position"), p.WeakN), board.label("diffraction.weak_beam"))),
		container.NewVBox(
			widget.NewLabel("Excess line beyond the g spot (offset) and 000 to g\n(spacing), both in one unit on the pattern:"),
			form(
				formRow("Offset", p.KikOffset, board.label("diffraction.deviation_from_kikuchi.offset")),
				formRow("Spacing", p.KikSpacing, board.label("diffraction.deviation_from_kikuchi.spacing")),
			),
			board.label("diffraction.deviation_from_kikuchi")),
	}
	devStack := container.NewStack(devForms...)
	showDev := func(k int) {
		for i, o := range devForms {
			if i == k {
				o.Show()
			} else {
				o.Hide()
			}
		}
	}
	p.Deviation = widget.NewSelect(deviationNames, func(name string) {
		k := indexOf(deviationNames, name)
		showDev(k)
		if b.syncing > 0 || k < 0 || deviationIndex(&ws.ctrl.Scene().Diffraction) == k {
			return
		}
		form := scene.DeviationForms[k]
		b.set("diffraction."+form, deviationValue(ws.ctrl.LastGoodSetup(), form))
		b.readAll()
	})
	b.reader(func(sc *scene.Scene) {
		k := deviationIndex(&sc.Diffraction)
		p.Deviation.SetSelected(deviationNames[k])
		showDev(k)
	})

	p.Derived = widget.NewLabel("")
	p.Derived.TextStyle = fyne.TextStyle{Italic: true}
	p.Derived.Wrapping = fyne.TextWrapWord

	// Model.
	p.Beams = b.numberEntry("diffraction.beams",
		func(sc *scene.Scene) string {
			if sc.Diffraction.Beams == 0 {
				return fmt.Sprint(scene.DefaultRowBeams)
			}
			return fmt.Sprint(sc.Diffraction.Beams)
		})
	beamsRow := form(formRow("Beams", unit(p.Beams, "odd, 3 to 15"), board.label("diffraction.beams")))
	p.Model = widget.NewSelect(scene.Models, func(m string) {
		if m == "systematic-row" {
			beamsRow.Show()
		} else {
			beamsRow.Hide()
		}
		if b.syncing > 0 {
			return
		}
		// The number of beams belongs to the systematic row only.
		var beams any
		if m == "systematic-row" {
			beams = scene.DefaultRowBeams
			if n := ws.ctrl.Scene().Diffraction.Beams; n != 0 {
				beams = n
			}
		}
		b.setAll("diffraction.model", scene.Edit{Path: "diffraction.model", Value: m}, scene.Edit{Path: "diffraction.beams", Value: beams})
		b.readAll()
	})
	b.reader(func(sc *scene.Scene) {
		m := sc.Diffraction.Model
		if m == "" {
			m = scene.DefaultModel
			if sc.Diffraction.WeakBeam != nil {
				m = "systematic-row" // what the scene builds for a weak beam
			}
		}
		p.Model.SetSelected(m)
		if m == "systematic-row" {
			beamsRow.Show()
		} else {
			beamsRow.Hide()
		}
	})
	p.Absorption = b.optionalNumberEntry("diffraction.absorption_ratio", fmt.Sprintf("%g (default)", scene.DefaultAbsorptionRatio),
		func(sc *scene.Scene) *float64 { return sc.Diffraction.AbsorptionRatio })
	p.Extinction = b.optionalNumberEntry("diffraction.extinction_nm", "computed from the crystal",
		func(sc *scene.Scene) *float64 { return sc.Diffraction.ExtinctionNm })

	diffraction := container.NewVBox(
		form(
			formRow("g (hkl)", p.G, board.label("diffraction.g")),
			formRow("Beam B [uvw]", p.Beam, board.label("diffraction.beam")),
			formRow("Pick g", p.Reflections),
			formRow("Deviation", p.Deviation),
		),
		devStack,
		board.label("diffraction"),
		p.Derived,
		form(
			formRow("Model", p.Model, board.label("diffraction.model")),
		),
		beamsRow,
		form(
			formRow("ξg / ξ'g", p.Absorption, board.label("diffraction.absorption_ratio")),
			formRow("ξg override", unit(p.Extinction, "nm"), board.label("diffraction.extinction_nm")),
		),
	)

	// Foil.
	p.Thickness = b.sliderField("foil.thickness_nm", thicknessMinNm, thicknessMaxNm, thicknessStepNm,
		func(sc *scene.Scene) (float64, bool) { return sc.Foil.ThicknessNm, true })
	p.Normal = b.indicesEntry("foil.normal", true,
		func(sc *scene.Scene) []float64 { return sc.Foil.Normal })
	p.Normal.SetPlaceHolder("along the beam")
	foil := form(
		formRow("Thickness t", p.Thickness.object("nm"), board.label("foil.thickness_nm")),
		formRow("Normal [uvw]", p.Normal, board.label("foil.normal")),
	)

	// Image field.
	width := b.numberEntry("image.width_nm",
		func(sc *scene.Scene) string { return formatNumber(sc.Image.WidthNm) })
	height := b.numberEntry("image.height_nm",
		func(sc *scene.Scene) string { return formatNumber(sc.Image.HeightNm) })
	pixel := func(k int) *widget.Entry {
		return b.numberEntryTo("image.pixels",
			func(sc *scene.Scene) string {
				if len(sc.Image.Pixels) > k {
					return fmt.Sprint(sc.Image.Pixels[k])
				}
				return ""
			},
			func(sc *scene.Scene, v float64) []scene.Edit {
				return []scene.Edit{{Path: fmt.Sprintf("image.pixels[%d]", k), Value: v}}
			})
	}
	nx, ny := pixel(0), pixel(1)
	p.Width, p.Height, p.NX, p.NY = width, height, nx, ny
	blur := b.optionalNumberEntry("image.blur_nm", "none",
		func(sc *scene.Scene) *float64 { return sc.Image.BlurNm })
	// The specimen frame: with an x axis the picture stays fixed to the
	// specimen while g changes (a g·b series keeps its defects in place).
	xAxis := b.indicesEntry("image.x_axis", true,
		func(sc *scene.Scene) []float64 { return sc.Image.XAxis })
	xAxis.SetPlaceHolder("along g")
	pxInfo := widget.NewLabel("")
	pxInfo.TextStyle = fyne.TextStyle{Italic: true}
	imageBox := form(
		formRow("Field", container.NewGridWithColumns(2, unit(width, "×"), unit(height, "nm")),
			board.label("image.width_nm"), board.label("image.height_nm")),
		formRow("Pixels", container.NewGridWithColumns(2, unit(nx, "×"), unit(ny, "")), board.label("image.pixels")),
		formRow("", pxInfo),
		formRow("Blur σ", unit(blur, "nm"), board.label("image.blur_nm")),
		formRow("x axis [uvw]", unit(xAxis, "fixes the picture to the specimen"), board.label("image.x_axis")),
	)

	p.Notes = widget.NewLabel("")
	p.Notes.Wrapping = fyne.TextWrapWord
	p.Notes.TextStyle = fyne.TextStyle{Italic: true}

	ws.ctrl.OnBuilt(func(st *scene.Setup, err error) {
		p.openSectionOf(err)
		sc := ws.ctrl.Scene()
		if im := sc.Image; len(im.Pixels) == 2 && im.Pixels[0] > 0 && im.Pixels[1] > 0 {
			pxInfo.SetText(fmt.Sprintf("%.3g × %.3g nm per pixel", im.WidthNm/float64(im.Pixels[0]), im.HeightNm/float64(im.Pixels[1])))
		}
		if st == nil {
			return
		}
		p.CrystalInfo.SetText(crystalInfo(st))
		p.Derived.SetText(st.Describe())
		p.Notes.SetText(strings.Join(append(append([]string(nil), st.Notes...), st.Warnings...), "\n"))
		p.updateReflections(st, b)
	})

	// Sections fold away; the image field, set once per scene, starts
	// folded so the conditions changed while looking fit the window.
	acc := widget.NewAccordion(
		widget.NewAccordionItem("Crystal and microscope", container.NewVBox(crystalBox, p.CrystalInfo, micro)),
		widget.NewAccordionItem("Diffraction", diffraction),
		widget.NewAccordionItem("Foil", foil),
		widget.NewAccordionItem("Image field", container.NewVBox(imageBox, p.Notes)),
	)
	acc.MultiOpen = true
	acc.Open(0)
	acc.Open(1)
	acc.Open(2)
	p.Sections = acc
	body := container.NewVBox(board.general, acc)
	return container.NewVScroll(body)
}

// openSectionOf unfolds the section holding the field an error is about.
func (p *paramsPanel) openSectionOf(err error) {
	var fe *scene.FieldError
	if p.Sections == nil || !errors.As(err, &fe) {
		return
	}
	for k, prefix := range []string{"crystal|microscope", "diffraction", "foil", "image"} {
		for _, pre := range strings.Split(prefix, "|") {
			if pathWithin(fe.Path, pre) {
				p.Sections.Open(k)
			}
		}
	}
}

const explicitCellLabel = "explicit cell (from the scene file)"

// deviationValue is the value of the deviation form that keeps the
// excitation error of st (the last setup that built), as the library
// derives it (Setup.DeviationAs), rounded to the steps the fields show.
// With no setup the form starts at its neutral value.
func deviationValue(st *scene.Setup, form string) any {
	if st == nil {
		switch form {
		case "weak_beam":
			return map[string]any{"n": 3}
		case "deviation_from_kikuchi":
			return map[string]any{"offset": 0, "spacing": 1}
		}
		return 0.0
	}
	v, err := st.DeviationAs(form)
	if err != nil {
		return nil
	}
	switch form {
	case "s_per_nm":
		return roundTo(v.(float64), sStep/10)
	case "w":
		return roundTo(v.(float64), wStep)
	case "deviation_from_kikuchi":
		k := v.(map[string]any)
		k["offset"] = roundTo(k["offset"].(float64), 1e-4)
	}
	return v
}

func roundTo(v, step float64) float64 { return math.Round(v/step) * step }

func indexOf(list []string, s string) int {
	for i, x := range list {
		if x == s {
			return i
		}
	}
	return -1
}

// crystalInfo says what crystal a setup uses.
func crystalInfo(st *scene.Setup) string {
	cr := st.Crystal
	c := cr.Cell
	cell := fmt.Sprintf("a = %.4g nm", c.A)
	switch c.System() {
	case "cubic":
	case "hexagonal", "tetragonal":
		cell += fmt.Sprintf(", c = %.4g nm", c.C)
	default:
		cell = fmt.Sprintf("a, b, c = %.4g, %.4g, %.4g nm; α, β, γ = %.4g°, %.4g°, %.4g°", c.A, c.B, c.C, c.Alpha, c.Beta, c.Gamma)
	}
	s := fmt.Sprintf("%s, %s, %s, %d atoms in the cell", cr.Name, cr.Structure, cell, len(cr.Atoms))
	if !cr.HasElastic {
		s += "; no elastic constants (dislocations need them)"
	}
	return s
}

// updateReflections fills the choice of g with the zone's reflections
// when the crystal, voltage or zone changed.
func (p *paramsPanel) updateReflections(st *scene.Setup, b *binder) {
	key := fmt.Sprintf("%s|%v|%v|%g", st.Crystal.Name, st.Beam, st.G, st.VoltageKV)
	if key == p.reflKey {
		return
	}
	p.reflKey = key
	refl, err := st.Reflections(scene.ZoneLimitFactor)
	if err != nil {
		p.Reflections.SetOptions(nil)
		return
	}
	p.reflHKL = map[string][]float64{}
	opts := make([]string, 0, len(refl))
	cur := ""
	for i, r := range refl {
		opt := reflectionLabel(st, r)
		if _, dup := p.reflHKL[opt]; dup {
			continue
		}
		p.reflHKL[opt] = r.HKL
		opts = append(opts, opt)
		if i == 0 {
			cur = opt
		}
	}
	b.quiet(func() {
		p.Reflections.SetOptions(opts)
		p.Reflections.SetSelected(cur)
	})
}

// reflectionLabel names a reflection in the choice of g: its indices, d
// and ξg, or that it is forbidden.
func reflectionLabel(st *scene.Setup, r scene.Reflection) string {
	hkl := formatIndices(r.HKL)
	if r.Forbidden || r.ExtinctionNm == nil {
		return fmt.Sprintf("%s   d %.4f nm   forbidden", hkl, r.DNm)
	}
	return fmt.Sprintf("%s   d %.4f nm   ξg %.1f nm", hkl, r.DNm, *r.ExtinctionNm)
}

// openCIF asks for a CIF file and makes it the scene's crystal.
func (ws *Workspace) openCIF() {
	ws.openFileDialog([]string{".cif", ".CIF"}, nil, ws.useCIF)
}

// useCIF makes the CIF file at path the crystal: its path is kept relative
// to the scene's directory where it can be. A file that does not read as a
// CIF is reported on the crystal field and the crystal stays as it was.
func (ws *Workspace) useCIF(path string) {
	rel := path
	if r, err := filepath.Rel(ws.ctrl.Dir(), path); err == nil && !strings.HasPrefix(r, "..") {
		rel = r
	}
	if err := scene.CheckCrystal(scene.Crystal{CIF: rel}, ws.ctrl.Dir()); err != nil {
		var fe *scene.FieldError
		msg := err.Error()
		if errors.As(err, &fe) {
			msg = fe.Msg
		}
		ws.board.setLocal("crystal", "CIF: "+msg)
		return
	}
	ws.binder.set("crystal", map[string]any{"cif": rel})
	ws.binder.readAll()
}
