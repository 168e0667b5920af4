package ui

import (
	"errors"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// defectTemplate returns a defect of type kind with every field it needs,
// at mid-depth of a foil t nm thick. The numbers suit a cubic (fcc) cell;
// they are a start to edit, not a recommendation.
func defectTemplate(kind string, tNm float64) scene.Defect {
	at := []float64{0, 0, tNm / 2}
	d := scene.Defect{Type: kind, AtNm: at}
	switch kind {
	case "dislocation":
		d.B, d.Line = "1/2[1 1 0]", []float64{1, -1, 2}
	case "dissociated":
		// A 60° dislocation on (1 -1 1) splitting into two Shockley
		// partials: 1/2[1 1 0] = 1/6[2 1 -1] + 1/6[1 2 1].
		d.B, d.Line, d.Plane = "1/2[1 1 0]", []float64{0, 1, 1}, []float64{1, -1, 1}
		d.Partials = []string{"1/6[2 1 -1]", "1/6[1 2 1]"}
		d.SeparationNm = ptr(8.0)
	case "fault":
		d.Plane, d.Shift = []float64{1, 1, 1}, "1/3[1 1 1]"
	case "inclusion":
		d.RadiusNm, d.Misfit = ptr(8.0), ptr(0.01)
	case "loop":
		d.Normal, d.B, d.RadiusNm = []float64{1, 1, 1}, "1/3[1 1 1]", ptr(15.0)
	case "cavity":
		d.RadiusNm = ptr(10.0)
	}
	return d
}

// retype changes a defect's type, keeping its position and filling the
// other fields from the template.
func retype(d scene.Defect, kind string, tNm float64) scene.Defect {
	n := defectTemplate(kind, tNm)
	if len(d.AtNm) == 3 {
		n.AtNm = append([]float64(nil), d.AtNm...)
	}
	return n
}

// availableTypes tells, for each defect type, whether the library builds
// it: a small scene holding one defect of the type is built, and an error
// about the defect's type means it is not available yet.
var availableTypes = sync.OnceValue(func() map[string]bool {
	out := map[string]bool{}
	for _, kind := range scene.DefectTypes {
		sc := &scene.Scene{
			Version:     scene.Version,
			Crystal:     scene.Crystal{Material: "Ni"},
			Microscope:  scene.Microscope{VoltageKV: 200},
			Diffraction: scene.Diffraction{G: []float64{2, 0, 0}, Beam: []float64{0, 1, 1}, SPerNm: ptr(0.0)},
			Foil:        scene.Foil{ThicknessNm: 50},
			Defects:     []scene.Defect{defectTemplate(kind, 50)},
			Image:       scene.Image{WidthNm: 40, HeightNm: 40, Pixels: []int{4, 4}},
		}
		_, err := scene.Build(sc, ".")
		var fe *scene.FieldError
		out[kind] = !(errors.As(err, &fe) && fe.Path == "defects[0].type")
	}
	return out
})

const notYet = " (not yet available)"

func typeOption(kind string) string {
	if availableTypes()[kind] {
		return kind
	}
	return kind + notYet
}

// defectsPanel is the editor of the scene's defects.
type defectsPanel struct {
	ws        *Workspace
	List      *widget.List
	AddType   *widget.Select
	Add       *widget.Button
	Duplicate *widget.Button
	Remove    *widget.Button
	Form      *fyne.Container
	Header    *widget.Label
	// Derived shows what the library derived for the selected defect (the
	// partial separation from a fault energy, the strain from a misfit).
	Derived *widget.Label

	selected int
	errIdx   int // defect the build error is about, or −1
	binder   *binder
	formFor  int // defect index the form shows, −1 for none
}

var defectPath = regexp.MustCompile(`^defects\[(\d+)\]`)

// defectsPanelObject returns the defects editor.
func defectsPanelObject(ws *Workspace) fyne.CanvasObject {
	dp := &defectsPanel{ws: ws, selected: -1, errIdx: -1, formFor: -1}
	ws.defects = dp
	count := func() int {
		if sc := ws.ctrl.Scene(); sc != nil {
			return len(sc.Defects)
		}
		return 0
	}
	dp.List = widget.NewList(count,
		func() fyne.CanvasObject {
			icon := widget.NewIcon(theme.WarningIcon())
			return container.NewBorder(nil, nil, nil, icon, widget.NewLabel("template defect text"))
		},
		func(id widget.ListItemID, o fyne.CanvasObject) {
			c := o.(*fyne.Container)
			label := c.Objects[0].(*widget.Label)
			icon := c.Objects[1].(*widget.Icon)
			sc := ws.ctrl.Scene()
			if id >= len(sc.Defects) {
				return
			}
			d := sc.Defects[id]
			label.SetText(defectSummary(id, d))
			if id == dp.errIdx || !availableTypes()[d.Type] {
				icon.Show()
			} else {
				icon.Hide()
			}
		})
	dp.List.OnSelected = func(id widget.ListItemID) {
		dp.selected = id
		dp.buildForm()
	}
	dp.List.OnUnselected = func(widget.ListItemID) {}

	opts := make([]string, len(scene.DefectTypes))
	for i, k := range scene.DefectTypes {
		opts[i] = typeOption(k)
	}
	dp.AddType = widget.NewSelect(opts, nil)
	dp.AddType.SetSelected(opts[0])
	dp.Add = widget.NewButtonWithIcon("Add", theme.ContentAddIcon(), func() {
		kind := strings.TrimSuffix(dp.AddType.Selected, notYet)
		dp.add(kind)
	})
	dp.Duplicate = widget.NewButtonWithIcon("Duplicate", theme.ContentCopyIcon(), func() { dp.duplicate() })
	dp.Remove = widget.NewButtonWithIcon("Remove", theme.ContentRemoveIcon(), func() { dp.remove() })
	dp.Form = container.NewVBox()
	dp.Header = widget.NewLabel("")
	dp.Derived = widget.NewLabelWithStyle("", fyne.TextAlignLeading, fyne.TextStyle{Italic: true})
	dp.Derived.Wrapping = fyne.TextWrapWord
	dp.Header.Wrapping = fyne.TextWrapWord

	ws.ctrl.OnReplaced(func() {
		dp.selected = -1
		dp.List.UnselectAll()
		if len(ws.ctrl.Scene().Defects) > 0 {
			dp.List.Select(0)
		} else {
			dp.buildForm()
		}
		dp.List.Refresh()
	})
	ws.ctrl.OnBuilt(func(st *scene.Setup, err error) {
		idx := -1
		var fe *scene.FieldError
		if errors.As(err, &fe) {
			if m := defectPath.FindStringSubmatch(fe.Path); m != nil {
				idx, _ = strconv.Atoi(m[1])
			}
		}
		dp.errIdx = idx
		dp.List.Refresh()
		dp.updateButtons()
		dp.showDerived(st)
	})

	general := ws.board.label("defects")
	buttons := container.NewHBox(dp.AddType, dp.Add, dp.Duplicate, dp.Remove)
	top := container.NewVBox(
		widget.NewLabelWithStyle("Defects in the foil", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}),
		buttons,
	)
	list := container.New(minHeight(170), dp.List)
	editor := container.NewVScroll(container.NewPadded(container.NewVBox(dp.Header, general, dp.Form, dp.Derived)))
	return container.NewBorder(container.NewVBox(top, list, widget.NewSeparator()), nil, nil, nil, editor)
}

