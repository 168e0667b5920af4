package pyref

import (
	_ "embed"
	"encoding/json"
	"strconv"
	"testing"
)

// weakBeamScript integrates the column equations across a straight
// dislocation with numpy; its header states the equations and sources.
//
//go:embed weakbeam.py
var weakBeamScript string

// WeakBeamCase is one weak-beam profile for the numpy reference: a screw
// or edge dislocation (isotropic) parallel to the surfaces at mid-depth of
// each foil, g·b, the excitation error s_1 of g, the wavelength and |g|
// (for s_n = n s_1 + n(1−n) λg²/2), N (beams −N…N), or TwoBeam (0 and g
// only) or Kinematical (first order), the extinction distances ξ_h and
// absorption lengths ξ'_h of the reflections h = 1…2N (ξ'_0 the mean;
// nil or 0 for none), the foils (averaged), the columns (nm from the core,
// measured along b for the edge) and the largest integration step.
type WeakBeamCase struct {
	Kind string  `json:"kind"`
	GB   float64 `json:"gb"`
	// Cores, when set, replaces the one dislocation by parallel ones of
	// Kind at the same depth (the partials of a dissociation on a glide
	// plane parallel to the surfaces), each at X nm with its own g·b.
	Cores       []WeakBeamCore     `json:"cores,omitempty"`
	Nu          float64            `json:"nu"`
	S1          float64            `json:"s1"`
	LambdaNm    float64            `json:"lambda_nm"`
	GPerNm      float64            `json:"g_nm"`
	N           int                `json:"N"`
	TwoBeam     bool               `json:"two_beam,omitempty"`
	Kinematical bool               `json:"kinematical,omitempty"`
	Xi          map[string]float64 `json:"xi"`
	XiAbs       map[string]float64 `json:"xi_abs,omitempty"`
	Xi0Abs      float64            `json:"xi0_abs,omitempty"`
	ThicknessNm []float64          `json:"thickness_nm"`
	XNm         []float64          `json:"x_nm"`
	StepNm      float64            `json:"h_nm"`
}

// WeakBeamCore is one of parallel dislocations: its offset along the
// columns' axis and its g·b.
type WeakBeamCore struct {
	X  float64 `json:"x"`
	GB float64 `json:"gb"`
}

// SetXi sets ξ_h and ξ'_h (absorption) of reflection h; 0 or +Inf for
// either leaves that part out (no coupling, no absorption).
func (c *WeakBeamCase) SetXi(h int, xi, xiAbs float64) {
	if c.Xi == nil {
		c.Xi = map[string]float64{}
	}
	if xi > 0 && xi < 1e300 {
		c.Xi[strconv.Itoa(h)] = xi
	}
	if xiAbs > 0 && xiAbs < 1e300 {
		if c.XiAbs == nil {
			c.XiAbs = map[string]float64{}
		}
		c.XiAbs[strconv.Itoa(h)] = xiAbs
	}
}

// WeakBeamResult is the reference's profile of the g beam (averaged over
// the foils), the perfect crystal's background, the peak position and
// FWHM (0 when the profile does not fall to half within the columns),
// and the same from a run at half the step with the largest change
// of any column (the reference's own convergence).
type WeakBeamResult struct {
	DF              []float64 `json:"df"`
	Background      float64   `json:"background"`
	PeakNm          float64   `json:"peak_nm"`
	FWHMNm          float64   `json:"fwhm_nm"`
	PeakDF          float64   `json:"peak_df"`
	PeakHalfStepNm  float64   `json:"peak_half_step_nm"`
	FWHMHalfStepNm  float64   `json:"fwhm_half_step_nm"`
	MaxChangeHalfDz float64   `json:"max_change_half_step"`
}

// WeakBeam runs the numpy reference on the cases (one Python process).
func WeakBeam(t testing.TB, cases []WeakBeamCase) []WeakBeamResult {
	t.Helper()
	Require(t, "python3-numpy", "numpy")
	in, err := json.Marshal(cases)
	if err != nil {
		t.Fatal(err)
	}
	var out []WeakBeamResult
	if err := json.Unmarshal(Run(t, in, weakBeamScript), &out); err != nil {
		t.Fatalf("numpy weak-beam reference: %v", err)
	}
	if len(out) != len(cases) {
		t.Fatalf("numpy weak-beam reference: %d results for %d cases", len(out), len(cases))
	}
	return out
}
