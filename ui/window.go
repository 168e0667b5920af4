package ui

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"

	"faultline/assets"
	"faultline/scene"
)

// AppID identifies the program to Fyne (its preferences: recent files).
const AppID = "org.faultline.desktop"

// Options are the command-line choices of the desktop program.
type Options struct {
	// ScenePath is the scene file to open; "" opens the built-in demo.
	ScenePath string
	// Screenshot, if set, makes the program write a capture of the window
	// to this PNG once the first full render is shown, and exit.
	Screenshot string
	// ScreenshotTimeout bounds the wait for that render (0: two minutes).
	ScreenshotTimeout time.Duration
	// Stderr receives the one-line errors (os.Stderr when nil).
	Stderr io.Writer
}

// Exit statuses of Run, as those of the command line.
const (
	ExitOK       = 0
	ExitInternal = 1
	ExitBadInput = 2
)

// WindowSize is the size the window opens at.
var WindowSize = fyne.NewSize(1400, 900)

// Run opens the window and returns the exit status when it is closed. A
// scene file that does not load is reported on Stderr as one line
// "error: ..." and Run returns ExitBadInput without opening a window; in
// screenshot mode so is a scene that does not build (it could never
// render).
func Run(o Options) int {
	stderr := o.Stderr
	if stderr == nil {
		stderr = os.Stderr
	}
	fail := func(code int, err error) int {
		fmt.Fprintln(stderr, "error: "+oneLine(err.Error()))
		return code
	}
	sc, path, err := startScene(o.ScenePath)
	if err != nil {
		return fail(ExitBadInput, err)
	}
	if o.Screenshot != "" {
		dir := "."
		if path != "" {
			dir = filepath.Dir(path)
		}
		if _, err := scene.Build(sc, dir); err != nil {
			return fail(ExitBadInput, err)
		}
	}

	if err := checkDisplay(os.Getenv); err != nil {
		fmt.Fprintln(stderr, err.Error())
		return ExitBadInput
	}
	a := app.NewWithID(AppID)
	w := a.NewWindow("Faultline")
	ws := NewWorkspace(a, w, fyne.Do)
	if path == "" {
		ws.untitled = "demo scene"
	}
	w.SetContent(ws.Content())
	w.Resize(WindowSize)
	ws.installMenus()
	ws.installShortcuts()
	w.SetCloseIntercept(func() {
		ws.confirmDiscard(func() {
			ws.ctrl.Close()
			w.Close()
		})
	})
	w.SetMaster()

	code := ExitOK
	if o.Screenshot != "" {
		ws.captureAfterFirstRender(o.Screenshot, o.ScreenshotTimeout, func(c int, err error) {
			code = c
			if err != nil {
				fail(c, err)
			}
			a.Quit()
		})
	}
	// The scene is loaded (and, when saved, not dirty: the demo counts as
	// saved, with no file).
	ws.ctrl.Replace(sc, path, true)
	if path != "" {
		ws.addRecent(path)
	}
	w.Show()
	a.Run()
	ws.ctrl.Close()
	return code
}

