package ui

import (
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// Workspace is one window's worth of state: the controller and the panels
// wired to it.
type Workspace struct {
	app  fyne.App
	win  fyne.Window // nil in tests that need no dialogs
	ctrl *Controller

	board  *errorBoard
	binder *binder

	params  *paramsPanel
	defects *defectsPanel
	view    *imageView
	prof    *profilePanel
	status  *statusLine
	micro   *micrographView
	match   *matchPanel
	plan    *planPanel
	tabs    *container.AppTabs

	onMicrograph []func()
	content      fyne.CanvasObject
	lastError    error  // of showError with no window (tests)
	untitled     string // the name of a scene with no file
}

// NewWorkspace builds the panels for a controller whose results arrive
// through post. win may be nil (no dialogs, no menus).
func NewWorkspace(a fyne.App, win fyne.Window, post func(func())) *Workspace {
	ws := &Workspace{app: a, win: win, ctrl: NewController(post)}
	ws.board = newErrorBoard()
	ws.binder = newBinder(ws.ctrl, ws.board)
	ws.ctrl.OnBuilt(func(_ *scene.Setup, err error) { ws.board.setBuild(err) })
	ws.ctrl.OnState(ws.updateTitle)

	images := imagesPanel(ws)
	plot := profilePanelObject(ws)
	status := statusPanel(ws)
	conditions := conditionsPanel(ws)
	defects := defectsPanelObject(ws)
	micro := micrographPanel(ws)
	matching := matchPanelObject(ws)
	planning := planPanelObject(ws)
	ws.tabs = container.NewAppTabs(
		container.NewTabItem("Conditions", conditions),
		container.NewTabItem("Defects", defects),
		container.NewTabItem("Micrograph", micro),
		container.NewTabItem("Match", matching),
		container.NewTabItem("Plan", planning),
	)
	ws.board.onShown = ws.revealError

	centre := container.NewBorder(nil, plot, nil, nil, images)
	// The panels keep the width the divider gives them: a wider form
	// (another defect type, say) must not move the divider.
	split := container.NewHSplit(container.New(anyWidth{}, ws.tabs), centre)
	split.Offset = 0.44
	ws.content = container.NewBorder(nil, container.NewVBox(widget.NewSeparator(), status), nil, nil, split)
	return ws
}

// anyWidth lays its objects out at the size it is given and asks for no
// width of its own, only their height: what it holds never pushes a
// divider aside.
type anyWidth struct{}

func (anyWidth) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	for _, o := range objs {
		o.Move(fyne.NewPos(0, 0))
		o.Resize(size)
	}
}

func (anyWidth) MinSize(objs []fyne.CanvasObject) fyne.Size {
	var h float32
	for _, o := range objs {
		h = max(h, o.MinSize().Height)
	}
	return fyne.NewSize(0, h)
}

// Controller returns the workspace's controller.
func (ws *Workspace) Controller() *Controller { return ws.ctrl }

// Content returns the window content.
func (ws *Workspace) Content() fyne.CanvasObject { return ws.content }

// revealError marks the tab holding the field in error, so an error on a
// tab not in view is not missed.
func (ws *Workspace) revealError(path string) {
	if ws.tabs == nil {
		return
	}
	names := []string{"Conditions", "Defects"}
	bad := -1
	switch {
	case path == "-":
	case strings.HasPrefix(path, "defects"):
		bad = 1
	default:
		bad = 0
	}
	changed := false
	for i, n := range names {
		if i == bad {
			n += " (error)"
		}
		if ws.tabs.Items[i].Text != n {
			ws.tabs.Items[i].Text = n
			changed = true
		}
	}
	if changed {
		ws.tabs.Refresh()
	}
}

// updateTitle names the scene in the window title, with a mark for
// unsaved changes.
func (ws *Workspace) updateTitle() {
	if ws.win == nil {
		return
	}
	name := ws.untitled
	if name == "" {
		name = "untitled scene"
	}
	if p := ws.ctrl.Path(); p != "" {
		name = filepath.Base(p)
	}
	mark := ""
	if ws.ctrl.Dirty() {
		mark = "• "
	}
	ws.win.SetTitle(mark + name + " — Faultline")
}

// showForm shows a form dialog that runs then on confirmation.
func showForm(ws *Workspace, title, confirm string, items []*widget.FormItem, then func()) {
	if ws.win == nil {
		then()
		return
	}
	d := dialog.NewForm(title, confirm, "Cancel", items, func(ok bool) {
		if ok {
			then()
		}
	}, ws.win)
	d.Resize(fyne.NewSize(520, 260))
	d.Show()
}
