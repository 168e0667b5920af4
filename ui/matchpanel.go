package ui

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"faultline/match"
	"faultline/scene"
)

// Ways of varying the defect, as the match panel offers them.
var varyChoices = []struct{ label, vary, hint string }{
	{"Burgers vector", "b", "1/2<110>"},
	{"Loop nature", "nature", "vacancy, interstitial"},
	{"Fault kind", "kind", "intrinsic, extrinsic"},
}

// seriesEntry is one micrograph of the g·b series being matched, with the
// imaging conditions it was taken under.
type seriesEntry struct {
	m     match.Micrograph
	label string
}

// matchPanel identifies a defect from a g·b series and fits the open
// micrograph; the work is the match package's, run off the UI goroutine.
type matchPanel struct {
	ws      *Workspace
	series  []seriesEntry
	ranked  []match.Ranked
	defect  int
	mu      sync.Mutex
	cancel  context.CancelFunc
	fitted  *match.FitResult
	fitDef  int
	list    *widget.List
	results *widget.List
	images  *fyne.Container
	status  *widget.Label
	errl    *widget.Label
	bar     *widget.ProgressBar
	stop    *widget.Button
	accept  *widget.Button
	acceptF *widget.Button
	picked  int
}

// matchPanelObject returns the Match tab.
func matchPanelObject(ws *Workspace) fyne.CanvasObject {
	mp := &matchPanel{ws: ws, picked: -1}
	ws.match = mp
	kind := widget.NewRadioGroup([]string{"BF", "DF"}, nil)
	kind.Horizontal = true
	kind.Required = true
	kind.SetSelected("BF")

	mp.list = widget.NewList(func() int { return len(mp.series) },
		func() fyne.CanvasObject { return widget.NewLabel("") },
		func(i widget.ListItemID, o fyne.CanvasObject) { o.(*widget.Label).SetText(mp.series[i].label) })
	selected := -1
	mp.list.OnSelected = func(i widget.ListItemID) { selected = i }
	add := widget.NewButton("Add the open micrograph", func() {
		if err := mp.addOpen(kindOf(kind.Selected)); err != nil {
			setError(mp.errl, err.Error())
			return
		}
		setError(mp.errl, "")
	})
	remove := widget.NewButton("Remove", func() {
		if selected >= 0 && selected < len(mp.series) {
			mp.series = append(mp.series[:selected], mp.series[selected+1:]...)
			selected = -1
			mp.list.UnselectAll()
			mp.list.Refresh()
		}
	})

	vary := widget.NewSelect(nil, nil)
	for _, c := range varyChoices {
		vary.Options = append(vary.Options, c.label)
	}
	cands := widget.NewEntry()
	cands.SetText(varyChoices[0].hint)
	vary.OnChanged = func(s string) {
		for _, c := range varyChoices {
			if c.label == s {
				cands.SetText(c.hint)
			}
		}
	}
	vary.SetSelected(varyChoices[0].label)
	defect := widget.NewEntry()
	defect.SetPlaceHolder("first that fits")

	mp.status = widget.NewLabel("")
	mp.status.Wrapping = fyne.TextWrapWord
	mp.errl = errorLabel()
	mp.bar = widget.NewProgressBar()
	mp.bar.Hide()
	mp.stop = widget.NewButton("Cancel", func() { mp.cancelWork() })
	mp.stop.Hide()

	rank := widget.NewButton("Rank candidates", func() {
		k, err := optionalIndex(defect.Text)
		if err != nil {
			setError(mp.errl, "varied defect: "+err.Error())
			return
		}
		v := "b"
		for _, c := range varyChoices {
			if c.label == vary.Selected {
				v = c.vary
			}
		}
		if err := mp.rank(v, splitList(cands.Text), k); err != nil {
			setError(mp.errl, err.Error())
			return
		}
		setError(mp.errl, "")
	})

	mp.results = widget.NewList(func() int { return len(mp.ranked) },
		func() fyne.CanvasObject { return widget.NewLabel("") },
		func(i widget.ListItemID, o fyne.CanvasObject) { o.(*widget.Label).SetText(rankLine(mp.ranked[i])) })
	mp.results.OnSelected = func(i widget.ListItemID) { mp.show(i) }
	mp.images = container.NewGridWithColumns(2)
	mp.accept = widget.NewButton("Use this candidate in the scene", func() { mp.acceptPicked() })
	mp.accept.Disable()

	fitBtn := widget.NewButton("Fit thickness, s and depth to the open micrograph", func() {
		k, err := optionalIndex(defect.Text)
		if err != nil {
			setError(mp.errl, "varied defect: "+err.Error())
			return
		}
		if err := mp.fit(kindOf(kind.Selected), k); err != nil {
			setError(mp.errl, err.Error())
			return
		}
		setError(mp.errl, "")
	})
	mp.acceptF = widget.NewButton("Use the fitted values", func() { mp.acceptFit() })
	mp.acceptF.Disable()

	intro := widget.NewLabel("Open a micrograph in the Micrograph tab, set its pixel size and the direction of g there, set its g, beam and deviation under Conditions, then add it to the series. Repeat for each g; then rank candidates. The score is the normalised correlation of micrograph and simulation (−1 to 1, see the README).")
	intro.Wrapping = fyne.TextWrapWord
	intro.TextStyle = fyne.TextStyle{Italic: true}
	listBox := container.NewGridWrap(fyne.NewSize(360, 110), mp.list)
	resBox := container.NewGridWrap(fyne.NewSize(360, 150), mp.results)
	return container.NewVScroll(container.NewPadded(container.NewVBox(
		intro,
		form(formRow("This micrograph is", kind)),
		container.NewHBox(add, remove),
		listBox,
		widget.NewSeparator(),
		form(formRow("Vary", vary), formRow("Candidates", cands), formRow("Defect no.", defect)),
		container.NewHBox(rank, fitBtn),
		container.NewBorder(nil, nil, nil, mp.stop, mp.bar),
		mp.status, mp.errl,
		resBox,
		mp.accept, mp.acceptF,
		mp.images,
	)))
}

