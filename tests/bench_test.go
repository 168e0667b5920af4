package tests

import (
	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"syscall"
	"testing"
	"time"

	"faultline/export"
	"faultline/internal/pyref"

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
	benchRender(b, st.Problem)
}

// Anisotropic against isotropic elasticity: a 256×256 two-beam render of
// one inclined mixed dislocation in copper (Zener ratio 3.2), the Stroh
// field against the Hirth–Lothe isotropic one.
func benchmarkElasticity(b *testing.B, elasticity string) {
	benchmarkModel(b, elasticity, `"s_per_nm": 0.0`)
}

// benchmarkModel renders the scene of benchmarkElasticity with the
// deviation and model given as diffraction fields.
func benchmarkModel(b *testing.B, elasticity, diffraction string) {
	benchRender(b, oneDislocation(b, elasticity, diffraction, 256).Problem)
}

// benchRender renders p b.N times and reports the CPU seconds per render
// (cpu-s/op) and the columns per second of wall time.
func benchRender(b *testing.B, p *sim.Problem) {
	cpu := startCPU()
	for b.Loop() {
		if _, err := sim.Render(context.Background(), p, sim.Options{}); err != nil {
			b.Fatal(err)
		}
	}
	cpu.report(b)
	g := p.Grid
	b.ReportMetric(float64(g.NX*g.NY)*float64(b.N)/b.Elapsed().Seconds(), "columns/s")
}

