package tests

import (
	"math"
	"strings"
	"testing"
)

// The basal stacking faults of a hexagonal close-packed crystal given by
// their kind: I1 (R = 1/6<2 −2 0 3>), I2 (1/3<1 −1 0 0>) and E
// (1/2[0 0 0 1]) (Hirth & Lothe 1982, Theory of Dislocations, ch. 10 —
// from memory). Their visibility follows α = 2π g·R (Hirsch et al. 1965,
// ch. 10): with g = 1 1 −2 0, g·R = 0 for all three and they are
// invisible; with g = 1 0 −1 1, g·R = 5/6, 1/3 and 1/2: α = −60°, +120°
// and 180°, and they show fringes. Rendered in titanium with the basal
// plane inclined to the beam; the program's reading must give the same α.
func TestHCPBasalFaultKinds(t *testing.T) {
	for _, c := range []struct {
		g, beam string
		kind    string
		alpha   string // the reading's α, or "" for invisible
	}{
		{"[1, 1, -2, 0]", "[1, -1, 1]", "I1", ""},
		{"[1, 1, -2, 0]", "[1, -1, 1]", "I2", ""},
		{"[1, 1, -2, 0]", "[1, -1, 1]", "E", ""},
		{"[1, 0, -1, 1]", "[1, 2, -1]", "I1", "α = -60°"},
		{"[1, 0, -1, 1]", "[1, 2, -1]", "I2", "α = +120°"},
		{"[1, 0, -1, 1]", "[1, 2, -1]", "E", "α = +180°"},
	} {
		st := setup(t, `{"version": 1, "crystal": {"material": "Ti"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": `+c.g+`, "beam": `+c.beam+`, "w": 0.2},
		  "foil": {"thickness_nm": 100},
		  "defects": [{"type": "fault", "plane": [0, 0, 0, 1], "kind": "`+c.kind+`", "at_nm": [0, 0, 50]}],
		  "image": {"width_nm": 300, "height_nm": 5, "pixels": [120, 2]}}`)
		im := render(t, st)
		ref := perfect(st)
		worst := 0.0
		for _, v := range im.BF() {
			worst = math.Max(worst, math.Abs(v-ref[0]))
		}
		reading := st.ReadingLines()[0]
		t.Logf("g = %s, %s: largest BF contrast %.3g; %s", c.g, c.kind, worst, reading)
		if c.alpha == "" {
			// Tolerance: the phase factor exp(2πi·0) is 1 to rounding.
			if worst > 1e-9 {
				t.Errorf("g = %s: the %s fault changes the bright field by %g; g·R = 0 makes it invisible", c.g, c.kind, worst)
			}
			if !strings.Contains(reading, "invisible") {
				t.Errorf("g = %s, %s: the program reads %q", c.g, c.kind, reading)
			}
			continue
		}
		if worst < 0.05 {
			t.Errorf("g = %s: the %s fault changes the bright field by only %g", c.g, c.kind, worst)
		}
		if !strings.Contains(reading, c.kind+" (R = ") || !strings.Contains(reading, c.alpha) {
			t.Errorf("g = %s, %s: the program reads %q, want %s", c.g, c.kind, reading, c.alpha)
		}
	}
}
