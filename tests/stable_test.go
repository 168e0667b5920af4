package tests

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"testing"

	"faultline/export"
	"faultline/sim"
)

// The s table (sim.TabulateS) built from the samples the window records
// (thickness a quarter deeper, slabs serving s ± 0.01 /nm) agrees, at 20
// random s of its range, with a replay of the samples at that s within
// 1e-5 of the incident beam and with a fresh render within 1e-4 (the
// render's own promise against converged,
// TestDefaultToleranceAgainstConverged), max over pixels and beams; an s
// outside the range is refused. On the demo scene, the scene with every
// defect type, and the demo scene twice as thick (more coefficients).
func TestSTableAgreesWithReplay(t *testing.T) {
	for _, c := range []struct {
		path   string
		nx, ny int
		t      float64
	}{{"../assets/demo.json", 96, 96, 0}, {"testdata/all_defects.json", 64, 64, 0}, {"../assets/demo.json", 48, 48, 240}} {
		t.Run(fmt.Sprintf("%s t=%g", c.path, c.t), func(t *testing.T) {
			st := loadScene(t, c.path, c.nx, c.ny, c.t)
			ctx := context.Background()
			_, samples, err := export.Record(ctx, st, sim.Options{}, 1.25*st.Problem.ThicknessNm, export.NearbyModels(st))
			if err != nil || samples == nil {
				t.Fatalf("record: %v (samples %v)", err, samples != nil)
			}
			lo, hi, ok := export.NearbyRange(st)
			if !ok {
				t.Fatal("no s range for the scene's model")
			}
			tab, err := export.TabulateS(ctx, samples, st, lo, hi, sim.STableOptions{})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("table over s in [%g, %g]: N = %d (%d replays), %d coefficients kept, %d bytes per column, estimated error %.2g, %d columns integrated afresh",
				lo, hi, tab.Degree(), tab.Replays(), tab.Coefficients(), tab.Bytes()/int64(c.nx*c.ny), tab.ErrorEstimate(), tab.FreshColumns())
			_, model, _ := export.SModel(st)
			rng := rand.New(rand.NewPCG(14, 5))
			worstReplay, worstFresh := 0.0, 0.0
			for k := 0; k < 20; k++ {
				s := lo + (hi-lo)*rng.Float64()
				got, err := tab.Image(ctx, s, sim.Options{})
				if err != nil {
					t.Fatal(err)
				}
				replay, _, err := samples.Replay(ctx, model(s), st.Problem.ThicknessNm, sim.Options{})
				if err != nil {
					t.Fatal(err)
				}
				p := *st.Problem
				p.Model = model(s)
				fresh, err := sim.Render(ctx, &p, sim.Options{})
				if err != nil {
					t.Fatal(err)
				}
				dr, df := sim.MaxDifference(got, replay), sim.MaxDifference(got, fresh)
				worstReplay, worstFresh = max(worstReplay, dr), max(worstFresh, df)
				if dr > 1e-5 {
					t.Errorf("s = %.6f: table differs from a replay by %.3g", s, dr)
				}
				if df > 1e-4 {
					t.Errorf("s = %.6f: table differs from a fresh render by %.3g", s, df)
				}
			}
			t.Logf("20 random s: worst %.2g from a replay, %.2g from a fresh render", worstReplay, worstFresh)
			for _, s := range []float64{lo - 1e-4, hi + 1e-4} {
				if _, err := tab.Image(ctx, s, sim.Options{}); !errors.Is(err, sim.ErrSTableRange) {
					t.Errorf("s = %g outside [%g, %g]: got error %v, want ErrSTableRange", s, lo, hi, err)
				}
			}
		})
	}
}
