package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"faultline/export"
	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// The exit statuses of the design (0 success, 2 bad input, 1 internal),
// in process: each failure is one "error:" line on stderr.
func TestRunExitStatus(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "colour": 1}`), 0o644)
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{nil, exitBadInput, "usage:"},
		{[]string{"help"}, exitOK, ""},
		{[]string{"frobnicate"}, exitBadInput, `error: unknown command "frobnicate"`},
		{[]string{"plan", bad, "-o", dir}, exitBadInput, "error: colour: unknown field"},
		{[]string{"render", bad, "-o", dir}, exitBadInput, "error: colour: unknown field"},
		{[]string{"render", bad}, exitBadInput, "error: render: give the output directory with -o DIR"},
		{[]string{"reflections", bad, bad}, exitBadInput, "error: reflections: give one scene file (got 2 arguments;"},
		{[]string{"profile", filepath.Join(dir, "none.json")}, exitBadInput, "error: scene file"},
	} {
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), c.args, &stdout, &stderr)
		if code != c.code || !strings.HasPrefix(stderr.String(), c.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, code, stderr.String(), c.code, c.want)
		}
		if code == exitBadInput && strings.HasPrefix(c.want, "error:") && strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: %d lines on stderr, want one", c.args, strings.Count(stderr.String(), "\n"))
		}
	}
}

func TestOneLine(t *testing.T) {
	if got := oneLine("a\n  b\tc "); got != "a b c" {
		t.Errorf("oneLine = %q", got)
	}
}

// --set on profile gives the profile of the scene file written with that
// value; bad paths and values exit 2 with one line naming the path.
func TestRunSet(t *testing.T) {
	dir := t.TempDir()
	scene := func(thickness, b string) string {
		return `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
  "foil": {"thickness_nm": ` + thickness + `},
  "defects": [{"type": "dislocation", "b": "` + b + `", "line": [0, 0, 1], "at_nm": [0, 0, 40]}],
  "image": {"width_nm": 100, "height_nm": 100, "pixels": [16, 16]}}`
	}
	a := filepath.Join(dir, "a.json")
	b := filepath.Join(dir, "b.json")
	os.WriteFile(a, []byte(scene("120", "1/2[1 1 0]")), 0o644)
	os.WriteFile(b, []byte(scene("80", "1/2[1 0 1]")), 0o644)
	profile := func(args ...string) string {
		t.Helper()
		var stdout, stderr bytes.Buffer
		if code := run(context.Background(), append([]string{"profile"}, args...), &stdout, &stderr); code != exitOK {
			t.Fatalf("%v: exit %d: %s", args, code, stderr.String())
		}
		return stdout.String()
	}
	want := profile(b)
	got := profile(a, "--set", "foil.thickness_nm=80", "--set", `defects[0].b="1/2[1 0 1]"`)
	if got != want {
		t.Errorf("profile with --set differs from the scene written with the values:\n%s\n%s", got, want)
	}
	if profile(a) == want {
		t.Fatal("the two scenes give the same profile: the test cannot tell")
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"profile", a, "--set", "foil.thick=80"}, "error: --set foil.thick: unknown field"},
		{[]string{"profile", a, "--set", "foil.thickness_nm=-1"}, "error: --set foil.thickness_nm: -1 nm: must be ≥ 0.1 and ≤ 10000 nm"},
		{[]string{"profile", a, "--set", "defects[0].b=1/2[1 0 1]"}, "error: --set defects[0].b: \"1/2[1 0 1]\" is not a JSON value"},
		{[]string{"profile", a, "--set", "defects[2].b=\"1/2[1 0 1]\""}, "error: --set defects[2]: index out of range"},
		{[]string{"render", a, "-o", dir, "--set", "diffraction.g=\"200\""}, "error: --set diffraction.g: is string, want a list"},
		{[]string{"render", a, "-o", dir, "--set", "diffraction.g"}, "error: render: invalid value"},
	} {
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), c.args, &stdout, &stderr)
		if code != exitBadInput || !strings.HasPrefix(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line %q", c.args, code, stderr.String(), c.want)
		}
	}
}

// sceneText is a small scene; fields are filled by fmt with the pixel
// counts and extra image fields.
func sceneText(nx, ny int, extra string) string {
	w := 100.0
	h := w * float64(ny) / float64(nx)
	return fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
  "foil": {"thickness_nm": 60},
  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [0, 0, 1], "at_nm": [0, 0, 30]}],
  "image": {"width_nm": %g, "height_nm": %g, "pixels": [%d, %d]%s}}`, w, h, nx, ny, extra)
}

