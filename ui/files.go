package ui

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// recentKey is the preference holding the recent scene files, newest
// first.
const (
	recentKey = "recent-scenes"
	maxRecent = 8
)

// Recent returns the recent scene files, newest first.
func (ws *Workspace) Recent() []string {
	if ws.app == nil {
		return nil
	}
	return ws.app.Preferences().StringList(recentKey)
}

// addRecent puts path at the top of the recent files.
func (ws *Workspace) addRecent(path string) {
	if ws.app == nil || path == "" {
		return
	}
	list := []string{path}
	for _, p := range ws.Recent() {
		if p != path && len(list) < maxRecent {
			list = append(list, p)
		}
	}
	ws.app.Preferences().SetStringList(recentKey, list)
	ws.refreshMenu()
}

// NewScene replaces the scene by a perfect crystal (after asking about
// unsaved changes).
func (ws *Workspace) NewScene() {
	ws.confirmDiscard(func() {
		ws.untitled = "new scene"
		ws.ctrl.Replace(newScene(), "", false)
	})
}

// OpenDialog asks for a scene file and opens it.
func (ws *Workspace) OpenDialog() {
	ws.confirmDiscard(func() {
		ws.openFileDialog([]string{".json", ".JSON"}, ws.startDir(), ws.OpenPath)
	})
}

// openFileDialog asks for a file with one of the extensions, starting in
// dir when it is not nil, and hands its path to use.
func (ws *Workspace) openFileDialog(exts []string, dir fyne.ListableURI, use func(path string)) {
	if ws.win == nil {
		return
	}
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil || r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		use(path)
	}, ws.win)
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	if dir != nil {
		d.SetLocation(dir)
	}
	d.Show()
}

// OpenPath opens the scene file at path, reporting a failure in a dialog.
func (ws *Workspace) OpenPath(path string) {
	if err := ws.ctrl.Open(path); err != nil {
		ws.showError(fmt.Errorf("could not open the scene: %w", err))
		return
	}
	ws.addRecent(ws.ctrl.Path())
}

// openRecent opens a recent file after asking about unsaved changes.
func (ws *Workspace) openRecent(path string) {
	ws.confirmDiscard(func() { ws.OpenPath(path) })
}

// Save writes the scene to its file, or asks for one.
func (ws *Workspace) Save(then func()) {
	if ws.ctrl.Path() == "" {
		ws.SaveAsDialog(then)
		return
	}
	if err := ws.ctrl.Save(); err != nil {
		ws.showError(fmt.Errorf("the scene was not saved (the file on disk is unchanged): %w", err))
		return
	}
	ws.addRecent(ws.ctrl.Path())
	if then != nil {
		then()
	}
}

// SaveAsDialog asks for a file name and saves the scene there.
func (ws *Workspace) SaveAsDialog(then func()) {
	suggest := ws.ctrl.Path()
	if suggest == "" {
		suggest = filepath.Join(ws.ctrl.Dir(), "scene.json")
	}
	ws.askPath("Save scene as", suggest, ".json", func(path string) {
		if err := ws.ctrl.SaveAs(path); err != nil {
			ws.showError(fmt.Errorf("the scene was not saved: %w", err))
			return
		}
		ws.addRecent(ws.ctrl.Path())
		if then != nil {
			then()
		}
	})
}

// confirmDiscard runs then at once if the scene has no unsaved changes,
// and otherwise asks whether to save them first, throw them away or stay.
func (ws *Workspace) confirmDiscard(then func()) {
	if !ws.ctrl.Dirty() || ws.win == nil {
		then()
		return
	}
	name := "The " + ws.untitled
	if ws.untitled == "" {
		name = "The scene"
	}
	if p := ws.ctrl.Path(); p != "" {
		name = filepath.Base(p)
	}
	msg := widget.NewLabel(name + " has changes that are not saved.")
	var d *dialog.CustomDialog
	save := widget.NewButton("Save", func() { d.Hide(); ws.Save(then) })
	save.Importance = widget.HighImportance
	discard := widget.NewButton("Discard changes", func() { d.Hide(); then() })
	cancel := widget.NewButton("Cancel", func() { d.Hide() })
	d = dialog.NewCustomWithoutButtons("Unsaved changes", msg, ws.win)
	d.SetButtons([]fyne.CanvasObject{cancel, discard, save})
	d.Show()
}

