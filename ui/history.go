package ui

import (
	"strings"
	"time"

	"faultline/scene"
)

// coalesceWindow is the longest pause between two changes of the same
// fields that still makes them one undo step (a slider dragged, a number
// typed digit by digit).
const coalesceWindow = 800 * time.Millisecond

// maxUndo bounds the undo history.
const maxUndo = 200

// history holds the scenes before each change (undo) and those undone
// (redo). A scene in it is never changed: every edit works on a copy.
type history struct {
	undo, redo []*scene.Scene
	lastKey    string
	lastAt     time.Time
	now        func() time.Time
}

// record notes that prev was the scene before a change of the fields key
// ("" for a change that never merges with the one before).
func (h *history) record(prev *scene.Scene, key string) {
	now := time.Now
	if h.now != nil {
		now = h.now
	}
	t := now()
	merge := key != "" && key == h.lastKey && t.Sub(h.lastAt) < coalesceWindow && len(h.undo) > 0
	h.lastKey, h.lastAt = key, t
	h.redo = nil
	if merge {
		return
	}
	h.undo = append(h.undo, prev)
	if len(h.undo) > maxUndo {
		h.undo = h.undo[len(h.undo)-maxUndo:]
	}
}

func (h *history) clear() { *h = history{now: h.now} }

// editKey names the fields of a set of edits.
func editKey(edits []scene.Edit) string {
	paths := make([]string, len(edits))
	for i, e := range edits {
		paths[i] = e.Path
	}
	return strings.Join(paths, "|")
}

// CanUndo reports whether there is a change to undo.
func (c *Controller) CanUndo() bool { return len(c.hist.undo) > 0 }

// CanRedo reports whether there is an undone change to redo.
func (c *Controller) CanRedo() bool { return len(c.hist.redo) > 0 }

// Undo puts back the scene as it was before the last change (changes of
// the same fields in quick succession count as one), rebuilds it and
// renders it. It reports whether there was a change to undo.
func (c *Controller) Undo() bool { return c.step(&c.hist.undo, &c.hist.redo) }

// Redo makes the last undone change again.
func (c *Controller) Redo() bool { return c.step(&c.hist.redo, &c.hist.undo) }

// step moves back along one list of scenes (undo or redo), pushing the
// current scene onto the other, and restores the scene it took.
func (c *Controller) step(from, to *[]*scene.Scene) bool {
	if len(*from) == 0 {
		return false
	}
	prev := (*from)[len(*from)-1]
	*from = (*from)[:len(*from)-1]
	*to = append(*to, c.sc)
	c.hist.lastKey = ""
	c.restore(prev)
	return true
}

// restore makes sc the scene, keeping its file and saved state, and tells
// every field to read it again.
func (c *Controller) restore(sc *scene.Scene) {
	c.sc = sc
	for _, f := range c.onReplaced {
		f()
	}
	c.fireState()
	c.rebuild()
}