// startScene reads the scene to open: the file, or the built-in demo.
func startScene(path string) (*scene.Scene, string, error) {
	if path == "" {
		sc, err := scene.Parse(assets.DemoScene)
		if err != nil {
			return nil, "", fmt.Errorf("built-in demo scene: %w", err)
		}
		return sc, "", nil
	}
	sc, err := scene.Load(path)
	if err != nil {
		return nil, "", err
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	return sc, path, nil
}

func oneLine(s string) string {
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\n", " ")), " ")
}

// shortcut is Ctrl (Cmd on macOS) with key, and Shift if shift.
func shortcut(key fyne.KeyName, shift bool) *desktop.CustomShortcut {
	m := fyne.KeyModifierShortcutDefault
	if shift {
		m |= fyne.KeyModifierShift
	}
	return &desktop.CustomShortcut{KeyName: key, Modifier: m}
}

// command is one menu entry with its shortcut.
type command struct {
	label string
	key   *desktop.CustomShortcut
	do    func()
}

func (ws *Workspace) commands() map[string]command {
	v := ws.view
	return map[string]command{
		"new":       {"New scene", shortcut(fyne.KeyN, false), ws.NewScene},
		"open":      {"Open scene…", shortcut(fyne.KeyO, false), ws.OpenDialog},
		"save":      {"Save", shortcut(fyne.KeyS, false), func() { ws.Save(nil) }},
		"saveas":    {"Save as…", shortcut(fyne.KeyS, true), func() { ws.SaveAsDialog(nil) }},
		"micro":     {"Open micrograph…", shortcut(fyne.KeyM, false), ws.openMicrographDialog},
		"figure":    {"Export figure (PNG)…", shortcut(fyne.KeyE, false), ws.ExportFigureDialog},
		"tiff":      {"Export TIFF (32-bit float)…", shortcut(fyne.KeyT, false), ws.ExportTIFFDialog},
		"profile":   {"Export line profile (CSV)…", shortcut(fyne.KeyE, true), ws.ExportProfileDialog},
		"undo":      {"Undo", shortcut(fyne.KeyZ, false), ws.Undo},
		"redo":      {"Redo", shortcut(fyne.KeyZ, true), ws.Redo},
		"quit":      {"Quit", shortcut(fyne.KeyQ, false), func() { ws.confirmDiscard(ws.app.Quit) }},
		"fit":       {"Fit images", shortcut(fyne.Key0, false), v.fit},
		"zoomin":    {"Zoom in", shortcut(fyne.KeyEqual, false), func() { v.zoomBy(1.25) }},
		"zoomout":   {"Zoom out", shortcut(fyne.KeyMinus, false), func() { v.zoomBy(1 / 1.25) }},
		"invert":    {"Invert grey", shortcut(fyne.KeyI, false), func() { v.Invert.SetChecked(!v.Invert.Checked) }},
		"linetool":  {"Draw profile line / pan", shortcut(fyne.KeyL, false), v.toggleTool},
		"adddefect": {"Add defect", shortcut(fyne.KeyD, true), func() { ws.tabs.SelectIndex(1); ws.defects.Add.OnTapped() }},
	}
}

func (ws *Workspace) installShortcuts() {
	for _, c := range ws.commands() {
		if c.key == nil {
			continue
		}
		do := c.do
		ws.win.Canvas().AddShortcut(c.key, func(fyne.Shortcut) { do() })
	}
}

func (ws *Workspace) item(name string) *fyne.MenuItem {
	c := ws.commands()[name]
	it := fyne.NewMenuItem(c.label, c.do)
	if c.key != nil {
		it.Shortcut = c.key
	}
	return it
}

// installMenus sets the main menu.
func (ws *Workspace) installMenus() {
	if ws.win == nil {
		return
	}
	ws.win.SetMainMenu(ws.mainMenu())
}

func (ws *Workspace) refreshMenu() {
	if ws.win == nil || ws.win.MainMenu() == nil {
		return
	}
	ws.win.SetMainMenu(ws.mainMenu())
}

func (ws *Workspace) mainMenu() *fyne.MainMenu {
	recent := fyne.NewMenuItem("Open recent", nil)
	var items []*fyne.MenuItem
	for _, p := range ws.Recent() {
		p := p
		items = append(items, fyne.NewMenuItem(p, func() { ws.openRecent(p) }))
	}
	if len(items) == 0 {
		none := fyne.NewMenuItem("(none yet)", nil)
		none.Disabled = true
		items = append(items, none)
	}
	recent.ChildMenu = fyne.NewMenu("", items...)
	quit := ws.item("quit")
	quit.IsQuit = true
	file := fyne.NewMenu("File",
		ws.item("new"), ws.item("open"), recent,
		fyne.NewMenuItemSeparator(),
		ws.item("save"), ws.item("saveas"),
		fyne.NewMenuItemSeparator(),
		ws.item("micro"),
		fyne.NewMenuItem("Open the demo micrograph", func() {
			if err := ws.OpenDemoMicrograph(); err != nil {
				ws.showError(err)
			}
		}),
		fyne.NewMenuItemSeparator(),
		ws.item("figure"), ws.item("tiff"), ws.item("profile"),
		fyne.NewMenuItemSeparator(),
		quit,
	)
	edit := fyne.NewMenu("Edit", ws.item("undo"), ws.item("redo"))
	view := fyne.NewMenu("View", ws.item("fit"), ws.item("zoomin"), ws.item("zoomout"),
		fyne.NewMenuItemSeparator(), ws.item("invert"), ws.item("linetool"))
	defects := fyne.NewMenu("Defects", ws.item("adddefect"))
	help := fyne.NewMenu("Help", fyne.NewMenuItem("Keyboard shortcuts", ws.showShortcuts),
		fyne.NewMenuItem("About the models", ws.showAboutModels))
	return fyne.NewMainMenu(file, edit, view, defects, help)
}

// showShortcuts lists the keyboard shortcuts.
func (ws *Workspace) showShortcuts() {
	order := []string{"new", "open", "save", "saveas", "undo", "redo", "micro", "figure", "tiff", "profile", "fit", "zoomin", "zoomout", "invert", "linetool", "adddefect", "quit"}
	cmds := ws.commands()
	var b strings.Builder
	for _, k := range order {
		c := cmds[k]
		fmt.Fprintf(&b, "%-15s %s\n", shortcutText(c.key), c.label)
	}
	b.WriteString("\nOver the images: scroll to zoom about the pointer; drag to pan,\nor to draw the profile line when that tool is chosen.")
	l := widget.NewLabel(b.String())
	l.TextStyle = fyne.TextStyle{Monospace: true}
	dialog.ShowCustom("Keyboard shortcuts", "Close", l, ws.win)
}

func shortcutText(s *desktop.CustomShortcut) string {
	t := "Ctrl+"
	if s.Modifier&fyne.KeyModifierShift != 0 {
		t += "Shift+"
	}
	return t + string(s.KeyName)
}

// Undo takes back the last change of the scene (changes of one field in
// quick succession, such as a slider's drag, count as one).
func (ws *Workspace) Undo() {
	if !ws.ctrl.Undo() {
		ws.note("Nothing to undo")
	}
}

// Redo makes the last undone change again.
func (ws *Workspace) Redo() {
	if !ws.ctrl.Redo() {
		ws.note("Nothing to redo")
	}
}
