package ui

import (
	"bytes"
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"

	"faultline/export"
	"faultline/figure"
	"faultline/internal/atomicfile"
	"faultline/scene"
	"faultline/sim"
)

// Figure contents.
const (
	figPair = "BF and DF side by side"
	figBF   = "BF only"
	figDF   = "DF only"
)

// FigureOptions choose an exported figure.
type FigureOptions struct {
	Panels  string // figPair, figBF or figDF
	Caption bool
	Scale   int // image pixels per simulated column; 0 automatic
	Mapping figure.Mapping
}

// currentFull returns the full render of the scene as it is now.
func (ws *Workspace) currentFull() (*scene.Setup, *sim.Image, error) {
	c := ws.ctrl
	if c.Err() != nil {
		return nil, nil, fmt.Errorf("the scene does not render: %w", c.Err())
	}
	r := c.LastFull()
	if r == nil || r.Gen != c.Gen() {
		return nil, nil, errors.New("the full render of the current scene has not finished yet; try again when the status line says it is done")
	}
	return r.Setup, r.Image, nil
}

// exportOptions are the export package's options for o.
func (o FigureOptions) exportOptions() export.Options {
	e := export.Options{FigureMapping: o.Mapping, Scale: o.Scale, Caption: o.Caption, Panels: export.PanelsPair}
	switch o.Panels {
	case figBF:
		e.Panels = export.PanelsBF
	case figDF:
		e.Panels = export.PanelsDF
	}
	return e
}

// sceneText is the PNG text chunks that carry the scene.
func (ws *Workspace) sceneText() map[string]string {
	data, err := scene.Marshal(ws.ctrl.Scene())
	if err != nil {
		return map[string]string{export.KeySoftware: "Faultline"}
	}
	return map[string]string{export.KeyScene: string(data), export.KeySoftware: "Faultline"}
}

// ExportFigure writes the figure to path.
func (ws *Workspace) ExportFigure(path string, o FigureOptions) error {
	st, im, err := ws.currentFull()
	if err != nil {
		return err
	}
	fig, err := export.Figure(st, im, o.exportOptions())
	if err != nil {
		return err
	}
	return figure.WritePNG(path, fig, ws.sceneText())
}

// ExportTIFF writes the bright and dark field into dir as 32-bit float
// TIFFs (fractions of the incident beam, with their pixel size and the
// scene) as the command line writes them, bf.tiff and df.tiff, and
// returns the two paths.
func (ws *Workspace) ExportTIFF(dir string) ([]string, error) {
	_, im, err := ws.currentFull()
	if err != nil {
		return nil, err
	}
	data, _ := scene.Marshal(ws.ctrl.Scene())
	return export.WriteTIFFs(dir, im, data)
}

// ExportProfile writes the line profile as CSV: along the drawn line
// (distance_nm,x_nm,y_nm,bf,df), or, with no line drawn, along the centre
// row as the command line's profile does (x_nm,bf,df).
func (ws *Workspace) ExportProfile(path string) error {
	_, im, err := ws.currentFull()
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if l := ws.view.line; l.Set && l.lengthNm() > 0 {
		p := export.SampleLine(im, l.line())
		if len(p.DistNm) == 0 {
			return errors.New("the profile line lies outside the simulated field")
		}
		err = export.WriteLineProfile(&buf, p)
	} else {
		err = export.WriteProfile(&buf, im, 0)
	}
	if err != nil {
		return err
	}
	return atomicfile.WriteFile(path, buf.Bytes())
}

// exportStem is the name exports start from: the scene file's.
func (ws *Workspace) exportStem() string {
	if p := ws.ctrl.Path(); p != "" {
		return strings.TrimSuffix(p, filepath.Ext(p))
	}
	return filepath.Join(ws.ctrl.Dir(), "faultline")
}

// ExportFigureDialog asks how the figure should look, then where to write
// it.
func (ws *Workspace) ExportFigureDialog() {
	_, im, err := ws.currentFull()
	if err != nil {
		ws.showError(err)
		return
	}
	panels := widget.NewSelect([]string{figPair, figBF, figDF}, nil)
	panels.SetSelected(figPair)
	caption := widget.NewCheck("Conditions under the images", nil)
	caption.SetChecked(true)
	nx := im.Grid.NX
	sizes := []string{"automatic (at least 800 px wide)"}
	scales := []int{0}
	for s := 1; s <= 8 && s*nx <= 4096; s++ {
		sizes = append(sizes, fmt.Sprintf("×%d: %d px per image", s, s*nx))
		scales = append(scales, s)
	}
	size := widget.NewSelect(sizes, nil)
	size.SetSelected(sizes[0])
	note := widget.NewLabel(export.MappingNote(ws.view.mapping))
	note.Wrapping = fyne.TextWrapWord
	note.TextStyle = fyne.TextStyle{Italic: true}
	items := []*widget.FormItem{
		widget.NewFormItem("Images", panels),
		widget.NewFormItem("Caption", caption),
		widget.NewFormItem("Size", size),
		widget.NewFormItem("", note),
	}
	showForm(ws, "Export figure", "Next…", items, func() {
		o := FigureOptions{Panels: panels.Selected, Caption: caption.Checked, Mapping: ws.view.mapping}
		if k := indexOf(sizes, size.Selected); k > 0 {
			o.Scale = scales[k]
		}
		ws.askPath("Export figure (PNG)", ws.exportStem()+"-figure.png", ".png", func(path string) {
			if err := ws.ExportFigure(path, o); err != nil {
				ws.showError(err)
				return
			}
			ws.note("Figure written to " + path)
		})
	})
}

// ExportTIFFDialog asks for the folder of the TIFF pair.
func (ws *Workspace) ExportTIFFDialog() {
	if _, _, err := ws.currentFull(); err != nil {
		ws.showError(err)
		return
	}
	ws.askFolder("Export TIFF (32-bit float): bf.tiff and df.tiff", ws.ctrl.Dir(), export.TIFFNames, func(dir string) {
		out, err := ws.ExportTIFF(dir)
		if err != nil {
			ws.showError(err)
			return
		}
		ws.note("TIFFs written: " + strings.Join(out, ", "))
	})
}

// ExportProfileDialog asks where to write the profile CSV.
func (ws *Workspace) ExportProfileDialog() {
	if _, _, err := ws.currentFull(); err != nil {
		ws.showError(err)
		return
	}
	ws.askPath("Export line profile (CSV)", ws.exportStem()+"-profile.csv", ".csv", func(path string) {
		if err := ws.ExportProfile(path); err != nil {
			ws.showError(err)
			return
		}
		ws.note("Profile written to " + path)
	})
}

// note shows a short message in the status line.
func (ws *Workspace) note(msg string) {
	if ws.status != nil {
		ws.status.Message.Importance = widget.SuccessImportance
		ws.status.Message.SetText(msg)
	}
}
