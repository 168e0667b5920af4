package ui

import (
	"reflect"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
)

// Fields valid only together change one at a time: the pixel count that
// makes pixels non-square is refused (shown under the field, the scene
// unchanged) and kept, and goes in with the field of view that makes the
// pixels square again.
func TestBinderFieldsTogether(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	im := ws.ctrl.Scene().Image
	if im.WidthNm != im.HeightNm || im.Pixels[0] != im.Pixels[1] {
		t.Fatalf("test scene image %+v: want a square one", im)
	}
	nx := 2 * im.Pixels[0]
	test.Type(clearEntry(ws.params.NX), itoa(nx))
	if got := ws.ctrl.Scene().Image.Pixels; got[0] != im.Pixels[0] {
		t.Fatalf("non-square pixels taken: %v", got)
	}
	if l := ws.board.labels["image.pixels"]; !l.Visible() || !strings.Contains(l.Text, "square") {
		t.Errorf("under the pixels: %q", l.Text)
	}
	test.Type(clearEntry(ws.params.Width), formatNumber(2*im.WidthNm))
	got := ws.ctrl.Scene().Image
	if got.Pixels[0] != nx || got.WidthNm != 2*im.WidthNm {
		t.Errorf("after the width: %+v, want %d pixels over %g nm", got, nx, 2*im.WidthNm)
	}
	if l := ws.board.labels["image.pixels"]; l.Visible() {
		t.Errorf("error still under the pixels: %q", l.Text)
	}
	if ws.ctrl.Err() != nil {
		t.Errorf("scene does not build: %v", ws.ctrl.Err())
	}
}

// The fault's form is made from its description: it has the optional
// bounding edge and strip, and filling both bounds the fault.
func TestFaultFormBounds(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	dp := ws.defects
	dp.AddType.SetSelected("fault")
	dp.Add.OnTapped()
	k := len(ws.ctrl.Scene().Defects) - 1
	labels := formLabels(dp.Form)
	for _, want := range []string{"Fault plane (hkl)", "Fault vector from", "Kind", "Position", "Bounded along [uvw]", "Strip from, to"} {
		if !labels[want] {
			t.Errorf("fault form lacks %q (has %v)", want, labels)
		}
	}
	// Type the edge [1 -1 0] (in the (1 1 1) plane), then the strip.
	entries := formEntries(dp.Form)
	var edgeE, stripE *widget.Entry
	for _, e := range entries {
		switch {
		case e.PlaceHolder == "from to, e.g. -40 40":
			stripE = e
		case e.Text == "" && edgeE == nil && e.PlaceHolder == "":
			edgeE = e
		}
	}
	if edgeE == nil || stripE == nil {
		t.Fatalf("no edge or strip entry")
	}
	test.Type(edgeE, "1 -1 0")
	if d := ws.ctrl.Scene().Defects[k]; d.Edge != nil {
		t.Errorf("edge taken without bounds: %+v", d)
	}
	test.Type(stripE, "-30 30")
	d := ws.ctrl.Scene().Defects[k]
	if !reflect.DeepEqual(d.Edge, []float64{1, -1, 0}) || !reflect.DeepEqual(d.BoundsNm, []float64{-30, 30}) {
		t.Errorf("bounded fault: edge %v bounds %v", d.Edge, d.BoundsNm)
	}
	if ws.ctrl.Err() != nil {
		t.Errorf("bounded fault does not build: %v", ws.ctrl.Err())
	}
}

func formLabels(o fyne.CanvasObject) map[string]bool {
	out := map[string]bool{}
	walkObjects(o, func(o fyne.CanvasObject) {
		if l, ok := o.(*widget.Label); ok {
			out[l.Text] = true
		}
	})
	return out
}

func formEntries(o fyne.CanvasObject) []*widget.Entry {
	var out []*widget.Entry
	walkObjects(o, func(o fyne.CanvasObject) {
		if e, ok := o.(*widget.Entry); ok {
			out = append(out, e)
		}
	})
	return out
}

func walkObjects(o fyne.CanvasObject, f func(fyne.CanvasObject)) {
	f(o)
	if c, ok := o.(*fyne.Container); ok {
		for _, x := range c.Objects {
			walkObjects(x, f)
		}
	}
}
