package tests

import (
	"context"
	"testing"

	"faultline/sim"
)

// The scenes with loops, rendered at 256² at the default tolerance: every
// defect type (tests/testdata/all_defects.json) and two loops with a
// cavity (assets/examples/damage_loops.json). A CPU profile of these
// gives the share of the loops' closed form (defects.(*Loop).R).
func BenchmarkAllDefects256(b *testing.B) { benchmarkScene256(b, "testdata/all_defects.json") }

func BenchmarkDamageLoops256(b *testing.B) {
	benchmarkScene256(b, "../assets/examples/damage_loops.json")
}

func benchmarkScene256(b *testing.B, path string) {
	st := loadScene(b, path, 256, 256, 0)
	cpu := startCPU()
	for b.Loop() {
		if _, err := sim.Render(context.Background(), st.Problem, sim.Options{}); err != nil {
			b.Fatal(err)
		}
	}
	cpu.report(b)
}