// showDerived shows the notes of st about the selected defect.
func (dp *defectsPanel) showDerived(st *scene.Setup) {
	var lines []string
	if st != nil && dp.selected >= 0 {
		prefix := fmt.Sprintf("defects[%d]: ", dp.selected)
		for _, n := range st.Notes {
			if strings.HasPrefix(n, prefix) {
				lines = append(lines, strings.TrimPrefix(n, prefix))
			}
		}
	}
	dp.Derived.SetText(strings.Join(lines, "\n"))
}

// defectSummary is the list line of defect i.
func defectSummary(i int, d scene.Defect) string {
	s := fmt.Sprintf("%d  %s", i+1, d.Type)
	switch d.Type {
	case "dislocation", "dissociated":
		s += fmt.Sprintf("  b = %s  u = [%s]", d.B, formatIndices(d.Line))
	case "fault":
		s += fmt.Sprintf("  (%s)  R = %s", formatIndices(d.Plane), d.Shift)
	case "loop":
		s += fmt.Sprintf("  b = %s", d.B)
		if d.RadiusNm != nil {
			s += fmt.Sprintf("  r = %g nm", *d.RadiusNm)
		}
	case "inclusion", "cavity":
		if d.RadiusNm != nil {
			s += fmt.Sprintf("  r = %g nm", *d.RadiusNm)
		}
	}
	if !availableTypes()[d.Type] {
		s += notYet
	}
	return s
}

