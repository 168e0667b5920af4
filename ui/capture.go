package ui

import (
	"errors"
	"fmt"
	"image"
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
