package figure

import (
	"bytes"
	"image"
	"image/color"
	"math"
	"strings"
	"testing"
)

// ramp returns an nx × ny grey image whose pixels are all distinguishable
// from their neighbours, so a misplaced or stretched panel shows up.
func ramp(nx, ny int) *image.Gray {
	img := image.NewGray(image.Rect(0, 0, nx, ny))
	for j := range ny {
		for i := range nx {
			img.Pix[j*img.Stride+i] = uint8(20 + (i*7+j*3)%200)
		}
	}
	return img
}

var demoCaption = Caption{
	G:     "g = 2 0 0",
	Lines: []string{"B = [0 0 1]   s = 0.000 /nm (w = 0.00)   t = 120 nm   200 kV   two-beam"},
}

func isBlack(c color.RGBA) bool { return c.R == 0 && c.G == 0 && c.B == 0 && c.A == 255 }
func isWhite(c color.RGBA) bool { return c.R == 255 && c.G == 255 && c.B == 255 }

// TestPairPanels checks the size of the figure and that each panel is the
// input image replicated scale × scale, inside a black frame.
func TestPairPanels(t *testing.T) {
	cases := []struct {
		nx, ny, scale, wantScale int
	}{
		{256, 200, 0, 2}, // auto: 2·256·2 = 1024 ≥ 800
		{64, 64, 0, 7},   // auto: the smallest s with 2·64·s ≥ 800
		{400, 300, 0, 1},
		{100, 50, 3, 3},
	}
	for _, c := range cases {
		bf, df := ramp(c.nx, c.ny), ramp(c.nx, c.ny)
		for k := range df.Pix {
			df.Pix[k] = 255 - df.Pix[k]
		}
		l := Layout{NmPerPx: 0.5, Scale: c.scale, Caption: true}
		fig, err := Pair(bf, df, demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		g, err := layout(c.nx, c.ny, []string{"BF", "DF"}, demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		if g.scale != c.wantScale {
			t.Errorf("%d×%d scale %d: chose %d, want %d", c.nx, c.ny, c.scale, g.scale, c.wantScale)
		}
		if fig.Bounds() != (image.Rectangle{Max: g.size}) {
			t.Errorf("figure %v, layout says %v", fig.Bounds(), g.size)
		}
		if c.scale == 0 && fig.Bounds().Dx() < MinWidthPx {
			t.Errorf("%d×%d: auto-scaled figure only %d px wide", c.nx, c.ny, fig.Bounds().Dx())
		}
		if !g.panels[0].Union(g.panels[1]).In(fig.Bounds()) || g.panels[0].Overlaps(g.panels[1]) {
			t.Errorf("panels %v %v in a %v figure", g.panels[0], g.panels[1], fig.Bounds())
		}
		s := g.scale
		for k, src := range []*image.Gray{bf, df} {
			p := g.panels[k]
			if p.Dx() != c.nx*s || p.Dy() != c.ny*s {
				t.Fatalf("panel %d is %v, want %d×%d", k, p.Size(), c.nx*s, c.ny*s)
			}
			for y := p.Min.Y; y < p.Max.Y; y++ {
				for x := p.Min.X; x < p.Max.X; x++ {
					want := src.GrayAt((x-p.Min.X)/s, (y-p.Min.Y)/s).Y
					if got := fig.RGBAAt(x, y); got.R != want || got.G != want || got.B != want {
						t.Fatalf("panel %d pixel (%d, %d) = %v, want grey %d", k, x, y, got, want)
					}
				}
			}
			for _, pt := range []image.Point{{p.Min.X - 1, p.Min.Y - 1}, {p.Max.X, p.Max.Y}, {p.Min.X - 1, p.Max.Y}} {
				if !isBlack(fig.RGBAAt(pt.X, pt.Y)) {
					t.Errorf("panel %d: frame pixel %v is %v", k, pt, fig.RGBAAt(pt.X, pt.Y))
				}
			}
		}
	}
}

// measureBar returns the length of the run of black pixels on row y that
// starts at x0, and whether the pixel before it is white.
func measureBar(fig *image.RGBA, x0, y int) (int, bool) {
	n := 0
	for x := x0; x < fig.Bounds().Max.X && isBlack(fig.RGBAAt(x, y)); x++ {
		n++
	}
	return n, isWhite(fig.RGBAAt(x0-1, y))
}

// TestPairScaleBar measures the drawn bar: its length in figure pixels must
// be its label length / NmPerPx × scale, to within the half pixel of
// rounding to whole pixels.
func TestPairScaleBar(t *testing.T) {
	cases := []struct {
		nx      int
		nmPerPx float64
		scale   int
		wantNm  float64 // ScaleBarNm of the field, from the rule
		label   string
	}{
		{256, 200.0 / 256, 0, 50, "50 nm"}, // 200 nm field
		{256, 1, 0, 50, "50 nm"},           // 256 nm field
		{128, 0.3, 2, 10, "10 nm"},         // 38.4 nm field
		{300, 10, 1, 1000, "1 µm"},         // 3 µm field
		{200, 0.0137, 0, 0.5, "0.5 nm"},    // 2.74 nm field
	}
	for _, c := range cases {
		l := Layout{NmPerPx: c.nmPerPx, Scale: c.scale}
		fig, err := Pair(ramp(c.nx, 80), ramp(c.nx, 80), demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		g, err := layout(c.nx, 80, []string{"BF", "DF"}, demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		if g.barNm != c.wantNm || g.barLabel != c.label {
			t.Errorf("nx %d at %v nm/px: bar %v nm %q, want %v nm %q", c.nx, c.nmPerPx, g.barNm, g.barLabel, c.wantNm, c.label)
		}
		ideal := c.wantNm / c.nmPerPx * float64(g.scale)
		for _, y := range []int{g.bar.Min.Y, (g.bar.Min.Y + g.bar.Max.Y) / 2, g.bar.Max.Y - 1} {
			n, clean := measureBar(fig, g.bar.Min.X, y)
			if math.Abs(float64(n)-ideal) > 0.5 || !clean {
				t.Errorf("nx %d at %v nm/px: drawn bar %d px on row %d, want %.2f (white before: %v)", c.nx, c.nmPerPx, n, y, ideal, clean)
			}
		}
		// The bar lies under the first panel, and something (the label) is
		// drawn to its right.
		if g.bar.Min.X != g.panels[0].Min.X || g.bar.Min.Y <= g.panels[0].Max.Y {
			t.Errorf("bar %v not under panel %v", g.bar, g.panels[0])
		}
		if !inked(fig, image.Rect(g.bar.Max.X+1, g.bar.Min.Y-20, g.arrowBox.Min.X, g.bar.Max.Y+20)) {
			t.Error("no bar label drawn")
		}
	}
}

// inked reports whether r holds a pixel that is not white.
func inked(fig *image.RGBA, r image.Rectangle) bool {
	r = r.Intersect(fig.Bounds())
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if !isWhite(fig.RGBAAt(x, y)) {
				return true
			}
		}
	}
	return false
}

// TestPairArrowDirection finds the darkness-weighted centroid of the arrow:
// the head carries more ink than the tail, so the centroid lies off the
// centre in the direction of g (counter-clockwise from right, y down).
func TestPairArrowDirection(t *testing.T) {
	for _, deg := range []float64{0, 30, 90, 135, 180, 270, -45} {
		l := Layout{NmPerPx: 1, GAngleDeg: deg}
		fig, err := Pair(ramp(256, 128), ramp(256, 128), demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		g, err := layout(256, 128, []string{"BF", "DF"}, demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		b := g.arrowBox
		var sx, sy, sw float64
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				w := 255 - float64(fig.RGBAAt(x, y).R)
				sx += w * (float64(x) + 0.5)
				sy += w * (float64(y) + 0.5)
				sw += w
			}
		}
		dx := sx/sw - (float64(b.Min.X)+float64(b.Max.X))/2
		dy := sy/sw - (float64(b.Min.Y)+float64(b.Max.Y))/2
		got := math.Atan2(-dy, dx) * 180 / math.Pi
		diff := math.Mod(got-deg+540, 360) - 180
		// 3° allows for the anti-aliased edges on the pixel grid.
		if math.Abs(diff) > 3 {
			t.Errorf("g at %v°: arrow drawn towards %.1f°", deg, got)
		}
	}
}

func TestPairDeterministic(t *testing.T) {
	l := Layout{NmPerPx: 0.8, GAngleDeg: 17, Caption: true}
	a, err := Pair(ramp(100, 90), ramp(100, 90), demoCaption, l)
	if err != nil {
		t.Fatal(err)
	}
	for range 3 {
		b, err := Pair(ramp(100, 90), ramp(100, 90), demoCaption, l)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Pix, b.Pix) {
			t.Fatal("same input gave different pixels")
		}
	}
}

// TestCaption checks that caption lines appear, wrap inside the margins,
// and go when Layout.Caption is off.
func TestCaption(t *testing.T) {
	long := Caption{G: "g = 1 1 1", Lines: []string{
		"B = [0 1 1]   s = 0.012 /nm (w = 0.50)   t = 85 nm   300 kV   systematic row, 7 beams   and a good deal more text so that it must wrap",
		"second line",
	}}
	l := Layout{NmPerPx: 1, Caption: true}
	g, err := layout(128, 128, []string{"BF", "DF"}, long, l)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.caption) < 3 {
		t.Fatalf("caption lines %q: the long line did not wrap", g.caption)
	}
	if strings.Join(strings.Fields(strings.Join(g.caption, " ")), " ") != strings.Join(strings.Fields(strings.Join(long.Lines, " ")), " ") {
		t.Errorf("wrapping lost or changed words: %q", g.caption)
	}
	fig, err := Pair(ramp(128, 128), ramp(128, 128), long, l)
	if err != nil {
		t.Fatal(err)
	}
	margin := g.panels[0].Min.X
	capArea := image.Rect(0, g.captionDots[0].Y-40, g.size.X, g.size.Y)
	if inked(fig, image.Rect(0, capArea.Min.Y, margin, capArea.Max.Y)) ||
		inked(fig, image.Rect(g.size.X-margin, capArea.Min.Y, g.size.X, capArea.Max.Y)) {
		t.Error("caption text runs into the margins")
	}
	if !inked(fig, image.Rect(margin, g.captionDots[len(g.captionDots)-1].Y-10, g.size.X, g.captionDots[len(g.captionDots)-1].Y)) {
		t.Error("last caption line not drawn")
	}
	l.Caption = false
	off, err := Pair(ramp(128, 128), ramp(128, 128), long, l)
	if err != nil {
		t.Fatal(err)
	}
	if off.Bounds().Dy() >= fig.Bounds().Dy() || off.Bounds().Dx() != fig.Bounds().Dx() {
		t.Errorf("without caption %v, with %v", off.Bounds(), fig.Bounds())
	}
}