func (dp *defectsPanel) updateButtons() {
	n := len(dp.ws.ctrl.Scene().Defects)
	if dp.selected >= 0 && dp.selected < n {
		dp.Duplicate.Enable()
		dp.Remove.Enable()
	} else {
		dp.Duplicate.Disable()
		dp.Remove.Disable()
	}
}

func (dp *defectsPanel) thickness() float64 {
	if t := dp.ws.ctrl.Scene().Foil.ThicknessNm; t > 0 {
		return t
	}
	return 100
}

func (dp *defectsPanel) add(kind string) {
	d := defectTemplate(kind, dp.thickness())
	dp.ws.ctrl.Edit(func(sc *scene.Scene) { sc.Defects = append(sc.Defects, d) })
	dp.ws.board.refresh()
	n := len(dp.ws.ctrl.Scene().Defects)
	dp.List.Refresh()
	dp.List.Select(n - 1)
}

func (dp *defectsPanel) duplicate() {
	i := dp.selected
	sc := dp.ws.ctrl.Scene()
	if i < 0 || i >= len(sc.Defects) {
		return
	}
	dp.ws.ctrl.Edit(func(sc *scene.Scene) {
		d := cloneDefect(sc.Defects[i])
		// Shift the copy so it does not sit on the original.
		if len(d.AtNm) == 3 {
			d.AtNm[0] += 20
		}
		sc.Defects = append(sc.Defects[:i+1], append([]scene.Defect{d}, sc.Defects[i+1:]...)...)
	})
	dp.ws.board.refresh()
	dp.List.Refresh()
	dp.List.Select(i + 1)
}

func (dp *defectsPanel) remove() {
	i := dp.selected
	sc := dp.ws.ctrl.Scene()
	if i < 0 || i >= len(sc.Defects) {
		return
	}
	dp.ws.ctrl.Edit(func(sc *scene.Scene) { sc.Defects = append(sc.Defects[:i], sc.Defects[i+1:]...) })
	dp.ws.board.refresh()
	n := len(dp.ws.ctrl.Scene().Defects)
	dp.List.UnselectAll()
	dp.selected = -1
	dp.List.Refresh()
	if n > 0 {
		dp.List.Select(min(i, n-1))
	} else {
		dp.buildForm()
	}
}

func cloneDefect(d scene.Defect) scene.Defect {
	sc := cloneScene(&scene.Scene{Defects: []scene.Defect{d}})
	return sc.Defects[0]
}

