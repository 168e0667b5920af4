package plan

import (
	"bytes"
	"context"
	"math"
	"strings"
	"testing"

	"faultline/scene"
)

func parse(t *testing.T, text string) *scene.Scene {
	t.Helper()
	sc, err := scene.Parse([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

const cuScene = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0, "absorption_ratio": 0},
  "foil": {"thickness_nm": 60},
  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 10], "elasticity": "isotropic"}],
  "image": {"width_nm": 60, "height_nm": 60, "pixels": [16, 16]}}`

func TestParseRange(t *testing.T) {
	r, err := ParseRange("--s-per-nm", "-0.1:0.1:0.05")
	if err != nil {
		t.Fatal(err)
	}
	if v := r.Values(); len(v) != 5 || math.Abs(v[4]-0.1) > 1e-12 {
		t.Errorf("values %v", v)
	}
	for _, bad := range []string{"1:2", "a:2:1", "0:1:0", "2:1:0.5", "0:1e9:1", "NaN:1:1"} {
		if _, err := ParseRange("--thickness-nm", bad); err == nil || !strings.HasPrefix(err.Error(), "--thickness-nm") {
			t.Errorf("%q: %v", bad, err)
		}
	}
}

func TestPerfectCrystalCurves(t *testing.T) {
	// Two beams, no absorption, s = 0: the dark field is sin²(πt/ξ_g)
	// (Hirsch et al. 1965, ch. 8), and the rocking curve of a foil ξ_g/2
	// thick peaks at s = 0.
	sc := parse(t, cuScene)
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	xi := st.XiGNm
	tr := Range{0, 3 * xi, xi / 20}
	sr := Range{-2 / xi, 2 / xi, 0.05 / xi}
	sc.Foil.ThicknessNm = xi / 2
	p, err := Make(context.Background(), sc, ".", Options{ThicknessNm: &tr, SPerNm: &sr})
	if err != nil {
		t.Fatal(err)
	}
	for i, th := range p.Thickness.X {
		want := math.Pow(math.Sin(math.Pi*th/xi), 2)
		if math.Abs(p.Thickness.DF[i]-want) > 1e-9 || math.Abs(p.Thickness.BF[i]+p.Thickness.DF[i]-1) > 1e-9 {
			t.Fatalf("t = %g: DF %g BF %g, want DF %g", th, p.Thickness.DF[i], p.Thickness.BF[i], want)
		}
	}
	ib := 0
	for i := range p.Rocking.DF {
		if p.Rocking.DF[i] > p.Rocking.DF[ib] {
			ib = i
		}
	}
	if math.Abs(p.Rocking.X[ib]) > 1e-9 || math.Abs(p.Rocking.DF[ib]-1) > 1e-9 {
		t.Errorf("rocking curve of a ξ_g/2 foil peaks at s = %g with %g, want 0 and 1", p.Rocking.X[ib], p.Rocking.DF[ib])
	}
	// The visibility grid: replayed field samples agree with a fresh
	// render within the integrator's 1e-4 (sim's replay contract), and
	// the Michelson contrast lies in [0, 1].
	if p.Visibility == nil || p.Reuse.Points == 0 {
		t.Fatalf("no visibility grid: %v", p.Skipped)
	}
	if p.Reuse.MaxReplayDifference > 1e-4 {
		t.Errorf("replay differs from a fresh render by %g", p.Reuse.MaxReplayDifference)
	}
	for _, row := range p.Visibility.V {
		for _, v := range row {
			if !(v >= 0 && v <= 1) {
				t.Fatalf("visibility %g outside [0, 1]", v)
			}
		}
	}
	var buf bytes.Buffer
	if err := p.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), "suggested conditions") || !strings.Contains(buf.String(), "because") {
		t.Errorf("text: %s", buf.String())
	}
}

func TestGBTable(t *testing.T) {
	// Cu, zone [001]: for b = ±1/2[1 -1 0], g = (2 2 0) gives
	// g·b = (2·1 + 2·(−1) + 0)/2 = 0, and with u = [1 -1 0] (a screw)
	// b×u = 0, so g·(b×u) = 0 too: invisible (Hirsch et al. 1965, ch. 11);
	// g = (2 0 0) gives g·b = ±1.
	sc := parse(t, strings.Replace(cuScene, `"line": [1, -1, 0]`, `"line": [1, -1, 0]`, 1))
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := gbTable(st, []string{"1/2<110>"})
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.Candidates) != 6 {
		t.Fatalf("%d candidates %v, want the 6 ±pairs of 1/2<110>", len(tab.Candidates), tab.Candidates)
	}
	ci, g220, g200 := -1, -1, -1
	for i, c := range tab.Candidates {
		if c == "1/2[1 -1 0]" || c == "1/2[-1 1 0]" {
			ci = i
		}
	}
	for k, g := range tab.G {
		switch g {
		case "(2 2 0)", "(-2 -2 0)":
			g220 = k
		case "(2 0 0)", "(-2 0 0)":
			g200 = k
		}
	}
	if ci < 0 || g220 < 0 || g200 < 0 {
		t.Fatalf("candidates %v, reflections %v", tab.Candidates, tab.G)
	}
	if tab.GB[ci][g220] != 0 || tab.GBxU[ci][g220] != 0 || math.Abs(tab.GB[ci][g200]) != 1 {
		t.Errorf("1/2[1 -1 0]: g·b (220) %g, g·(b×u) %g, g·b (200) %g", tab.GB[ci][g220], tab.GBxU[ci][g220], tab.GB[ci][g200])
	}
	_, both := tab.Invisible(ci)
	found := false
	for _, g := range both {
		found = found || g == tab.G[g220]
	}
	if !found {
		t.Errorf("invisible for %v, want %s among them", both, tab.G[g220])
	}
	if _, err := gbTable(st, []string{"1/2<11"}); err == nil {
		t.Error("a malformed family was accepted")
	}
}
