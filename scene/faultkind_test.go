package scene

import (
	"errors"
	"strings"
	"testing"

	"faultline/crystal"
)

// The fault vector a kind names, in the README's convention (R on the
// side the plane normal points to): intrinsic −1/3[h k l], extrinsic
// +1/3[h k l] on a cubic {111}; I1, I2, E on the hcp basal plane
// (vectors from Hirth & Lothe 1982, ch. 10, from memory).
func TestFaultKindShift(t *testing.T) {
	cubic, _ := crystal.NewCell(0.3615, 0.3615, 0.3615, 90, 90, 90)
	hex, _ := crystal.NewCell(0.295, 0.295, 0.468, 90, 90, 120)
	for _, c := range []struct {
		cell  crystal.Cell
		plane []float64
		kind  string
		want  string // or the start of the error
		fails bool
	}{
		{cubic, []float64{1, 1, 1}, "intrinsic", "1/3[-1 -1 -1]", false},
		{cubic, []float64{1, 1, 1}, "extrinsic", "1/3[1 1 1]", false},
		{cubic, []float64{1, -1, 1}, "intrinsic", "1/3[-1 1 -1]", false},
		{cubic, []float64{-2, -2, -2}, "intrinsic", "1/3[1 1 1]", false},
		{cubic, []float64{1, 1, 0}, "intrinsic", "intrinsic: R is worked out for a {1 1 1} plane", true},
		{cubic, []float64{1, 1, 1}, "I1", "I1: a fault of the basal plane", true},
		{hex, []float64{0, 0, 0, 1}, "I1", "1/6[2 -2 0 3]", false},
		{hex, []float64{0, 0, 0, 1}, "I2", "1/3[1 -1 0 0]", false},
		{hex, []float64{0, 0, 0, 1}, "E", "1/2[0 0 0 1]", false},
		{hex, []float64{0, 0, 1}, "E", "1/2[0 0 0 1]", false},
		{hex, []float64{0, 0, 0, 1}, "intrinsic", "intrinsic: on the basal plane of a hexagonal crystal the faults are I1, I2 and E", true},
		{hex, []float64{1, 0, -1, 0}, "E", "E: a fault of the basal plane", true},
	} {
		got, err := FaultKindShift(c.cell, c.plane, c.kind)
		switch {
		case c.fails && (err == nil || !strings.HasPrefix(err.Error(), c.want)):
			t.Errorf("%v %s: %q, %v; want the error %q…", c.plane, c.kind, got, err, c.want)
		case !c.fails && (err != nil || got != c.want):
			t.Errorf("%v %s: %q, %v; want %q", c.plane, c.kind, got, err, c.want)
		}
	}
}

// A kind or a nature the crystal cannot take is an error naming the
// field; a loop's nature reverses b when b·n has the other sign, and the
// note says so.
func TestKindAndNatureInBuild(t *testing.T) {
	build := func(defect string) (*Setup, error) {
		sc, err := Parse([]byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "w": 0.5}, "foil": {"thickness_nm": 100},
		  "defects": [` + defect + `], "image": {"width_nm": 20, "height_nm": 20, "pixels": [4, 4]}}`))
		if err != nil {
			return nil, err
		}
		return Build(sc, ".")
	}
	var fe *FieldError
	if _, err := build(`{"type": "fault", "plane": [1, 1, 0], "kind": "intrinsic", "at_nm": [0, 0, 50]}`); !errors.As(err, &fe) || fe.Path != "defects[0].kind" {
		t.Errorf("kind on (1 1 0): %v, want an error at defects[0].kind", err)
	}
	if _, err := build(`{"type": "fault", "plane": [1, 1, 1], "kind": "intrinsic", "shift": "1/3[1 1 1]", "at_nm": [0, 0, 50]}`); err == nil || !strings.Contains(err.Error(), "exactly one of kind or shift") {
		t.Errorf("kind and shift together: %v, want exactly one", err)
	}
	if _, err := build(`{"type": "loop", "at_nm": [0, 0, 50], "normal": [1, 1, 1], "b": "1/2[1 -1 0]", "radius_nm": 5, "nature": "vacancy"}`); !errors.As(err, &fe) || fe.Path != "defects[0].nature" {
		t.Errorf("nature of a shear loop: %v, want an error at defects[0].nature", err)
	}
	st, err := build(`{"type": "loop", "at_nm": [0, 0, 50], "normal": [1, 1, 1], "b": "1/3[1 1 1]", "radius_nm": 5, "nature": "interstitial"}`)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(st.Notes, "\n"), "defects[0]: interstitial loop: b = −(1/3[1 1 1]), so that b·n < 0") {
		t.Errorf("notes %q lack the reversed b", st.Notes)
	}
	if r := st.ReadingLines()[0]; !strings.HasPrefix(r, "loop 1: interstitial (b·n < 0)") {
		t.Errorf("reading %q", r)
	}
	st, err = build(`{"type": "fault", "plane": [1, -1, 1], "kind": "extrinsic", "at_nm": [0, 0, 50]}`)
	if err != nil {
		t.Fatal(err)
	}
	if r := st.ReadingLines()[0]; !strings.HasPrefix(r, "fault 1: extrinsic (R = 1/3[1 -1 1] on (1 -1 1))") {
		t.Errorf("reading %q", r)
	}
}
