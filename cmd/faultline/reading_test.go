package main

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// render prints one "reading:" line per defect on stderr, and
// --caption long adds them under the figure (a taller figure.png).
func TestRenderReadings(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "loop.json")
	os.WriteFile(path, []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "w": 1},
  "foil": {"thickness_nm": 100},
  "defects": [{"type": "loop", "at_nm": [0, 0, 50], "normal": [1, 0, 1], "b": "1/2[1 0 1]", "radius_nm": 10},
              {"type": "inclusion", "at_nm": [20, 0, 50], "radius_nm": 3, "misfit": 0.01}],
  "image": {"width_nm": 60, "height_nm": 60, "pixels": [32, 32]}}`), 0o644)
	height := map[string]int{}
	for _, caption := range []string{"short", "long"} {
		out := filepath.Join(dir, caption)
		var stdout, stderr bytes.Buffer
		if code := run(context.Background(), []string{"render", path, "-o", out, "--caption", caption}, &stdout, &stderr); code != exitOK {
			t.Fatalf("--caption %s: exit %d: %s", caption, code, stderr.String())
		}
		for _, want := range []string{
			"reading: loop 1: vacancy (b·n > 0), (g·b)s > 0",
			"→ outside contrast expected",
			"reading: inclusion 2: misfit +0.01 (expanding)",
		} {
			if !strings.Contains(stderr.String(), want) {
				t.Errorf("--caption %s: stderr lacks %q:\n%s", caption, want, stderr.String())
			}
		}
		f, err := os.Open(filepath.Join(out, "figure.png"))
		if err != nil {
			t.Fatal(err)
		}
		cfg, err := png.DecodeConfig(f)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		height[caption] = cfg.Height
	}
	if height["long"] <= height["short"] {
		t.Errorf("figure.png is %d px high with the long caption and %d with the short one: the readings are not under it", height["long"], height["short"])
	}
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"render", path, "-o", dir, "--caption", "medium"}, &stdout, &stderr); code != exitBadInput || !strings.HasPrefix(stderr.String(), "error: render: --caption") {
		t.Errorf("--caption medium: exit %d, %q", code, stderr.String())
	}
}
