package ui

import (
	"math"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
)

// tapAtValue taps view v at the pixel where the plot puts x value x (the
// frame of the drawn plot, checked against the drawn ink in figure's
// tests), and returns one pixel's worth of x.
func tapAtValue(t *testing.T, v *plotView, x float64) float64 {
	t.Helper()
	f := v.frame
	px := f.PixelX(x)
	pos := fyne.NewPos(float32(px*float64(v.Size().Width)/float64(v.pxW)), v.Size().Height/2)
	test.TapAt(v, pos)
	// One pixel of the window (which may be several of the image).
	return (f.XMax - f.XMin) / (f.Right - f.Left) * float64(v.pxW) / float64(v.Size().Width)
}

// The Plan tab plans the scene off the UI goroutine with the plan
// package, shows the curves and the g·b table, and a tap on a curve sets
// the thickness or s the curve shows under the pointer.
func TestPlanPanelCurvesAndPick(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	pp := ws.plan
	pp.cands.SetText("1/2<110>")
	test.Tap(pp.run)
	p.until(t, 120*time.Second, "the plan", func() bool { return pp.result != nil || pp.errl.Text != "" })
	if pp.result == nil {
		t.Fatalf("plan failed: %s", pp.errl.Text)
	}
	res := pp.result
	if !pp.thick.Visible() || !pp.rocking.Visible() || !pp.thick.have || !pp.rocking.have {
		t.Fatal("the curves are not shown")
	}
	if len(res.Thickness.X) < 10 || pp.thick.frame.XMax < res.Thickness.X[len(res.Thickness.X)-1] {
		t.Errorf("thickness plot spans %g–%g nm for data to %g nm", pp.thick.frame.XMin, pp.thick.frame.XMax, res.Thickness.X[len(res.Thickness.X)-1])
	}
	if !strings.Contains(pp.table.Text, "g·b table") || !strings.Contains(pp.table.Text, "1/2[") {
		t.Errorf("g·b table:\n%s", pp.table.Text)
	}
	if !strings.Contains(pp.suggest.Text, "because") {
		t.Errorf("suggestions:\n%s", pp.suggest.Text)
	}

	// Tap the thickness curve where the plan has a point: the scene takes
	// that thickness, within a pixel's worth.
	pp.thick.Resize(fyne.NewSize(420, 260))
	want := res.Thickness.X[len(res.Thickness.X)*3/5]
	tol := tapAtValue(t, pp.thick, want)
	if got := ws.ctrl.Scene().Foil.ThicknessNm; math.Abs(got-want) > tol {
		t.Errorf("tap at t = %g nm set the thickness to %g nm (a pixel is %g nm)", want, got, tol)
	}
	if got := ws.ctrl.Scene().Foil.ThicknessNm; pp.thick.mark != got {
		t.Errorf("the thickness curve marks %g nm, the scene has %g nm", pp.thick.mark, got)
	}
	// And the rocking curve sets s.
	pp.rocking.Resize(fyne.NewSize(420, 260))
	wantS := res.Rocking.X[len(res.Rocking.X)/4]
	tolS := tapAtValue(t, pp.rocking, wantS)
	if s := ws.ctrl.Scene().Diffraction.SPerNm; s == nil || math.Abs(*s-wantS) > tolS {
		t.Errorf("tap at s = %g /nm set s to %v (a pixel is %g /nm)", wantS, s, tolS)
	}
	// The visibility curve (the test scene has a dislocation) also sets s.
	if !pp.vis.Visible() || !pp.weak.Visible() {
		t.Fatal("the visibility or weak-beam curve is not shown for a scene with a dislocation")
	}
	pp.vis.Resize(fyne.NewSize(420, 260))
	wantV := res.Visibility.SPerNm[len(res.Visibility.SPerNm)*2/3]
	tolV := tapAtValue(t, pp.vis, wantV)
	if s := ws.ctrl.Scene().Diffraction.SPerNm; s == nil || math.Abs(*s-wantV) > tolV {
		t.Errorf("tap at s = %g /nm on the visibility curve set s to %v (a pixel is %g /nm)", wantV, s, tolV)
	}
	// A tap left of the axes changes nothing.
	before := ws.ctrl.Scene().Foil.ThicknessNm
	test.TapAt(pp.thick, fyne.NewPos(2, 100))
	if got := ws.ctrl.Scene().Foil.ThicknessNm; got != before {
		t.Errorf("a tap outside the data area set the thickness to %g", got)
	}
	// A bad family says what is wrong.
	pp.cands.SetText("1/3<11-20>")
	test.Tap(pp.run)
	p.until(t, 120*time.Second, "the failed plan", func() bool { return pp.errl.Text != "" })
	if !strings.Contains(pp.errl.Text, "1/3<11-20>") {
		t.Errorf("error for a family the crystal lacks: %q", pp.errl.Text)
	}
}

// A plan can be cancelled; the panel says so.
func TestPlanPanelCancels(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	pp := ws.plan
	if err := pp.start(); err != nil {
		t.Fatal(err)
	}
	if pp.stop.Hidden || pp.run.Disabled() == false {
		t.Error("while planning, Cancel is hidden or the plan button enabled")
	}
	test.Tap(pp.stop)
	p.until(t, 30*time.Second, "the cancelled plan", func() bool { return strings.Contains(pp.status.Text, "cancelled") })
	if pp.result != nil || !pp.stop.Hidden || pp.run.Disabled() {
		t.Error("after cancelling: a result shown, Cancel still shown or the plan button disabled")
	}
}
