package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
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
		{[]string{"plan", bad}, exitBadInput, "error: plan is not built yet"},
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
		{[]string{"profile", a, "--set", "foil.thickness_nm=-1"}, "error: --set foil.thickness_nm: -1: must be positive"},
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
