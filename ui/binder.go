package ui

import (
	"errors"
	"sort"
	"strings"

	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// binder ties fields to the scene of a controller: a change typed into a
// field edits the scene (and so starts a render), and when the whole scene
// is replaced every field reads its value again. While fields are being
// filled from the scene (syncing), their change callbacks do nothing.
type binder struct {
	c       *Controller
	board   *errorBoard
	syncing int
	readers []func(sc *scene.Scene)
	// pending holds, by the path of their field, values the scene refused,
	// tried again with the next change.
	pending map[string][]scene.Edit
}

func newBinder(c *Controller, board *errorBoard) *binder {
	b := &binder{c: c, board: board}
	c.OnReplaced(b.readAll)
	return b
}

// quiet runs f with change callbacks switched off.
func (b *binder) quiet(f func()) {
	b.syncing++
	defer func() { b.syncing-- }()
	f()
}

// reader registers f to fill a field from the scene; it runs now and on
// every replacement of the scene.
func (b *binder) reader(f func(sc *scene.Scene)) {
	b.readers = append(b.readers, f)
	if b.c.Scene() != nil {
		b.quiet(func() { f(b.c.Scene()) })
	}
}

func (b *binder) readAll() {
	for p := range b.pending {
		delete(b.board.local, p)
	}
	b.pending = nil
	b.quiet(func() {
		for _, f := range b.readers {
			f(b.c.Scene())
		}
	})
}

// set stores value at the scene field path through scene.Set (via the
// controller), unless fields are being filled. A value the scene refuses
// leaves the scene as it was: its error is shown under the field, and the
// value is kept and tried again with the next change, so fields that are
// valid only together (pixels and field of view) can be changed one at a
// time.
func (b *binder) set(path string, value any) {
	b.setAll(path, scene.Edit{Path: path, Value: value})
}

// setAll is set for several fields changed by one control at path.
func (b *binder) setAll(path string, edits ...scene.Edit) {
	if b.syncing > 0 {
		return
	}
	delete(b.board.local, path)
	delete(b.pending, path)
	var all []scene.Edit
	for _, p := range b.pendingOrder() {
		all = append(all, b.pending[p]...)
	}
	err := errors.New("")
	if len(all) > 0 {
		err = b.c.Set(append(all, edits...)...)
		if err == nil {
			for p := range b.pending {
				delete(b.board.local, p)
			}
			b.pending = nil
		}
	}
	if err != nil {
		if err = b.c.Set(edits...); err != nil {
			if b.pending == nil {
				b.pending = map[string][]scene.Edit{}
			}
			b.pending[path] = edits
			b.board.local[path] = fieldMessage(path, err)
		}
	}
	b.board.refresh()
}

// pendingOrder lists the paths of refused values in a fixed order.
func (b *binder) pendingOrder() []string {
	paths := make([]string, 0, len(b.pending))
	for p := range b.pending {
		paths = append(paths, p)
	}
	sort.Strings(paths)
	return paths
}

// fieldMessage is err as shown under the field at path: without the path
// when it is about that field.
func fieldMessage(path string, err error) string {
	var fe *scene.FieldError
	if errors.As(err, &fe) {
		if fe.Path == path {
			return fe.Msg
		}
		if pathWithin(fe.Path, path) {
			return strings.TrimPrefix(fe.Path, path+".") + ": " + fe.Msg
		}
	}
	return err.Error()
}

// typed handles text typed into the field at path: a parse error is shown
// under the field and changes nothing; a value goes to use.
func typed[T any](b *binder, path, text string, parse func(string) (T, error), use func(v T)) {
	if b.syncing > 0 {
		return
	}
	v, err := parse(text)
	if err != nil {
		b.board.setLocal(path, err.Error())
		return
	}
	use(v)
}

// numberEntry is an entry for the number at path; get writes the scene's
// value as text.
func (b *binder) numberEntry(path string, get func(sc *scene.Scene) string) *widget.Entry {
	return b.numberEntryTo(path, get, func(_ *scene.Scene, v float64) []scene.Edit {
		return []scene.Edit{{Path: path, Value: v}}
	})
}

// numberEntryTo is numberEntry whose value becomes the edits of to (given
// the scene as it is).
func (b *binder) numberEntryTo(path string, get func(sc *scene.Scene) string, to func(sc *scene.Scene, v float64) []scene.Edit) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) {
		typed(b, path, text, parseNumber, func(v float64) {
			b.setAll(path, to(b.c.Scene(), v)...)
		})
	}
	b.reader(func(sc *scene.Scene) { e.SetText(get(sc)) })
	return e
}

// optionalNumberEntry is numberEntry for a value that may be left out: an
// empty entry clears it.
func (b *binder) optionalNumberEntry(path, placeholder string, get func(sc *scene.Scene) *float64) *widget.Entry {
	e := widget.NewEntry()
	e.SetPlaceHolder(placeholder)
	e.OnChanged = func(text string) {
		if b.syncing > 0 {
			return
		}
		if isBlank(text) {
			b.set(path, nil)
			return
		}
		typed(b, path, text, parseNumber, func(v float64) { b.set(path, v) })
	}
	b.reader(func(sc *scene.Scene) {
		if p := get(sc); p != nil {
			e.SetText(formatNumber(*p))
		} else {
			e.SetText("")
		}
	})
	return e
}

// indicesEntry is an entry for indices at path ("2 0 0"); optional lets it
// be empty (the field cleared).
func (b *binder) indicesEntry(path string, optional bool, get func(sc *scene.Scene) []float64) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) {
		if b.syncing > 0 {
			return
		}
		if optional && isBlank(text) {
			b.set(path, nil)
			return
		}
		typed(b, path, text, scene.ParseIndexText, func(v []float64) { b.set(path, v) })
	}
	b.reader(func(sc *scene.Scene) { e.SetText(formatIndices(get(sc))) })
	return e
}

// textEntry is an entry for text stored as typed (a Burgers vector).
func (b *binder) textEntry(path string, get func(sc *scene.Scene) string) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) { b.set(path, text) }
	b.reader(func(sc *scene.Scene) { e.SetText(get(sc)) })
	return e
}

func isBlank(s string) bool {
	for _, r := range s {
		if r != ' ' && r != '\t' {
			return false
		}
	}
	return true
}