// askPath asks for a file to write: a folder (typed or chosen) and a file
// name. Writing goes through a temporary file renamed over the target
// afterwards, so the system dialog, which empties an existing file as soon
// as it is chosen, is not used. An existing file is only replaced after
// confirmation.
func (ws *Workspace) askPath(title, suggest, ext string, then func(path string)) {
	if ws.win == nil {
		return
	}
	folder, folderRow := ws.folderField(filepath.Dir(suggest))
	name := widget.NewEntry()
	name.SetText(filepath.Base(suggest))
	items := []*widget.FormItem{folderRow, widget.NewFormItem("File name", name)}
	d := dialog.NewForm(title, "Save", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		n := strings.TrimSpace(name.Text)
		if n == "" {
			ws.showError(errors.New("no file name given"))
			return
		}
		if ext != "" && filepath.Ext(n) == "" {
			n += ext
		}
		path := filepath.Join(strings.TrimSpace(folder.Text), n)
		if fi, err := os.Stat(filepath.Dir(path)); err != nil || !fi.IsDir() {
			ws.showError(fmt.Errorf("folder %s does not exist", filepath.Dir(path)))
			return
		}
		if _, err := os.Stat(path); err == nil {
			dialog.ShowConfirm("Replace file?", filepath.Base(path)+" exists. Replace it?", func(yes bool) {
				if yes {
					then(path)
				}
			}, ws.win)
			return
		}
		then(path)
	}, ws.win)
	d.Resize(fyne.NewSize(620, 220))
	d.Show()
}

// folderField is a form row holding a folder's path, typed or chosen with
// the system's folder dialog (which starts at the typed folder).
func (ws *Workspace) folderField(start string) (*widget.Entry, *widget.FormItem) {
	folder := widget.NewEntry()
	folder.SetText(start)
	browse := widget.NewButton("Choose…", func() {
		fd := dialog.NewFolderOpen(func(u fyne.ListableURI, err error) {
			if err == nil && u != nil {
				folder.SetText(u.Path())
			}
		}, ws.win)
		if l, err := storage.ListerForURI(storage.NewFileURI(folder.Text)); err == nil {
			fd.SetLocation(l)
		}
		fd.Show()
	})
	return folder, widget.NewFormItem("Folder", container.NewBorder(nil, nil, nil, browse, folder))
}

// askFolder asks for a folder to write the files names(dir) into, and
// asks before replacing any that exist.
func (ws *Workspace) askFolder(title, suggest string, names func(dir string) []string, then func(dir string)) {
	if ws.win == nil {
		return
	}
	folder, folderRow := ws.folderField(suggest)
	items := []*widget.FormItem{folderRow}
	d := dialog.NewForm(title, "Save", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		dir := strings.TrimSpace(folder.Text)
		if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
			ws.showError(fmt.Errorf("folder %s does not exist", dir))
			return
		}
		var exist []string
		for _, p := range names(dir) {
			if _, err := os.Stat(p); err == nil {
				exist = append(exist, filepath.Base(p))
			}
		}
		if len(exist) > 0 {
			dialog.ShowConfirm("Replace files?", strings.Join(exist, ", ")+" exist in "+dir+". Replace them?", func(yes bool) {
				if yes {
					then(dir)
				}
			}, ws.win)
			return
		}
		then(dir)
	}, ws.win)
	d.Resize(fyne.NewSize(620, 180))
	d.Show()
}

// startDir is where file dialogs open: the scene's folder.
func (ws *Workspace) startDir() fyne.ListableURI {
	l, err := storage.ListerForURI(storage.NewFileURI(ws.ctrl.Dir()))
	if err != nil {
		return nil
	}
	return l
}

func (ws *Workspace) showError(err error) {
	if ws.win == nil {
		ws.lastError = err
		return
	}
	dialog.ShowError(err, ws.win)
}

// newScene is the scene of File > New: a perfect copper foil in a
// two-beam condition, ready for defects to be added.
func newScene() *scene.Scene {
	return &scene.Scene{
		Version:     scene.Version,
		Crystal:     scene.Crystal{Material: "Cu"},
		Microscope:  scene.Microscope{VoltageKV: 200},
		Diffraction: scene.Diffraction{G: []float64{2, 0, 0}, Beam: []float64{0, 0, 1}, SPerNm: ptr(0.0), Model: "two-beam"},
		Foil:        scene.Foil{ThicknessNm: 100},
		Defects:     []scene.Defect{},
		Image:       scene.Image{WidthNm: 200, HeightNm: 200, Pixels: []int{200, 200}},
	}
}
