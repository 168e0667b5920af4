package match

import (
	"context"
	"fmt"
	"testing"
)

// identifyWords ranks the words of vary for defect 0 against a synthetic
// series of the base scene and returns the ranking.
func identifyWords(t *testing.T, base []byte, conds []string, kind Kind, vary string) []Ranked {
	t.Helper()
	mics := synthetic(t, base, rawList(conds...), nil, kind, 48, 1.5, 1, 60, 21)
	cands, err := wordCandidates(vary, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	ranked, err := Identify(context.Background(), &Series{Base: base, Dir: ".", Micrographs: mics, Candidates: cands, BlurNm: 1}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range ranked {
		t.Logf("%s: %.4f ± %.4f, rank %d, tied %v", r.Candidate.Label, r.Score, r.Error, r.Rank, r.Tied)
	}
	return ranked
}

// A loop's nature is identified from images taken with ±g at s > 0, the
// pair whose inside–outside contrast tells vacancy from interstitial
// (Groves & Kelly 1961; Maher & Eyre 1971 for the inclined loop): the
// true nature ranks first and is not tied with the other.
func TestIdentifyLoopNature(t *testing.T) {
	for _, nature := range []string{"vacancy", "interstitial"} {
		t.Run(nature, func(t *testing.T) {
			base := []byte(fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
			  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.02},
			  "foil": {"thickness_nm": 80},
			  "defects": [{"type": "loop", "nature": %q, "b": "1/2[1 0 1]", "normal": [1, 0, 1], "radius_nm": 14, "at_nm": [0, 0, 40]}],
			  "image": {"width_nm": 72, "height_nm": 72, "pixels": [48, 48], "x_axis": [1, 0, 0]}}`, nature))
			ranked := identifyWords(t, base, []string{
				`{"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.02}`,
				`{"g": [-2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.02}`,
			}, BrightField, "nature")
			if ranked[0].Candidate.Label != nature || ranked[1].Tied {
				t.Fatalf("ranking %s first (tied %v), want %s first and not tied", ranked[0].Candidate.Label, ranked[1].Tied, nature)
			}
		})
	}
}

// A fault's kind is identified from dark-field images, whose outer fringes
// tell intrinsic from extrinsic (Hashimoto, Howie & Whelan 1962; Gevers,
// Art & Amelinckx 1963): the true kind ranks first, not tied.
func TestIdentifyFaultKind(t *testing.T) {
	for _, kind := range []string{"intrinsic", "extrinsic"} {
		t.Run(kind, func(t *testing.T) {
			base := []byte(fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
			  "diffraction": {"g": [1, 1, -1], "beam": [0, 1, 1], "s_per_nm": 0},
			  "foil": {"thickness_nm": 90},
			  "defects": [{"type": "fault", "plane": [1, 1, 1], "kind": %q, "at_nm": [0, 0, 45]}],
			  "image": {"width_nm": 72, "height_nm": 72, "pixels": [48, 48], "x_axis": [1, 0, 0]}}`, kind))
			ranked := identifyWords(t, base, []string{
				`{"g": [1, 1, -1], "beam": [0, 1, 1], "s_per_nm": 0}`,
				`{"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0}`,
			}, DarkField, "kind")
			if ranked[0].Candidate.Label != kind || ranked[1].Tied {
				t.Fatalf("ranking %s first (tied %v), want %s first and not tied", ranked[0].Candidate.Label, ranked[1].Tied, kind)
			}
		})
	}
}
