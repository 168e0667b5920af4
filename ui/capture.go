package ui

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/software"

	"faultline/figure"
	"faultline/scene"
)

// settle is how long the capture waits after the first full render, so the
// panels and the profile have taken it up.
const settle = 300 * time.Millisecond

// Capture draws the window content with Fyne's software painter at the
// window's size (at least WindowSize). Under a virtual X server the GL
// window's own capture comes back empty, while the same content on a
// software canvas draws as it appears on the screen.
func (ws *Workspace) Capture() image.Image {
	size := WindowSize
	if ws.win != nil {
		size = size.Max(ws.win.Canvas().Size())
	}
	c := software.NewCanvas()
	c.SetContent(ws.content)
	c.Resize(size)
	return c.Capture()
}

// minCaptureStdDev is the least spread of grey levels a capture of the
// window with its images has; a one-colour (blank) capture has 0, the demo
// window about 0.3.
const minCaptureStdDev = 0.05

// GreyStdDev is the standard deviation of an image's luminance as a
// fraction of full scale (what ImageMagick reports as
// %[fx:standard_deviation] for a grey image).
func GreyStdDev(img image.Image) float64 {
	b := img.Bounds()
	var s, s2, n float64
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			g := float64(color.GrayModel.Convert(img.At(x, y)).(color.Gray).Y) / 255
			s += g
			s2 += g * g
			n++
		}
	}
	m := s / n
	return math.Sqrt(math.Max(0, s2/n-m*m))
}

// captureAfterFirstRender writes the capture to out once the first full
// render is on screen and calls done with the exit status (and the error
// to report, if any). A scene that stops rendering, or a render that does
// not finish within timeout, ends it with an error.
func (ws *Workspace) captureAfterFirstRender(out string, timeout time.Duration, done func(code int, err error)) {
	if timeout <= 0 {
		timeout = 2 * time.Minute
	}
	finished := false
	finish := func(code int, err error) {
		if finished {
			return
		}
		finished = true
		done(code, err)
	}
	ws.ctrl.OnResult(func(r *Result) {
		if r.Preview || finished {
			return
		}
		time.AfterFunc(settle, func() {
			fyne.Do(func() {
				if finished {
					return
				}
				img := ws.Capture()
				if sd := GreyStdDev(img); sd < minCaptureStdDev {
					finish(ExitInternal, fmt.Errorf("screenshot: the capture looks blank (grey standard deviation %.3f)", sd))
					return
				}
				if err := figure.WritePNG(out, img, map[string]string{"Software": "Faultline"}); err != nil {
					finish(ExitInternal, fmt.Errorf("screenshot: %w", err))
					return
				}
				finish(ExitOK, nil)
			})
		})
	})
	ws.ctrl.OnBuilt(func(_ *scene.Setup, err error) {
		if err != nil {
			finish(ExitBadInput, err)
		}
	})
	ws.ctrl.OnFailed(func(err error) { finish(ExitInternal, fmt.Errorf("render: %w", err)) })
	time.AfterFunc(timeout, func() {
		fyne.Do(func() {
			finish(ExitInternal, errors.New("screenshot: no full render within "+timeout.String()))
		})
	})
}
