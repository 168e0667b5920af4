package ui

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A scene file that does not load ends the program with status 2 and one
// line "error: ..." before any window opens.
func TestRunBrokenScene(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"version": 1, "crystal": {"material": "Ni"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2,0,0], "beam": [0,1,1], "s_per_nm": 0},
	  "foil": {"thickness_nm": 100, "thicknes_nm": 3}, "defects": [],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [10, 10]}}`), 0o644)
	for _, c := range []struct {
		name, path, shot string
		want             string
	}{
		{"unknown field", bad, "", "foil.thicknes_nm"},
		{"missing file", filepath.Join(dir, "none.json"), "", "none.json"},
		{"unknown field, screenshot", bad, filepath.Join(dir, "x.png"), "foil.thicknes_nm"},
	} {
		var stderr bytes.Buffer
		code := Run(Options{ScenePath: c.path, Screenshot: c.shot, Stderr: &stderr})
		if code != ExitBadInput {
			t.Errorf("%s: exit %d, want %d", c.name, code, ExitBadInput)
		}
		out := stderr.String()
		if !strings.HasPrefix(out, "error: ") || strings.Count(out, "\n") != 1 || !strings.Contains(out, c.want) {
			t.Errorf("%s: stderr %q, want one line \"error: ...%s...\"", c.name, out, c.want)
		}
	}
}
