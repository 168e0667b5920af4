package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// render --format mrc writes bf.mrc and df.mrc beside the calibrated
// TIFFs; inspect reports what each file holds, as JSON with the keys the
// design names; bad micrograph files exit 2 with one line.
func TestRenderMRCAndInspect(t *testing.T) {
	dir := t.TempDir()
	sc := writeFile(t, "s.json", perfectScene)
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"render", sc, "-o", out, "--format", "mrc"}, &stdout, &stderr); code != exitOK {
		t.Fatalf("render: exit %d: %s", code, stderr.String())
	}
	for _, f := range []string{"bf.tiff", "df.mrc"} {
		stdout.Reset()
		stderr.Reset()
		if code := run(context.Background(), []string{"inspect", "--json", filepath.Join(out, f)}, &stdout, &stderr); code != exitOK {
			t.Fatalf("inspect %s: exit %d: %s", f, code, stderr.String())
		}
		var got struct {
			Width, Height int
			NmPerPx       float64 `json:"nm_per_px"`
			Format, Kind  string
			Metadata      map[string]any
		}
		if err := json.Unmarshal(stdout.Bytes(), &got); err != nil {
			t.Fatal(err)
		}
		if got.Width != 16 || got.Height != 8 || math.Abs(got.NmPerPx-2.5) > 1e-6 || got.Kind != "32-bit float" || got.Metadata == nil ||
			got.Format != strings.TrimPrefix(filepath.Ext(f), ".") {
			t.Errorf("inspect %s: %+v, want 16 × 8 at 2.5 nm/px", f, got)
		}
	}
	stdout.Reset()
	run(context.Background(), []string{"inspect", filepath.Join(out, "bf.tiff")}, &stdout, &stderr)
	if !strings.Contains(stdout.String(), "pixel size   2.5 nm") {
		t.Errorf("inspect text:\n%s", stdout.String())
	}
	cut := filepath.Join(dir, "cut.mrc")
	b, _ := os.ReadFile(filepath.Join(out, "bf.mrc"))
	os.WriteFile(cut, b[:1100], 0o644)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"inspect", cut}, "error: cut.mrc: MRC: the file is truncated"},
		{[]string{"inspect", sc}, "error: s.json: not a format this program reads"},
		{[]string{"inspect"}, "error: inspect: give one micrograph file"},
		{[]string{"render", sc, "-o", out, "--format", "jpeg"}, "error: --format jpeg: the formats are mrc"},
	} {
		stderr.Reset()
		code := run(context.Background(), c.args, &stdout, &stderr)
		if code != exitBadInput || !strings.HasPrefix(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%v: exit %d, %q; want 2 and %q", c.args, code, stderr.String(), c.want)
		}
	}
}
