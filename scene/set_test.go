package scene

import (
	"encoding/json"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
)

func parseBase(t *testing.T) *Scene {
	t.Helper()
	sc, err := Parse([]byte(base))
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

// Set on every kind of path: a number, a vector, Burgers text, a defect
// field by index, a whole defect, an optional field cleared, an object
// field created on the way.
func TestSet(t *testing.T) {
	for _, c := range []struct {
		path  string
		value any
		check func(sc *Scene) bool
	}{
		{"foil.thickness_nm", 80.0, func(sc *Scene) bool { return sc.Foil.ThicknessNm == 80 }},
		{"foil.thickness_nm", 75, func(sc *Scene) bool { return sc.Foil.ThicknessNm == 75 }},
		{"diffraction.s_per_nm", -0.02, func(sc *Scene) bool { return *sc.Diffraction.SPerNm == -0.02 }},
		{"diffraction.g", []float64{1, 1, -1}, func(sc *Scene) bool { return reflect.DeepEqual(sc.Diffraction.G, []float64{1, 1, -1}) }},
		{"diffraction.g", []any{2, 2, 0}, func(sc *Scene) bool { return reflect.DeepEqual(sc.Diffraction.G, []float64{2, 2, 0}) }},
		{"diffraction.g[0]", 4, func(sc *Scene) bool { return reflect.DeepEqual(sc.Diffraction.G, []float64{4, 0, 0}) }},
		{"defects[0].b", "1/2[1 0 1]", func(sc *Scene) bool { return sc.Defects[0].B == "1/2[1 0 1]" }},
		{"defects[0].at_nm", []float64{5, -5, 40}, func(sc *Scene) bool { return reflect.DeepEqual(sc.Defects[0].AtNm, []float64{5, -5, 40}) }},
		{"defects[0].at_nm[2]", 30.0, func(sc *Scene) bool { return sc.Defects[0].AtNm[2] == 30 }},
		{"defects[0].elasticity", "isotropic", func(sc *Scene) bool { return sc.Defects[0].Elasticity == "isotropic" }},
		{"defects[0]", map[string]any{"type": "cavity", "at_nm": []float64{0, 0, 60}, "radius_nm": 10}, func(sc *Scene) bool {
			return sc.Defects[0].Type == "cavity" && *sc.Defects[0].RadiusNm == 10
		}},
		{"defects[0]", nil, func(sc *Scene) bool { return len(sc.Defects) == 0 }},
		{"defects", []Defect{{Type: "cavity", AtNm: []float64{0, 0, 50}, RadiusNm: ptr(5)}}, func(sc *Scene) bool {
			return len(sc.Defects) == 1 && sc.Defects[0].Type == "cavity"
		}},
		{"image.pixels", []int{64, 64}, func(sc *Scene) bool { return reflect.DeepEqual(sc.Image.Pixels, []int{64, 64}) }},
		{"image.blur_nm", 1.5, func(sc *Scene) bool { return *sc.Image.BlurNm == 1.5 }},
		{"crystal.material", "Ni", func(sc *Scene) bool { return sc.Crystal.Material == "Ni" }},
		{"diffraction.extinction_nm", 40.0, func(sc *Scene) bool { return *sc.Diffraction.ExtinctionNm == 40 }},
		{"diffraction.model", "kinematical", func(sc *Scene) bool { return sc.Diffraction.Model == "kinematical" }},
		{"microscope.voltage_kv", json.RawMessage(`300`), func(sc *Scene) bool { return sc.Microscope.VoltageKV == 300 }},
		// The deviation forms replace each other.
		{"diffraction.w", 0.5, func(sc *Scene) bool { return *sc.Diffraction.W == 0.5 && sc.Diffraction.SPerNm == nil }},
		{"diffraction.weak_beam.n", 3, func(sc *Scene) bool { return sc.Diffraction.WeakBeam.N == 3 && sc.Diffraction.SPerNm == nil }},
		{"diffraction.deviation_from_kikuchi", map[string]any{"offset": 0.2, "spacing": 1}, func(sc *Scene) bool {
			return sc.Diffraction.Kikuchi.Offset == 0.2 && sc.Diffraction.SPerNm == nil
		}},
	} {
		sc := parseBase(t)
		if err := Set(sc, c.path, c.value); err != nil {
			t.Errorf("Set(%s, %v): %v", c.path, c.value, err)
			continue
		}
		if !c.check(sc) {
			t.Errorf("Set(%s, %v): not applied: %+v", c.path, c.value, sc)
		}
		if err := sc.Validate(); err != nil {
			t.Errorf("Set(%s): result does not validate: %v", c.path, err)
		}
	}
}

// Every error names the path, is a *FieldError wrapping ErrInvalid, and
// leaves the scene as it was.
func TestSetErrors(t *testing.T) {
	for _, c := range []struct {
		path     string
		value    any
		wantPath string
		want     string
	}{
		{"foil.thickness", 80.0, "foil.thickness", "unknown field (known here: normal, thickness_nm)"},
		{"diffraction.colour", 1, "diffraction.colour", "unknown field"},
		{"foil.thickness_nm.x", 1, "foil.thickness_nm.x", "holds no fields"},
		{"foil.thickness_nm", "eighty", "foil.thickness_nm", "is string, want a number"},
		{"foil.thickness_nm", -5.0, "foil.thickness_nm", "must be ≥ 0.1 and ≤ 10000 nm"},
		{"foil.thickness_nm", nil, "foil.thickness_nm", "missing"},
		{"foil.thickness_nm", math.NaN(), "foil.thickness_nm", "must be a finite number"},
		{"diffraction.g", "2 0 0", "diffraction.g", "is string, want a list"},
		{"diffraction.g", []float64{1, 1}, "diffraction.g", "needs 3 indices"},
		{"image.pixels", []float64{32.5, 32}, "image.pixels", "want a whole number"},
		{"image.pixels", []int{64, 32}, "image.pixels", "pixels must be square"},
		{"defects[3].b", "1/2[1 1 0]", "defects[3]", "index out of range: defects has 1 entry"},
		{"defects[0].b", 110, "defects[0].b", "is number, want a string"},
		{"defects[0].radius_nm", 5.0, "defects[0].radius_nm", "does not apply to a dislocation"},
		{"defects[0]", map[string]any{"type": "cavity", "size": 3}, "defects[0].size", "unknown field"},
		{"defects[0].type", "crack", "defects[0].type", `"crack" is not a defect type`},
		{"diffraction.weak_beam.n", 2.5, "diffraction.weak_beam.n", "whole number n from −20 to 20"},
		{"defects.b", "x", "defects.b", "unknown field: defects holds no fields"},
		{"foil[0]", 1, "foil[0]", "foil is not a list"},
		{"Foil.thickness_nm", 1, "Foil.thickness_nm", "not a field path"},
		{"defects[-1].b", 1, "defects[-1].b", "not a field path"},
		{"defects[0]b", 1, "defects[0]b", "not a field path"},
		{"", 1, "", "empty field path"},
		{"microscope.voltage_kv", json.RawMessage(`{`), "microscope.voltage_kv", "not a JSON value"},
		{"microscope.voltage_kv", make(chan int), "microscope.voltage_kv", "not a value a scene holds"},
	} {
		sc := parseBase(t)
		before, _ := Marshal(sc)
		err := Set(sc, c.path, c.value)
		var fe *FieldError
		if !errors.As(err, &fe) || !errors.Is(err, ErrInvalid) {
			t.Errorf("Set(%q, %v) = %v, want a *FieldError", c.path, c.value, err)
			continue
		}
		if fe.Path != c.wantPath || !strings.Contains(fe.Msg, c.want) {
			t.Errorf("Set(%q, %v) = %q at %q, want %q at %q", c.path, c.value, fe.Msg, fe.Path, c.want, c.wantPath)
		}
		after, _ := Marshal(sc)
		if string(before) != string(after) {
			t.Errorf("Set(%q) failed but changed the scene", c.path)
		}
	}
}

func TestSetJSON(t *testing.T) {
	sc := parseBase(t)
	if err := SetJSON(sc, "diffraction.g", "[1,1,-1]"); err != nil {
		t.Fatal(err)
	}
	if err := SetJSON(sc, "defects[0].b", `"1/2[1 0 1]"`); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(sc.Diffraction.G, []float64{1, 1, -1}) || sc.Defects[0].B != "1/2[1 0 1]" {
		t.Errorf("not applied: %+v", sc)
	}
	err := SetJSON(sc, "defects[0].b", "1/2[1 0 1]")
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Path != "defects[0].b" || !strings.Contains(fe.Msg, "double quotes") {
		t.Errorf("unquoted text: %v", err)
	}
}

// SetAll validates once, after every edit: pixels and field of view that
// keep the pixels square only together.
func TestSetAllTogether(t *testing.T) {
	sc := parseBase(t)
	if err := Set(sc, "image.pixels", []int{64, 32}); err == nil {
		t.Fatal("non-square pixels accepted")
	}
	if err := SetAll(sc, Edit{"image.pixels", []int{64, 32}}, Edit{"image.height_nm", 100}); err != nil {
		t.Fatal(err)
	}
	if sc.Image.HeightNm != 100 || sc.Image.Pixels[0] != 64 {
		t.Errorf("not applied: %+v", sc.Image)
	}
}

func ptr(v float64) *float64 { return &v }