func kindOf(s string) match.Kind {
	if s == "DF" {
		return match.DarkField
	}
	return match.BrightField
}

// optionalIndex reads a defect number counted from 1 as the window shows
// it ("" for none) and returns it counted from 0.
func optionalIndex(text string) (*int, error) {
	text = strings.TrimSpace(text)
	if text == "" {
		return nil, nil
	}
	n, err := strconv.Atoi(text)
	if err != nil || n < 1 {
		return nil, fmt.Errorf("%q: give the defect's number in the list (1, 2, …) or leave it empty", text)
	}
	n--
	return &n, nil
}

func splitList(text string) []string {
	var out []string
	for _, f := range strings.Split(text, ",") {
		if f = strings.TrimSpace(f); f != "" {
			out = append(out, f)
		}
	}
	return out
}

func rankLine(r match.Ranked) string {
	rank := strconv.Itoa(r.Rank) + "."
	if r.Tied {
		rank = strconv.Itoa(r.Rank) + "="
	}
	return fmt.Sprintf("%s %s   %.3f ± %.3f", rank, r.Candidate.Label, r.Score, r.Error)
}

// addOpen adds the micrograph open in the Micrograph tab to the series,
// with the scene's current imaging conditions.
func (mp *matchPanel) addOpen(kind match.Kind) error {
	m := mp.ws.micro
	if m == nil {
		return fmt.Errorf("no micrograph is open: open one in the Micrograph tab first")
	}
	sc := mp.ws.ctrl.Scene()
	if sc == nil || mp.ws.ctrl.Setup() == nil {
		return fmt.Errorf("the scene does not build; mend it first (the Conditions give each micrograph its g)")
	}
	d, err := json.Marshal(sc.Diffraction)
	if err != nil {
		return err
	}
	mic := match.Micrograph{Name: m.Name, Raster: match.FromFloat32(m.img.Width, m.img.Height, m.img.Pix, m.NmPerPx),
		GAngleDeg: m.GAngleDeg, Kind: kind, Diffraction: d}
	label := fmt.Sprintf("%s: g = %s, %s, %.3g nm/px, g at %.0f°", m.Name, formatIndices(sc.Diffraction.G), strings.ToUpper(string(kind)), m.NmPerPx, m.GAngleDeg)
	mp.series = append(mp.series, seriesEntry{m: mic, label: label})
	mp.list.Refresh()
	return nil
}