// perfectScene is a small perfect copper crystal: the files of a render
// without any defect.
const perfectScene = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
  "foil": {"thickness_nm": 50},
  "image": {"width_nm": 40, "height_nm": 20, "pixels": [16, 8]}}`

func writeFile(t *testing.T, name, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func runCLI(args ...string) (stdout, stderr string, code int) {
	var o, e bytes.Buffer
	code = run(context.Background(), args, &o, &e)
	return o.String(), e.String(), code
}

// oneErrorLine checks the failure contract: the last line of stderr is
// the only "error:" line and stands alone.
func oneErrorLine(t *testing.T, args []string, stderr string) string {
	t.Helper()
	lines := strings.Split(strings.TrimSuffix(stderr, "\n"), "\n")
	last := lines[len(lines)-1]
	if !strings.HasPrefix(last, "error: ") || strings.Count(stderr, "error:") != 1 || !strings.HasSuffix(stderr, "\n") {
		t.Errorf("%v: stderr %q: want one error line, last", args, stderr)
	}
	return last
}

// TestHelpForEveryCommand: COMMAND --help and -h print the command's usage
// on stdout and exit 0; no arguments prints the usage on stderr, exit 2.
func TestHelpForEveryCommand(t *testing.T) {
	for _, c := range []string{"render", "profile", "reflections", "identify", "fit"} {
		for _, h := range []string{"--help", "-h"} {
			out, errOut, code := runCLI(c, h)
			if code != exitOK || !strings.HasPrefix(out, "usage: faultline "+c) || errOut != "" {
				t.Errorf("%s %s: exit %d, stdout %q, stderr %q", c, h, code, out, errOut)
			}
		}
	}
	for _, args := range [][]string{{"--help"}, {"-h"}, {"help"}} {
		if out, _, code := runCLI(args...); code != exitOK || !strings.HasPrefix(out, "usage:") {
			t.Errorf("%v: exit %d, %q", args, code, out)
		}
	}
	if _, errOut, code := runCLI(); code != exitBadInput || !strings.HasPrefix(errOut, "usage:") {
		t.Errorf("no arguments: exit %d, stderr %q", code, errOut)
	}
}

// TestOutputErrors: -o where no directory can be: exit 2 (the
// environment, not the program), one line naming -o and the cause, no
// temporary name, nothing rendered first (it fails fast), nothing left.
func TestOutputErrors(t *testing.T) {
	sc := writeFile(t, "s.json", sceneText(16, 16, ""))
	file := writeFile(t, "f.txt", "keep")
	for _, c := range []struct{ o, cause string }{
		{file, "not a directory"},
		{filepath.Join(file, "sub"), "not a directory"},
		{"/dev/null", "not a directory"},
		{"/dev/full", "not a directory"},
		{"/proc/self/no/such", "cannot create the directory"},
	} {
		args := []string{"render", sc, "-o", c.o}
		_, errOut, code := runCLI(args...)
		line := oneErrorLine(t, args, errOut)
		if code != exitBadInput || !strings.HasPrefix(line, "error: -o "+c.o+": ") || !strings.Contains(line, c.cause) || strings.Contains(line, ".tmp-") {
			t.Errorf("-o %s: exit %d, %q; want 2 and one line naming -o and %q", c.o, code, line, c.cause)
		}
	}
	if b, _ := os.ReadFile(file); string(b) != "keep" {
		t.Errorf("the file -o pointed at changed to %q", b)
	}
	// A missing parent chain is created.
	out := filepath.Join(t.TempDir(), "a", "b", "c")
	if _, errOut, code := runCLI("render", sc, "-o", out); code != exitOK {
		t.Fatalf("render into a missing chain: exit %d: %s", code, errOut)
	}
	ents, _ := os.ReadDir(out)
	if len(ents) != 5 {
		t.Errorf("%d files in %s, want 5", len(ents), out)
	}
}

// TestErrorLinesAreShort: a huge bad value is cut in the one error line.
func TestErrorLinesAreShort(t *testing.T) {
	name := strings.Repeat("Unobtainium", 100_000)
	sc := writeFile(t, "s.json", strings.Replace(sceneText(8, 8, ""), `"material": "Cu"`, `"material": "`+name+`"`, 1))
	args := []string{"render", sc, "-o", t.TempDir()}
	_, errOut, code := runCLI(args...)
	line := oneErrorLine(t, args, errOut)
	if code != exitBadInput || len(line) > maxLine+10 || !strings.Contains(line, "crystal.material") {
		t.Errorf("exit %d, line of %d bytes: %.200q", code, len(line), line)
	}
	if got := cutQuoted(`a "` + strings.Repeat("x", 100) + `" b`); !strings.Contains(got, `…" (100 characters) b`) {
		t.Errorf("cutQuoted: %q", got)
	}
}

