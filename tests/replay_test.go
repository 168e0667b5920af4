package tests

import (
	"context"
	"encoding/json"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// A replay of the recorded field samples with other conditions (s,
// thickness, absorption) agrees with a fresh render of those conditions
// within 1e-4 of the incident beam, on the demo scene; both are within
// that of converged (TestDefaultToleranceAgainstConverged).
func TestReplayAgreesWithRender(t *testing.T) {
	st := loadScene(t, "../assets/demo.json", 128, 128, 0)
	ctx := context.Background()
	base, ok := st.Problem.Model.(sim.TwoBeam)
	if !ok {
		t.Fatalf("demo model %T, want two-beam", st.Problem.Model)
	}
	with := func(s, absRatio float64) sim.TwoBeam {
		m := base
		m.SPerNm = s
		if absRatio > 0 {
			m.XiGAbsNm = m.XiGNm / absRatio
			m.Xi0AbsNm = m.XiGAbsNm
		}
		return m
	}
	im0, samples, err := sim.Record(ctx, st.Problem, sim.RecordOptions{MaxThicknessNm: 240,
		Also: []sim.Model{with(-0.004, 0), with(0.012, 0)}})
	if err != nil {
		t.Fatal(err)
	}
	if samples == nil {
		t.Fatal("no samples recorded")
	}
	g := st.Problem.Grid
	t.Logf("samples: %.0f bytes per column", float64(samples.Bytes())/float64(g.NX*g.NY))
	fresh0, err := sim.Render(ctx, st.Problem, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if d := sim.MaxDifference(im0, fresh0); d > 1e-4 {
		t.Errorf("recording render differs from a plain one by %.3g", d)
	}
	for _, c := range []struct {
		s, t, abs float64
	}{{0.004, 120, 0}, {0.010, 90, 0}, {-0.002, 200, 0}, {0.004, 240, 0}, {0.0, 60, 0.05}, {0.03, 120, 0}} {
		m := with(c.s, c.abs)
		got, nFresh, err := samples.Replay(ctx, m, c.t, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		p := *st.Problem
		p.Model = m
		p.ThicknessNm = c.t
		want, err := sim.Render(ctx, &p, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		d := sim.MaxDifference(got, want)
		t.Logf("s = %g, t = %g nm, absorption %g: replay within %.2e of a fresh render, %d columns afresh", c.s, c.t, c.abs, d, nFresh)
		if d > 1e-4 {
			t.Errorf("s = %g, t = %g: replay differs from a fresh render by %.3g", c.s, c.t, d)
		}
	}
	if _, _, err := samples.Replay(ctx, base, 241, sim.Options{}); err == nil {
		t.Error("replay beyond the recorded thickness accepted")
	}
}

// The systematic row replays too: the six-defect scene as a 7-beam row at
// the Bragg position, recorded to 125 nm, replayed at other s and
// thicknesses (among them g(3g)) with no slab re-checked (slabs recorded
// with rows serve any row, sim/column.go) and as two beams (every slab
// checked), each within 1e-4 of a fresh render of the same conditions.
func TestRowReplayAgreesWithRender(t *testing.T) {
	build := func(model string, beams int, dev string, devValue any, thickness float64) *sim.Problem {
		edits := []scene.Edit{{Path: "diffraction.model", Value: model}, {Path: dev, Value: devValue},
			{Path: "foil.thickness_nm", Value: thickness}}
		if beams > 0 {
			edits = append(edits, scene.Edit{Path: "diffraction.beams", Value: beams})
		}
		return editedScene(t, "testdata/all_defects.json", 48, edits...).Problem
	}
	ctx := context.Background()
	p := build("systematic-row", 7, "diffraction.s_per_nm", 0.0, 100)
	_, samples, err := sim.Record(ctx, p, sim.RecordOptions{MaxThicknessNm: 125})
	if err != nil || samples == nil {
		t.Fatalf("record: %v", err)
	}
	for _, c := range []struct {
		name, model string
		beams       int
		dev         string
		value       any
		t           float64
	}{
		{"7 beams, s = 0.005", "systematic-row", 7, "diffraction.s_per_nm", 0.005, 100},
		{"7 beams, s = −0.01, t = 70 nm", "systematic-row", 7, "diffraction.s_per_nm", -0.01, 70},
		{"9 beams, g(3g), t = 125 nm", "systematic-row", 9, "diffraction.weak_beam", json.RawMessage(`{"n": 3}`), 125},
		{"two beams, s = 0.005", "two-beam", 0, "diffraction.s_per_nm", 0.005, 100},
	} {
		q := build(c.model, c.beams, c.dev, c.value, c.t)
		got, nFresh, err := samples.Replay(ctx, q.Model, c.t, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		want, err := sim.Render(ctx, q, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		d := sim.MaxDifference(got, want)
		t.Logf("%s: replay within %.2e of a fresh render, %d columns afresh", c.name, d, nFresh)
		if d > 1e-4 {
			t.Errorf("%s: replay differs from a fresh render by %.3g", c.name, d)
		}
		if c.model == "systematic-row" && nFresh != 0 {
			t.Errorf("%s: %d columns integrated afresh, want none", c.name, nFresh)
		}
	}
}
