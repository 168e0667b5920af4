package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/figure"
	"faultline/match"
	"faultline/scene"
)

// seriesDir writes a base scene, three synthetic micrographs of it (32-bit
// float TIFF, shot noise at 40 electrons per pixel, 1.5 nm blur) taken
// with three g of the [011] zone, and returns the directory and the
// micrographs' g angles.
func seriesDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	base := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5},
	  "foil": {"thickness_nm": 90},
	  "defects": [{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, -1, 0], "at_nm": [0, 0, 45], "elasticity": "isotropic"}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`
	if err := os.WriteFile(filepath.Join(dir, "base.json"), []byte(base), 0o644); err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for i, g := range []string{"[2, 0, 0]", "[1, 1, -1]", "[0, 2, -2]"} {
		sc, err := scene.Parse([]byte(base))
		if err != nil {
			t.Fatal(err)
		}
		if err := scene.SetJSON(sc, "diffraction.g", g); err != nil {
			t.Fatal(err)
		}
		st, err := scene.Build(sc, dir)
		if err != nil {
			t.Fatal(err)
		}
		angle := float64(30 * i)
		r, err := match.Simulate(context.Background(), st, match.View{W: 48, H: 48, NmPerPx: 1.6, GAngleDeg: angle}, match.BrightField, 1.5, 0)
		if err != nil {
			t.Fatal(err)
		}
		for k, v := range r.Pix {
			r.Pix[k] = v + math.Sqrt(v/40)*rng.NormFloat64()
		}
		if err := figure.WriteFloatTIFF(filepath.Join(dir, fmt.Sprintf("m%d.tiff", i)), r.Pix, r.W, r.H); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func writeSet(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const goodSet = `{"version": 1, "scene": "base.json", "candidates": ["1/2<110>"], "blur_nm": 1.5,
  "micrographs": [
    {"image": "m0.tiff", "nm_per_px": 1.6, "g_angle_deg": 0, "kind": "bf", "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5}},
    {"image": "m1.tiff", "nm_per_px": 1.6, "g_angle_deg": 30, "kind": "bf", "diffraction": {"g": [1, 1, -1], "beam": [0, 1, 1], "w": 0.5}},
    {"image": "m2.tiff", "nm_per_px": 1.6, "g_angle_deg": 60, "kind": "bf", "diffraction": {"g": [0, 2, -2], "beam": [0, 1, 1], "w": 0.5}}]}`

// identify ranks ±1/2[1 0 1] first for a synthetic series of it, prints
// the JSON the README describes and writes the contact sheet.
func TestIdentifyCommand(t *testing.T) {
	dir := seriesDir(t)
	set := writeSet(t, dir, "set.json", goodSet)
	var stdout, stderr bytes.Buffer
	out := filepath.Join(dir, "out")
	if code := run(context.Background(), []string{"identify", set, "--json", "-o", out}, &stdout, &stderr); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	var res struct {
		Ranking []struct {
			B           string  `json:"b"`
			Score       float64 `json:"score"`
			Rank        int     `json:"rank"`
			Micrographs []struct {
				Image string   `json:"image"`
				GDotB *float64 `json:"g_dot_b"`
			} `json:"micrographs"`
		} `json:"ranking"`
	}
	if err := json.Unmarshal(stdout.Bytes(), &res); err != nil {
		t.Fatalf("%v: %s", err, stdout.String())
	}
	if len(res.Ranking) != 12 {
		t.Fatalf("%d candidates ranked, want the 12 of 1/2<110>", len(res.Ranking))
	}
	if top := res.Ranking[0].B; top != "1/2[1 0 1]" && top != "1/2[-1 0 -1]" {
		t.Fatalf("best candidate %s, want ±1/2[1 0 1]; %s", top, stdout.String())
	}
	// g·b of the true vector in the three micrographs: 200·½[101] = 1,
	// (11-1)·½[101] = 0, (02-2)·½[101] = −1 (direct sums).
	want := []float64{1, 0, -1}
	sign := 1.0
	if res.Ranking[0].B == "1/2[-1 0 -1]" {
		sign = -1
	}
	for i, m := range res.Ranking[0].Micrographs {
		if m.GDotB == nil || *m.GDotB != sign*want[i] {
			t.Errorf("%s: g·b = %v, want %v", m.Image, m.GDotB, sign*want[i])
		}
	}
	if _, err := os.Stat(filepath.Join(out, "identify.png")); err != nil {
		t.Errorf("contact sheet: %v", err)
	}
	// The text table has a row per candidate.
	stdout.Reset()
	stderr.Reset()
	if code := run(context.Background(), []string{"identify", set}, &stdout, &stderr); code != exitOK {
		t.Fatalf("text: exit %d: %s", code, stderr.String())
	}
	if n := strings.Count(stdout.String(), "1/2["); n != 12 {
		t.Errorf("text table names %d candidates, want 12:\n%s", n, stdout.String())
	}
}

// Bad sets exit 2 with one line naming what is wrong.
func TestIdentifyBadInput(t *testing.T) {
	dir := seriesDir(t)
	for _, c := range []struct {
		name, edit, want string
	}{
		{"missing image", `"m0.tiff"->"nothere.tiff"`, "micrographs[0].image"},
		{"pixel size", `"nm_per_px": 1.6, "g_angle_deg": 0->"nm_per_px": -1, "g_angle_deg": 0`, "micrographs[0].nm_per_px"},
		{"g not perpendicular", `"g": [1, 1, -1], "beam": [0, 1, 1]->"g": [1, 1, 1], "beam": [0, 1, 1]`, "micrographs[1]: diffraction.g"},
		{"family the crystal lacks", `"1/2<110>"->"1/3<11-20>"`, "candidates[0]"},
		{"empty candidates", `["1/2<110>"]->[]`, "candidates: the list is empty"},
		{"unknown field", `"blur_nm"->"blurr_nm"`, "unknown field"},
		{"region outside", `"nm_per_px": 1.6, "g_angle_deg": 0->"nm_per_px": 1.6, "roi_px": [0, 0, 100, 10], "g_angle_deg": 0`, "micrographs[0].roi_px"},
		{"rotation too large", `"blur_nm": 1.5->"blur_nm": 1.5, "refine_rotation_deg": 10`, "refine_rotation_deg"},
	} {
		pairs := strings.SplitN(c.edit, "->", 2)
		text := strings.Replace(goodSet, pairs[0], pairs[1], 1)
		if text == goodSet {
			t.Fatalf("%s: edit did not apply", c.name)
		}
		set := writeSet(t, dir, "bad.json", text)
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), []string{"identify", set}, &stdout, &stderr)
		if code != exitBadInput || !strings.Contains(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%s: exit %d, stderr %q; want 2 and one line with %q", c.name, code, stderr.String(), c.want)
		}
	}
	// A micrograph smaller than a loop it should show.
	loop := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5}, "foil": {"thickness_nm": 90},
	  "defects": [{"type": "loop", "b": "1/2[1 0 1]", "normal": [1, 0, 1], "radius_nm": 60, "at_nm": [0, 0, 45]}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`
	writeSet(t, dir, "loop.json", loop)
	set := writeSet(t, dir, "small.json", strings.Replace(goodSet, "base.json", "loop.json", 1))
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"identify", set}, &stdout, &stderr); code != exitBadInput || !strings.Contains(stderr.String(), "smaller than the loop") {
		t.Errorf("small micrograph: exit %d, stderr %q", code, stderr.String())
	}
}

