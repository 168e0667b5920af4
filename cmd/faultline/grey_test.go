package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/export"
)

// render --grey and --clip choose figure.png's grey scale, and the figure
// is the one export.Figure draws under that mapping; bad values exit 2
// with one line naming the flag.
func TestRenderGrey(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.json")
	os.WriteFile(path, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01}, "foil": {"thickness_nm": 60},
  "defects": [{"type": "inclusion", "at_nm": [0, 0, 30], "radius_nm": 5, "misfit": 0.02}],
  "image": {"width_nm": 80, "height_nm": 80, "pixels": [16, 16]}}`), 0o644)
	figs := map[string][]byte{}
	for name, args := range map[string][]string{
		"stretch": {"render", path, "-o", filepath.Join(dir, "stretch")},
		"fixed":   {"render", path, "-o", filepath.Join(dir, "fixed"), "--grey", "fixed"},
		"clip0":   {"render", path, "-o", filepath.Join(dir, "clip0"), "--grey", "stretch", "--clip", "0"},
	} {
		var stdout, stderr bytes.Buffer
		if code := run(context.Background(), args, &stdout, &stderr); code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, stderr.String())
		}
		b, err := os.ReadFile(filepath.Join(args[3], export.FileFigure))
		if err != nil {
			t.Fatal(err)
		}
		figs[name] = b
	}
	if bytes.Equal(figs["stretch"], figs["fixed"]) || bytes.Equal(figs["stretch"], figs["clip0"]) {
		t.Error("--grey or --clip does not change figure.png")
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--grey", "log"}, `error: render: --grey "log": use fixed or stretch`},
		{[]string{"--clip", "50"}, "error: render: --clip 50: must be a percentage from 0 up to but not including 50"},
		{[]string{"--clip", "-1"}, "error: render: --clip -1:"},
		{[]string{"--grey", "fixed", "--clip", "1"}, "error: render: --clip applies to --grey stretch only"},
	} {
		var stdout, stderr bytes.Buffer
		args := append([]string{"render", path, "-o", filepath.Join(dir, "bad")}, c.args...)
		code := run(context.Background(), args, &stdout, &stderr)
		if code != exitBadInput || !strings.HasPrefix(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line %q", c.args, code, stderr.String(), c.want)
		}
	}
}