func TestWrap(t *testing.T) {
	face := newFace(regularFont(), 20)
	cases := []struct {
		s     string
		width int
		want  []string
	}{
		{"short", 1000, []string{"short"}},
		{"", 100, []string{""}},
		{"aaa   bbb   ccc", textWidth(face, "aaa   bbb"), []string{"aaa   bbb", "ccc"}},
		{"aaa bbb ccc", 1, []string{"aaa", "bbb", "ccc"}},
	}
	for _, c := range cases {
		got := wrap(face, c.s, c.width)
		if strings.Join(got, "|") != strings.Join(c.want, "|") {
			t.Errorf("wrap(%q, %d) = %q, want %q", c.s, c.width, got, c.want)
		}
	}
}

func TestSingle(t *testing.T) {
	img := ramp(100, 60)
	fig, err := Single(img, "DF", demoCaption, Layout{NmPerPx: 2, GAngleDeg: 90})
	if err != nil {
		t.Fatal(err)
	}
	g, _ := layout(100, 60, []string{"DF"}, demoCaption, Layout{NmPerPx: 2, GAngleDeg: 90})
	if g.scale != 8 || fig.Bounds().Dx() < MinWidthPx || len(g.panels) != 1 {
		t.Errorf("scale %d, width %d, %d panels", g.scale, fig.Bounds().Dx(), len(g.panels))
	}
	if !inked(fig, image.Rect(0, 0, fig.Bounds().Dx(), g.panels[0].Min.Y-g.frame)) {
		t.Error("no label above the panel")
	}
	// Without a label there is no label row.
	bare, err := Single(img, "", demoCaption, Layout{NmPerPx: 2})
	if err != nil {
		t.Fatal(err)
	}
	if bare.Bounds().Dy() >= fig.Bounds().Dy() {
		t.Errorf("unlabelled figure %v not shorter than labelled %v", bare.Bounds(), fig.Bounds())
	}
}

