// Package ui is the desktop window of Faultline: the conditions of a scene
// on the left, the simulated bright-field and dark-field images in the
// middle with a line profile under them, a micrograph beside them for
// comparison, and a status line at the bottom.
//
// There is no physics here. A scene is edited as a scene.Scene, turned into
// a simulation by scene.Build, rendered by export.Render (the same function
// the command line uses) and drawn with the grey mappings of package
// figure. Figures, TIFFs and profiles are written by packages export and
// figure.
//
// The moving parts are split so that they can be tested without a display:
//
//   - Controller holds the scene, its file and saved state, and schedules
//     renders: each change builds the scene and, if it builds, starts a
//     coarse preview followed by the full render on a goroutine of its own.
//     A newer change cancels the render in flight through its context; if
//     that render is still on its preview (a few tens of milliseconds), the
//     change waits for it, so a slider dragged without pause shows a new
//     preview every preview time instead of none. A change of the
//     conditions alone (s, thickness, absorption) is instead replayed at
//     full resolution from the field samples the last full render recorded
//     (export.Record, export.Replay); after a change of s alone, a table of
//     the intensities as Chebyshev series in s over the range the samples
//     serve is built in the background (export.TabulateS, paused while
//     anything else renders, dropped by any change but s), and later
//     changes of s inside it are evaluated from it (export.FromTable).
//     Result.Source says which. Results come back to the UI goroutine
//     through Controller.Post (fyne.Do in the program).
//   - The panels (params.go, defects.go, imageview.go, profile.go,
//     micrograph.go, status.go) are functions that return a
//     fyne.CanvasObject wired to a Controller.
//   - window.go puts them in a window with menus and keyboard shortcuts;
//     capture.go writes the headless screenshot used by the checks.
package ui