// oneDislocation builds the scene of the elasticity and row benchmarks:
// one inclined mixed dislocation in a 150 nm copper foil, g = 200, imaged
// over 200 nm at pixels² columns, with the diffraction fields given.
func oneDislocation(tb testing.TB, elasticity, diffraction string, pixels int) *scene.Setup {
	tb.Helper()
	sc, err := scene.Parse([]byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], ` + diffraction + `},
	  "foil": {"thickness_nm": 150},
	  "defects": [{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, 1, 1], "at_nm": [0, 0, 75], "elasticity": "` + elasticity + `"}],
	  "image": {"width_nm": 200, "height_nm": 200, "pixels": [` + strconv.Itoa(pixels) + `, ` + strconv.Itoa(pixels) + `]}}`))
	if err != nil {
		tb.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		tb.Fatal(err)
	}
	return st
}

func BenchmarkRender256Isotropic(b *testing.B)   { benchmarkElasticity(b, "isotropic") }
func BenchmarkRender256Anisotropic(b *testing.B) { benchmarkElasticity(b, "anisotropic") }

// BenchmarkRenderSceneVsNumpy measures, in the same run, the numpy RK4
// baseline (tests/baseline/rk4_numpy.py, 128×128 columns, dz = 0.2 nm,
// once) and the default render of the same scene (b.N times), and reports
// both times (numpy-s, render-s: the fastest of the renders) and their
// ratio (speedup). The target is a speedup of at least 100.
func BenchmarkRenderSceneVsNumpy(b *testing.B) {
	pyref.Require(b, "python3-numpy", "numpy")
	st := loadScene(b, "testdata/bench_dislocation_inclusion.json", 128, 128, 0)
	out := filepath.Join(b.TempDir(), "bf.npy")
	cmd := exec.Command(pyref.Python, "baseline/rk4_numpy.py", strconv.FormatFloat(st.XiGNm, 'g', -1, 64),
		strconv.FormatFloat(st.Crystal.Elastic.Poisson, 'g', -1, 64), "128", "0.2", out)
	msg, err := cmd.CombinedOutput()
	if err != nil {
		b.Fatalf("%v: %s", err, msg)
	}
	// "128x128 columns, 750 steps of 0.200 nm: 16.50 s, ..."
	m := regexp.MustCompile(`: ([0-9.]+) s,`).FindSubmatch(msg)
	if m == nil {
		b.Fatalf("numpy baseline printed %q", msg)
	}
	numpy, _ := strconv.ParseFloat(string(m[1]), 64)
	best := math.Inf(1)
	cpu := startCPU()
	for b.Loop() {
		t0 := time.Now()
		if _, err := sim.Render(context.Background(), st.Problem, sim.Options{}); err != nil {
			b.Fatal(err)
		}
		best = math.Min(best, time.Since(t0).Seconds())
	}
	cpu.report(b)
	b.ReportMetric(numpy, "numpy-s")
	b.ReportMetric(best, "render-s")
	b.ReportMetric(numpy/best, "speedup")
}

// BenchmarkDemo512 is the demo scene (assets/demo.json) rendered at 512²
// at the default tolerance (target: 0.6 s wall on 2 cores).
func BenchmarkDemo512(b *testing.B) {
	benchRender(b, loadScene(b, "../assets/demo.json", 512, 512, 0).Problem)
}

// BenchmarkDemo256Cold and BenchmarkDemo256SChange: the demo scene at
// 256², rendered from scratch, and re-rendered after a change of s alone
// (0.004 to 0.006 /nm) by replaying the field samples of a recorded render
// (target: at most a tenth of the cold render).
func BenchmarkDemo256Cold(b *testing.B) {
	benchRender(b, loadScene(b, "../assets/demo.json", 256, 256, 0).Problem)
}

func BenchmarkDemo256SChange(b *testing.B) {
	st := loadScene(b, "../assets/demo.json", 256, 256, 0)
	// Recorded as the window records: slabs that also serve s ± 0.01 /nm.
	_, samples, err := export.Record(context.Background(), st, sim.Options{}, st.Problem.ThicknessNm, export.NearbyModels(st))
	if err != nil || samples == nil {
		b.Fatalf("record: %v", err)
	}
	cpu := startCPU()
	m := st.Problem.Model.(sim.TwoBeam)
	m.SPerNm = 0.006
	fresh := 0
	for b.Loop() {
		_, n, err := samples.Replay(context.Background(), m, st.Problem.ThicknessNm, sim.Options{})
		if err != nil {
			b.Fatal(err)
		}
		fresh = n
	}
	cpu.report(b)
	b.ReportMetric(float64(fresh), "fresh-columns")
}

// BenchmarkDemo256STable: the s change of BenchmarkDemo256SChange served
// from an s table (sim.TabulateS) over s ± 0.01 /nm built, as the window
// builds it, from samples recorded a quarter deeper: cpu-s/op is the cost
// of evaluating the table at the new s; build-cpu-s, build-replays and
// table-bytes/column are those of the one-off build (measured once).
func BenchmarkDemo256STable(b *testing.B) {
	st := loadScene(b, "../assets/demo.json", 256, 256, 0)
	ctx := context.Background()
	_, samples, err := export.Record(ctx, st, sim.Options{}, 1.25*st.Problem.ThicknessNm, export.NearbyModels(st))
	if err != nil || samples == nil {
		b.Fatalf("record: %v", err)
	}
	lo, hi, _ := export.NearbyRange(st)
	build := startCPU()
	tab, err := export.TabulateS(ctx, samples, st, lo, hi, sim.STableOptions{})
	if err != nil {
		b.Fatal(err)
	}
	buildCPU := cpuSeconds() - build.start
	cpu := startCPU()
	for b.Loop() {
		if _, err := tab.Image(ctx, 0.006, sim.Options{}); err != nil {
			b.Fatal(err)
		}
	}
	cpu.report(b)
	b.ReportMetric(buildCPU, "build-cpu-s")
	b.ReportMetric(float64(tab.Replays()), "build-replays")
	b.ReportMetric(float64(tab.Bytes())/float64(256*256), "table-bytes/column")
}

// cpuClock measures the CPU time (user and system) of the process, which
// depends far less than wall time on other work sharing the machine.
type cpuClock struct{ start float64 }

func cpuSeconds() float64 {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)*1e-6
}

func startCPU() cpuClock { return cpuClock{cpuSeconds()} }

// report adds the CPU seconds per operation (cpu-s/op).
func (c cpuClock) report(b *testing.B) {
	b.ReportMetric((cpuSeconds()-c.start)/float64(b.N), "cpu-s/op")
}

// The systematic row against two beams on the same scene (Stroh field):
// 7 beams at the Bragg position, and the weak-beam condition g(3g) with
// both models. The per-column cost ratio is the row's price.
func BenchmarkRender256AnisotropicRow7(b *testing.B) {
	benchmarkModel(b, "anisotropic", `"s_per_nm": 0.0, "model": "systematic-row", "beams": 7`)
}
func BenchmarkRender256WeakBeamTwoBeam(b *testing.B) {
	benchmarkModel(b, "anisotropic", `"weak_beam": {"n": 3}, "model": "two-beam"`)
}
func BenchmarkRender256WeakBeamRow7(b *testing.B) {
	benchmarkModel(b, "anisotropic", `"weak_beam": {"n": 3}, "beams": 7`)
}