var (
	negZero  = regexp.MustCompile(`-0(\.0+)?[,\s\]}]`)
	longFrac = regexp.MustCompile(`\d\.\d*(9{6,}|0{6,}[1-9])`) // float noise: 0.3999999999999999, 0.1000000000000002
)

// TestReflectionsJSON: values rounded to the decimals the table shows (no
// 0.3999999999999999, no −0), every field present, and a crystal without
// elastic constants lists its reflections even with a dislocation in the
// scene (listing reflections needs no elasticity).
func TestReflectionsJSON(t *testing.T) {
	noElastic := `{"version": 1, "crystal": {"cell": {"a_nm": 0.4, "b_nm": 0.4, "c_nm": 0.4, "alpha_deg": 90, "beta_deg": 90, "gamma_deg": 90},
	  "atoms": [{"element": "Al", "xyz": [0, 0, 0]}], "centering": "F"},
	  "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 2, 0], "beam": [0, 0, 1], "w": 0.4},
	  "foil": {"thickness_nm": 60},
	  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [0, 0, 1], "at_nm": [0, 0, 30]}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [8, 8]}}`
	for _, text := range []string{sceneText(8, 8, ""), noElastic} {
		sc := writeFile(t, "s.json", text)
		out, errOut, code := runCLI("reflections", sc, "--json")
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errOut)
		}
		if m := negZero.FindString(out); m != "" {
			t.Errorf("-0 in the JSON: %q", m)
		}
		if m := longFrac.FindString(out); m != "" {
			t.Errorf("unrounded number in the JSON: %q", m)
		}
		var r struct {
			Reflections []map[string]any `json:"reflections"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil || len(r.Reflections) < 2 {
			t.Fatalf("JSON: %v (%d reflections)", err, len(r.Reflections))
		}
		for _, f := range []string{"hkl", "d_nm", "fg_nm", "extinction_nm", "s_per_nm", "w", "forbidden", "scene_g"} {
			if _, ok := r.Reflections[0][f]; !ok {
				t.Errorf("field %s missing", f)
			}
		}
		if w := r.Reflections[0]["w"]; text == noElastic && w != 0.4 {
			t.Errorf("w of the scene's g = %v, want 0.4 as given", w)
		}
	}
}

// TestProfileAlongALine: --from/--to gives what the window's line
// profile (export.SampleLine over the whole image) gives, though only the
// rows the line crosses are rendered.
func TestProfileAlongALine(t *testing.T) {
	sc := writeFile(t, "s.json", sceneText(32, 32, ""))
	out, errOut, code := runCLI("profile", sc, "--from", "-40,-10", "--to", "30,25.5")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	s, err := scene.Load(sc)
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(s, ".")
	if err != nil {
		t.Fatal(err)
	}
	im, err := export.Render(context.Background(), st, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	export.WriteLineProfile(&want, export.SampleLine(im, export.Line{X0: -40, Y0: -10, X1: 30, Y1: 25.5}))
	if out != want.String() || !strings.HasPrefix(out, "distance_nm,x_nm,y_nm,bf,df\n") {
		t.Errorf("line profile differs from SampleLine over the whole image:\n%.300s\n%.300s", out, want.String())
	}
	for _, args := range [][]string{
		{"profile", sc, "--from", "0,0"},
		{"profile", sc, "--from", "0,0", "--to", "1,1", "--y-nm", "3"},
		{"profile", sc, "--from", "0;0", "--to", "1,1"},
		{"profile", sc, "--from", "NaN,0", "--to", "1,1"},
		{"profile", sc, "--from", "500,500", "--to", "600,600"},
	} {
		_, errOut, code := runCLI(args...)
		oneErrorLine(t, args, errOut)
		if code != exitBadInput {
			t.Errorf("%v: exit %d", args, code)
		}
	}
}

// TestFigureShapes: pixel counts the scene accepts either give a figure
// (scaled to fit) or are refused before rendering, naming image.pixels.
func TestFigureShapes(t *testing.T) {
	for _, c := range []struct {
		nx, ny int
		ok     bool
	}{{16, 1024, true}, {1024, 16, true}, {4096, 64, true}, {10000, 1, false}, {1, 4096, false}} {
		sc := writeFile(t, "s.json", sceneText(c.nx, c.ny, ""))
		out := t.TempDir()
		args := []string{"render", sc, "-o", out}
		start := time.Now()
		_, errOut, code := runCLI(args...)
		ents, _ := os.ReadDir(out)
		if c.ok {
			if code != exitOK || len(ents) != 5 {
				t.Errorf("[%d, %d]: exit %d, %d files: %s", c.nx, c.ny, code, len(ents), errOut)
			}
			continue
		}
		line := oneErrorLine(t, args, errOut)
		if code != exitBadInput || !strings.Contains(line, "image.pixels") || len(ents) != 0 {
			t.Errorf("[%d, %d]: exit %d, %d files, %q", c.nx, c.ny, code, len(ents), line)
		}
		if d := time.Since(start); d > 5*time.Second {
			t.Logf("[%d, %d]: refusal took %v (was the image rendered first?)", c.nx, c.ny, d)
		}
	}
}

// TestBlurOutOfRange: a blur of 1e12 nm once ran out of memory; now it is
// refused before rendering, naming image.blur_nm.
func TestBlurOutOfRange(t *testing.T) {
	for _, b := range []string{"1e12", "1e300", "1e-200"} {
		sc := writeFile(t, "s.json", sceneText(8, 8, `, "blur_nm": `+b))
		args := []string{"render", sc, "-o", t.TempDir()}
		_, errOut, code := runCLI(args...)
		if line := oneErrorLine(t, args, errOut); code != exitBadInput || !strings.Contains(line, "image.blur_nm") {
			t.Errorf("blur %s: exit %d, %q", b, code, line)
		}
	}
}

// TestInterruptedRender: a render cancelled (as by Ctrl-C) at several
// moments exits 130 with "interrupted", or 0 if it had finished; either
// way no temporary file is left and the directory holds the old set or
// the new one.
func TestInterruptedRender(t *testing.T) {
	sc := writeFile(t, "s.json", sceneText(96, 96, ""))
	ref := t.TempDir()
	start := time.Now()
	if _, errOut, code := runCLI("render", sc, "-o", ref); code != exitOK {
		t.Fatalf("reference render: %s", errOut)
	}
	full := time.Since(start)
	for _, frac := range []float64{0, 0.2, 0.5, 0.9, 1.0, 1.2} {
		out := t.TempDir()
		old := writeFile(t, "old.json", strings.Replace(sceneText(8, 8, ""), `"thickness_nm": 60`, `"thickness_nm": 61`, 1))
		if _, errOut, code := runCLI("render", old, "-o", out); code != exitOK {
			t.Fatal(errOut)
		}
		oldSet := snapshot(t, out)
		ctx, cancel := context.WithCancel(context.Background())
		timer := time.AfterFunc(time.Duration(frac*float64(full)), cancel)
		var o, e bytes.Buffer
		code := run(ctx, []string{"render", sc, "-o", out}, &o, &e)
		timer.Stop()
		cancel()
		got := snapshot(t, out)
		switch code {
		case exitInterrupted:
			if e.String() != "error: interrupted\n" && !strings.HasSuffix(e.String(), "\nerror: interrupted\n") {
				t.Errorf("at %.0f%%: stderr %q", 100*frac, e.String())
			}
			if got != oldSet {
				t.Errorf("at %.0f%%: interrupted, but the directory changed", 100*frac)
			}
		case exitOK:
			if got != snapshot(t, ref) {
				t.Errorf("at %.0f%%: finished, but the directory is not the new set", 100*frac)
			}
		default:
			t.Errorf("at %.0f%%: exit %d: %s", 100*frac, code, e.String())
		}
	}
}

// snapshot lists a directory's entries with their contents' sizes and a
// checksum, failing on a temporary file.
func snapshot(t *testing.T, dir string) string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left: %s", e.Name())
		}
		b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		out = append(out, fmt.Sprintf("%s:%x", e.Name(), sha256.Sum256(b)))
	}
	return strings.Join(out, " ")
}

// TestToleranceFlag: --tolerance takes a positive number of cycles up to
// 0.01; anything else is one error line naming the flag, exit 2.
func TestToleranceFlag(t *testing.T) {
	sc := writeFile(t, "s.json", sceneText(8, 8, ""))
	for _, v := range []string{"0", "-1e-5", "0.5", "NaN", "abc"} {
		args := []string{"render", sc, "-o", t.TempDir(), "--tolerance", v}
		_, errOut, code := runCLI(args...)
		line := oneErrorLine(t, args, errOut)
		if code != exitBadInput || !strings.Contains(line, "tolerance") {
			t.Errorf("--tolerance %s: exit %d, %q; want 2 and a line naming --tolerance", v, code, line)
		}
	}
	if _, errOut, code := runCLI("render", sc, "-o", t.TempDir(), "--tolerance", "1e-7"); code != exitOK {
		t.Errorf("--tolerance 1e-7: exit %d: %s", code, errOut)
	}
}

// render --all-beams writes beam_N.tiff for every beam of the systematic
// row besides 0 and g; df.tiff is the g beam, and with absorption off the
// beams add up to the incident intensity (Σ|φ_n|² = 1; Hirsch et al. 1965).
func TestRenderAllBeams(t *testing.T) {
	dir := t.TempDir()
	sc := filepath.Join(dir, "wb.json")
	os.WriteFile(sc, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "weak_beam": {"n": 3}, "beams": 5, "absorption_ratio": 0},
	  "foil": {"thickness_nm": 60},
	  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 30]}],
	  "image": {"width_nm": 40, "height_nm": 40, "pixels": [8, 8]}}`), 0o644)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"render", sc, "-o", out, "--all-beams"}, &stdout, &stderr); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	read := func(name string) []float32 {
		f, err := os.Open(filepath.Join(out, name))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		v, _, _, err := figure.ReadFloatTIFF(f)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	total := make([]float64, 64)
	for _, name := range []string{"bf.tiff", "df.tiff", "beam_-2.tiff", "beam_-1.tiff", "beam_2.tiff"} {
		for i, v := range read(name) {
			total[i] += float64(v)
		}
	}
	for i, v := range total {
		// float32 files: 1e-6.
		if math.Abs(v-1) > 1e-6 {
			t.Fatalf("pixel %d: the beams add up to %g", i, v)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "beam_1.tiff")); err == nil {
		t.Error("beam_1.tiff written; g is df.tiff")
	}
	if !strings.Contains(stderr.String(), "warning: diffraction.weak_beam") {
		t.Errorf("no weak-beam warning on stderr: %q", stderr.String())
	}
	// A later render into the same directory without --all-beams removes
	// the beams of the earlier one and says so, so the directory never
	// mixes two renders.
	stdout.Reset()
	stderr.Reset()
	if code := run(context.Background(), []string{"render", sc, "-o", out}, &stdout, &stderr); code != exitOK {
		t.Fatalf("second render: exit %d: %s", code, stderr.String())
	}
	for _, name := range []string{"beam_-2.tiff", "beam_-1.tiff", "beam_2.tiff"} {
		if _, err := os.Stat(filepath.Join(out, name)); err == nil {
			t.Errorf("%s of the earlier render is still there", name)
		}
	}
	if !strings.Contains(stderr.String(), "note: removed beam_-1.tiff, beam_-2.tiff, beam_2.tiff") {
		t.Errorf("no note of the removed files on stderr: %q", stderr.String())
	}
}

