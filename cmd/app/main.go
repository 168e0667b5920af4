// Command app is the Faultline desktop program: a window in which the
// conditions and defects of a scene are changed while its simulated
// bright- and dark-field images update.
//
//	app [--scene FILE] [--screenshot OUT.png]
//
// Without --scene it opens the built-in demo scene. With --screenshot it
// writes a capture of the window once the first full render is shown and
// exits (0 on success, 2 for a scene that does not load or build).
package main

import (
	"flag"
	"fmt"
	"os"

	_ "faultline/cmd/app/internal/clocale" // before Fyne reads the locale
	"faultline/ui"
)

func main() {
	fs := flag.NewFlagSet("app", flag.ContinueOnError)
	scenePath := fs.String("scene", "", "scene file to open (default: the built-in demo)")
	shot := fs.String("screenshot", "", "write a PNG capture of the window after the first full render, then exit")
	if err := fs.Parse(os.Args[1:]); err != nil {
		os.Exit(ui.ExitBadInput)
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(os.Stderr, "error: unexpected argument %q (give the scene with --scene)\n", fs.Arg(0))
		os.Exit(ui.ExitBadInput)
	}
	os.Exit(ui.Run(ui.Options{ScenePath: *scenePath, Screenshot: *shot}))
}