// start runs work off the UI goroutine with a cancellable context;
// progress and the result come back through the controller's post.
func (mp *matchPanel) start(what string, work func(ctx context.Context, progress func(done, total int)) (func(), error)) {
	mp.cancelWork()
	ctx, cancel := context.WithCancel(context.Background())
	mp.mu.Lock()
	mp.cancel = cancel
	mp.mu.Unlock()
	post := mp.ws.ctrl.Post
	mp.bar.SetValue(0)
	mp.bar.Show()
	mp.stop.Show()
	mp.status.SetText(what + "…")
	go func() {
		done, err := work(ctx, func(d, t int) {
			post(func() { mp.bar.SetValue(float64(d) / float64(t)) })
		})
		post(func() {
			mp.bar.Hide()
			mp.stop.Hide()
			switch {
			case ctx.Err() != nil:
				mp.status.SetText(what + ": cancelled")
			case err != nil:
				mp.status.SetText("")
				setError(mp.errl, oneLine(err.Error()))
			default:
				done()
			}
		})
	}()
}

func (mp *matchPanel) cancelWork() {
	mp.mu.Lock()
	defer mp.mu.Unlock()
	if mp.cancel != nil {
		mp.cancel()
		mp.cancel = nil
	}
}

// rank compares the candidates with the series.
func (mp *matchPanel) rank(vary string, given []string, defect *int) error {
	if len(mp.series) == 0 {
		return fmt.Errorf("the series is empty: add at least one micrograph")
	}
	st := mp.ws.ctrl.Setup()
	if st == nil {
		return fmt.Errorf("the scene does not build; mend it first")
	}
	k, cands, err := match.CandidatesFor(st, vary, given, defect)
	if err != nil {
		return err
	}
	base, err := scene.Marshal(mp.ws.ctrl.Scene())
	if err != nil {
		return err
	}
	s := &match.Series{Base: base, Dir: mp.ws.ctrl.Dir(), Defect: k, Candidates: cands}
	for _, e := range mp.series {
		s.Micrographs = append(s.Micrographs, e.m)
	}
	mp.start(fmt.Sprintf("ranking %d candidates against %d micrographs", len(cands), len(s.Micrographs)),
		func(ctx context.Context, progress func(done, total int)) (func(), error) {
			ranked, err := match.Identify(ctx, s, match.Options{Progress: progress})
			return func() {
				mp.ranked, mp.defect, mp.picked = ranked, k, -1
				mp.results.UnselectAll()
				mp.results.Refresh()
				mp.accept.Disable()
				mp.status.SetText(fmt.Sprintf("ranked %d candidates; = marks a candidate the micrographs cannot tell apart from the one above. Pick one to see its images.", len(ranked)))
				if len(ranked) > 0 {
					mp.results.Select(0)
				}
			}, err
		})
	return nil
}

