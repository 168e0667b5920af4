package tests

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"faultline/figure"
)

var cliPath string

// TestMain builds the command line once, without cgo, as a user's
// `CGO_ENABLED=0 go build ./cmd/faultline` would.
func TestMain(m *testing.M) {
	dir, err := os.MkdirTemp("", "faultline-cli")
	if err != nil {
		panic(err)
	}
	cliPath = filepath.Join(dir, "faultline")
	build := exec.Command("go", "build", "-o", cliPath, "faultline/cmd/faultline")
	build.Env = append(os.Environ(), "CGO_ENABLED=0")
	if out, err := build.CombinedOutput(); err != nil {
		os.Stderr.Write(out)
		panic("building cmd/faultline with CGO_ENABLED=0: " + err.Error())
	}
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

func cli(t *testing.T, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	cmd := exec.Command(cliPath, args...)
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	err := cmd.Run()
	if ee, ok := err.(*exec.ExitError); ok {
		return o.String(), e.String(), ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	return o.String(), e.String(), 0
}

func writeScene(t *testing.T, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "scene.json")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const goodScene = `{
  "version": 1,
  "crystal": {"material": "Cu"},
  "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.0, "model": "two-beam", "absorption_ratio": 0.1},
  "foil": {"thickness_nm": 120, "normal": [0, 0, 1]},
  "defects": [
    {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 60]}
  ],
  "image": {"width_nm": 200, "height_nm": 200, "pixels": [64, 64]}
}`

func TestRenderWritesTheFiles(t *testing.T) {
	out := t.TempDir()
	_, stderr, code := cli(t, "render", writeScene(t, goodScene), "-o", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, name := range []string{"bf.png", "df.png", "figure.png"} {
		text, err := figure.ReadPNGText(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		var back map[string]any
		if err := json.Unmarshal([]byte(text["faultline-scene"]), &back); err != nil || back["version"] != 1.0 {
			t.Errorf("%s: scene text chunk missing or not the scene: %v", name, err)
		}
	}
	for _, name := range []string{"bf.tiff", "df.tiff"} {
		f, err := os.Open(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		data, nx, ny, err := figure.ReadFloatTIFF(f)
		f.Close()
		if err != nil || nx != 64 || ny != 64 {
			t.Fatalf("%s: %v %d×%d", name, err, nx, ny)
		}
		for _, v := range data {
			if !(v >= 0 && v <= 1) {
				t.Fatalf("%s: intensity %g outside [0, 1]", name, v)
			}
		}
	}
}

func TestProfileCSV(t *testing.T) {
	path := writeScene(t, goodScene)
	stdout, stderr, code := cli(t, "profile", path, "--y-nm", "10")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "x_nm,bf,df" || len(rows) != 65 {
		t.Fatalf("header %v, %d rows", rows[0], len(rows))
	}
	// Pixel centres x = (i + 0.5 − nx/2)·Δx with Δx = 200/64 nm.
	for i, r := range rows[1:] {
		x, _ := strconv.ParseFloat(r[0], 64)
		if want := (float64(i) + 0.5 - 32) * 200 / 64; math.Abs(x-want) > 1e-4 {
			t.Fatalf("row %d: x = %g, want %g", i, x, want)
		}
	}
	// The row is the one nearest y = 10 nm of the full render.
	out := t.TempDir()
	if _, e, c := cli(t, "render", path, "-o", out); c != 0 {
		t.Fatal(e)
	}
	f, _ := os.Open(filepath.Join(out, "bf.tiff"))
	bf, nx, _, err := figure.ReadFloatTIFF(f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	j := int(math.Floor(10/(200.0/64) + 32)) // y_j nearest 10 nm
	for i, r := range rows[1:] {
		v, _ := strconv.ParseFloat(r[1], 64)
		if math.Abs(v-float64(bf[j*nx+i])) > 1e-6 {
			t.Fatalf("profile pixel %d = %g, render row %d has %g", i, v, j, bf[j*nx+i])
		}
	}
}

func TestReflectionsJSON(t *testing.T) {
	stdout, stderr, code := cli(t, "reflections", writeScene(t, goodScene), "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out struct {
		WavelengthNm float64 `json:"wavelength_nm"`
		VoltageKV    float64 `json:"voltage_kv"`
		Reflections  []struct {
			HKL          []float64 `json:"hkl"`
			DNm          float64   `json:"d_nm"`
			ExtinctionNm *float64  `json:"extinction_nm"`
			SPerNm       float64   `json:"s_per_nm"`
			W            *float64  `json:"w"`
			Forbidden    bool      `json:"forbidden"`
		} `json:"reflections"`
	}
	if err := json.Unmarshal([]byte(stdout), &out); err != nil {
		t.Fatal(err)
	}
	// λ(200 kV) = 2.508 pm (relativistic; published tables, e.g.
	// Williams & Carter 2009, Table 1.1).
	if math.Abs(out.WavelengthNm-0.002508) > 2e-6 || out.VoltageKV != 200 {
		t.Errorf("wavelength %g nm at %g kV", out.WavelengthNm, out.VoltageKV)
	}
	first := out.Reflections[0]
	if len(first.HKL) != 3 || first.HKL[0] != 2 || first.HKL[1] != 0 || first.HKL[2] != 0 || first.Forbidden || first.ExtinctionNm == nil {
		t.Fatalf("first reflection %+v, want the scene's g = 200", first)
	}
	// d(200) of Cu = a/2 (a = 0.3615 nm).
	if math.Abs(first.DNm-0.36149/2) > 1e-3 {
		t.Errorf("d_200 = %g nm", first.DNm)
	}
	sawForbidden := false
	for _, r := range out.Reflections {
		sawForbidden = sawForbidden || r.Forbidden
		// Every listed g is in the zone [001]: l = 0.
		if r.HKL[2] != 0 {
			t.Errorf("%v is not in the zone [0 0 1]", r.HKL)
		}
		// Systematic row: s_n = n s_g + n(1−n) λ g²/2 with s_g = 0.
		if r.HKL[1] == 0 && r.HKL[2] == 0 {
			n := r.HKL[0] / 2
			g := 2 / 0.36149
			want := n * (1 - n) * out.WavelengthNm * g * g / 2
			if math.Abs(r.SPerNm-want) > 1e-3*math.Abs(want)+1e-9 {
				t.Errorf("%v: s = %g, want %g", r.HKL, r.SPerNm, want)
			}
		}
	}
	if !sawForbidden {
		t.Error("no forbidden reflection flagged in the fcc [001] zone (100 and 110 are forbidden)")
	}
}

// Every kind of bad input exits 2 with a single line on stderr that starts
// "error:" and names what is wrong.
func TestBadInput(t *testing.T) {
	mod := func(old, new string) string {
		if !strings.Contains(goodScene, old) {
			t.Fatalf("test scene has no %q", old)
		}
		return strings.Replace(goodScene, old, new, 1)
	}
	cases := []struct {
		name, text, want string
	}{
		{"unknown field", mod(`"thickness_nm": 120`, `"thickness_nm": 120, "thicknes": 3`), "foil.thicknes: unknown field"},
		{"g not perpendicular", mod(`"g": [2, 0, 0]`, `"g": [1, 1, 1]`), "diffraction.g: [1 1 1] is not perpendicular to the beam [0 0 1]"},
		{"two deviations", mod(`"s_per_nm": 0.0`, `"s_per_nm": 0.0, "w": 1`), "diffraction: give only one deviation setting"},
		{"thickness zero", mod(`"thickness_nm": 120`, `"thickness_nm": 0`), "foil.thickness_nm"},
		{"thickness negative", mod(`"thickness_nm": 120`, `"thickness_nm": -5`), "foil.thickness_nm: -5"},
		{"pixels zero", mod(`"pixels": [64, 64]`, `"pixels": [0, 64]`), "image.pixels"},
		{"pixels too many", mod(`"pixels": [64, 64]`, `"pixels": [100000, 100000]`), "image.pixels: [100000 100000]: more than"},
		{"burgers text", mod(`"1/2[1 1 0]"`, `"1/2[1 1"`), "defects[0].b"},
		{"zero line", mod(`"line": [1, -1, 0]`, `"line": [0, 0, 0]`), "defects[0].line: [0, 0, 0]: all indices are zero"},
		{"unknown defect", mod(`"type": "dislocation"`, `"type": "twin"`), `defects[0].type: "twin" is not a defect type`},
		{"unknown material", mod(`"Cu"`, `"Unobtainium"`), "crystal.material"},
		{"truncated", goodScene[:len(goodScene)/2], "truncated"},
		{"wrong type", mod(`"thickness_nm": 120`, `"thickness_nm": "120"`), "foil.thickness_nm"},
		{"forbidden g", mod(`"g": [2, 0, 0]`, `"g": [1, 0, 0]`), "forbidden"},
		{"model", mod(`"model": "two-beam"`, `"model": "three-beam"`), "diffraction.model"},
	}
	for _, c := range cases {
		_, stderr, code := cli(t, "render", writeScene(t, c.text), "-o", t.TempDir())
		lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
		if code != 2 || len(lines) != 1 || !strings.HasPrefix(lines[0], "error: ") || !strings.Contains(lines[0], c.want) {
			t.Errorf("%s: exit %d, stderr %q; want exit 2 and one line with %q", c.name, code, stderr, c.want)
		}
		if strings.Contains(stderr, "goroutine") || strings.Contains(stderr, "panic") {
			t.Errorf("%s: a panic trace reached the user: %s", c.name, stderr)
		}
	}
	// A missing file, an output directory that cannot be made and bad
	// command-line use are bad input too.
	for _, args := range [][]string{
		{"render", writeScene(t, goodScene), "-o", "/proc/faultline-cannot-be-here"},
		{"render", filepath.Join(t.TempDir(), "missing.json"), "-o", t.TempDir()},
		{"render", writeScene(t, goodScene)},
		{"profile", writeScene(t, goodScene), "--y-nm", "1000"},
		{"frobnicate"},
	} {
		_, stderr, code := cli(t, args...)
		if code != 2 || !strings.HasPrefix(stderr, "error: ") || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and one error line", args, code, stderr)
		}
	}
}

// Every defect kind renders through the command line, several in one
// scene, and each leaves its mark: removing any one of them changes the
// image.
func TestEveryDefectKindRenders(t *testing.T) {
	data, err := os.ReadFile("testdata/all_defects.json")
	if err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	if _, stderr, code := cli(t, "render", "testdata/all_defects.json", "-o", out); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	all := render(t, setup(t, string(data)))
	var sc map[string]any
	if err := json.Unmarshal(data, &sc); err != nil {
		t.Fatal(err)
	}
	defs := sc["defects"].([]any)
	for k := range defs {
		rest := append(append([]any{}, defs[:k]...), defs[k+1:]...)
		sc["defects"] = rest
		text, _ := json.Marshal(sc)
		without := render(t, setup(t, string(text)))
		diff := 0.0
		for n := range all.BF() {
			diff = math.Max(diff, math.Abs(all.BF()[n]-without.BF()[n]))
		}
		if diff < 0.01 {
			t.Errorf("removing %v changes the image by only %g", defs[k].(map[string]any)["type"], diff)
		}
	}
}

// A scene whose CIF file is broken names the file's line in its one error
// line, and exits 2.
func TestBadCIF(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "broken.cif"), []byte("data_x\n_cell_length_a 4.0\n_cell_length_b 4.0\nloop_\n_atom_site_label\n_atom_site_type_symbol\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nNa1 Na 0 0 0\n"), 0o644)
	text := strings.Replace(goodScene, `"material": "Cu"`, `"cif": "broken.cif", "elastic": {"shear_gpa": 20, "poisson": 0.3}`, 1)
	p := filepath.Join(dir, "scene.json")
	os.WriteFile(p, []byte(text), 0o644)
	_, stderr, code := cli(t, "render", p, "-o", t.TempDir())
	if code != 2 || !strings.HasPrefix(stderr, "error: crystal.cif: ") || strings.Count(stderr, "\n") != 1 {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	t.Logf("%s", stderr)
}

// Bad crystal input from the command line: each exits 2 with the field
// named.
func TestBadCrystalInput(t *testing.T) {
	cell := `"cell": {"a_nm": 0.36, "b_nm": 0.36, "c_nm": 0.36, "alpha_deg": 90, "beta_deg": 90, "gamma_deg": 90}, "centering": "F", "elastic": {"shear_gpa": 40, "poisson": 0.3}`
	for _, c := range []struct{ crystal, g, want string }{
		{cell + `, "atoms": [{"element": "Xx", "xyz": [0, 0, 0]}]`, `[2, 0, 0]`, "crystal.atoms"},
		{cell + `, "atoms": [{"element": "Cu", "xyz": [0, 0, 0], "occupancy": 1.5}]`, `[2, 0, 0]`, "crystal.atoms[0].occupancy: 1.5"},
		{strings.Replace(cell, `"gamma_deg": 90`, `"gamma_deg": 200`, 1) + `, "atoms": [{"element": "Cu", "xyz": [0, 0, 0]}]`, `[2, 0, 0]`, "crystal.cell"},
		{`"material": "Mg"`, `[1, 1, -1, 0]`, "diffraction.g"},
	} {
		text := strings.Replace(goodScene, `"material": "Cu"`, c.crystal, 1)
		text = strings.Replace(text, `"g": [2, 0, 0]`, `"g": `+c.g, 1)
		if strings.Contains(c.crystal, "Mg") {
			text = strings.Replace(text, `"beam": [0, 0, 1]`, `"beam": [0, 0, 0, 1]`, 1)
		}
		_, stderr, code := cli(t, "reflections", writeScene(t, text))
		if code != 2 || !strings.HasPrefix(stderr, "error: "+c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%s: exit %d, stderr %q, want %q", c.want, code, stderr, c.want)
		}
	}
	// Hexagonal reflections come back in four-index form.
	mg := strings.Replace(strings.Replace(strings.Replace(goodScene, `"material": "Cu"`, `"material": "Mg"`, 1),
		`"g": [2, 0, 0], "beam": [0, 0, 1]`, `"g": [1, 1, -2, 0], "beam": [0, 0, 0, 1]`, 1), `"b": "1/2[1 1 0]", "line": [1, -1, 0]`, `"b": "1/3[1 1 -2 0]", "line": [1, -1, 0, 0]`, 1)
	stdout, stderr, code := cli(t, "reflections", writeScene(t, mg), "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var out struct {
		Reflections []struct {
			HKL []float64 `json:"hkl"`
		} `json:"reflections"`
	}
	json.Unmarshal([]byte(stdout), &out)
	for _, r := range out.Reflections {
		if len(r.HKL) != 4 || r.HKL[2] != -(r.HKL[0]+r.HKL[1]) {
			t.Fatalf("reflection %v is not four-index hkil", r.HKL)
		}
	}
}
