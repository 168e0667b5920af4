package tests

import (
	"fmt"
	"math"
	"testing"

	"faultline/sim"
)

const dislocationScene = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0.003, "absorption_ratio": %s},
  "foil": {"thickness_nm": 150},
  "defects": [
    {"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, 1, 1], "at_nm": [0, 0, 75], "elasticity": "isotropic"},
    {"type": "inclusion", "at_nm": [30, 25, 70], "radius_nm": 8, "misfit": 0.02}],
  "image": {"width_nm": 120, "height_nm": 120, "pixels": [%d, %d]}}`

func sceneText(ratio string, n int) string {
	return fmt.Sprintf(dislocationScene, ratio, n, n)
}

// Without absorption the Howie–Whelan equations conserve the electron
// current, |T|² + |S|² = 1 (Hirsch et al. 1965, ch. 8), defects or not.
func TestConservationWithDislocationAndInclusion(t *testing.T) {
	im := render(t, setup(t, sceneText("0", 32)))
	for n := range im.BF() {
		if d := im.BF()[n] + im.DF()[n] - 1; math.Abs(d) > 1e-9 {
			t.Fatalf("pixel %d: |T|²+|S|² − 1 = %g", n, d)
		}
	}
}

// The stated accuracy of the column integrator, 1e-4 of the incident
// intensity, holds with the real defect fields: compared with the same
// scene converged (tolerance 1e-8 cycles, where halving the tolerance
// changes nothing at 1e-7).
func TestAccuracyWithRealDefects(t *testing.T) {
	st := setup(t, sceneText("0.1", 20))
	fine := *st.Problem
	fine.Tolerance = 1e-8
	finer := fine
	finer.Tolerance = 5e-9
	worst, conv := 0.0, 0.0
	g := st.Problem.Grid
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			x, y := g.X(i), g.Y(j)
			a, b, c := st.Problem.Column(x, y), fine.Column(x, y), finer.Column(x, y)
			for k := range a {
				worst = math.Max(worst, math.Abs(a[k]-b[k]))
				conv = math.Max(conv, math.Abs(b[k]-c[k]))
			}
		}
	}
	t.Logf("default tolerance: worst intensity error %.2e; converged reference moves by %.1e", worst, conv)
	if conv > 1e-7 {
		t.Fatalf("reference not converged: %g", conv)
	}
	if worst > 1e-4 {
		t.Errorf("worst intensity error %.2e > 1e-4", worst)
	}
}

// At large w the two-beam image tends to the kinematical one with
// s → s_eff = sqrt(s² + ξ_g⁻²) (Hirsch et al. 1965, ch. 8): here w = 15,
// where the relative difference of the dark field is of order 1/w².
func TestKinematicalMatchesDynamicalAtLargeW(t *testing.T) {
	text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 15, "absorption_ratio": 0, "model": "%s"},
	  "foil": {"thickness_nm": 90},
	  "defects": [{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, 1, 1], "at_nm": [0, 0, 45], "elasticity": "isotropic"}],
	  "image": {"width_nm": 40, "height_nm": 40, "pixels": [16, 16]}}`
	dyn := setup(t, fmt.Sprintf(text, "two-beam"))
	kin := setup(t, fmt.Sprintf(text, "kinematical"))
	kp := *kin.Problem
	s := dyn.SPerNm
	kp.Model = sim.Kinematical{SPerNm: math.Sqrt(s*s + 1/(dyn.XiGNm*dyn.XiGNm)), XiGNm: dyn.XiGNm}
	a, b := render(t, dyn), func() *sim.Image { k := *kin; k.Problem = &kp; return render(t, &k) }()
	peak, worst := 0.0, 0.0
	for n := range a.DF() {
		peak = math.Max(peak, a.DF()[n])
		worst = math.Max(worst, math.Abs(a.DF()[n]-b.DF()[n]))
	}
	if worst > 0.03*peak {
		t.Errorf("kinematical and dynamical dark field differ by %g (peak %g)", worst, peak)
	}
}
