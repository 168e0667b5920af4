package figure

import (
	"image"
	"image/color"
	"math"
	"testing"
)

// sine is a curve over 0..100 nm between lo and hi.
func sine(lo, hi float64) (x, y []float64) {
	for k := 0; k <= 200; k++ {
		t := float64(k) / 2
		x = append(x, t)
		y = append(y, lo+(hi-lo)*(0.5+0.5*math.Sin(t/8)))
	}
	return x, y
}

func TestPlotYRange(t *testing.T) {
	x, y := sine(0.412, 0.587)
	y[0], y[1] = 0.412, 0.587
	flat := make([]float64, len(x))
	for k := range flat {
		flat[k] = 0.5 + 1e-16*float64(k%3) // rounding noise only
	}
	for _, c := range []struct {
		name   string
		p      Plot
		lo, hi float64
	}{
		// The data's range, 5 % added at each end.
		{"data", Plot{Series: []Series{{Name: "BF", X: x, Y: y}}}, 0.412 - 0.05*0.175, 0.587 + 0.05*0.175},
		{"unit", Plot{Y: YUnit, Series: []Series{{Name: "BF", X: x, Y: y}}}, 0, 1},
		// Flatter than ContrastFloor: a 1e-3 window about the middle.
		{"flat", Plot{Series: []Series{{Name: "BF", X: x, Y: flat}}}, 0.5 - 0.55e-3, 0.5 + 0.55e-3},
	} {
		lo, hi := c.p.YRange()
		if math.Abs(lo-c.lo) > 1e-9 || math.Abs(hi-c.hi) > 1e-9 {
			t.Errorf("%s: y range %g–%g, want %g–%g", c.name, lo, hi, c.lo, c.hi)
		}
	}
}

// inkBox is the bounding box of pixels of colour col (within a tolerance
// for antialiasing) in img.
func inkBox(img *image.RGBA, col color.NRGBA) image.Rectangle {
	var r image.Rectangle
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			c := img.RGBAAt(x, y)
			if absDiff(c.R, col.R) < 12 && absDiff(c.G, col.G) < 12 && absDiff(c.B, col.B) < 12 {
				r = r.Union(image.Rect(x, y, x+1, y+1))
			}
		}
	}
	return r
}

func absDiff(a, b uint8) int {
	if a > b {
		return int(a - b)
	}
	return int(b - a)
}

// The legend stands beside the axes: the legend's swatch of the second
// curve lies right of every pixel the curve itself inks, and the curve
// fills the plot's height (scaled to the data).
func TestPlotLegendBesideCurves(t *testing.T) {
	x, y := sine(0.2, 0.9)
	_, y2 := sine(0.1, 0.3)
	orange := PlotColours[2].(color.NRGBA)
	p := Plot{XLabel: "distance (nm)", YLabel: "intensity", Series: []Series{
		{Name: "BF", X: x, Y: y},
		{Name: "DF", X: x, Y: y2},
		{Name: "micrograph", X: x, Y: y2, Colour: orange},
	}}
	img, err := p.Image(600, 240, 96)
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() != 600 || img.Bounds().Dy() != 240 {
		t.Fatalf("size %v", img.Bounds())
	}
	// The orange curve and its legend swatch: the swatch is the rightmost
	// orange, separated by a gap from the curve's right end.
	box := inkBox(img, orange)
	if box.Empty() {
		t.Fatal("no orange ink")
	}
	var cols []int
	for xx := box.Min.X; xx < box.Max.X; xx++ {
		if !inkBox(img.SubImage(image.Rect(xx, 0, xx+1, 240)).(*image.RGBA), orange).Empty() {
			cols = append(cols, xx)
		}
	}
	gap := 0
	for k := 1; k < len(cols); k++ {
		gap = max(gap, cols[k]-cols[k-1])
	}
	if gap < 10 {
		t.Errorf("the legend swatch touches the curve (largest gap between orange columns %d px)", gap)
	}
}