// A dissociated dislocation's b is the sum of its partials: it is not the
// default varied defect, and naming it is refused.
func TestIdentifySkipsDissociated(t *testing.T) {
	dir := seriesDir(t)
	base := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5}, "foil": {"thickness_nm": 90},
	  "defects": [
	    {"type": "dissociated", "b": "1/2[1 0 -1]", "line": [1, -1, 0], "plane": [1, 1, 1], "at_nm": [0, 20, 45], "partials": ["1/6[2 -1 -1]", "1/6[1 1 -2]"], "separation_nm": 6},
	    {"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, -1, 0], "at_nm": [0, 0, 45], "elasticity": "isotropic"}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`
	writeSet(t, dir, "two.json", base)
	set := writeSet(t, dir, "set2.json", strings.Replace(strings.Replace(goodSet, "base.json", "two.json", 1), `"candidates": ["1/2<110>"]`, `"candidates": ["1/2[1 0 1]"]`, 1))
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"identify", set, "--json"}, &stdout, &stderr); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	named := writeSet(t, dir, "set3.json", strings.Replace(strings.Replace(goodSet, "base.json", "two.json", 1), `"candidates"`, `"defect": 0, "candidates"`, 1))
	stdout.Reset()
	stderr.Reset()
	if code := run(context.Background(), []string{"identify", named}, &stdout, &stderr); code != exitBadInput || !strings.Contains(stderr.String(), "defects[0] is a dissociated") {
		t.Errorf("naming the dissociated dislocation: exit %d, %q", code, stderr.String())
	}
}