// show puts candidate i's simulations beside the micrographs.
func (mp *matchPanel) show(i int) {
	if i < 0 || i >= len(mp.ranked) {
		return
	}
	mp.picked = i
	mp.accept.Enable()
	mp.images.RemoveAll()
	r := mp.ranked[i]
	for j, c := range r.Cells {
		if j >= len(mp.series) {
			break
		}
		mic := canvas.NewImageFromImage(match.Picture(mp.series[j].m.Raster, false))
		sim := canvas.NewImageFromImage(match.Picture(c.Simulated, true))
		for _, im := range []*canvas.Image{mic, sim} {
			im.FillMode = canvas.ImageFillContain
			im.ScaleMode = canvas.ImageScalePixels
			im.SetMinSize(fyne.NewSize(150, 150))
		}
		text := fmt.Sprintf("r = %.3f", c.Score)
		if !math.IsNaN(c.GDotB) {
			text += fmt.Sprintf(", g·b = %.3g", c.GDotB)
		}
		if c.Flat {
			text += " (no contrast)"
		}
		mp.images.Add(container.NewBorder(nil, widget.NewLabel(mp.series[j].m.Name), nil, nil, mic))
		mp.images.Add(container.NewBorder(nil, widget.NewLabel(text), nil, nil, sim))
	}
	mp.images.Refresh()
}

// acceptPicked writes the picked candidate into the scene.
func (mp *matchPanel) acceptPicked() {
	if mp.picked < 0 || mp.picked >= len(mp.ranked) {
		return
	}
	c := mp.ranked[mp.picked].Candidate
	if err := mp.ws.ctrl.Set(scene.Edit{Path: c.Path, Value: c.Value}); err != nil {
		setError(mp.errl, oneLine(err.Error()))
		return
	}
	mp.status.SetText(fmt.Sprintf("%s set to %s", c.Path, c.Label))
}

// fit adjusts thickness, s and the defect's depth to the open micrograph.
func (mp *matchPanel) fit(kind match.Kind, defect *int) error {
	m := mp.ws.micro
	if m == nil {
		return fmt.Errorf("no micrograph is open: open one in the Micrograph tab first")
	}
	sc := mp.ws.ctrl.Scene()
	if sc == nil || mp.ws.ctrl.Setup() == nil {
		return fmt.Errorf("the scene does not build; mend it first")
	}
	k := 0
	if defect != nil {
		k = *defect
	}
	base, err := scene.Marshal(sc)
	if err != nil {
		return err
	}
	start, err := scene.Parse(base)
	if err != nil {
		return err
	}
	mic := &match.Micrograph{Name: m.Name, Raster: match.FromFloat32(m.img.Width, m.img.Height, m.img.Pix, m.NmPerPx), GAngleDeg: m.GAngleDeg, Kind: kind}
	dir := mp.ws.ctrl.Dir()
	post := mp.ws.ctrl.Post
	mp.start("fitting", func(ctx context.Context, _ func(done, total int)) (func(), error) {
		fr, err := match.Fit(ctx, start, dir, mic, match.FitOptions{Defect: k, Progress: func(msg string) {
			post(func() { mp.status.SetText(msg) })
		}})
		return func() {
			mp.fitted, mp.fitDef = fr, k
			mp.acceptF.Enable()
			mp.status.SetText(fmt.Sprintf("fitted: thickness %.1f ± %.1f nm, s = %.4f ± %.4f /nm, depth %.1f ± %.1f nm, score %.3f (errors from the %s)",
				fr.ThicknessNm.Value, fr.ThicknessNm.Error, fr.SPerNm.Value, fr.SPerNm.Error, fr.AtNm[2].Value, fr.AtNm[2].Error, fr.Score, fr.ErrorMethod))
		}, err
	})
	return nil
}

// acceptFit writes the fitted values into the scene, as one edit.
func (mp *matchPanel) acceptFit() {
	fr := mp.fitted
	if fr == nil {
		return
	}
	err := mp.ws.ctrl.Set(
		scene.Edit{Path: "foil.thickness_nm", Value: fr.ThicknessNm.Value},
		scene.Edit{Path: "diffraction.s_per_nm", Value: fr.SPerNm.Value},
		scene.Edit{Path: fmt.Sprintf("defects[%d].at_nm", mp.fitDef), Value: []float64{fr.AtNm[0].Value, fr.AtNm[1].Value, fr.AtNm[2].Value}},
	)
	if err != nil {
		setError(mp.errl, oneLine(err.Error()))
		return
	}
	mp.status.SetText("fitted thickness, s and position set in the scene")
}
