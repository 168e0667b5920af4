package plan

import (
	"context"
	"math"
	"testing"
)

// twoPeaks takes for each partial the highest maximum within reach of its
// core: a far, faint maximum of the profile (a thickness-fringe or
// many-beam lobe) is not taken for a partial's image, and a partial
// without a maximum above the background leaves the pair unresolved.
func TestTwoPeaksWithinReachOfTheCores(t *testing.T) {
	bump := func(x, at, h, w float64) float64 { return h * math.Exp(-(x-at)*(x-at)/(2*w*w)) }
	profile := func(weak float64) (x, v []float64) {
		for i := -80; i <= 80; i++ {
			xi := float64(i) * 0.15
			x = append(x, xi)
			v = append(v, 0.001+bump(xi, 1.6, 0.012, 0.3)+bump(xi, -1.9, weak, 0.3)+bump(xi, -10.8, 0.004, 0.5))
		}
		return x, v
	}
	cores := [2]float64{-1.73, 1.73}
	x, v := profile(0.002)
	if got := twoPeaks(v, x, 0.001, cores, 1.2); math.Abs(got-3.45) > 0.16 {
		t.Errorf("separation %.2f nm, want the partials' peaks 3.5 nm apart (not the far maximum at −10.8 nm)", got)
	}
	// The weaker partial's image gone, or too faint (below minRise of the
	// stronger one): not resolved.
	for _, weak := range []float64{0, 0.0003} {
		x, v := profile(weak)
		if got := twoPeaks(v, x, 0.001, cores, 1.2); !math.IsNaN(got) {
			t.Errorf("separation %.2f nm from a profile with one partial's image (the other %g)", got, weak)
		}
	}
	// Windows overlapping on one maximum: not resolved either.
	if got := twoPeaks(v, x, 0.001, [2]float64{1.5, 1.7}, 1.2); !math.IsNaN(got) {
		t.Errorf("separation %.2f nm from one maximum", got)
	}
}

// A 1/2[1-10] screw in Cu dissociated on (111) into 1/6[2-1-1] and
// 1/6[1-21], 10 nm apart, imaged with g = 2-20 along the line: both
// partials have g·b_p = 1, so by the rule of Cockayne, Ray & Whelan
// (1969) each image lies off its core on the same side, within the
// distance at which s + g·dR/dz = 0 (at most 1.8 |g·b_p|/(2π|s|), the
// edge's factor 1 + 1/(2(1−ν))); the two images then shift alike and a
// resolved pair's separation differs from the projected one by less than
// twice that distance plus two pixels of the profile. At |s| ≥ 0.2 /nm
// (common practice for weak beam) the shifts are nearly equal (measured:
// 5.81 nm for 5.77 nm), so a pair must be resolved there and lie within
// two pixels (0.3 nm) of the projected separation.
func TestWeakBeamDissociatedSeparation(t *testing.T) {
	sc := parse(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, -2, 0], "beam": [0, 0, 1], "weak_beam": {"n": 3}},
	  "foil": {"thickness_nm": 80},
	  "defects": [{"type": "dissociated", "b": "1/2[1 -1 0]", "line": [1, -1, 0], "plane": [1, 1, 1], "at_nm": [0, 0, 40],
	     "partials": ["1/6[2 -1 -1]", "1/6[1 -2 1]"], "separation_nm": 10}],
	  "image": {"width_nm": 40, "height_nm": 40, "pixels": [8, 8]}}`)
	p, err := Make(context.Background(), sc, ".", Options{ThicknessNm: &Range{80, 80, 1}, SPerNm: &Range{0, 0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	if len(p.WeakBeam) < 3 {
		t.Fatalf("%d weak-beam conditions: %v", len(p.WeakBeam), p.Skipped)
	}
	px := 2 * 12.0 / (profilePixels - 1)
	strong := 0
	for _, w := range p.WeakBeam {
		nu := p.Setup.Crystal.Elastic.Poisson
		reach := (1 + 1/(2*(1-nu))) / (2 * math.Pi * math.Abs(w.SPerNm)) // |g·b_p| = 1
		t.Logf("g(%dg), s %.3f /nm, %d beams: peaks %.2f nm apart, projected separation %.2f nm (separation %.1f nm); reach %.2f nm",
			w.N, w.SPerNm, w.Beams, w.MeasuredSepNm, w.ProjectedSepNm, w.SeparationNm, reach)
		if math.Abs(w.ProjectedSepNm-10/math.Sqrt(3)) > 1e-6 {
			t.Errorf("g(%dg): projected separation %.4f nm, want 10/√3 = 5.7735 nm ((111) against the (001) foil)", w.N, w.ProjectedSepNm)
		}
		if math.IsNaN(w.MeasuredSepNm) {
			if math.Abs(w.SPerNm) >= 0.2 {
				t.Errorf("g(%dg): the partials' images not resolved at s = %.3f /nm", w.N, w.SPerNm)
			}
			continue
		}
		if d := math.Abs(w.MeasuredSepNm - w.ProjectedSepNm); d > 2*reach+2*px {
			t.Errorf("g(%dg): peaks %.2f nm apart for a projected separation of %.2f nm: more than twice the reach %.2f nm", w.N, w.MeasuredSepNm, w.ProjectedSepNm, reach)
		}
		if math.Abs(w.SPerNm) >= 0.2 {
			strong++
			if d := math.Abs(w.MeasuredSepNm - w.ProjectedSepNm); d > 2*px {
				t.Errorf("g(%dg): peaks %.2f nm apart for a projected separation of %.2f nm (equal g·b_p: want within two pixels, %.2f nm)", w.N, w.MeasuredSepNm, w.ProjectedSepNm, 2*px)
			}
		}
	}
	if strong == 0 {
		t.Error("no resolved pair at |s| ≥ 0.2 /nm")
	}
}
