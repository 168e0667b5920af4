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

// --figure-width-mm and --dpi make figure.png that many pixels wide
// (W/25.4·D), --figure-format adds the vector figure; without them
// figure.png is the screen figure as before.
func TestRenderPrintFigure(t *testing.T) {
	dir := t.TempDir()
	sc := writeFile(t, "s.json", perfectScene)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"render", sc, "-o", out, "--figure-width-mm", "85", "--dpi", "300", "--figure-format", "svg"}, &stdout, &stderr); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	f, err := os.Open(filepath.Join(out, "figure.png"))
	if err != nil {
		t.Fatal(err)
	}
	cfg, err := png.DecodeConfig(f)
	f.Close()
	if err != nil || cfg.Width != 1004 { // round(85/25.4·300)
		t.Errorf("figure.png %d px wide (%v), want 1004", cfg.Width, err)
	}
	if b, err := os.ReadFile(filepath.Join(out, "figure.svg")); err != nil || !strings.Contains(string(b), "<svg") {
		t.Errorf("figure.svg: %v", err)
	}
	stderr.Reset()
	if code := run(context.Background(), []string{"render", sc, "-o", out, "--figure-width-mm", "5"}, &stdout, &stderr); code != exitBadInput || !strings.HasPrefix(stderr.String(), "error: --figure-width-mm 5: want 20 to 500") {
		t.Errorf("width 5 mm: exit %d, %q", code, stderr.String())
	}
}
