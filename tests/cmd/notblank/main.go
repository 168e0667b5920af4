// Command notblank exits 0 when a PNG shows something: fully opaque pixels
// whose grey levels vary. It checks the desktop program's window capture.
package main

import (
	"fmt"
	"image"
	_ "image/png"
	"math"
	"os"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: notblank FILE.png")
		os.Exit(2)
	}
	if err := check(os.Args[1]); err != nil {
		fmt.Fprintln(os.Stderr, "error:", err)
		os.Exit(1)
	}
}

func check(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	img, _, err := image.Decode(f)
	if err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	b := img.Bounds()
	if b.Dx() < 1400 || b.Dy() < 900 {
		return fmt.Errorf("%s: %d×%d, smaller than 1400×900", path, b.Dx(), b.Dy())
	}
	var n, opaque float64
	var sum, sum2 float64
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, a := img.At(x, y).RGBA()
			n++
			if a == 0xffff {
				opaque++
			}
			v := float64(r+g+bl) / 3 / 0xffff
			sum += v
			sum2 += v * v
		}
	}
	mean := sum / n
	sd := math.Sqrt(math.Max(0, sum2/n-mean*mean))
	if opaque/n < 0.99 {
		return fmt.Errorf("%s: only %.0f%% of pixels are opaque", path, 100*opaque/n)
	}
	if sd < 0.02 {
		return fmt.Errorf("%s: nearly uniform (standard deviation %.4f)", path, sd)
	}
	fmt.Printf("%s: %d×%d, mean grey %.3f, standard deviation %.3f: not blank\n", path, b.Dx(), b.Dy(), mean, sd)
	return nil
}
