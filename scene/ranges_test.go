package scene

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// cellScene is base with an explicit cell (aluminium-like, from memory:
// a = 0.405 nm, fcc) and cubic elastic constants.
const cellScene = `{
  "version": 1,
  "crystal": {"cell": {"a_nm": 0.405, "b_nm": 0.405, "c_nm": 0.405, "alpha_deg": 90, "beta_deg": 90, "gamma_deg": 90},
    "atoms": [{"element": "Al", "xyz": [0, 0, 0], "occupancy": 1, "b_iso_nm2": 0.008}], "centering": "F",
    "elastic": {"c11": 108, "c12": 62, "c44": 28}},
  "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
  "foil": {"thickness_nm": 120},
  "defects": [
    {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 60]}
  ],
  "image": {"width_nm": 200, "height_nm": 200, "pixels": [32, 32]}
}`

// TestRangesNameTheirField: each number of the scene outside the defects,
// just outside its range (or absurd: 5e-324, 1e300, 1e308), is refused
// where it enters with an error naming that field and stating the range;
// just inside, it is accepted. Values derived from another field (s from
// w, weak_beam.n or a Kikuchi measurement; the opacity of the foil) name
// the field they came from.
func TestRangesNameTheirField(t *testing.T) {
	sub := func(text, old, new string) string {
		if !strings.Contains(text, old) {
			t.Fatalf("test set-up: %q not in the scene", old)
		}
		return strings.Replace(text, old, new, 1)
	}
	for _, c := range []struct {
		text, want string // want "" for accepted
	}{
		{sub(base, `"voltage_kv": 200`, `"voltage_kv": 0`), "microscope.voltage_kv: missing or zero; 0 kV: must be ≥ 10 and ≤ 3000 kV"},
		{sub(base, `"voltage_kv": 200`, `"voltage_kv": 3001`), "microscope.voltage_kv: 3001 kV"},
		{sub(base, `"voltage_kv": 200`, `"voltage_kv": 3000`), ""},
		{sub(base, `"g": [2, 0, 0]`, `"g": [5e-324, 0, 0]`), "diffraction.g: [5e-324, 0, 0]: index 0 (5e-324) is below 0.001"},
		{sub(base, `"g": [2, 0, 0]`, `"g": [0.5, 0, 0]`), "diffraction.g: [0.5, 0, 0]: index 0 (0.5) is not a whole number"},
		{sub(base, `"g": [2, 0, 0]`, `"g": [1e-9, 0, 0]`), "diffraction.g"},
		{sub(base, `"beam": [0, 0, 1]`, `"beam": [1e308, 1e308, 1e308]`), "diffraction.beam: [1e+308, 1e+308, 1e+308]: index 0 (1e+308) is beyond ±1000"},
		{sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 1e200`), "diffraction.s_per_nm: 1e+200 /nm: must be ≥ -10 and ≤ 10 /nm"},
		{sub(base, `"s_per_nm": 0.01`, `"w": 1e308`), "diffraction.w: 1e+308"},
		{sub(base, `"s_per_nm": 0.01`, `"w": 1e10`), "diffraction.w: 1e+10"},
		{sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "extinction_nm": 1e-200`), "diffraction.extinction_nm: 1e-200 nm: must be ≥ 1 and ≤ 100000 nm"},
		{sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "absorption_ratio": 1`), "diffraction.absorption_ratio: 1: must be ≥ 0 and < 1"},
		{sub(base, `"s_per_nm": 0.01`, `"deviation_from_kikuchi": {"offset": 1, "spacing": 0}`), "diffraction.deviation_from_kikuchi.spacing: 0: must be > 0"},
		{sub(base, `"thickness_nm": 120`, `"thickness_nm": 1e6`), "foil.thickness_nm: 1e+06 nm: must be ≥ 0.1 and ≤ 10000 nm"},
		{sub(base, `"thickness_nm": 120`, `"thickness_nm": 0`), "foil.thickness_nm: missing or zero"},
		{sub(base, `"thickness_nm": 120`, `"thickness_nm": 120, "normal": [0, 1e-9, 1]`), "foil.normal: [0, 1e-09, 1]: index 1 (1e-09) is below 0.001"},
		{sub(base, `"width_nm": 200, "height_nm": 200`, `"width_nm": 5e-324, "height_nm": 5e-324`), "image.width_nm: 5e-324 nm: must be ≥ 0.001"},
		{sub(base, `"pixels": [32, 32]`, `"pixels": [32, 32], "blur_nm": 1e12`), "image.blur_nm: 1e+12 nm: must be 0 (no blur) or from 0.001 nm to 50 nm"},
		{sub(base, `"pixels": [32, 32]`, `"pixels": [32, 32], "blur_nm": 1e-200`), "image.blur_nm: 1e-200 nm"},
		{sub(base, `"pixels": [32, 32]`, `"pixels": [32, 32], "blur_nm": 2`), ""},
		{sub(cellScene, `"a_nm": 0.405`, `"a_nm": 5e-324`), "crystal.cell.a_nm: 5e-324 nm: must be ≥ 0.1 and ≤ 20 nm"},
		{sub(cellScene, `"c_nm": 0.405`, `"c_nm": 1e300`), "crystal.cell.c_nm: 1e+300 nm"},
		{sub(cellScene, `"gamma_deg": 90`, `"gamma_deg": 180`), "crystal.cell.gamma_deg: 180 °: must be > 0 and < 180 °"},
		{sub(cellScene, `"xyz": [0, 0, 0]`, `"xyz": [0, 1e300, 0]`), "crystal.atoms[0].xyz[1]: 1e+300"},
		{sub(cellScene, `"b_iso_nm2": 0.008`, `"b_iso_nm2": 2`), "crystal.atoms[0].b_iso_nm2: 2 nm²"},
		{sub(cellScene, `"occupancy": 1`, `"occupancy": 0`), "crystal.atoms[0].occupancy: 0: must be > 0 and ≤ 1"},
		{sub(cellScene, `"c11": 108`, `"c11": 1e308`), "crystal.elastic.c11: 1e+308 GPa: must be ≥ -2000 and ≤ 2000 GPa"},
		{sub(cellScene, `"c11": 108, "c12": 62, "c44": 28`, `"shear_gpa": 1e308, "poisson": 0.3`), "crystal.elastic.shear_gpa: 1e+308 GPa"},
		{sub(cellScene, `"c11": 108, "c12": 62, "c44": 28`, `"shear_gpa": 26, "poisson": 0.5`), "crystal.elastic.poisson: 0.5: must be > -1 and < 0.5"},
		{cellScene, ""},
		// Derived values name the field they came from.
		{sub(base, `"s_per_nm": 0.01`, `"w": 999`), "diffraction.w: w = 999 with ξ_g ="},
		{sub(base, `"s_per_nm": 0.01`, `"deviation_from_kikuchi": {"offset": 1e5, "spacing": 1}`), "diffraction.deviation_from_kikuchi.offset: offset 100000 over spacing 1 gives s ="},
		{sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "absorption_ratio": 0.9`), ""},
		{sub(sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "absorption_ratio": 0.9`), `"thickness_nm": 120`, `"thickness_nm": 9000`), "foil.thickness_nm: 9000 nm with the mean absorption length"},
		{sub(sub(base, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "absorption_ratio": 0`), `"thickness_nm": 120`, `"thickness_nm": 9000`), ""},
	} {
		sc, err := Parse([]byte(c.text))
		if err == nil {
			_, err = Build(sc, ".")
		}
		switch {
		case c.want == "" && err != nil:
			t.Errorf("refused: %v", err)
		case c.want != "" && (err == nil || !strings.HasPrefix(err.Error(), c.want)):
			t.Errorf("got %v\nwant %q…", err, c.want)
		}
	}
}

// TestEmptySceneFileNamed: an empty scene file is named in the error.
func TestEmptySceneFileNamed(t *testing.T) {
	p := filepath.Join(t.TempDir(), "empty.json")
	os.WriteFile(p, nil, 0o644)
	if _, err := Load(p); err == nil || !strings.Contains(err.Error(), "scene file "+p+": empty") {
		t.Errorf("empty file: %v", err)
	}
}

// TestCIFReadIsBounded: a CIF path naming an endless device is refused
// after crystal.MaxCIFBytes, naming crystal.cif, not read until memory
// runs out.
func TestCIFReadIsBounded(t *testing.T) {
	text := strings.Replace(base, `"material": "Cu"`, `"cif": "/dev/zero"`, 1)
	sc, err := Parse([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Build(sc, "."); err == nil || !strings.HasPrefix(err.Error(), "crystal.cif: /dev/zero: larger than 64 MB") {
		t.Errorf("cif /dev/zero: %v", err)
	}
}
