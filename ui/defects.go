package ui

import (
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// template returns a new defect of type kind from its description, at
// mid-depth of a foil t nm thick.
func template(kind string, tNm float64) scene.Defect {
	spec, _ := scene.DefectSpecOf(kind)
	return spec.Template(tNm)
}

// listRows is the number of defects the list shows at once.
const listRows = 4

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
			label.SetText(fmt.Sprintf("%d  %s", id+1, d.Summary()))
			if id == dp.errIdx {
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

	dp.AddType = widget.NewSelect(scene.DefectTypes, nil)
	dp.AddType.SetSelected(scene.DefectTypes[0])
	dp.Add = widget.NewButtonWithIcon("Add", theme.ContentAddIcon(), func() { dp.add(dp.AddType.Selected) })
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
	// The list shows a whole number of rows, so that scrolling to the
	// last defect never leaves a row cut off at the top.
	row := container.NewBorder(nil, nil, nil, widget.NewIcon(theme.WarningIcon()), widget.NewLabel("template defect text")).MinSize().Height
	sep := theme.SeparatorThicknessSize()
	list := container.New(minHeight(listRows*(row+sep)-sep), dp.List)
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
	d := template(kind, dp.thickness())
	dp.setDefects(append(slices.Clone(dp.ws.ctrl.Scene().Defects), d))
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
	d := cloneDefect(sc.Defects[i])
	// Shift the copy so it does not sit on the original.
	if len(d.AtNm) == 3 {
		d.AtNm[0] += 20
	}
	dp.setDefects(slices.Insert(slices.Clone(sc.Defects), i+1, d))
	dp.List.Refresh()
	dp.List.Select(i + 1)
}

func (dp *defectsPanel) remove() {
	i := dp.selected
	sc := dp.ws.ctrl.Scene()
	if i < 0 || i >= len(sc.Defects) {
		return
	}
	dp.ws.ctrl.Set(scene.Edit{Path: fmt.Sprintf("defects[%d]", i), Value: nil})
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

// setDefects makes list the scene's defects.
func (dp *defectsPanel) setDefects(list []scene.Defect) {
	dp.ws.ctrl.Set(scene.Edit{Path: "defects", Value: list})
	dp.ws.board.refresh()
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

	typeSel := widget.NewSelect(scene.DefectTypes, nil)
	typeSel.SetSelected(d.Type)
	typeSel.OnChanged = func(kind string) {
		if kind == def(ws.ctrl.Scene()).Type {
			return
		}
		// A new type keeps the position and takes the rest from its
		// template.
		n := template(kind, dp.thickness())
		if len(d.AtNm) == 3 {
			n.AtNm = append([]float64(nil), d.AtNm...)
		}
		ws.ctrl.Set(scene.Edit{Path: path, Value: n})
		ws.board.refresh()
		dp.List.Refresh()
		dp.buildForm()
	}
	rows := []row{formRow("Type", typeSel, ws.board.label(path+".type"))}
	spec, ok := scene.DefectSpecOf(d.Type)
	if ok {
		done := map[string]bool{}
		for i := range spec.Fields {
			f := &spec.Fields[i]
			if done[f.Name] {
				continue
			}
			if g := spec.GroupOf(f.Name); g != nil && g.Rule == scene.OneOf {
				for _, name := range g.Fields {
					done[name] = true
				}
				if allNumbers(spec, g) {
					rows = append(rows, dp.oneOfRow(b, path, spec, g))
				} else {
					rows = append(rows, dp.oneOfFieldRows(b, path, spec, g)...)
				}
				continue
			}
			rows = append(rows, dp.fieldRow(b, path, f))
		}
	}
	dp.Form.Add(form(rows...))
	ws.board.refresh()
	dp.Form.Refresh()
}

// fieldRow is the form row of field f of the defect at path, made from
// its description.
func (dp *defectsPanel) fieldRow(b *binder, path string, f *scene.FieldSpec) row {
	ws := dp.ws
	fpath := path + "." + f.Name
	i := dp.formFor
	cur := func(sc *scene.Scene) *scene.Defect {
		if i < len(sc.Defects) {
			return &sc.Defects[i]
		}
		return &scene.Defect{}
	}
	value := func(sc *scene.Scene) any {
		v, _ := defectValue(cur(sc), f.Name)
		return v
	}
	var obj fyne.CanvasObject
	switch f.Kind {
	case scene.Burgers:
		e := b.textEntry(fpath, func(sc *scene.Scene) string { s, _ := value(sc).(string); return s })
		e.SetPlaceHolder(f.Help)
		obj = e
	case scene.BurgersList:
		entries := make([]fyne.CanvasObject, f.Count)
		for k := range f.Count {
			e := b.textEntry(fmt.Sprintf("%s[%d]", fpath, k), func(sc *scene.Scene) string {
				if l, _ := value(sc).([]string); len(l) > k {
					return l[k]
				}
				return ""
			})
			e.SetPlaceHolder(f.Help)
			entries[k] = e
		}
		obj = container.NewGridWithColumns(f.Count, entries...)
	case scene.Direction, scene.Plane:
		e := b.indicesEntry(fpath, !f.Required, func(sc *scene.Scene) []float64 { v, _ := value(sc).([]float64); return v })
		obj = e
	case scene.Number:
		get := func(sc *scene.Scene) *float64 { v, _ := value(sc).(*float64); return v }
		var e *widget.Entry
		if f.Required {
			e = b.numberEntry(fpath, func(sc *scene.Scene) string {
				if p := get(sc); p != nil {
					return formatNumber(*p)
				}
				return ""
			})
		} else {
			e = b.optionalNumberEntry(fpath, "", get)
		}
		obj = unit(e, f.Unit())
	case scene.Position:
		entries := make([]fyne.CanvasObject, 3)
		for k, name := range []string{"x", "y", "z"} {
			e := b.numberEntry(fmt.Sprintf("%s[%d]", fpath, k), func(sc *scene.Scene) string {
				if a, _ := value(sc).([]float64); len(a) == 3 {
					return formatNumber(a[k])
				}
				return ""
			})
			entries[k] = container.NewBorder(nil, nil, widget.NewLabel(name), nil, e)
		}
		obj = container.NewGridWithColumns(3, entries...)
	case scene.Interval:
		e := widget.NewEntry()
		e.SetPlaceHolder("from to, e.g. -40 40")
		e.OnChanged = func(text string) {
			if b.syncing > 0 {
				return
			}
			if isBlank(text) {
				b.set(fpath, nil)
				return
			}
			typed(b, fpath, text, parseNumberPair, func(v []float64) { b.set(fpath, v) })
		}
		b.reader(func(sc *scene.Scene) { v, _ := value(sc).([]float64); e.SetText(formatIndices(v)) })
		obj = unit(e, f.Unit())
	case scene.Choice:
		opts := append([]string{"default"}, f.Options...)
		sel := widget.NewSelect(opts, nil)
		if v, _ := value(ws.ctrl.Scene()).(string); v != "" {
			sel.SetSelected(v)
		} else {
			sel.SetSelected("default")
		}
		sel.OnChanged = func(s string) {
			var v any = s
			if s == "default" {
				v = nil
			}
			b.set(fpath, v)
		}
		obj = sel
	}
	if f.Help != "" && f.Kind != scene.Burgers && f.Kind != scene.BurgersList {
		obj = container.NewVBox(obj, widget.NewLabelWithStyle(f.Help, fyne.TextAlignLeading, fyne.TextStyle{Italic: true}))
	}
	return formRow(f.Label, obj, ws.board.label(fpath))
}

// oneOfRow edits a group of mutually exclusive numbers (separation or
// fault energy, misfit or strain) with a choice between them; switching
// starts the other at its default.
func (dp *defectsPanel) oneOfRow(b *binder, path string, spec *scene.DefectSpec, g *scene.GroupSpec) row {
	ws := dp.ws
	d := ws.ctrl.Scene().Defects[dp.formFor]
	fields := make([]*scene.FieldSpec, len(g.Fields))
	k := 0
	for j, name := range g.Fields {
		fields[j] = spec.Field(name)
		if _, set := defectValue(&d, name); set {
			k = j
		}
	}
	choice := widget.NewSelect(g.Names, nil)
	choice.SetSelected(g.Names[k])
	e := widget.NewEntry()
	if v, ok := defectValue(&d, g.Fields[k]); ok {
		e.SetText(formatNumber(*v.(*float64)))
	}
	unitLbl := widget.NewLabel(fields[k].Unit())
	errs := []fyne.CanvasObject{ws.board.label(path)}
	for _, name := range g.Fields {
		errs = append(errs, ws.board.label(path+"."+name))
	}
	// edits sets field j to v and clears the others.
	edits := func(j int, v float64) []scene.Edit {
		var out []scene.Edit
		for m, name := range g.Fields {
			var val any
			if m == j {
				val = v
			}
			out = append(out, scene.Edit{Path: path + "." + name, Value: val})
		}
		return out
	}
	choice.OnChanged = func(s string) {
		j := indexOf(g.Names, s)
		if j < 0 || j == k {
			return
		}
		k = j
		unitLbl.SetText(fields[j].Unit())
		v, _ := fields[j].Default.(float64)
		b.setAll(path+"."+g.Fields[j], edits(j, v)...)
		b.quiet(func() { e.SetText(formatNumber(v)) })
	}
	e.OnChanged = func(text string) {
		j := k
		typed(b, path+"."+g.Fields[j], text, parseNumber, func(v float64) {
			b.setAll(path+"."+g.Fields[j], edits(j, v)...)
		})
	}
	return formRow(g.Label, container.NewBorder(nil, nil, choice, unitLbl, e), errs...)
}

// allNumbers tells whether every field of group g is a number (edited by
// oneOfRow).
func allNumbers(spec *scene.DefectSpec, g *scene.GroupSpec) bool {
	for _, name := range g.Fields {
		if spec.Field(name).Kind != scene.Number {
			return false
		}
	}
	return true
}

// oneOfFieldRows edits a group of mutually exclusive fields of any kind
// (a fault's kind or shift): a choice between them, then the row of the
// chosen field. Switching sets the chosen field to its default, clears
// the others and rebuilds the form.
func (dp *defectsPanel) oneOfFieldRows(b *binder, path string, spec *scene.DefectSpec, g *scene.GroupSpec) []row {
	ws := dp.ws
	d := ws.ctrl.Scene().Defects[dp.formFor]
	k := 0
	for j, name := range g.Fields {
		if _, set := defectValue(&d, name); set {
			k = j
		}
	}
	choice := widget.NewSelect(g.Names, nil)
	choice.SetSelected(g.Names[k])
	choice.OnChanged = func(s string) {
		j := indexOf(g.Names, s)
		if j < 0 || j == k {
			return
		}
		var edits []scene.Edit
		for m, name := range g.Fields {
			var val any
			if m == j {
				val = spec.Field(name).Default
			}
			edits = append(edits, scene.Edit{Path: path + "." + name, Value: val})
		}
		b.setAll(path+"."+g.Fields[j], edits...)
		ws.board.refresh()
		dp.List.Refresh()
		dp.buildForm()
	}
	return []row{
		formRow(g.Label, choice, ws.board.label(path)),
		dp.fieldRow(b, path, spec.Field(g.Fields[k])),
	}
}

// defectValue is the value of d's field name as the scene holds it
// (string, []float64, []string or *float64) and whether it is set.
func defectValue(d *scene.Defect, name string) (any, bool) { return d.Field(name) }

// parseNumberPair reads two numbers typed as "from to" or "from, to".
func parseNumberPair(text string) ([]float64, error) {
	parts := strings.FieldsFunc(text, func(r rune) bool { return r == ' ' || r == ',' || r == '\t' || r == '[' || r == ']' })
	if len(parts) != 2 {
		return nil, fmt.Errorf("%q: type two numbers, from and to", text)
	}
	out := make([]float64, 2)
	for i, p := range parts {
		v, err := parseNumber(p)
		if err != nil {
			return nil, err
		}
		out[i] = v
	}
	return out, nil
}
