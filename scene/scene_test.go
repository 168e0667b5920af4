package scene

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/sim"
)

const base = `{
  "version": 1,
  "crystal": {"material": "Cu"},
  "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
  "foil": {"thickness_nm": 120},
  "defects": [
    {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 60]}
  ],
  "image": {"width_nm": 200, "height_nm": 200, "pixels": [32, 32]}
}`

func mustBuild(t *testing.T, text string) *Setup {
	t.Helper()
	sc, err := Parse([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	st, err := Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	return st
}

func replace(t *testing.T, old, new string) string {
	t.Helper()
	if !strings.Contains(base, old) {
		t.Fatalf("base scene lacks %q", old)
	}
	return strings.Replace(base, old, new, 1)
}

func TestRoundTrip(t *testing.T) {
	sc, err := Parse([]byte(base))
	if err != nil {
		t.Fatal(err)
	}
	a, err := Marshal(sc)
	if err != nil {
		t.Fatal(err)
	}
	sc2, err := Parse(a)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Marshal(sc2)
	if !bytes.Equal(a, b) {
		t.Errorf("not a fixed point:\n%s\n%s", a, b)
	}
	// A value given as zero stays given (s = 0 is not "no deviation").
	sc3, _ := Parse([]byte(replace(t, `"s_per_nm": 0.01`, `"s_per_nm": 0`)))
	c, _ := Marshal(sc3)
	if !strings.Contains(string(c), `"s_per_nm": 0`) {
		t.Errorf("s_per_nm 0 lost on save:\n%s", c)
	}
	path := filepath.Join(t.TempDir(), "s.json")
	if err := Save(path, sc); err != nil {
		t.Fatal(err)
	}
	back, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	d, _ := Marshal(back)
	if !bytes.Equal(a, d) {
		t.Error("Save/Load changed the scene")
	}
}

func TestFieldErrors(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{replace(t, `"version": 1`, `"version": 2`), "version: 2 is not supported"},
		{replace(t, `"material": "Cu"`, `"material": "Cu", "colour": "red"`), "crystal.colour: unknown field"},
		{replace(t, `"at_nm": [0, 0, 60]`, `"at_nm": [0, 0, 60], "radius_nm": 3`), "defects[0].radius_nm: does not apply to a dislocation"},
		{replace(t, `"at_nm": [0, 0, 60]}`, `"at_nm": [0, 0, 60], "hue": 1}`), "defects[0].hue: unknown field"},
		{replace(t, `"s_per_nm": 0.01`, `"w": 1, "weak_beam": {"n": 3}`), "give only one deviation setting, found w and weak_beam"},
		{replace(t, `"s_per_nm": 0.01`, `"model": "two-beam"`), "give the deviation"},
		{replace(t, `"pixels": [32, 32]`, `"pixels": [32, 16]`), "pixels must be square"},
		{replace(t, `"pixels": [32, 32]`, `"pixels": [32]`), "image.pixels"},
		{replace(t, `"voltage_kv": 200`, `"voltage_kv": -1`), "microscope.voltage_kv"},
		{replace(t, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "absorption_ratio": 1.5`), "diffraction.absorption_ratio"},
		{replace(t, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "model": "systematic-row", "beams": 4`), "diffraction.beams: 4"},
		{replace(t, `"line": [1, -1, 0], `, ``), "defects[0].line: missing"},
		{`{"version": 1, "crystal": {"material": "Cu"}`, "truncated"},
		{`{"version": 1} {}`, "unexpected data"},
		{`[1, 2]`, "must be a JSON object"},
		{replace(t, `"thickness_nm": 120`, `"thickness_nm": [120]`), "foil.thickness_nm: is array, want a number"},
		{replace(t, `"at_nm": [0, 0, 60]`, `"at_nm": [0, 1e300, 60]`), "defects[0].at_nm: [0 1e+300 60]: must be ≥ -1e+06 and ≤ 1e+06 nm"},
		{replace(t, `"thickness_nm": 120`, `"thickness_nm": 1e9`), "foil.thickness_nm: 1e+09 nm: must be ≥ 0.1 and ≤ 10000 nm"},
		{replace(t, `"thickness_nm": 120`, `"thickness_nm": 150, "thickness_nm": 5`), "foil.thickness_nm: given twice"},
		{replace(t, `"s_per_nm": 0.01`, `"weak_beam": {"n": 2.5}`), "diffraction.weak_beam.n: 2.5: the g(ng) condition needs a whole number"},
		{replace(t, `"b": "1/2[1 1 0]"`, `"b": "1/2[1 1 0]", "b": "[1 0 0]"`), "defects[0].b: given twice"},
	} {
		_, err := Parse([]byte(c.text))
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrInvalid) {
			t.Errorf("want error containing %q, got %v", c.want, err)
		}
	}
}

