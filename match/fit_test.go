package match

import (
	"context"
	"encoding/json"
	"math"
	"testing"

	"faultline/scene"
)

// Fit recovers the thickness within 3 % and s within 0.003 /nm of the
// values a micrograph was simulated with, from a start 15 % off in
// thickness and 0.01 /nm off in s. The micrograph is an inclined intrinsic
// stacking fault in copper with shot noise and blur: its fringes fix the
// thickness and s (Hashimoto, Howie & Whelan 1962: the number of fringes
// grows with t·sqrt(s² + 1/ξ_g²), their profile with w).
func TestFitRecoversThicknessAndS(t *testing.T) {
	truth := []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [1, 1, -1], "beam": [0, 1, 1], "s_per_nm": 0.01},
	  "foil": {"thickness_nm": 100},
	  "defects": [{"type": "fault", "plane": [1, 1, 1], "shift": "-1/3[1 1 1]", "at_nm": [0, 0, 50]}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`)
	mics := synthetic(t, truth, []json.RawMessage{json.RawMessage(`{"g": [1, 1, -1], "beam": [0, 1, 1], "s_per_nm": 0.01}`)}, []float64{20}, BrightField, 72, 1.6, 1.5, 40, 5)
	start, err := scene.Parse(truth)
	if err != nil {
		t.Fatal(err)
	}
	if err := scene.SetAll(start,
		scene.Edit{Path: "foil.thickness_nm", Value: 85.0},
		scene.Edit{Path: "diffraction.s_per_nm", Value: 0.0},
		scene.Edit{Path: "defects[0].at_nm", Value: []float64{0, 0, 42.5}}); err != nil {
		t.Fatal(err)
	}
	fr, err := Fit(context.Background(), start, ".", &mics[0], FitOptions{BlurNm: 1.5})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("t = %.2f ± %.2f nm, s = %.4f ± %.4f /nm, score %.3f, %d renders, %d replays, errors: %s",
		fr.ThicknessNm.Value, fr.ThicknessNm.Error, fr.SPerNm.Value, fr.SPerNm.Error, fr.Score, fr.Renders, fr.Replays, fr.ErrorMethod)
	if math.Abs(fr.ThicknessNm.Value-100) > 3 {
		t.Errorf("thickness %.2f nm, want 100 within 3 %%", fr.ThicknessNm.Value)
	}
	if math.Abs(fr.SPerNm.Value-0.01) > 0.003 {
		t.Errorf("s %.4f /nm, want 0.0100 within 0.003", fr.SPerNm.Value)
	}
	if !(fr.ThicknessNm.Error > 0) || math.IsInf(fr.ThicknessNm.Error, 0) {
		t.Errorf("thickness error %v: want a finite positive uncertainty", fr.ThicknessNm.Error)
	}
}