// buildForm fills the editor with the fields of the selected defect.
func (dp *defectsPanel) buildForm() {
	ws := dp.ws
	ws.board.drop("defects[")
	dp.Form.RemoveAll()
	dp.showDerived(ws.ctrl.Setup())
	dp.updateButtons()
	sc := ws.ctrl.Scene()
	i := dp.selected
	if i < 0 || i >= len(sc.Defects) {
		dp.formFor = -1
		if len(sc.Defects) == 0 {
			dp.Header.SetText("A perfect crystal: no defects. Add one above.")
		} else {
			dp.Header.SetText("Select a defect to edit it.")
		}
		ws.board.refresh()
		return
	}
	dp.formFor = i
	d := sc.Defects[i]
	dp.Header.SetText(fmt.Sprintf("Defect %d", i+1))
	path := fmt.Sprintf("defects[%d]", i)
	b := &binder{c: ws.ctrl, board: ws.board}
	dp.binder = b
	def := func(sc *scene.Scene) *scene.Defect {
		if i < len(sc.Defects) {
			return &sc.Defects[i]
		}
		return &scene.Defect{}
	}

	typeSel := widget.NewSelect(nil, nil)
	opts := make([]string, len(scene.DefectTypes))
	for k, kind := range scene.DefectTypes {
		opts[k] = typeOption(kind)
	}
	typeSel.Options = opts
	typeSel.SetSelected(typeOption(d.Type))
	typeSel.OnChanged = func(opt string) {
		kind := strings.TrimSuffix(opt, notYet)
		if kind == def(ws.ctrl.Scene()).Type {
			return
		}
		t := dp.thickness()
		ws.ctrl.Edit(func(sc *scene.Scene) { *def(sc) = retype(*def(sc), kind, t) })
		ws.board.refresh()
		dp.List.Refresh()
		dp.buildForm()
	}
	rows := []row{}
	addRow := func(label, field string, obj fyne.CanvasObject) {
		rows = append(rows, formRow(label, obj, ws.board.label(path+"."+field)))
	}
	addRow("Type", "type", typeSel)
	if !availableTypes()[d.Type] {
		note := widget.NewLabel("The simulator cannot model this defect type yet. It is kept in the scene and saved with it, but while it is in the scene nothing is rendered.")
		note.Wrapping = fyne.TextWrapWord
		note.Importance = widget.WarningImportance
		rows = append(rows, formRow("", note))
	}

	burgers := func(label, field string, get func(d *scene.Defect) *string) {
		e := b.textEntry(path+"."+field,
			func(sc *scene.Scene) string { return *get(def(sc)) },
			func(sc *scene.Scene, v string) { *get(def(sc)) = v })
		e.SetPlaceHolder("e.g. 1/2[1 -1 0]")
		addRow(label, field, e)
	}
	indices := func(label, field string, get func(d *scene.Defect) *[]float64) {
		e := b.indicesEntry(path+"."+field, false,
			func(sc *scene.Scene) []float64 { return *get(def(sc)) },
			func(sc *scene.Scene, v []float64) { *get(def(sc)) = v })
		addRow(label, field, e)
	}
	number := func(label, field, unitText string, get func(d *scene.Defect) **float64) {
		e := b.numberEntry(path+"."+field,
			func(sc *scene.Scene) string {
				if p := *get(def(sc)); p != nil {
					return formatNumber(*p)
				}
				return ""
			},
			func(sc *scene.Scene, v float64) { *get(def(sc)) = ptr(v) })
		addRow(label, field, unit(e, unitText))
	}
	position := func() {
		entries := make([]fyne.CanvasObject, 3)
		for k, name := range []string{"x", "y", "z"} {
			k := k
			e := b.numberEntry(path+".at_nm",
				func(sc *scene.Scene) string {
					if a := def(sc).AtNm; len(a) == 3 {
						return formatNumber(a[k])
					}
					return ""
				},
				func(sc *scene.Scene, v float64) {
					d := def(sc)
					if len(d.AtNm) != 3 {
						d.AtNm = []float64{0, 0, 0}
					}
					d.AtNm[k] = v
				})
			entries[k] = container.NewBorder(nil, nil, widget.NewLabel(name), nil, e)
		}
		addRow("Position", "at_nm", container.NewVBox(container.NewGridWithColumns(3, entries...),
			widget.NewLabelWithStyle("nm; x along g, y down the image, z depth below the entrance surface", fyne.TextAlignLeading, fyne.TextStyle{Italic: true})))
	}
	// oneOf edits a pair of mutually exclusive numbers (separation or
	// stacking-fault energy, strain or misfit) with a choice between them.
	oneOf := func(label string, names [2]string, fields [2]string, units [2]string, get [2]func(d *scene.Defect) **float64, start [2]float64) {
		choice := widget.NewSelect([]string{names[0], names[1]}, nil)
		e := widget.NewEntry()
		cur := func() int {
			if *get[1](&d) != nil {
				return 1
			}
			return 0
		}
		k := cur()
		choice.SetSelected(names[k])
		if p := *get[k](&d); p != nil {
			e.SetText(formatNumber(*p))
		}
		unitLbl := widget.NewLabel(units[k])
		errl := container.NewVBox(ws.board.label(path+"."+fields[0]), ws.board.label(path+"."+fields[1]))
		choice.OnChanged = func(s string) {
			j := indexOf(names[:], s)
			if j < 0 || j == k {
				return
			}
			k = j
			unitLbl.SetText(units[j])
			v := start[j]
			ws.ctrl.Edit(func(sc *scene.Scene) {
				dd := def(sc)
				*get[1-j](dd) = nil
				*get[j](dd) = ptr(v)
			})
			ws.board.refresh()
			e.SetText(formatNumber(v))
		}
		e.OnChanged = func(text string) {
			j := k
			typed(b, path+"."+fields[j], text, parseNumber, func(v float64) {
				b.edit(path+"."+fields[j], func(sc *scene.Scene) {
					dd := def(sc)
					*get[1-j](dd) = nil
					*get[j](dd) = ptr(v)
				})
			})
		}
		rows = append(rows, formRow(label, container.NewBorder(nil, nil, choice, unitLbl, e), errl))
	}
	elasticity := func() {
		opts := []string{"default", "isotropic", "anisotropic"}
		sel := widget.NewSelect(opts, nil)
		cur := d.Elasticity
		if cur == "" {
			cur = "default"
		}
		sel.SetSelected(cur)
		sel.OnChanged = func(s string) {
			v := s
			if v == "default" {
				v = ""
			}
			b.edit(path+".elasticity", func(sc *scene.Scene) { def(sc).Elasticity = v })
		}
		addRow("Elasticity", "elasticity", container.NewVBox(sel,
			widget.NewLabelWithStyle("default: anisotropic (Stroh) when the crystal has all its elastic constants", fyne.TextAlignLeading, fyne.TextStyle{Italic: true})))
	}

	switch d.Type {
	case "dislocation":
		burgers("Burgers vector b", "b", func(d *scene.Defect) *string { return &d.B })
		indices("Line u [uvw]", "line", func(d *scene.Defect) *[]float64 { return &d.Line })
		position()
		elasticity()
	case "dissociated":
		burgers("Total b", "b", func(d *scene.Defect) *string { return &d.B })
		indices("Line u [uvw]", "line", func(d *scene.Defect) *[]float64 { return &d.Line })
		indices("Glide plane (hkl)", "plane", func(d *scene.Defect) *[]float64 { return &d.Plane })
		for k := 0; k < 2; k++ {
			k := k
			e := b.textEntry(path+".partials",
				func(sc *scene.Scene) string {
					if p := def(sc).Partials; len(p) > k {
						return p[k]
					}
					return ""
				},
				func(sc *scene.Scene, v string) {
					dd := def(sc)
					for len(dd.Partials) < 2 {
						dd.Partials = append(dd.Partials, "")
					}
					dd.Partials[k] = v
				})
			e.SetPlaceHolder("e.g. 1/6[1 2 1]")
			if k == 0 {
				addRow("Partial b₁", "partials", e)
			} else {
				rows = append(rows, formRow("Partial b₂", e))
			}
		}
		oneOf("Width from", [2]string{"separation", "fault energy"}, [2]string{"separation_nm", "sfe_mj_m2"}, [2]string{"nm", "mJ/m²"},
			[2]func(d *scene.Defect) **float64{
				func(d *scene.Defect) **float64 { return &d.SeparationNm },
				func(d *scene.Defect) **float64 { return &d.SFEmJm2 }},
			[2]float64{8, 100})
		position()
		elasticity()
	case "fault":
		indices("Fault plane (hkl)", "plane", func(d *scene.Defect) *[]float64 { return &d.Plane })
		burgers("Shift R", "shift", func(d *scene.Defect) *string { return &d.Shift })
		position()
	case "inclusion":
		number("Radius", "radius_nm", "nm", func(d *scene.Defect) **float64 { return &d.RadiusNm })
		oneOf("Strength", [2]string{"misfit δ", "strain ε"}, [2]string{"misfit", "strain"}, [2]string{"", ""},
			[2]func(d *scene.Defect) **float64{
				func(d *scene.Defect) **float64 { return &d.Misfit },
				func(d *scene.Defect) **float64 { return &d.Strain }},
			[2]float64{0.01, 0.005})
		position()
	case "loop":
		indices("Loop normal [uvw]", "normal", func(d *scene.Defect) *[]float64 { return &d.Normal })
		burgers("Burgers vector b", "b", func(d *scene.Defect) *string { return &d.B })
		number("Radius", "radius_nm", "nm", func(d *scene.Defect) **float64 { return &d.RadiusNm })
		position()
	case "cavity":
		number("Radius", "radius_nm", "nm", func(d *scene.Defect) **float64 { return &d.RadiusNm })
		position()
	}
	dp.Form.Add(form(rows...))
	ws.board.refresh()
	dp.Form.Refresh()
}
