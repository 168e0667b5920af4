package tests

import (
	"math"
	"testing"

	"faultline/assets"
	"faultline/export"
	"faultline/micrograph"
)

// The demo micrograph is the demo scene at s = 0.006 /nm seen with g at 30°
// counter-clockwise from the picture's x axis, 1.25 nm per pixel (the
// convention of the micrograph panel). Turned back into the simulation
// frame it matches the simulated bright field: a check of that geometry,
// which the micrograph view and later image matching rely on.
func TestDemoMicrographGeometry(t *testing.T) {
	mg, err := micrograph.DecodeBytes(assets.DemoMicrograph, micrograph.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if mg.Kind != "16-bit grey" || mg.Width != 240 || mg.Height != 240 {
		t.Fatalf("demo micrograph is %s %d×%d, want 16-bit grey 240×240", mg.Kind, mg.Width, mg.Height)
	}
	st := setup(t, string(assets.DemoScene))
	s := 0.006
	st.Scene.Diffraction.SPerNm = &s
	st.Scene.Image.Pixels = []int{100, 100}
	st = setup(t, mustMarshal(t, st))
	im := render(t, st)
	g := im.Grid
	corr := func(angleDeg float64) float64 {
		p := micrograph.Placement{NmPerPx: 1.25, GAngleDeg: angleDeg}
		var a, b []float64
		for j := 0; j < g.NY; j++ {
			for i := 0; i < g.NX; i++ {
				x, y := g.X(i), g.Y(j)
				v, ok := mg.ValueAt(p, x, y)
				if !ok {
					continue
				}
				a = append(a, export.Interpolate(im.BF(), g, x, y))
				b = append(b, float64(v))
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
