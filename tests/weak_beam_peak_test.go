package tests

import (
	"fmt"
	"math"
	"testing"
)

// In the weak-beam limit the dark-field image of a dislocation is a narrow
// peak where the lattice planes near the core are bent back into the Bragg
// position, s + d(g·R)/dz = 0 (Cockayne, Ray & Whelan 1969, Phil. Mag. 20,
// 1265). For a screw dislocation lying in the foil plane, on the column at
// distance d along ŝ = u × z, d(g·R)/dz = −(g·b) d / (2π(d² + ζ²)) at the
// height ζ above or below the line (the derivation beside
// TestDislocationImageSide). Its extreme value, at ζ = 0, is −(g·b)/(2π d),
// so the columns in which s + d(g·R)/dz passes through zero are those with
//
//	0 < d/d* < 1,   d* = (g·b) / (2π s),
//
// and nowhere else; the peak lies among them. In the weak-beam limit the
// column integral depends on s and d only through d/d* (write ζ = d·v:
// the phase is 2π s d v − arctan v; surfaces aside), so the peak position
// scales as 1/s.
//
// Rendered with the two-beam model (given explicitly: a weak_beam
// condition otherwise uses the systematic row, whose n·g at the Bragg
// position moves the peak; sim's TestRowWeakBeamPeakPosition covers that)
// at the excitation error of g(3g) and g(4g) (s = (n−1)λg²/2), the peak must lie in (0, d*] on the side of
// sign((g·b)s), and d_peak·s must agree between the two within 15 %
// (the two-beam s_eff = √(s² + 1/ξ_g²) differs from s by 4–2 % here,
// and the peak is located to a quarter pixel, 0.013 nm). Repeated with g
// reversed. With the systematic row (7 beams; g(3g) puts 3g at the Bragg
// position, whose strong beam breaks the 1/s scaling of the two-beam
// picture) the peak must still lie in (0, d*] on the rule's side; one
// case, g(3g) averaged over 8 foils, as the 7-beam renders cost more.
func TestWeakBeamPeakWhereEffectiveSIsZero(t *testing.T) {
	var prev float64
	for _, model := range []string{"two-beam", "systematic-row"} {
		for _, gs := range []float64{1, -1} {
			for _, n := range []int{3, 4} {
				if model == "systematic-row" && (gs < 0 || n != 3) {
					continue // see above: one case, for time
				}
				g := vec3{2, 0, 0}.scale(gs)
				c := dislocationCase{b: "1/2[1 1 0]", line: vec3{1, 1, 0}, g: g, diffr: fmt.Sprintf(`"weak_beam": {"n": %d}, "model": %q`, n, model), useDF: true, widthNm: 12}
				st := setup(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
			  "diffraction": {"g": `+g.json()+`, "beam": [0, 0, 1], `+c.diffr+`},
			  "foil": {"thickness_nm": 100}, "defects": [],
			  "image": {"width_nm": 10, "height_nm": 10, "pixels": [1, 1]}}`)
				s := st.SPerNm
				gb := g.dot(vec3{0.5, 0.5, 0})
				want := gb / (2 * math.Pi * s)
				// The thickness-fringe background interferes with the peak, so
				// the profile is averaged over 16 foils whose thickness steps
				// through 2/s_eff (s_eff = √(s² + 1/ξ_g²)), the dislocation in
				// the middle of each: the average of a wedge.
				seff := math.Hypot(s, 1/st.XiGNm)
				var d, con []float64
				nt := 16.0
				if model == "systematic-row" {
					nt = 8
				}
				for k := 0; k < int(nt); k++ {
					c.thickNm = 3*st.XiGNm + float64(k)*2/seff/nt
					dk, ck, _ := renderDislocation(t, c)
					if con == nil {
						d, con = dk, make([]float64, len(ck))
					}
					for i := range ck {
						con[i] += ck[i] / nt
					}
				}
				peak := 0
				for k := range con {
					if con[k] > con[peak] {
						peak = k
					}
				}
				// Parabolic interpolation through the peak pixel and its
				// neighbours.
				dp := d[peak]
				if peak > 0 && peak < len(con)-1 {
					a, b, c := con[peak-1], con[peak], con[peak+1]
					dp += (d[peak+1] - d[peak]) * (a - c) / (2 * (a - 2*b + c))
				}
				name := fmt.Sprintf("%s g=%v g(%dg)", model, g, n)
				t.Logf("%s: s = %.4f /nm, peak %.4f at d = %+.3f nm; s + g·dR/dz = 0 in some depth of every column with 0 < d/d* < 1, d* = %+.2f nm; d_peak·s = %.4f", name, s, con[peak], dp, want, dp*s)
				if r := dp / want; r <= 0 || r > 1 {
					t.Errorf("%s: weak-beam peak at d = %+.3f nm, outside (0, d*], d* = %+.2f nm", name, dp, want)
				}
				if n == 4 && model == "two-beam" {
					if r := dp * s / prev; r < 0.85 || r > 1.15 {
						t.Errorf("%s: d_peak·s = %.4f for g(4g) against %.4f for g(3g): the peak does not scale as 1/s", name, dp*s, prev)
					}
				}
				prev = dp * s
			}
		}
	}
}
