package tests

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// needPython3 returns /usr/bin/python3 when it can import the modules;
// without them the test is skipped, except under CI (CI set), where the
// Makefile installs them and their absence is a failure.
func needPython3(t *testing.T, modules ...string) string {
	t.Helper()
	const py = "/usr/bin/python3"
	if err := exec.Command(py, "-c", "import "+strings.Join(modules, ", ")).Run(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s cannot import %v (make test-deps installs them): %v", py, modules, err)
		}
		t.Skipf("%s cannot import %v: %v", py, modules, err)
	}
	return py
}

// An independent implementation of the same physics: a straightforward
// numpy fourth-order Runge–Kutta integration of the Howie–Whelan equations
// (tests/baseline/rk4_numpy.py, written separately from the Go code, with
// its own frame rotation and displacement formulas) on the benchmark
// scene. Faultline's bright field agrees with it to the stated accuracy.
func TestAgreesWithIndependentNumpyRK4(t *testing.T) {
	py := needPython3(t, "numpy")
	data, err := os.ReadFile("testdata/bench_dislocation_inclusion.json")
	if err != nil {
		t.Fatal(err)
	}
	var sc map[string]any
	json.Unmarshal(data, &sc)
	const n = 32
	sc["image"].(map[string]any)["pixels"] = []int{n, n}
	text, _ := json.Marshal(sc)
	st := setup(t, string(text))
	im := render(t, st)
	out := filepath.Join(t.TempDir(), "bf.npy")
	cmd := exec.Command(py, "baseline/rk4_numpy.py", strconv.FormatFloat(st.XiGNm, 'g', -1, 64),
		strconv.FormatFloat(st.Crystal.Elastic.Poisson, 'g', -1, 64), strconv.Itoa(n), "0.1", out)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("%v: %s", err, msg)
	}
	check := exec.Command(py, "-c", `import numpy, sys; a = numpy.load(sys.argv[1]); print(" ".join(repr(float(v)) for v in a.ravel()))`, out)
	got, err := check.Output()
	if err != nil {
		t.Fatal(err)
	}
	vals := strings.Fields(string(got))
	if len(vals) != n*n {
		t.Fatalf("%d values from numpy", len(vals))
	}
	worst := 0.0
	for k, v := range vals {
		f, _ := strconv.ParseFloat(v, 64)
		worst = math.Max(worst, math.Abs(f-im.BF()[k]))
	}
	t.Logf("largest bright-field difference from numpy RK4 (dz = 0.1 nm): %.2e", worst)
	// Tolerance: Faultline's stated accuracy, 1e-4 of the incident beam.
	if worst > 1e-4 {
		t.Errorf("bright field differs from the numpy RK4 by %g", worst)
	}
}
