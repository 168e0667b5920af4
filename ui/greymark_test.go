package ui

import (
	"strings"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// The panels say how their grey relates to intensity, as the figure's
// caption does: a uniform render (the fake renderer's BF 1, DF 0) is
// marked as having no contrast; a render with contrast shows the range
// the stretch maps; the fixed mapping needs no mark.
func TestPanelsMarkTheirGreyRange(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	v := ws.view
	for _, p := range []*imagePanel{v.BF, v.DF} {
		if !p.warn || !strings.Contains(p.grey, "no contrast") {
			t.Errorf("%s of a uniform render: mark %q (warn %v), want a no-contrast mark", p.title, p.grey, p.warn)
		}
	}
	g := sim.Grid{NX: 8, NY: 8, WidthNm: 200, HeightNm: 200}
	bf, df := make([]float64, 64), make([]float64, 64)
	for k := range bf {
		bf[k] = 0.4 + 0.2*float64(k%8)/7
		df[k] = 0.1
	}
	v.show(&Result{Setup: ws.ctrl.LastFull().Setup, Image: &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{bf, df}}})
	if v.BF.warn || v.BF.grey != "stretched over 0.400–0.600" {
		t.Errorf("BF mark %q (warn %v), want the stretched range 0.400–0.600", v.BF.grey, v.BF.warn)
	}
	if !v.DF.warn {
		t.Errorf("uniform DF not marked: %q", v.DF.grey)
	}
	v.Grey.SetSelected(greyChoices[2].name) // fixed
	if v.BF.grey != "" || v.DF.grey != "" || v.DF.warn {
		t.Errorf("fixed mapping: marks %q, %q", v.BF.grey, v.DF.grey)
	}
}

// A refused value is named in the status line by the label the window
// shows and by the scene file's path.
func TestStatusNamesTheField(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	if err := ws.ctrl.Set(scene.Edit{Path: "diffraction.extinction_nm", Value: -5.0}); err == nil {
		t.Fatal("negative ξg accepted")
	}
	if got := ws.status.Message.Text; !strings.Contains(got, "ξg override (diffraction.extinction_nm): ") {
		t.Errorf("status %q does not name the field as the window does", got)
	}
}
