package ui

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"faultline/export"
	"faultline/scene"
)

// errorBoard shows errors next to the fields they are about. Fields
// register a label under the path of the scene field they edit
// ("foil.thickness_nm", "defects[1].b"); an error of scene.Build goes to
// the label of the longest registered path that its path starts with, and
// to the general label when none matches. Entries also post their own
// errors (text that is not a number), which are shown until the text
// parses.
type errorBoard struct {
	labels  map[string]*widget.Label
	general *widget.Label
	local   map[string]string // path -> message of a field's own text
	build   error
	// shown is the path that got the build error ("" for the general
	// label, "-" for none).
	shown string
	// onShown, if set, is told where the build error went.
	onShown func(path string)
}

func newErrorBoard() *errorBoard {
	return &errorBoard{labels: map[string]*widget.Label{}, local: map[string]string{}, general: errorLabel(), shown: "-"}
}

// errorLabel is a hidden, wrapping, red label.
func errorLabel() *widget.Label {
	l := widget.NewLabel("")
	l.Importance = widget.DangerImportance
	l.Wrapping = fyne.TextWrapWord
	l.Hide()
	return l
}

// label returns the error label of path, creating it.
func (b *errorBoard) label(path string) *widget.Label {
	if l, ok := b.labels[path]; ok {
		return l
	}
	l := errorLabel()
	b.labels[path] = l
	return l
}

// drop forgets the labels of every path with the prefix (a defect form
// that is rebuilt).
func (b *errorBoard) drop(prefix string) {
	for p := range b.labels {
		if strings.HasPrefix(p, prefix) {
			delete(b.labels, p)
		}
	}
	for p := range b.local {
		if strings.HasPrefix(p, prefix) {
			delete(b.local, p)
		}
	}
}

// setLocal sets (msg != "") or clears the field's own error.
func (b *errorBoard) setLocal(path, msg string) {
	if msg == "" {
		delete(b.local, path)
	} else {
		b.local[path] = msg
	}
	b.refresh()
}

// setBuild shows the error of the last build (nil: none).
func (b *errorBoard) setBuild(err error) {
	b.build = err
	b.refresh()
}

// target is the registered path an error path belongs to, or "".
func (b *errorBoard) target(path string) string {
	best := ""
	for p := range b.labels {
		if pathWithin(path, p) && len(p) > len(best) {
			best = p
		}
	}
	return best
}

// pathWithin reports whether path is p or lies under it ("defects[1].b"
// lies under "defects[1]", "diffraction.gx" does not lie under
// "diffraction.g").
func pathWithin(path, p string) bool {
	if !strings.HasPrefix(path, p) {
		return false
	}
	rest := path[len(p):]
	return rest == "" || rest[0] == '.' || rest[0] == '['
}

func (b *errorBoard) refresh() {
	msgs := map[string]string{}
	for p, m := range b.local {
		msgs[p] = m
	}
	general := ""
	b.shown = "-"
	if b.build != nil {
		var fe *scene.FieldError
		path, msg := "", b.build.Error()
		if errors.As(b.build, &fe) {
			path, msg = fe.Path, fe.Msg
		}
		t := ""
		if path != "" {
			t = b.target(path)
		}
		switch {
		case t == "":
			general = b.build.Error()
			b.shown = ""
		default:
			if _, taken := msgs[t]; !taken {
				if path != t {
					msg = strings.TrimPrefix(path, t+".") + ": " + msg
				}
				msgs[t] = msg
			}
			b.shown = t
		}
	}
	for p, l := range b.labels {
		setError(l, msgs[p])
	}
	setError(b.general, general)
	if b.onShown != nil {
		b.onShown(b.shown)
	}
}

func setError(l *widget.Label, msg string) {
	if msg == "" {
		if l.Visible() || l.Text != "" {
			l.SetText("")
			l.Hide()
		}
		return
	}
	if l.Text != msg {
		l.SetText(msg)
	}
	l.Show()
}

// fieldNames maps an error label to the name of the form row it sits in
// ("ξg override"), so that a message shown away from its field names the
// field as the window shows it.
var fieldNames sync.Map // *widget.Label -> string

// describe names the field of a scene path as the window shows it, with
// the path as the file writes it: "ξg override (diffraction.extinction_nm)";
// just the path when no row of the window holds it.
func (b *errorBoard) describe(path string) string {
	if l, ok := b.labels[b.target(path)]; ok {
		if name, ok := fieldNames.Load(l); ok {
			return name.(string) + " (" + path + ")"
		}
	}
	return path
}

// row is one line of a form: a label and what it labels.
type row [2]fyne.CanvasObject

// formRow is one labelled field: the label at the left, the field with
// its error labels under it at the right.
func formRow(label string, field fyne.CanvasObject, errs ...fyne.CanvasObject) row {
	for _, e := range errs {
		if el, ok := e.(*widget.Label); ok {
			fieldNames.Store(el, label)
		}
	}
	l := widget.NewLabel(label)
	if len(errs) == 0 {
		return row{l, field}
	}
	return row{l, container.NewVBox(append([]fyne.CanvasObject{field}, errs...)...)}
}

// form lays rows out as a two-column form.
func form(rows ...row) *fyne.Container {
	objs := make([]fyne.CanvasObject, 0, 2*len(rows))
	for _, r := range rows {
		objs = append(objs, r[0], r[1])
	}
	return container.New(layout.NewFormLayout(), objs...)
}

// unit puts a unit after a field.
func unit(field fyne.CanvasObject, u string) fyne.CanvasObject {
	return container.NewBorder(nil, nil, nil, widget.NewLabel(u), field)
}

// Parsing of typed text.

// parseNumber reads a number as typed: "120", "0.005", "-1e-3"; the
// unicode minus sign is accepted.
func parseNumber(text string) (float64, error) {
	s := strings.TrimSpace(strings.ReplaceAll(text, "−", "-"))
	if s == "" {
		return 0, errors.New("empty: type a number")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a number", text)
	}
	return v, nil
}

// Formatting for display in fields.

// formatNumber writes v with up to 6 significant digits, no trailing
// zeros.
func formatNumber(v float64) string {
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// formatStep writes v rounded to the decimals of step (a slider's step).
func formatStep(v, step float64) string {
	d := 0
	for s := step; s < 1-1e-12 && d < 8; s *= 10 {
		d++
	}
	out := strconv.FormatFloat(v, 'f', d, 64)
	if out == "-"+strconv.FormatFloat(0, 'f', d, 64) {
		out = out[1:]
	}
	return out
}

// formatIndices writes indices as "2 0 0" (the program's one formatter).
func formatIndices(v []float64) string { return export.Indices(v) }

func ptr[T any](v T) *T { return &v }
