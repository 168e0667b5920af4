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

	"faultline/crystal"
	"faultline/scene"
)

// Deviation settings, in the order of the choice.
const (
	devS = iota
	devW
	devWeak
	devKikuchi
)

var deviationNames = []string{
	"s, excitation error",
	"w = s·ξg",
	"weak beam g(ng)",
	"Kikuchi line position",
}

func deviationOf(d *scene.Diffraction) int {
	switch {
	case d.W != nil:
		return devW
	case d.WeakBeam != nil:
		return devWeak
	case d.Kikuchi != nil:
		return devKikuchi
	}
	return devS
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
	presets := crystal.PresetNames()
	p.Material = widget.NewSelect(presets, func(name string) {
		if name == "" || strings.HasPrefix(name, "CIF:") || name == explicitCellLabel {
			return
		}
		b.edit("crystal.material", func(sc *scene.Scene) { sc.Crystal = scene.Crystal{Material: name} })
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
		func(sc *scene.Scene) string { return formatNumber(sc.Microscope.VoltageKV) },
		func(sc *scene.Scene, v float64) { sc.Microscope.VoltageKV = v })
	micro := form(formRow("Voltage", unit(p.Voltage, "kV"), board.label("microscope.voltage_kv")))

	// Diffraction: g, beam, the zone's reflections.
	p.G = b.indicesEntry("diffraction.g", false,
		func(sc *scene.Scene) []float64 { return sc.Diffraction.G },
		func(sc *scene.Scene, v []float64) { sc.Diffraction.G = v })
	p.Beam = b.indicesEntry("diffraction.beam", false,
		func(sc *scene.Scene) []float64 { return sc.Diffraction.Beam },
		func(sc *scene.Scene, v []float64) { sc.Diffraction.Beam = v })
	p.Reflections = widget.NewSelect(nil, func(opt string) {
		hkl, ok := p.reflHKL[opt]
		if !ok {
			return
		}
		b.edit("diffraction.g", func(sc *scene.Scene) { sc.Diffraction.G = append([]float64(nil), hkl...) })
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
		},
		func(sc *scene.Scene, v float64) { setDeviation(&sc.Diffraction, devS); sc.Diffraction.SPerNm = ptr(v) })
	p.W = b.sliderField("diffraction.w", wMin, wMax, wStep,
		func(sc *scene.Scene) (float64, bool) {
			if d := sc.Diffraction.W; d != nil {
				return *d, true
			}
			return 0, false
		},
		func(sc *scene.Scene, v float64) { setDeviation(&sc.Diffraction, devW); sc.Diffraction.W = ptr(v) })
	p.WeakN = b.numberEntry("diffraction.weak_beam.n",
		func(sc *scene.Scene) string {
			if w := sc.Diffraction.WeakBeam; w != nil {
				return formatNumber(w.N)
			}
			return "3"
		},
		func(sc *scene.Scene, v float64) {
			setDeviation(&sc.Diffraction, devWeak)
			sc.Diffraction.WeakBeam = &scene.WeakBeam{N: v}
		})
	kik := func(sc *scene.Scene) *scene.Kikuchi {
		if sc.Diffraction.Kikuchi == nil {
			setDeviation(&sc.Diffraction, devKikuchi)
			sc.Diffraction.Kikuchi = &scene.Kikuchi{Spacing: 1}
		}
		return sc.Diffraction.Kikuchi
	}
	p.KikOffset = b.numberEntry("diffraction.deviation_from_kikuchi.offset",
		func(sc *scene.Scene) string {
			if k := sc.Diffraction.Kikuchi; k != nil {
				return formatNumber(k.Offset)
			}
			return "0"
		},
		func(sc *scene.Scene, v float64) { kik(sc).Offset = v })
	p.KikSpacing = b.numberEntry("diffraction.deviation_from_kikuchi.spacing",
		func(sc *scene.Scene) string {
			if k := sc.Diffraction.Kikuchi; k != nil {
				return formatNumber(k.Spacing)
			}
			return "1"
		},
		func(sc *scene.Scene, v float64) { kik(sc).Spacing = v })

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
		if b.syncing > 0 || k < 0 || deviationOf(&ws.ctrl.Scene().Diffraction) == k {
			return
		}
		st := ws.ctrl.LastGoodSetup()
		b.edit("diffraction", func(sc *scene.Scene) { convertDeviation(&sc.Diffraction, k, st) })
		b.readAll()
	})
	b.reader(func(sc *scene.Scene) {
		k := deviationOf(&sc.Diffraction)
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
				return "5"
			}
			return fmt.Sprint(sc.Diffraction.Beams)
		},
		func(sc *scene.Scene, v float64) { sc.Diffraction.Beams = int(math.Round(v)) })
	beamsRow := form(formRow("Beams", unit(p.Beams, "odd, 3 to 31"), board.label("diffraction.beams")))
	p.Model = widget.NewSelect(scene.Models, func(m string) {
		if m == "systematic-row" {
			beamsRow.Show()
		} else {
			beamsRow.Hide()
		}
		if b.syncing > 0 {
			return
		}
		b.edit("diffraction.model", func(sc *scene.Scene) {
			sc.Diffraction.Model = m
			if m == "systematic-row" {
				if sc.Diffraction.Beams == 0 {
					sc.Diffraction.Beams = 5
				}
			} else {
				sc.Diffraction.Beams = 0
			}
		})
		b.readAll()
	})
	b.reader(func(sc *scene.Scene) {
		m := sc.Diffraction.Model
		if m == "" {
			m = scene.DefaultModel
		}
		p.Model.SetSelected(m)
		if m == "systematic-row" {
			beamsRow.Show()
		} else {
			beamsRow.Hide()
		}
	})
	p.Absorption = b.optionalNumberEntry("diffraction.absorption_ratio", fmt.Sprintf("%g (default)", scene.DefaultAbsorptionRatio),
		func(sc *scene.Scene) *float64 { return sc.Diffraction.AbsorptionRatio },
		func(sc *scene.Scene, v *float64) { sc.Diffraction.AbsorptionRatio = v })
	p.Extinction = b.optionalNumberEntry("diffraction.extinction_nm", "computed from the crystal",
		func(sc *scene.Scene) *float64 { return sc.Diffraction.ExtinctionNm },
		func(sc *scene.Scene, v *float64) { sc.Diffraction.ExtinctionNm = v })

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
		func(sc *scene.Scene) (float64, bool) { return sc.Foil.ThicknessNm, true },
		func(sc *scene.Scene, v float64) { sc.Foil.ThicknessNm = v })
	p.Normal = b.indicesEntry("foil.normal", true,
		func(sc *scene.Scene) []float64 { return sc.Foil.Normal },
		func(sc *scene.Scene, v []float64) { sc.Foil.Normal = v })
	p.Normal.SetPlaceHolder("along the beam")
	foil := form(
		formRow("Thickness t", p.Thickness.object("nm"), board.label("foil.thickness_nm")),
		formRow("Normal [uvw]", p.Normal, board.label("foil.normal")),
	)

	// Image field.
	width := b.numberEntry("image.width_nm",
		func(sc *scene.Scene) string { return formatNumber(sc.Image.WidthNm) },
		func(sc *scene.Scene, v float64) { sc.Image.WidthNm = v })
	height := b.numberEntry("image.height_nm",
		func(sc *scene.Scene) string { return formatNumber(sc.Image.HeightNm) },
		func(sc *scene.Scene, v float64) { sc.Image.HeightNm = v })
	pixel := func(k int) *widget.Entry {
		return b.numberEntry("image.pixels",
			func(sc *scene.Scene) string {
				if len(sc.Image.Pixels) > k {
					return fmt.Sprint(sc.Image.Pixels[k])
				}
				return ""
			},
			func(sc *scene.Scene, v float64) {
				for len(sc.Image.Pixels) < 2 {
					sc.Image.Pixels = append(sc.Image.Pixels, 0)
				}
				sc.Image.Pixels[k] = int(math.Round(v))
			})
	}
	nx, ny := pixel(0), pixel(1)
	blur := b.optionalNumberEntry("image.blur_nm", "none",
		func(sc *scene.Scene) *float64 { return sc.Image.BlurNm },
		func(sc *scene.Scene, v *float64) { sc.Image.BlurNm = v })
	pxInfo := widget.NewLabel("")
	pxInfo.TextStyle = fyne.TextStyle{Italic: true}
	imageBox := form(
		formRow("Field", container.NewGridWithColumns(2, unit(width, "×"), unit(height, "nm")),
			board.label("image.width_nm"), board.label("image.height_nm")),
		formRow("Pixels", container.NewGridWithColumns(2, unit(nx, "×"), unit(ny, "")), board.label("image.pixels")),
		formRow("", pxInfo),
		formRow("Blur σ", unit(blur, "nm"), board.label("image.blur_nm")),
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
		p.Derived.SetText(derivedText(st))
		p.Notes.SetText(strings.Join(st.Notes, "\n"))
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

// setDeviation clears every deviation setting but k.
func setDeviation(d *scene.Diffraction, k int) {
	if k != devS {
		d.SPerNm = nil
	}
	if k != devW {
		d.W = nil
	}
	if k != devWeak {
		d.WeakBeam = nil
	}
	if k != devKikuchi {
		d.Kikuchi = nil
	}
}

// convertDeviation switches the deviation setting to k, keeping the
// excitation error of the last setup that built where it can be written in
// the new form.
func convertDeviation(d *scene.Diffraction, k int, st *scene.Setup) {
	s, xi, lg2 := 0.0, 0.0, 0.0
	if st != nil {
		s, xi = st.SPerNm, st.XiGNm
		lg2 = st.WavelengthNm * st.GPerNm * st.GPerNm
	}
	setDeviation(d, k)
	switch k {
	case devS:
		d.SPerNm = ptr(roundTo(s, sStep/10))
	case devW:
		d.W = ptr(roundTo(s*xi, wStep))
	case devWeak:
		// s = (n − 1) λ g²/2; keep n = 3 unless s already sits beyond the
		// Bragg position of 2g.
		n := 3.0
		if lg2 > 0 && s > lg2/2 {
			n = math.Round(1 + 2*s/lg2)
		}
		d.WeakBeam = &scene.WeakBeam{N: n}
	case devKikuchi:
		// s = λ g² Δx / x with the spacing x = 1.
		off := 0.0
		if lg2 > 0 {
			off = roundTo(s/lg2, 1e-4)
		}
		d.Kikuchi = &scene.Kikuchi{Offset: off, Spacing: 1}
	}
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

// derivedText lists the numbers the conditions come to.
func derivedText(st *scene.Setup) string {
	return fmt.Sprintf("λ = %.4g pm, d = %.4g nm, ξg = %.4g nm%s; s = %.4g /nm, w = s·ξg = %.3g",
		st.WavelengthNm*1000, st.DSpacingNm, st.XiGNm, map[bool]string{true: "", false: " (given)"}[st.XiGComputed], st.SPerNm, st.W)
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
	if _, err := crystal.LoadCIF(path); err != nil {
		ws.board.setLocal("crystal", "CIF: "+err.Error())
		return
	}
	rel := path
	if r, err := filepath.Rel(ws.ctrl.Dir(), path); err == nil && !strings.HasPrefix(r, "..") {
		rel = r
	}
	ws.binder.edit("crystal", func(sc *scene.Scene) { sc.Crystal = scene.Crystal{CIF: rel} })
	ws.binder.readAll()
}