func TestBuildErrors(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{replace(t, `"g": [2, 0, 0]`, `"g": [1, 1, 1]`), "diffraction.g: [1 1 1] is not perpendicular to the beam [0 0 1]"},
		{replace(t, `"g": [2, 0, 0]`, `"g": [1, 1, 0]`), "diffraction.g: [1 1 0] is kinematically forbidden in Cu"},
		{replace(t, `"1/2[1 1 0]"`, `"1/2[1 1 x]"`), "defects[0].b"},
		{replace(t, `"material": "Cu"`, `"material": "Kryptonite"`), "crystal.material"},
		// A systematic row reaching 7·g of Cu 600 (|g| = 16.6 /nm) lies beyond
		// the scattering-factor fits (sinθ/λ ≤ 2/Å, International Tables
		// Vol. C, Table 4.3.2.2).
		{replace(t, `"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01`, `"g": [6, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01, "model": "systematic-row", "beams": 7`), "diffraction.beams: 7 beams reach 3·g"},
		{replace(t, `"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01`, `"g": [1, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01, "model": "systematic-row", "beams": 5`), "diffraction.g: [1 0 0] is kinematically forbidden in Cu; give diffraction.extinction_nm"},
		{replace(t, `"thickness_nm": 120`, `"thickness_nm": 120, "normal": [1, 0, 0]`), "foil.normal"},
	} {
		sc, err := Parse([]byte(c.text))
		if err == nil {
			_, err = Build(sc, ".")
		}
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrInvalid) {
			t.Errorf("want error containing %q, got %v", c.want, err)
		}
	}
}

func TestDeviationSettings(t *testing.T) {
	st := mustBuild(t, base)
	lam, g := st.WavelengthNm, st.GPerNm
	// a(Cu) = 0.36149 nm (the preset's value): |g_200| = 2/a.
	if math.Abs(g-2/0.36149) > 1e-3 {
		t.Errorf("|g| = %g", g)
	}
	for _, c := range []struct {
		dev  string
		want float64
	}{
		{`"w": 0.8`, 0.8 / st.XiGNm},
		// g(3g): s = (n − 1) λ g²/2 (Cockayne, Ray & Whelan 1969).
		{`"weak_beam": {"n": 3}`, 2 * lam * g * g / 2},
		// Kikuchi: s = λ g² Δx / x (Hirsch et al. 1965).
		{`"deviation_from_kikuchi": {"offset": 0.3, "spacing": 12}`, lam * g * g * 0.3 / 12},
	} {
		st := mustBuild(t, replace(t, `"s_per_nm": 0.01`, c.dev))
		if math.Abs(st.SPerNm-c.want) > 1e-12 {
			t.Errorf("%s: s = %g, want %g", c.dev, st.SPerNm, c.want)
		}
	}
}

func TestDefaultsAndOverrides(t *testing.T) {
	st := mustBuild(t, base)
	tb, ok := st.Problem.Model.(sim.TwoBeam)
	if !ok || st.Model != "two-beam" {
		t.Fatalf("default model %T %s", st.Problem.Model, st.Model)
	}
	if math.Abs(tb.XiGAbsNm-st.XiGNm/DefaultAbsorptionRatio) > 1e-9 || tb.Xi0AbsNm != tb.XiGAbsNm {
		t.Errorf("absorption lengths %g %g for ξ_g %g", tb.XiGAbsNm, tb.Xi0AbsNm, st.XiGNm)
	}
	if len(st.Notes) == 0 || !strings.Contains(st.Notes[0], "default") {
		t.Errorf("default absorption not noted: %v", st.Notes)
	}
	over := mustBuild(t, replace(t, `"g": [2, 0, 0]`, `"g": [1, 0, 0], "extinction_nm": 80`))
	if over.XiGNm != 80 || over.XiGComputed {
		t.Errorf("extinction override: %g", over.XiGNm)
	}
	iso := mustBuild(t, replace(t, `"material": "Cu"`, `"material": "Cu", "elastic": {"shear_gpa": 48, "poisson": 0.34}`))
	if e := iso.Crystal.Elastic; e.Full || e.ShearGPa != 48 || e.Poisson != 0.34 {
		t.Errorf("isotropic override: %+v", e)
	}
}