func TestPlotErrors(t *testing.T) {
	if _, err := (Plot{}).Image(100, 100, 96); err == nil {
		t.Error("a plot without series drew")
	}
	if _, err := (Plot{Series: []Series{{X: []float64{1, 2}, Y: []float64{1}}}}).Image(100, 100, 96); err == nil {
		t.Error("a series with unequal x and y drew")
	}
	if _, err := (Plot{Series: []Series{{X: []float64{1, 2}, Y: []float64{1, 2}}}}).Image(0, 100, 96); err == nil {
		t.Error("a zero-width plot drew")
	}
}

// A NaN breaks a curve instead of failing the plot.
func TestPlotGaps(t *testing.T) {
	x, y := sine(0.2, 0.9)
	y[50] = math.NaN()
	if _, err := (Plot{Series: []Series{{Name: "m", X: x, Y: y}}}).Image(300, 200, 96); err != nil {
		t.Fatal(err)
	}
	if got := len(segments(x, y)); got != 2 {
		t.Errorf("%d segments, want 2", got)
	}
}

// NiceStep against the 1-2-5 series (common practice for axis ticks).
func TestNiceStep(t *testing.T) {
	for _, c := range [][2]float64{{0.7, 1}, {1, 1}, {1.2, 2}, {3, 5}, {0.013, 0.02}, {60, 100}, {0.05, 0.05}} {
		if got := NiceStep(c[0]); math.Abs(got-c[1]) > 1e-12*c[1] {
			t.Errorf("NiceStep(%g) = %g, want %g", c[0], got, c[1])
		}
	}
}

// The frame Framed returns says where the data lie: a vertical orange
// segment at x = 30 and y from 0.2 to 0.8 is inked where the frame puts
// those values (measured on the drawn pixels, within 1.5 px for the
// line's width and antialiasing), and XAt inverts PixelX.
func TestPlotFrame(t *testing.T) {
	x, y := sine(0.1, 0.9)
	orange := PlotColours[2].(color.NRGBA)
	p := Plot{Title: "frame", XLabel: "thickness (nm)", YLabel: "intensity", Y: YUnit, Series: []Series{
		{Name: "BF", X: x, Y: y},
		{X: []float64{30, 30}, Y: []float64{0.2, 0.8}, Colour: orange},
	}}
	img, f, err := p.Framed(640, 300, 96)
	if err != nil {
		t.Fatal(err)
	}
	if f.XMin != 0 || f.XMax != 100 || f.YMin != 0 || f.YMax != 1 {
		t.Fatalf("frame ranges x %g–%g y %g–%g, want 0–100 and 0–1", f.XMin, f.XMax, f.YMin, f.YMax)
	}
	box := inkBox(img, orange)
	if box.Empty() {
		t.Fatal("no orange ink")
	}
	mid := float64(box.Min.X+box.Max.X) / 2
	if want := f.PixelX(30); math.Abs(mid-want) > 1.5 {
		t.Errorf("segment at x = 30 inked about column %.1f, frame says %.1f", mid, want)
	}
	yAt := func(v float64) float64 { return f.Bottom - (v-f.YMin)/(f.YMax-f.YMin)*(f.Bottom-f.Top) }
	if top, bot := float64(box.Min.Y), float64(box.Max.Y); math.Abs(top-yAt(0.8)) > 1.5 || math.Abs(bot-yAt(0.2)) > 1.5 {
		t.Errorf("segment inked rows %v–%v, frame says %.1f–%.1f", top, bot, yAt(0.8), yAt(0.2))
	}
	if v, ok := f.XAt(f.PixelX(42)); !ok || math.Abs(v-42) > 1e-9 {
		t.Errorf("XAt(PixelX(42)) = %g, %v", v, ok)
	}
	if _, ok := f.XAt(f.Left - 5); ok {
		t.Error("a column left of the data area counted as inside it")
	}
}

// The tick at zero of an axis spanning it reads "0", not "-0".
func TestTicksNoNegativeZero(t *testing.T) {
	for _, r := range [][2]float64{{-0.08, 0.08}, {-0.0771, 0.0771}, {-3, 1}} {
		for _, tk := range (niceTicks{}).Ticks(r[0], r[1]) {
			if tk.Label == "-0" {
				t.Errorf("axis %g–%g labels a tick -0", r[0], r[1])
			}
		}
	}
}
