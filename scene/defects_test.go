package scene

import (
	"strconv"
	"strings"
	"testing"
)

const dissociated = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0},
  "foil": {"thickness_nm": 100},
  "defects": [{"type": "dissociated", "b": "1/2[1 0 -1]", "line": [1, 1, 0], "plane": [1, -1, 1], "at_nm": [0, 0, 50],
     "partials": ["1/6[2 1 -1]", "1/6[1 -1 -2]"], "sfe_mj_m2": 45}],
  "image": {"width_nm": 100, "height_nm": 100, "pixels": [16, 16]}}`

func TestDissociatedReportsSeparation(t *testing.T) {
	st := mustBuild(t, dissociated)
	found := false
	for _, n := range st.Notes {
		found = found || strings.Contains(n, "partial separation") && strings.Contains(n, "45 mJ/m²")
	}
	if !found {
		t.Errorf("separation from the stacking-fault energy not reported: %v", st.Notes)
	}
}

// The bad inputs of the defect library, each named by its field.
func TestDefectBuildErrors(t *testing.T) {
	rep := func(old, new string) string {
		if !strings.Contains(dissociated, old) {
			t.Fatalf("no %q", old)
		}
		return strings.Replace(dissociated, old, new, 1)
	}
	cavity := func(at string, r float64) string {
		return rep(`{"type": "dissociated", "b": "1/2[1 0 -1]", "line": [1, 1, 0], "plane": [1, -1, 1], "at_nm": [0, 0, 50],
     "partials": ["1/6[2 1 -1]", "1/6[1 -1 -2]"], "sfe_mj_m2": 45}`, `{"type": "cavity", "at_nm": `+at+`, "radius_nm": `+fmtF(r)+`}`)
	}
	for _, c := range []struct{ text, want string }{
		{rep(`"1/6[1 -1 -2]"]`, `"1/6[1 -1 2]"]`), "defects[0].partials[1]: the partial 1/6[1 -1 2] does not lie in the glide plane (1 -1 1)"},
		{rep(`["1/6[2 1 -1]", "1/6[1 -1 -2]"]`, `["1/6[2 1 -1]", "1/6[-1 -2 -1]"]`), "defects[0].partials: 1/6[2 1 -1] + 1/6[-1 -2 -1] does not add up to b = 1/2[1 0 -1]"},
		{rep(`"line": [1, 1, 0]`, `"line": [1, 1, 1]`), "defects[0].line: the line [1 1 1] does not lie in the glide plane (1 -1 1)"},
		{rep(`"sfe_mj_m2": 45`, `"sfe_mj_m2": 45, "separation_nm": 3`), "exactly one of separation_nm or sfe_mj_m2"},
		{rep(`"type": "dissociated", "b": "1/2[1 0 -1]", "line": [1, 1, 0], "plane": [1, -1, 1], "at_nm": [0, 0, 50],
     "partials": ["1/6[2 1 -1]", "1/6[1 -1 -2]"], "sfe_mj_m2": 45`, `"type": "loop", "b": "1/2[1 1 0]", "normal": [1, 1, 0], "at_nm": [0, 0, 50], "radius_nm": 0`), "defects[0].radius_nm"},
		{cavity("[0, 0, 5]", 8), "defects[0]: a cavity of radius 8 nm at depth 5 nm reaches outside the foil"},
		{cavity("[0, 0, 95]", 8), "reaches outside the foil"},
		{rep(`"material": "Cu"`, `"material": "Cu", "elastic": {"c11": 100, "c12": 150, "c44": 50}`), "crystal.elastic"},
	} {
		sc, err := Parse([]byte(c.text))
		if err == nil {
			_, err = Build(sc, ".")
		}
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("want error containing %q, got %v", c.want, err)
		}
	}
	// A cavity well inside the foil is accepted.
	mustBuild(t, cavity("[0, 0, 50]", 8))
}

func fmtF(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
