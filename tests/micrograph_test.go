package tests

import (
	"bytes"
	"image"
	"image/png"
	"math"
	"testing"

	"faultline/assets"
	"faultline/export"
)

// The demo micrograph is the demo scene at s = 0.006 /nm seen with g at 30°
// counter-clockwise from the picture's x axis, 1.25 nm per pixel (the
// convention of the micrograph panel). Turned back into the simulation
// frame it matches the simulated bright field: a check of that geometry,
// which the micrograph view and later image matching rely on.
func TestDemoMicrographGeometry(t *testing.T) {
	img, err := png.Decode(bytes.NewReader(assets.DemoMicrograph))
	if err != nil {
		t.Fatal(err)
	}
	gray, ok := img.(*image.Gray16)
	if !ok || gray.Bounds().Dx() != 240 {
		t.Fatalf("demo micrograph is %T %v, want 16-bit grey 240×240", img, img.Bounds())
	}
	st := setup(t, string(assets.DemoScene))
	s := 0.006
	st.Scene.Diffraction.SPerNm = &s
	st.Scene.Image.Pixels = []int{100, 100}
	st = setup(t, mustMarshal(t, st))
	im := render(t, st)
	g := im.Grid
	corr := func(angleDeg float64) float64 {
		c, sn := math.Cos(angleDeg*math.Pi/180), math.Sin(angleDeg*math.Pi/180)
		var a, b []float64
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				x, y := g.X(i), g.Y(j)
				u, v := c*x+sn*y, -sn*x+c*y // picture frame, nm
				px, py := int(math.Floor(u/1.25+120)), int(math.Floor(v/1.25+120))
				if px < 0 || py < 0 || px >= 240 || py >= 240 {
					continue
				}
				a = append(a, export.Interpolate(im.BF(), g, x, y))
				b = append(b, float64(gray.Gray16At(px, py).Y))
			}
		}
		return pearson(a, b)
	}
	right, wrong := corr(30), corr(-30)
	t.Logf("correlation with the simulation: g at +30°: %.3f, at −30°: %.3f", right, wrong)
	if right < 0.8 || wrong > right-0.2 {
		t.Errorf("micrograph geometry: correlation %.3f at +30°, %.3f at −30°", right, wrong)
	}
}

func pearson(a, b []float64) float64 {
	var ma, mb float64
	for i := range a {
		ma += a[i]
		mb += b[i]
	}
	ma /= float64(len(a))
	mb /= float64(len(b))
	var sab, saa, sbb float64
	for i := range a {
		sab += (a[i] - ma) * (b[i] - mb)
		saa += (a[i] - ma) * (a[i] - ma)
		sbb += (b[i] - mb) * (b[i] - mb)
	}
	return sab / math.Sqrt(saa*sbb)
}
