package ui

import (
	"image"
	"testing"

	"faultline/scene"
)

func coloured(img *image.RGBA, x, y int) bool {
	c := img.RGBAAt(x, y)
	return c.R == outlineColour.R && c.G == outlineColour.G && c.B == outlineColour.B
}

// The outlines land where the library's geometry puts them: a line along
// its segment, a circle on its radius and not at its centre.
func TestDrawOutlines(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 100, 100))
	at := func(x, y float64) (float64, float64) { return 50 + x, 50 + y } // 1 nm = 1 px
	drawOutlines(img, []scene.Outline{
		{Lines: [][]scene.Point{{{X: -40, Y: -30}, {X: 40, Y: -30}}}},
		{Circles: []scene.Circle{{Center: scene.Point{X: 10, Y: 20}, Radius: 15}}},
	}, at, 2)
	for _, p := range [][2]int{{10, 20}, {50, 20}, {89, 20}, {75, 70}, {60, 55}, {60, 85}} {
		if !coloured(img, p[0], p[1]) {
			t.Errorf("pixel %v not drawn", p)
		}
	}
	for _, p := range [][2]int{{60, 70}, {50, 50}, {5, 20}, {95, 20}, {50, 24}} {
		if coloured(img, p[0], p[1]) {
			t.Errorf("pixel %v drawn", p)
		}
	}
}

// The toggle is off by default, and the outlines of the built scene are
// at hand for it.
func TestOutlinesToggle(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	if ws.view.Outlines.Checked {
		t.Error("defects drawn over the images by default")
	}
	if len(ws.view.outlines) != 1 || len(ws.view.outlines[0].Lines) != 1 {
		t.Errorf("outlines of the test scene's dislocation: %+v", ws.view.outlines)
	}
}
