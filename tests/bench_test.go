package tests

import (
	"context"
	"os"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// BenchmarkRenderScene is the speed check of the foundation: a 128×128
// two-beam render of an inclined dislocation plus a coherent inclusion in
// a 150 nm copper foil (tests/testdata/bench_dislocation_inclusion.json),
// at the default accuracy (1e-4 of the incident intensity).
func BenchmarkRenderScene(b *testing.B) {
	data, err := os.ReadFile("testdata/bench_dislocation_inclusion.json")
	if err != nil {
		b.Fatal(err)
	}
	sc, err := scene.Parse(data)
	if err != nil {
		b.Fatal(err)
	}
	st, err := scene.Build(sc, "testdata")
	if err != nil {
		b.Fatal(err)
	}
	g := st.Problem.Grid
	for b.Loop() {
		if _, err := sim.Render(context.Background(), st.Problem, sim.Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(g.NX*g.NY)*float64(b.N)/b.Elapsed().Seconds(), "columns/s")
}

// Anisotropic against isotropic elasticity: a 256×256 two-beam render of
// one inclined mixed dislocation in copper (Zener ratio 3.2), the Stroh
// field against the Hirth–Lothe isotropic one.
func benchmarkElasticity(b *testing.B, elasticity string) {
	sc, err := scene.Parse([]byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0.0},
	  "foil": {"thickness_nm": 150},
	  "defects": [{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, 1, 1], "at_nm": [0, 0, 75], "elasticity": "` + elasticity + `"}],
	  "image": {"width_nm": 200, "height_nm": 200, "pixels": [256, 256]}}`))
	if err != nil {
		b.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := sim.Render(context.Background(), st.Problem, sim.Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(256*256*float64(b.N)/b.Elapsed().Seconds(), "columns/s")
}

func BenchmarkRender256Isotropic(b *testing.B)   { benchmarkElasticity(b, "isotropic") }
func BenchmarkRender256Anisotropic(b *testing.B) { benchmarkElasticity(b, "anisotropic") }
