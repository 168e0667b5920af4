package ui

import (
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
	b.quiet(func() {
		for _, f := range b.readers {
			f(b.c.Scene())
		}
	})
}

// edit applies change to the scene unless fields are being filled. The
// error of the build is shown by the board (through the OnBuilt listener
// of the window), so it is not returned.
func (b *binder) edit(path string, change func(sc *scene.Scene)) {
	if b.syncing > 0 {
		return
	}
	delete(b.board.local, path)
	b.c.Edit(change)
	b.board.refresh()
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

// numberEntry is an entry for a number at path: get writes the scene's
// value as text, set stores a parsed value.
func (b *binder) numberEntry(path string, get func(sc *scene.Scene) string, set func(sc *scene.Scene, v float64)) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) {
		typed(b, path, text, parseNumber, func(v float64) {
			b.edit(path, func(sc *scene.Scene) { set(sc, v) })
		})
	}
	b.reader(func(sc *scene.Scene) { e.SetText(get(sc)) })
	return e
}

// optionalNumberEntry is numberEntry for a value that may be left out: an
// empty entry stores nil.
func (b *binder) optionalNumberEntry(path, placeholder string, get func(sc *scene.Scene) *float64, set func(sc *scene.Scene, v *float64)) *widget.Entry {
	e := widget.NewEntry()
	e.SetPlaceHolder(placeholder)
	e.OnChanged = func(text string) {
		if b.syncing > 0 {
			return
		}
		if isBlank(text) {
			b.edit(path, func(sc *scene.Scene) { set(sc, nil) })
			return
		}
		typed(b, path, text, parseNumber, func(v float64) {
			b.edit(path, func(sc *scene.Scene) { set(sc, &v) })
		})
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
// be empty (stored as nil).
func (b *binder) indicesEntry(path string, optional bool, get func(sc *scene.Scene) []float64, set func(sc *scene.Scene, v []float64)) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) {
		if b.syncing > 0 {
			return
		}
		if optional && isBlank(text) {
			b.edit(path, func(sc *scene.Scene) { set(sc, nil) })
			return
		}
		typed(b, path, text, parseIndexList, func(v []float64) {
			b.edit(path, func(sc *scene.Scene) { set(sc, v) })
		})
	}
	b.reader(func(sc *scene.Scene) { e.SetText(formatIndices(get(sc))) })
	return e
}

// textEntry is an entry for text stored as typed (a Burgers vector).
func (b *binder) textEntry(path string, get func(sc *scene.Scene) string, set func(sc *scene.Scene, v string)) *widget.Entry {
	e := widget.NewEntry()
	e.OnChanged = func(text string) {
		b.edit(path, func(sc *scene.Scene) { set(sc, text) })
	}
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