func TestFigureErrors(t *testing.T) {
	a := ramp(64, 64)
	ok := Layout{NmPerPx: 1}
	cases := []struct {
		name string
		run  func() error
		want string
	}{
		{"nil bf", func() error { _, err := Pair(nil, a, demoCaption, ok); return err }, "bf"},
		{"nil df", func() error { _, err := Pair(a, nil, demoCaption, ok); return err }, "df"},
		{"empty", func() error { _, err := Single(image.NewGray(image.Rectangle{}), "x", demoCaption, ok); return err }, "empty"},
		{"sizes differ", func() error { _, err := Pair(a, ramp(64, 63), demoCaption, ok); return err }, "same size"},
		{"no pixel size", func() error { _, err := Pair(a, a, demoCaption, Layout{}); return err }, "Layout.NmPerPx"},
		{"negative pixel size", func() error { _, err := Single(a, "", demoCaption, Layout{NmPerPx: -1}); return err }, "Layout.NmPerPx"},
		{"NaN angle", func() error {
			_, err := Single(a, "", demoCaption, Layout{NmPerPx: 1, GAngleDeg: math.NaN()})
			return err
		}, "Layout.GAngleDeg"},
		{"negative scale", func() error { _, err := Single(a, "", demoCaption, Layout{NmPerPx: 1, Scale: -2}); return err }, "Layout.Scale"},
		{"huge scale", func() error { _, err := Pair(a, a, demoCaption, Layout{NmPerPx: 1, Scale: 200}); return err }, "Layout.Scale"},
		{"too small for marks", func() error { _, err := Single(ramp(4, 4), "", demoCaption, Layout{NmPerPx: 1, Scale: 1}); return err }, "Layout.Scale"},
	}
	for _, c := range cases {
		err := c.run()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one naming %s", c.name, err, c.want)
		}
	}
}

func TestGLabelParts(t *testing.T) {
	cases := [][3]string{
		{"g = 2 0 0", "g", " = 2 0 0"},
		{"g", "g", ""},
		{"g=111", "g", "=111"},
		{"200", "", "200"},
		{"gold", "", "gold"},
	}
	for _, c := range cases {
		if b, r := gLabelParts(c[0]); b != c[1] || r != c[2] {
			t.Errorf("gLabelParts(%q) = %q, %q", c[0], b, r)
		}
	}
}
