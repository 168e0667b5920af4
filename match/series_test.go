package match

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"faultline/scene"
)

// synthetic makes the micrographs of a series by simulating the true
// scene for each condition, blurring it and adding shot noise at dose
// electrons per pixel (Poisson statistics, in their Gaussian limit). A
// micrograph's g angle is the one given, or (angles nil) the scene's own:
// with image.x_axis, the direction of g on the fixed specimen.
func synthetic(t *testing.T, base []byte, conds []json.RawMessage, angles []float64, kind Kind, size int, nmPerPx, blurNm, dose float64, seed uint64) []Micrograph {
	t.Helper()
	s := &Series{Base: base, Dir: "."}
	rng := rand.New(rand.NewPCG(seed, 2))
	var out []Micrograph
	for i, c := range conds {
		m := Micrograph{Name: fmt.Sprintf("m%d", i), Kind: kind, Diffraction: c}
		sc, err := s.SceneFor(&m)
		if err != nil {
			t.Fatal(err)
		}
		st, err := scene.Build(sc, ".")
		if err != nil {
			t.Fatal(err)
		}
		m.GAngleDeg = st.GAngleDeg
		if angles != nil {
			m.GAngleDeg = angles[i]
		}
		r, err := Simulate(context.Background(), st, View{W: size, H: size, NmPerPx: nmPerPx, GAngleDeg: m.GAngleDeg}, kind, blurNm, 0)
		if err != nil {
			t.Fatal(err)
		}
		for k, v := range r.Pix {
			r.Pix[k] = v + math.Sqrt(math.Max(v, 0)/dose)*rng.NormFloat64()
		}
		m.Raster = r
		out = append(out, m)
	}
	return out
}

func burgersCandidates(t *testing.T, base []byte, family string, defect int) []Candidate {
	t.Helper()
	sc, err := scene.Parse(base)
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	cs, err := BurgersCandidates(st.Crystal.Cell, []string{family}, defect)
	if err != nil {
		t.Fatal(err)
	}
	return cs
}

func rawList(ss ...string) []json.RawMessage {
	out := make([]json.RawMessage, len(ss))
	for i, s := range ss {
		out[i] = json.RawMessage(s)
	}
	return out
}

// A synthetic g·b series of one dislocation, with shot noise and blur, is
// identified: the best-ranked candidate is the true Burgers vector or its
// negative (the sign of b is not determined by a set of images without
// knowing the sense of s and the line, the usual statement of the g·b
// method; e.g. Williams & Carter, Transmission Electron Microscopy, 2nd
// ed. 2009, ch. 26, from memory).
func TestIdentifySyntheticSeries(t *testing.T) {
	type cond struct{ g, beam string }
	cases := []struct {
		name, crystal, trueB, line, normal, xAxis, family string
		conds                                             []cond
	}{
		{"fcc", `{"material": "Cu"}`, "1/2[1 0 1]", "[1, -1, 0]", "[0, 1, 1]", "[1, 0, 0]", "1/2<110>",
			[]cond{{"[2, 0, 0]", "[0, 1, 1]"}, {"[1, 1, -1]", "[0, 1, 1]"}, {"[1, -1, 1]", "[0, 1, 1]"}, {"[0, 2, -2]", "[0, 1, 1]"}}},
		// One zone cannot tell apart vectors that differ by a multiple of
		// its axis (they have the same g·b for every g of the zone), so a
		// bcc series takes g from two zones, as at the microscope.
		{"bcc", `{"material": "Fe"}`, "1/2[1 1 1]", "[1, -1, 0]", "[0, 0, 1]", "[1, 0, 0]", "1/2<111>",
			[]cond{{"[1, 1, 0]", "[0, 0, 1]"}, {"[2, 0, 0]", "[0, 0, 1]"}, {"[0, 1, -1]", "[0, 1, 1]"}, {"[2, 1, -1]", "[0, 1, 1]"}}},
		{"hcp", `{"material": "Ti"}`, "1/3[1 1 -2 0]", "[1, -1, 0, 0]", "[0, 0, 0, 1]", "[1, 0, -1, 0]", "1/3<11-20>",
			[]cond{{"[1, 0, -1, 0]", "[0, 0, 0, 1]"}, {"[0, 1, -1, 0]", "[0, 0, 0, 1]"}, {"[1, -1, 0, 0]", "[0, 0, 0, 1]"}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			base := []byte(fmt.Sprintf(`{"version": 1, "crystal": %s, "microscope": {"voltage_kv": 200},
			  "diffraction": {"g": %s, "beam": %s, "w": 0.5},
			  "foil": {"thickness_nm": 90, "normal": %s},
			  "defects": [{"type": "dislocation", "b": %q, "line": %s, "at_nm": [0, 0, 45], "elasticity": "isotropic"}],
			  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50], "x_axis": %s}}`, c.crystal, c.conds[0].g, c.conds[0].beam, c.normal, c.trueB, c.line, c.xAxis))
			var conds []json.RawMessage
			for _, cd := range c.conds {
				conds = append(conds, json.RawMessage(fmt.Sprintf(`{"g": %s, "beam": %s, "w": 0.5}`, cd.g, cd.beam)))
			}
			mics := synthetic(t, base, conds, nil, BrightField, 40, 2, 1.5, 40, 11)
			s := &Series{Base: base, Dir: ".", Micrographs: mics, Candidates: burgersCandidates(t, base, c.family, 0), BlurNm: 1.5}
			ranked, err := Identify(context.Background(), s, Options{})
			if err != nil {
				t.Fatal(err)
			}
			sc, _ := scene.Parse(base)
			st, _ := scene.Build(sc, ".")
			want, _ := st.Crystal.Cell.Burgers(c.trueB)
			top := ranked[0].Candidate.B
			same := *top == want || *top == [3]float64{-want[0], -want[1], -want[2]}
			if !same {
				for _, r := range ranked {
					t.Logf("%s score %.4f ± %.4f rank %d tied %v", r.Candidate.Label, r.Score, r.Error, r.Rank, r.Tied)
				}
				t.Fatalf("best candidate %s, want ±%s", ranked[0].Candidate.Label, c.trueB)
			}
			// No candidate other than ±b is tied with the best.
			for _, r := range ranked {
				b := *r.Candidate.B
				if r.Rank == 1 && b != want && b != [3]float64{-want[0], -want[1], -want[2]} {
					t.Errorf("candidate %s tied with the best", r.Candidate.Label)
				}
			}
		})
	}
}