// plan writes the four curves with their headers and plots, and prints
// suggestions with reasons.
func TestPlanWritesCurves(t *testing.T) {
	dir := t.TempDir()
	sc := filepath.Join(dir, "p.json")
	os.WriteFile(sc, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01},
	  "foil": {"thickness_nm": 50},
	  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 25], "elasticity": "isotropic"}],
	  "image": {"width_nm": 40, "height_nm": 40, "pixels": [8, 8]}}`), 0o644)
	out := filepath.Join(dir, "plan")
	stdout, stderr, code := runCLI("plan", sc, "-o", out, "--thickness-nm", "10:50:10", "--s-per-nm", "-0.02:0.02:0.02", "--candidates", "1/2<110>")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for name, header := range map[string]string{"thickness.csv": "thickness_nm,bf,df\n", "rocking.csv": "s_per_nm,bf,df\n",
		"visibility.csv": "thickness_nm,s_per_nm,visibility\n", "weakbeam.csv": "n,s_per_nm,w,", "gb.csv": "b,g,g_dot_b,g_dot_b_cross_u\n"} {
		b, err := os.ReadFile(filepath.Join(out, name))
		if err != nil || !strings.HasPrefix(string(b), header) {
			t.Errorf("%s: %v, starts %.40q", name, err, b)
		}
	}
	for _, name := range []string{"thickness.png", "rocking.png", "visibility.png", "weakbeam.png"} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Error(err)
		}
	}
	if !strings.Contains(stdout, "because") || !strings.Contains(stdout, "g·b table") || !strings.Contains(stdout, "replayed") {
		t.Errorf("stdout: %s", stdout)
	}
	for _, args := range [][]string{{"plan", sc}, {"plan", sc, "-o", out, "--s-per-nm", "1:0:1"}, {"plan", sc, "-o", out, "--candidates", "1/2<1 1"}} {
		_, errOut, code := runCLI(args...)
		if code != exitBadInput {
			t.Errorf("%v: exit %d %s", args, code, errOut)
		}
	}
}

// TestBadSceneLeavesNoDirectory: a scene refused before rendering does not
// create the -o directory.
func TestBadSceneLeavesNoDirectory(t *testing.T) {
	out := filepath.Join(t.TempDir(), "new")
	for _, text := range []string{
		strings.Replace(sceneText(8, 8, ""), `"thickness_nm": 60`, `"thickness_nm": -1`, 1),
		sceneText(10000, 1, ""),
	} {
		sc := writeFile(t, "s.json", text)
		if _, _, code := runCLI("render", sc, "-o", out); code != exitBadInput {
			t.Errorf("exit %d, want 2", code)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("-o directory created for a refused scene: %v", err)
		}
	}
}
