package scene

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func demoScene(t testing.TB) *Scene {
	t.Helper()
	data, err := os.ReadFile("../assets/demo.json")
	if err != nil {
		t.Fatal(err)
	}
	sc, err := Parse(data)
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

// Each edit re-runs only the stages it touches: thickness, s and the model
// the last stage alone, a moved defect the geometry (with no new Stroh
// solve), a new g the geometry and Stroh, a new crystal everything. The
// setup after each edit is the one a fresh one-shot build gives.
func TestBuilderStages(t *testing.T) {
	sc := demoScene(t)
	var b Builder
	if _, err := b.Build(sc, "../assets"); err != nil {
		t.Fatal(err)
	}
	first := b.Counts()
	if first.Material != 1 || first.Geometry != 1 || first.Conditions != 1 || first.StrohSolves == 0 {
		t.Fatalf("first build: %+v", first)
	}
	for _, c := range []struct {
		path           string
		value          any
		material, geom int // runs added
		newStroh       bool
	}{
		{"foil.thickness_nm", 90.0, 0, 0, false},
		{"diffraction.s_per_nm", 0.01, 0, 0, false},
		{"diffraction.w", 0.3, 0, 0, false},
		{"diffraction.model", "kinematical", 0, 0, false},
		{"microscope.voltage_kv", 300, 0, 0, false},
		{"image.pixels", []int{50, 50}, 0, 0, false},
		{"defects[2].at_nm", []float64{60, 80, 50}, 0, 1, false},
		{"defects[2].b", "1/2[1 0 1]", 0, 1, false},
		{"diffraction.g", []float64{1, 1, -1}, 0, 1, true},
		{"crystal.material", "Cu", 1, 1, true},
	} {
		before := b.Counts()
		if err := Set(sc, c.path, c.value); err != nil {
			t.Fatal(err)
		}
		st, err := b.Build(sc, "../assets")
		if err != nil {
			t.Fatalf("%s: %v", c.path, err)
		}
		after := b.Counts()
		if after.Material-before.Material != c.material || after.Geometry-before.Geometry != c.geom || after.Conditions-before.Conditions != 1 {
			t.Errorf("%s: stage runs %+v → %+v, want material +%d, geometry +%d, conditions +1", c.path, before, after, c.material, c.geom)
		}
		if (after.StrohSolves > before.StrohSolves) != c.newStroh {
			t.Errorf("%s: Stroh solves %d → %d", c.path, before.StrohSolves, after.StrohSolves)
		}
		fresh, err := Build(sc, "../assets")
		if err != nil {
			t.Fatal(err)
		}
		if !sameSetup(st, fresh) {
			t.Errorf("%s: staged build differs from a fresh one", c.path)
		}
		// The zone's reflections from the geometry stage's cache are the
		// ones computed afresh.
		cached, err1 := st.Reflections(ZoneLimitFactor)
		bare := *st
		bare.zones = nil
		direct, err2 := bare.Reflections(ZoneLimitFactor)
		if err1 != nil || err2 != nil || !reflect.DeepEqual(cached, direct) || !reflect.DeepEqual(st.Warnings, fresh.Warnings) {
			t.Errorf("%s: cached reflections or warnings differ (%v, %v)", c.path, err1, err2)
		}
	}
}

// sameSetup compares two setups by their numbers and by the field they
// give at a few points.
func sameSetup(a, b *Setup) bool {
	pa, pb := *a.Problem, *b.Problem
	fa, fb := pa.Field, pb.Field
	pa.Field, pb.Field = nil, nil
	if !reflect.DeepEqual(pa, pb) || a.SPerNm != b.SPerNm || a.XiGNm != b.XiGNm || !reflect.DeepEqual(a.Notes, b.Notes) {
		return false
	}
	if (fa == nil) != (fb == nil) {
		return false
	}
	if fa != nil {
		for _, p := range [][3]float64{{1, 2, 30}, {-50, 40, 70}, {65, 85, 55}} {
			v := vec(p)
			if fa.R(v) != fb.R(v) {
				return false
			}
		}
	}
	return true
}

// The material stage is keyed by the CIF file's content: rewriting the
// file with another cell rebuilds the crystal; the same bytes do not.
func TestBuilderCIFChange(t *testing.T) {
	cif, err := os.ReadFile("testdata/nacl.cif")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "nacl.cif")
	os.WriteFile(path, cif, 0o644)
	sc, err := Parse([]byte(replace(t, `"material": "Cu"`, `"cif": "nacl.cif", "elastic": {"shear_gpa": 14.9, "poisson": 0.25}`)))
	if err != nil {
		t.Fatal(err)
	}
	var b Builder
	st1, err := b.Build(sc, dir)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := b.Build(sc, dir); err != nil {
		t.Fatal(err)
	}
	if n := b.Counts().Material; n != 1 {
		t.Fatalf("unchanged CIF: %d material builds, want 1", n)
	}
	// A 1 % larger cell.
	bigger := strings.ReplaceAll(string(cif), "5.6402(3)", "5.6966(3)")
	if bigger == string(cif) {
		t.Fatal("test CIF lacks the cell length")
	}
	os.WriteFile(path, []byte(bigger), 0o644)
	st2, err := b.Build(sc, dir)
	if err != nil {
		t.Fatal(err)
	}
	if n := b.Counts().Material; n != 2 {
		t.Errorf("changed CIF: %d material builds, want 2", n)
	}
	if r := st1.GPerNm / st2.GPerNm; r < 1.0099 || r > 1.0101 {
		t.Errorf("|g| ratio %g after a 1%% larger cell, want 1.01", r)
	}
	// A missing file is an error naming the field, not a stale crystal.
	os.Remove(path)
	if _, err := b.Build(sc, dir); err == nil || !strings.HasPrefix(err.Error(), "crystal.cif:") {
		t.Errorf("CIF removed: %v", err)
	}
}

func vec(p [3]float64) r3.Vec { return r3.Vec{X: p[0], Y: p[1], Z: p[2]} }
