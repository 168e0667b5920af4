package tests

import (
	"context"
	"testing"

	"faultline/sim"

	"gonum.org/v1/gonum/spatial/r3"
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
	benchRender(b, loadScene(b, path, 256, 256, 0).Problem)
}

// BenchmarkDemoField is the cost of one g·R evaluation of the demo scene
// (assets/demo.json) at the points the integrator asks for: the depths of
// 64 rows of a 512² render (rows 200 to 263, through the dissociated
// dislocation), recorded once, then evaluated in the order they came
// through the fast path (sim.Phaser). It reports CPU ns per evaluation
// and the evaluations per column.
func BenchmarkDemoField(b *testing.B) {
	st := loadScene(b, "../assets/demo.json", 512, 512, 0)
	ph, ok := st.Problem.Field.(sim.Phaser)
	if !ok {
		b.Fatal("the demo scene's field has no fast path")
	}
	p := *st.Problem
	rec := &phaseRecorder{Displacement: p.Field, ph: ph}
	p.Field = rec
	if _, err := sim.RenderRows(context.Background(), &p, 200, 264, sim.Options{Workers: 1}); err != nil {
		b.Fatal(err)
	}
	f := ph.Phase(r3.Vec{X: st.Problem.GPerNm})
	cpu := startCPU()
	for b.Loop() {
		for _, q := range rec.pts {
			sinkPhase += f(q)
		}
	}
	b.ReportMetric((cpuSeconds()-cpu.start)*1e9/float64(b.N*len(rec.pts)), "cpu-ns/eval")
	b.ReportMetric(float64(len(rec.pts))/(64*512), "evals/column")
}

var sinkPhase float64

// phaseRecorder passes a field through and keeps every point its fast
// path is asked for (one worker: no locking).
type phaseRecorder struct {
	sim.Displacement
	ph  sim.Phaser
	pts []r3.Vec
}

func (r *phaseRecorder) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if j, ok := r.Displacement.(sim.Jumper); ok {
		return j.Jumps(x, y, z0, z1, dst)
	}
	return dst
}

func (r *phaseRecorder) Phase(g r3.Vec) func(p r3.Vec) float64 {
	f := r.ph.Phase(g)
	return func(p r3.Vec) float64 {
		r.pts = append(r.pts, p)
		return f(p)
	}
}
