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

	"faultline/internal/pyref"
)

// An independent implementation of the same physics: a straightforward
// numpy fourth-order Runge–Kutta integration of the Howie–Whelan equations
// (tests/baseline/rk4_numpy.py, written separately from the Go code, with
// its own frame rotation and displacement formulas) on the benchmark
// scene. Faultline's bright field agrees with it to the stated accuracy.
func TestAgreesWithIndependentNumpyRK4(t *testing.T) {
	pyref.Require(t, "python3-numpy", "numpy")
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
	cmd := exec.Command(pyref.Python, "baseline/rk4_numpy.py", strconv.FormatFloat(st.XiGNm, 'g', -1, 64),
		strconv.FormatFloat(st.Crystal.Elastic.Poisson, 'g', -1, 64), strconv.Itoa(n), "0.1", out)
	if msg, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("%v: %s", err, msg)
	}
	got := pyref.Run(t, nil, `import numpy, sys; a = numpy.load(sys.argv[1]); print(" ".join(repr(float(v)) for v in a.ravel()))`, out)
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
