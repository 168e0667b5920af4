// Package assets holds the files built into the programs: the demo scene
// and the icon. Every scene here is invented.
package assets

import _ "embed"

// DemoScene is the built-in demo: a foil of a made-up low-stacking-fault-
// energy nickel alloy (20 mJ/m²), imaged in g = 200 near [011] at 200 kV:
// a dislocation split into Shockley partials with its faulted ribbon
// inclined through the foil, a small coherent precipitate with a negative
// misfit, and a perfect mixed dislocation.
//
//go:embed demo.json
var DemoScene []byte

// Icon is the program's icon: a dark-field image of a stacking fault and a
// small precipitate, simulated by Faultline itself.
//
//go:embed icon.png
var Icon []byte

// DemoMicrograph is an invented 16-bit bright-field micrograph for trying
// the micrograph view: the demo scene simulated at s = 0.006 /nm with g
// pointing 30° above the horizontal, 1.25 nm per pixel, blurred and with
// shot noise (made by assets/internal/mkmicrograph).
//
//go:embed demo_micrograph.png
var DemoMicrograph []byte
