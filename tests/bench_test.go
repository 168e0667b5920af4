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
