package scene

import (
	"os"
	"testing"
)

// benchRebuild measures the rebuild after one slider edit (the Set itself
// is timed only when timeSet is true) of the demo scene (assets/demo.json: a dissociated dislocation
// whose width comes from the fault energy, an inclusion from its misfit,
// an anisotropic dislocation in Ni).
func benchRebuild(b *testing.B, timeSet bool, path string, values []any, build func(sc *Scene) (*Setup, error)) {
	data, err := os.ReadFile("../assets/demo.json")
	if err != nil {
		b.Fatal(err)
	}
	sc, err := Parse(data)
	if err != nil {
		b.Fatal(err)
	}
	if _, err := build(sc); err != nil {
		b.Fatal(err)
	}
	i := 0
	for b.Loop() {
		if !timeSet {
			b.StopTimer()
		}
		if err := Set(sc, path, values[i%len(values)]); err != nil {
			b.Fatal(err)
		}
		if !timeSet {
			b.StartTimer()
		}
		i++
		if _, err := build(sc); err != nil {
			b.Fatal(err)
		}
	}
}

func oneShot(sc *Scene) (*Setup, error) { return Build(sc, "../assets") }

func BenchmarkRebuildThicknessOnlyOneShot(b *testing.B) {
	benchRebuild(b, false, "foil.thickness_nm", []any{100.0, 120.0, 140.0}, oneShot)
}

func BenchmarkRebuildSOnlyOneShot(b *testing.B) {
	benchRebuild(b, false, "diffraction.s_per_nm", []any{0.0, 0.004, 0.01}, oneShot)
}

// The same edits through a Builder, which re-runs only the conditions
// stage (TestBuilderStages checks that the crystal and Stroh stages are
// skipped).
func BenchmarkRebuildThicknessOnly(b *testing.B) {
	var bl Builder
	benchRebuild(b, false, "foil.thickness_nm", []any{100.0, 120.0, 140.0}, func(sc *Scene) (*Setup, error) { return bl.Build(sc, "../assets") })
	reportStages(b, &bl)
}

func BenchmarkRebuildSOnly(b *testing.B) {
	var bl Builder
	benchRebuild(b, false, "diffraction.s_per_nm", []any{0.0, 0.004, 0.01}, func(sc *Scene) (*Setup, error) { return bl.Build(sc, "../assets") })
	reportStages(b, &bl)
}

// reportStages reports the material and geometry stage runs and Stroh
// solves per rebuild beyond the first build: 0 when the edit skips them.
func reportStages(b *testing.B, bl *Builder) {
	c := bl.Counts()
	n := float64(c.Conditions - 1)
	if n < 1 {
		return
	}
	first := Counts{Material: 1, Geometry: 1}
	b.ReportMetric(float64(c.Material-first.Material)/n, "material-runs/op")
	b.ReportMetric(float64(c.Geometry-first.Geometry)/n, "geometry-runs/op")
	b.ReportMetric(float64(c.StrohSolves-strohSolvesOfDemo)/n, "stroh-solves/op")
}

// strohSolvesOfDemo is the number of Stroh eigenproblems the first build of
// the demo scene solves: one per line direction of its anisotropic
// dislocations and partials (and the fault-energy separation's).
var strohSolvesOfDemo = func() int {
	var bl Builder
	sc, err := Load("../assets/demo.json")
	if err != nil {
		return -1
	}
	if _, err := bl.Build(sc, "../assets"); err != nil {
		return -1
	}
	return bl.Counts().StrohSolves
}()

// BenchmarkSet is the cost of the Set alone in the figures above.
func BenchmarkSet(b *testing.B) {
	benchRebuild(b, true, "foil.thickness_nm", []any{100.0, 120.0, 140.0}, func(sc *Scene) (*Setup, error) { return nil, nil })
}