// The image frame is right-handed with x along g and z along the beam.
func TestImageFrame(t *testing.T) {
	st := mustBuild(t, replace(t, `"g": [2, 0, 0], "beam": [0, 0, 1]`, `"g": [1, 1, -1], "beam": [0, 1, 1]`))
	r := st.Rotation
	x := [3]float64{r[0][0], r[0][1], r[0][2]}
	y := [3]float64{r[1][0], r[1][1], r[1][2]}
	z := [3]float64{r[2][0], r[2][1], r[2][2]}
	cross := [3]float64{z[1]*x[2] - z[2]*x[1], z[2]*x[0] - z[0]*x[2], z[0]*x[1] - z[1]*x[0]}
	for i := range 3 {
		if math.Abs(cross[i]-y[i]) > 1e-12 {
			t.Fatalf("y ≠ z × x: %v vs %v", y, cross)
		}
	}
	s3 := 1 / math.Sqrt(3)
	if math.Abs(x[0]-s3) > 1e-12 || math.Abs(x[2]+s3) > 1e-12 || math.Abs(z[1]-1/math.Sqrt2) > 1e-12 {
		t.Errorf("x = %v z = %v", x, z)
	}
	b := st.ImageVector([3]float64{0, 1, 1})
	if math.Abs(b.X) > 1e-12 || math.Abs(b.Y) > 1e-12 || b.Z <= 0 {
		t.Errorf("beam direction in the image frame: %v", b)
	}
}

func TestLoadErrors(t *testing.T) {
	_, err := Load(filepath.Join(t.TempDir(), "none.json"))
	if err == nil || !errors.Is(err, os.ErrNotExist) || !strings.Contains(err.Error(), "no such file") {
		t.Errorf("missing file: %v", err)
	}
}

// A CIF crystal, an explicit cell and four-index hexagonal input all reach
// the simulator.
func TestCrystalSources(t *testing.T) {
	dir := t.TempDir()
	cif, err := os.ReadFile("testdata/nacl.cif")
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "nacl.cif"), cif, 0o644)
	sc, err := Parse([]byte(replace(t, `"material": "Cu"`, `"cif": "nacl.cif", "elastic": {"shear_gpa": 14.9, "poisson": 0.25}`)))
	if err != nil {
		t.Fatal(err)
	}
	st, err := Build(sc, dir)
	if err != nil {
		t.Fatal(err)
	}
	if n := len(st.Crystal.Atoms); n != 8 {
		t.Errorf("rock salt cell from CIF has %d atoms, want 8", n)
	}
	// The same fcc copper as an explicit cell: four atoms by F centring,
	// the same extinction distance as the preset when the Debye–Waller
	// factor is the same.
	preset := mustBuild(t, base)
	b := preset.Crystal.Atoms[0].BIsoNm2
	a := preset.Crystal.Cell.A
	cell := fmtF(a)
	explicit := mustBuild(t, replace(t, `"material": "Cu"`, `"cell": {"a_nm": `+cell+`, "b_nm": `+cell+`, "c_nm": `+cell+`, "alpha_deg": 90, "beta_deg": 90, "gamma_deg": 90},
	  "atoms": [{"element": "Cu", "xyz": [0, 0, 0], "b_iso_nm2": `+fmtF(b)+`}], "centering": "F", "elastic": {"c11": 168, "c12": 121, "c44": 75}`))
	if len(explicit.Crystal.Atoms) != 4 || math.Abs(explicit.XiGNm-preset.XiGNm) > 1e-9*preset.XiGNm {
		t.Errorf("explicit fcc Cu: %d atoms, ξ_200 = %g nm (preset %g)", len(explicit.Crystal.Atoms), explicit.XiGNm, preset.XiGNm)
	}
	// Hexagonal magnesium in four-index form: g = 1 1 −2 0 in the zone
	// [0 0 0 1], a Burgers vector 1/3[1 1 −2 0] of length a.
	mg := mustBuild(t, `{"version": 1, "crystal": {"material": "Mg"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [1, 1, -2, 0], "beam": [0, 0, 0, 1], "s_per_nm": 0},
	  "foil": {"thickness_nm": 100},
	  "defects": [{"type": "dislocation", "b": "1/3[1 1 -2 0]", "line": [1, 1, -2, 3], "at_nm": [0, 0, 50]}],
	  "image": {"width_nm": 50, "height_nm": 50, "pixels": [8, 8]}}`)
	// d(11−20) = a/2 for a hexagonal cell.
	if math.Abs(mg.DSpacingNm-mg.Crystal.Cell.A/2) > 1e-12 || mg.G != [3]float64{1, 1, 0} {
		t.Errorf("Mg g = %v, d = %g nm, a = %g nm", mg.G, mg.DSpacingNm, mg.Crystal.Cell.A)
	}
	bad := strings.Replace(`{"version": 1, "crystal": {"material": "Mg"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [1, 1, -1, 0], "beam": [0, 0, 0, 1], "s_per_nm": 0}, "foil": {"thickness_nm": 100},
	  "defects": [], "image": {"width_nm": 50, "height_nm": 50, "pixels": [8, 8]}}`, "", "", 1)
	sc, _ = Parse([]byte(bad))
	if _, err := Build(sc, "."); err == nil || !strings.Contains(err.Error(), "diffraction.g") {
		t.Errorf("four-index g with i ≠ −(h+k): %v", err)
	}
}
