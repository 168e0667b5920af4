package ui

import (
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// sliderField is a slider with a typed entry beside it for one number of
// the scene at a path. Moving the slider writes the entry and sets the
// field;
// typing writes the slider (clamped to its range, while the typed value
// itself may lie outside it) and edits the scene.
type sliderField struct {
	Slider *widget.Slider
	Entry  *widget.Entry
	step   float64
}

func (b *binder) sliderField(path string, min, max, step float64, get func(sc *scene.Scene) (float64, bool)) *sliderField {
	f := &sliderField{Slider: widget.NewSlider(min, max), Entry: widget.NewEntry(), step: step}
	f.Slider.Step = step
	f.Slider.OnChanged = func(v float64) {
		if b.syncing > 0 {
			return
		}
		// Round to the step so the scene holds the number the entry shows.
		v = math.Round(v/step) * step
		text := formatStep(v, step)
		b.quiet(func() { f.Entry.SetText(text) })
		v, _ = parseNumber(text)
		b.set(path, v)
	}
	f.Entry.OnChanged = func(text string) {
		typed(b, path, text, parseNumber, func(v float64) {
			b.quiet(func() { f.Slider.SetValue(clamp(v, min, max)) })
			b.set(path, v)
		})
	}
	b.reader(func(sc *scene.Scene) {
		v, ok := get(sc)
		if !ok {
			return
		}
		f.Slider.SetValue(clamp(v, min, max))
		f.Entry.SetText(formatNumber(v))
	})
	return f
}

// object lays the slider out with the entry (and the unit) at its right.
func (f *sliderField) object(unitText string) fyne.CanvasObject {
	entry := container.NewGridWrap(fyne.NewSize(90, f.Entry.MinSize().Height), f.Entry)
	right := container.NewHBox(entry)
	if unitText != "" {
		right.Add(widget.NewLabel(unitText))
	}
	return container.NewBorder(nil, nil, nil, right, f.Slider)
}

func clamp(v, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, v)) }
