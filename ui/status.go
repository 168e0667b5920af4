package ui

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// statusLine is the bottom line of the window: render progress, how long
// the last renders took, and the error that stops the render, if any;
// above it, the reading a microscopist would make of every defect under
// the current g and s (scene.Setup.ReadingLines, the same text `faultline
// render` prints).
type statusLine struct {
	Progress *widget.ProgressBar
	Timing   *widget.Label
	Message  *widget.Label
	Readings *widget.Label
	box      *container.Scroll // holds Readings

	preview time.Duration // latency of the last preview
}

// readingLines is the height of the readings box, in lines of text.
const readingLines = 3

const (
	startText = "Starting…"
	staleText = "Images show the last scene that rendered."
)

// statusPanel returns the status line.
func statusPanel(ws *Workspace) fyne.CanvasObject {
	s := &statusLine{Progress: widget.NewProgressBar(), Timing: widget.NewLabel(startText), Message: widget.NewLabel(""), Readings: widget.NewLabel("")}
	s.Readings.Wrapping = fyne.TextWrapWord
	// The readings scroll in a box of readingLines lines, so that adding a
	// defect does not shrink the images above.
	readings := container.NewVScroll(s.Readings)
	lineH := fyne.MeasureText("Mg", theme.TextSize(), fyne.TextStyle{}).Height + theme.LineSpacing()
	readings.SetMinSize(fyne.NewSize(0, readingLines*lineH+2*theme.InnerPadding()))
	readings.Hide()
	s.box = readings
	ws.status = s
	s.Progress.Min, s.Progress.Max = 0, 1
	s.Progress.TextFormatter = func() string { return fmt.Sprintf("%.0f %%", 100*s.Progress.Value) }
	s.Message.Truncation = fyne.TextTruncateEllipsis

	c := ws.ctrl
	c.OnBuilt(func(st *scene.Setup, err error) {
		if err != nil {
			msg := err.Error()
			var fe *scene.FieldError
			if errors.As(err, &fe) && fe.Path != "" {
				name := fe.Path
				if ws.board != nil {
					name = ws.board.describe(fe.Path)
				}
				msg = name + ": " + fe.Msg
			}
			s.Message.Importance = widget.DangerImportance
			s.Message.SetText("Not rendered: " + msg)
			s.Progress.SetValue(0)
			s.Timing.SetText(staleText)
			s.Readings.SetText("")
			s.box.Hide()
			return
		}
		if lines := st.ReadingLines(); len(lines) > 0 {
			s.Readings.SetText(strings.Join(lines, "\n"))
			s.box.Show()
		} else {
			s.Readings.SetText("")
			s.box.Hide()
		}
		// Warnings about the conditions (other beams excited, an opaque
		// foil, defects that cannot show, residual contrast): notes, not
		// refusals.
		if ws := st.Warnings; len(ws) > 0 {
			s.Message.Importance = widget.WarningImportance
			s.Message.SetText("Note: " + strings.Join(ws, " · "))
		} else {
			s.Message.Importance = widget.MediumImportance
			s.Message.SetText("")
		}
		s.Progress.SetValue(0)
		if s.Timing.Text == staleText || s.Timing.Text == startText {
			s.Timing.SetText("Rendering…")
		}
	})
	c.OnProgress(func(done, total int) { s.Progress.SetValue(float64(done) / float64(total)) })
	c.OnResult(func(r *Result) {
		g := r.Image.Grid
		if r.Preview {
			s.preview = r.Latency
			s.Timing.SetText(fmt.Sprintf("Preview %d × %d shown %s after the change; full render running…", g.NX, g.NY, ms(r.Latency)))
			return
		}
		s.Progress.SetValue(1)
		text := fullText(r)
		if s.preview > 0 {
			text += fmt.Sprintf("   (preview after %s)", ms(s.preview))
		}
		s.Timing.SetText(text + tableNote(c))
		s.preview = 0
	})
	c.OnTable(func() {
		if r := c.LastFull(); r != nil && r.Gen == c.Gen() && !c.Rendering() {
			s.Timing.SetText(fullText(r) + tableNote(c))
		}
	})
	c.OnFailed(func(err error) {
		s.Message.Importance = widget.DangerImportance
		s.Message.SetText("Render failed: " + err.Error())
	})
	bar := container.NewGridWrap(fyne.NewSize(160, s.Progress.MinSize().Height), s.Progress)
	line := container.NewBorder(nil, nil, container.NewHBox(bar, s.Timing), nil, s.Message)
	return container.NewVBox(readings, line)
}

// fullText says how a full-resolution image was made and how long it
// took: rendered, replayed from the field samples, or evaluated from the
// s table (with the table's range and estimated error).
func fullText(r *Result) string {
	g := r.Image.Grid
	switch r.Source {
	case SourceReplay:
		return fmt.Sprintf("Full image %d × %d replayed from the field samples: %s", g.NX, g.NY, ms(r.Elapsed))
	case SourceTable:
		lo, hi := r.Table.Range()
		return fmt.Sprintf("Full image %d × %d from the s table (s %.4f to %.4f /nm, series error estimated at %.0e): %s",
			g.NX, g.NY, lo, hi, r.Table.ErrorEstimate(), ms(r.Elapsed))
	}
	return fmt.Sprintf("Full render %d × %d: %s", g.NX, g.NY, ms(r.Elapsed))
}

// tableNote says what became of the s table after a change of s alone:
// being built, built (its range and cost), or why there is none.
func tableNote(c *Controller) string {
	t, building, err := c.STable()
	switch {
	case building:
		return " · building the s table for the next s moves…"
	case err != nil:
		return " · no s table (" + err.Error() + "); s moves are replayed"
	case t != nil:
		lo, hi := t.Range()
		return fmt.Sprintf(" · s table ready for s %.4f to %.4f /nm (%d replays, %s)", lo, hi, t.Replays(), ms(c.STableBuildTime()))
	}
	return ""
}

// ms writes a duration in milliseconds, or seconds from 10 s on.
func ms(d time.Duration) string {
	if d >= 10*time.Second {
		return fmt.Sprintf("%.1f s", d.Seconds())
	}
	return fmt.Sprintf("%d ms", d.Milliseconds())
}
