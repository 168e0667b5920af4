// Command mkmicrograph makes assets/demo_micrograph.png, the invented
// micrograph that ships with Faultline for trying the micrograph view: the
// demo scene simulated at a slightly different deviation, turned so that
// g points 30° above the horizontal, resampled at 1.25 nm per pixel, blurred
// and given shot noise, and stored as a 16-bit grey PNG. It is a made-up
// image, not a measurement. Run from the repository root:
//
//	go run ./assets/internal/mkmicrograph
package main

import (
	"context"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/rand/v2"
	"os"

	"faultline/assets"
	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

const (
	outPath   = "assets/demo_micrograph.png"
	nmPerPx   = 1.25
	sizePx    = 240
	gAngleDeg = 30  // direction of g in the picture, counter-clockwise from right
	electrons = 400 // mean counts per pixel for the full incident beam
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "error:", err)
		os.Exit(1)
	}
}

func run() error {
	sc, err := scene.Parse(assets.DemoScene)
	if err != nil {
		return err
	}
	s := 0.006
	sc.Diffraction.SPerNm = &s
	sc.Image.Pixels = []int{300, 300}
	blur := 1.5
	sc.Image.BlurNm = &blur
	st, err := scene.Build(sc, ".")
	if err != nil {
		return err
	}
	im, err := export.Render(context.Background(), st, sim.Options{})
	if err != nil {
		return err
	}
	bf := im.BF()
	g := im.Grid
	background := bf[0]
	rng := rand.New(rand.NewPCG(7, 11))
	out := image.NewGray16(image.Rect(0, 0, sizePx, sizePx))
	c, sn := math.Cos(gAngleDeg*math.Pi/180), math.Sin(gAngleDeg*math.Pi/180)
	for py := 0; py < sizePx; py++ {
		for px := 0; px < sizePx; px++ {
			// Picture coordinates (right, down) in nm about the centre,
			// turned into the simulation frame (x along g, y down).
			u := (float64(px) + 0.5 - sizePx/2) * nmPerPx
			v := (float64(py) + 0.5 - sizePx/2) * nmPerPx
			x := c*u - sn*v
			y := sn*u + c*v
			val := background
			if math.Abs(x) < g.WidthNm/2 && math.Abs(y) < g.HeightNm/2 {
				val = export.Interpolate(bf, g, x, y)
			}
			counts := poisson(rng, val*electrons)
			out.SetGray16(px, py, color.Gray16{Y: uint16(math.Min(65535, counts*65535/(0.7*electrons)))})
		}
	}
	f, err := os.Create(outPath)
	if err != nil {
		return err
	}
	if err := png.Encode(f, out); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// poisson draws a Poisson variate of mean m (normal approximation above 50).
func poisson(r *rand.Rand, m float64) float64 {
	if m > 50 {
		return math.Max(0, math.Round(m+math.Sqrt(m)*r.NormFloat64()))
	}
	l, k, p := math.Exp(-m), 0.0, 1.0
	for {
		p *= r.Float64()
		if p <= l {
			return k
		}
		k++
	}
}
