package tests

import (
	"context"
	"encoding/json"
	"math"
	"path/filepath"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// loadScene builds a scene file with its pixels and, if t > 0, its
// thickness replaced.
func loadScene(tb testing.TB, path string, nx, ny int, thickness float64) *scene.Setup {
	tb.Helper()
	sc, err := scene.Load(path)
	if err != nil {
		tb.Fatal(err)
	}
	sc.Image.Pixels = []int{nx, ny}
	if thickness > 0 {
		sc.Foil.ThicknessNm = thickness
	}
	st, err := scene.Build(sc, "")
	if err != nil {
		tb.Fatal(err)
	}
	return st
}

// worstAgainstConverged renders p at tolerance tol and at a converged
// tolerance (sim.DefaultTolerance/100), and returns the largest difference
// of any beam's intensity over all pixels. The reference is checked to be
// converged: on every eighth row, halving its tolerance again moves no
// intensity by more than 1e-6.
func worstAgainstConverged(t *testing.T, p *sim.Problem, tol float64) float64 {
	t.Helper()
	ctx := context.Background()
	q := *p
	q.Tolerance = tol
	got, err := sim.Render(ctx, &q, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	q.Tolerance = sim.DefaultTolerance / 100
	ref, err := sim.Render(ctx, &q, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	q.Tolerance /= 2
	g := p.Grid
	conv := 0.0
	for j := 0; j < g.NY; j += 8 {
		finer, err := sim.RenderRows(ctx, &q, j, j+1, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		for k := range ref.Intensity {
			for i := range g.NX {
				n := j*g.NX + i
				conv = math.Max(conv, math.Abs(finer.Intensity[k][n]-ref.Intensity[k][n]))
			}
		}
	}
	if conv > 1e-6 {
		t.Fatalf("reference not converged: halving its tolerance moves an intensity by %.2g", conv)
	}
	return sim.MaxDifference(got, ref)
}

// At the default tolerance every pixel of every image lies within 1e-4 of
// the incident beam of a converged render (the accuracy sim.DefaultTolerance
// states): the demo scene at 512², the six-defect scene (a dissociated
// dislocation, a dislocation, a bounded fault, an inclusion, a loop and a
// cavity), the benchmark scene, and the demo at t = 60, 120 and 240 nm.
func TestDefaultToleranceAgainstConverged(t *testing.T) {
	cases := []struct {
		name   string
		st     *scene.Setup
		budget float64
	}{
		{"demo 512²", loadScene(t, "../assets/demo.json", 512, 512, 0), 1e-4},
		{"six defects 128²", loadScene(t, "testdata/all_defects.json", 128, 128, 0), 1e-4},
		{"bench 128²", loadScene(t, "testdata/bench_dislocation_inclusion.json", 128, 128, 0), 1e-4},
		{"demo t = 60 nm, 128²", loadScene(t, "../assets/demo.json", 128, 128, 60), 1e-4},
		{"demo t = 120 nm, 128²", loadScene(t, "../assets/demo.json", 128, 128, 120), 1e-4},
		{"demo t = 240 nm, 128²", loadScene(t, "../assets/demo.json", 128, 128, 240), 1e-4},
	}
	for _, tc := range cases {
		worst := worstAgainstConverged(t, tc.st.Problem, 0)
		t.Logf("%s: largest difference from converged %.2e of the incident beam", tc.name, worst)
		if worst > tc.budget {
			t.Errorf("%s: a pixel is %.3g from converged, more than %g", tc.name, worst, tc.budget)
		}
	}
}

func TestRowDefaultToleranceAgainstConverged(t *testing.T) {
	// The 7-beam systematic row at the default tolerance, whose slabs are
	// limited by the Bloch-wave step's own indicator (sim/column.go: the
	// departures and the content at each slab's midpoint, not the beat),
	// against the same render converged: every pixel of every beam within
	// 1e-4 of the incident beam, the accuracy sim.DefaultTolerance states,
	// on the six-defect scene (dislocations, a dissociated one, a fault, an
	// inclusion, a loop, a cavity) and on one Stroh dislocation (the scene
	// of BenchmarkRender256AnisotropicRow7), at the Bragg position and in
	// g(3g), and on the damage-loop example at the Bragg position (the
	// largest difference found over the example scenes, each beam count
	// from 5 to 15 and conditions from g(−g) to g(4g): 2.7e-5).
	row7 := []scene.Edit{{Path: "diffraction.model", Value: "systematic-row"}, {Path: "diffraction.beams", Value: 7}}
	bragg := append(row7[:2:2], scene.Edit{Path: "diffraction.s_per_nm", Value: 0.0})
	weak := append(row7[:2:2], scene.Edit{Path: "diffraction.weak_beam", Value: json.RawMessage(`{"n": 3}`)})
	stroh := func(deviation string) *scene.Setup {
		return oneDislocation(t, "anisotropic", deviation+`, "model": "systematic-row", "beams": 7`, 64)
	}
	cases := []struct {
		name string
		st   *scene.Setup
	}{
		{"six defects, Bragg, 64²", editedScene(t, "testdata/all_defects.json", 64, bragg...)},
		{"six defects, g(3g), 64²", editedScene(t, "testdata/all_defects.json", 64, weak...)},
		{"damage loops, Bragg, 64²", editedScene(t, "../assets/examples/damage_loops.json", 64, bragg...)},
		{"Stroh dislocation, Bragg, 64²", stroh(`"s_per_nm": 0`)},
		{"Stroh dislocation, g(3g), 64²", stroh(`"weak_beam": {"n": 3}`)},
	}
	for _, tc := range cases {
		worst := worstAgainstConverged(t, tc.st.Problem, 0)
		t.Logf("%s: largest difference from converged %.2e of the incident beam", tc.name, worst)
		if worst > 1e-4 {
			t.Errorf("%s: a pixel is %.3g from converged, more than 1e-4", tc.name, worst)
		}
	}
}

// editedScene builds the scene file at path at pixels² columns with the
// edits applied.
func editedScene(tb testing.TB, path string, pixels int, edits ...scene.Edit) *scene.Setup {
	tb.Helper()
	sc, err := scene.Load(path)
	if err != nil {
		tb.Fatal(err)
	}
	if err := scene.SetAll(sc, edits...); err != nil {
		tb.Fatal(err)
	}
	sc.Image.Pixels = []int{pixels, pixels}
	st, err := scene.Build(sc, filepath.Dir(path))
	if err != nil {
		tb.Fatal(err)
	}
	return st
}
