package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Warnings about the conditions go to stderr after a successful render,
// one "warning:" line each, and do not change the exit status.
func TestRenderWarnings(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.json")
	os.WriteFile(path, []byte(`{"version": 1, "crystal": {"material": "Ni"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0},
  "foil": {"thickness_nm": 3000}, "defects": [],
  "image": {"width_nm": 40, "height_nm": 40, "pixels": [8, 8]}}`), 0o644)
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"render", path, "-o", filepath.Join(dir, "out")}, &stdout, &stderr); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, want := range []string{"warning: diffraction: reflections outside the systematic row are strongly excited", "warning: opaque foil"} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("stderr lacks %q:\n%s", want, stderr.String())
		}
	}
}
