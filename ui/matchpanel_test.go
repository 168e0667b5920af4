package ui

import (
	"context"
	"strings"
	"testing"
	"time"

	"faultline/match"
	"faultline/micrograph"
	"faultline/scene"
)

// syntheticMicrograph simulates the workspace's current scene as a 32 × 32
// bright-field micrograph with g at the angle given.
func syntheticMicrograph(t *testing.T, ws *Workspace, angle float64) *micrographView {
	t.Helper()
	st := ws.ctrl.Setup()
	r, err := match.Simulate(context.Background(), st, match.View{W: 32, H: 32, NmPerPx: 2, GAngleDeg: angle}, match.BrightField, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	img := &micrograph.Image{Width: 32, Height: 32, Pix: make([]float32, len(r.Pix)), NmPerPx: 2, Format: "tiff", Kind: "32-bit float"}
	for k, v := range r.Pix {
		img.Pix[k] = float32(v)
	}
	m := newMicrographView("synthetic", img)
	m.GAngleDeg = angle
	return m
}

// The Match tab ranks candidates against the series built from the open
// micrograph and the scene's conditions, off the UI goroutine, and puts
// the chosen candidate into the scene through scene.Set.
func TestMatchPanelRanksAndAccepts(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	mp := ws.match
	// The scene's b is 1/2[0 1 1]; the micrographs are of it, with g = 200
	// and g = 1 1 -1.
	for _, g := range [][]float64{{2, 0, 0}, {1, 1, -1}} {
		if err := ws.ctrl.Set(scene.Edit{Path: "diffraction.g", Value: g}); err != nil {
			t.Fatal(err)
		}
		ws.showMicrograph(syntheticMicrograph(t, ws, 0), false)
		if err := mp.addOpen(match.BrightField); err != nil {
			t.Fatal(err)
		}
	}
	if len(mp.series) != 2 || !strings.Contains(mp.series[1].label, "g = 1 1 -1") {
		t.Fatalf("series %v", mp.series)
	}
	// Change b, then let the ranking find it again.
	if err := ws.ctrl.Set(scene.Edit{Path: "defects[0].b", Value: "1/2[1 1 0]"}); err != nil {
		t.Fatal(err)
	}
	if err := mp.rank("b", []string{"1/2[0 1 1]", "1/2[1 1 0]", "1/2[1 0 -1]"}, nil); err != nil {
		t.Fatal(err)
	}
	p.until(t, 60*time.Second, "the ranking", func() bool { return len(mp.ranked) == 3 })
	if top := mp.ranked[0].Candidate.Label; top != "1/2[0 1 1]" {
		t.Fatalf("best candidate %s, want 1/2[0 1 1]", top)
	}
	if mp.picked != 0 || len(mp.images.Objects) != 4 {
		t.Errorf("picked %d with %d images shown; want the best with 2 micrographs and 2 simulations", mp.picked, len(mp.images.Objects))
	}
	mp.acceptPicked()
	if b := ws.ctrl.Scene().Defects[0].B; b != "1/2[0 1 1]" {
		t.Errorf("scene b after accepting = %s", b)
	}
	// Bad requests say what is wrong.
	if err := mp.rank("b", []string{"1/3<11-20>"}, nil); err == nil || !strings.Contains(err.Error(), "candidates[0]") {
		t.Errorf("a family the crystal lacks: %v", err)
	}
	bad := 5
	if err := mp.rank("b", []string{"1/2<110>"}, &bad); err == nil || !strings.Contains(err.Error(), "defect") {
		t.Errorf("a defect number past the list: %v", err)
	}
}

// A fit runs off the UI goroutine and can be cancelled.
func TestMatchPanelFitCancels(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	mp := ws.match
	if err := mp.fit(match.BrightField, nil); err == nil || !strings.Contains(err.Error(), "no micrograph") {
		t.Fatalf("fit without a micrograph: %v", err)
	}
	ws.showMicrograph(syntheticMicrograph(t, ws, 0), false)
	if err := mp.fit(match.BrightField, nil); err != nil {
		t.Fatal(err)
	}
	mp.cancelWork()
	p.until(t, 30*time.Second, "the cancelled fit", func() bool { return strings.Contains(mp.status.Text, "cancelled") })
}
