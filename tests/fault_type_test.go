package tests

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// Fault vectors of the two kinds of {111} stacking fault in an fcc
// crystal, in the README's convention (R moves the crystal on the side
// the plane normal (1 1 1) points to). An intrinsic fault is a removed
// (111) layer: the two sides close up towards each other by one layer
// spacing d = |1/3[1 1 1]|, so the side (1 1 1) points to moves by
// −1/3[1 1 1]. An extrinsic fault is an inserted layer: that side moves
// away, +1/3[1 1 1]. (Only α = 2π g·R modulo 2π reaches the image, so
// these equal the 1/6<112> shears of the same faults; Hirsch et al. 1965,
// Electron Microscopy of Thin Crystals, ch. 10.)
const (
	intrinsic111 = "1/3[-1 -1 -1]"
	extrinsic111 = "1/3[1 1 1]"
)

// outerFringes renders an inclined (1 1 1) fault in copper at s = 0 (its
// vector given by the JSON fields vector: a shift or a kind) and
// returns the mean contrast (intensity minus the perfect crystal's) of the
// outer fringe at the top end T (where the fault meets the entrance
// surface) and at the bottom end B, in bright and dark field, and the
// x coordinate of T (g points along +x).
//
// The foil is 5.4 ξ_g thick (the thick-foil, anomalous-absorption regime
// of the rules below); the fault passes through the middle of the foil at
// the image centre, so along the row y = 0 its depth is
// z_f(x) = t/2 − (n_x/n_z) x, T lies at x_T = (n_z/n_x) t/2 and B at −x_T.
// The outer fringe is measured over the columns whose fault depth lies
// 0.05–0.4 ξ_g below the entrance surface (T) or above the exit surface
// (B): the first fringe of a fault with |α| = 2π/3 (its first extremum
// is at about 0.2 ξ_g).
func outerFringes(t *testing.T, g, beam vec3, vector string) (bfT, bfB, dfT, dfB, xT float64, reading string) {
	t.Helper()
	text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": ` + g.json() + `, "beam": ` + beam.json() + `, "w": 0},
	  "foil": {"thickness_nm": %[1]g},
	  "defects": [{"type": "fault", "plane": [1, 1, 1], ` + vector + `, "at_nm": [0, 0, %[2]g]}],
	  "image": {"width_nm": %[3]g, "height_nm": %[4]g, "pixels": [%[5]d, 1]}}`
	xi := setup(t, fmt.Sprintf(text, 100.0, 50.0, 10.0, 1.0, 10)).XiGNm
	th := 5.4 * xi
	n := newImageFrame(g, beam).in(vec3{1, 1, 1}.unit())
	ratio := n[2] / n[0] // dx/dz along the fault's trace in the row y = 0
	xT = ratio * th / 2
	px := math.Abs(ratio) * 0.35 * xi / 10 // ten pixels across each outer-fringe window
	nx := int(math.Ceil(1.2 * 2 * math.Abs(xT) / px))
	st := setup(t, fmt.Sprintf(text, th, th/2, float64(nx)*px, px, nx))
	im := render(t, st)
	bf, df := contrast(st, im, 0), contrast(st, im, 1)
	var nT, nB float64
	for i := 0; i < nx; i++ {
		zf := th/2 - pixelX(im, i)/ratio
		switch {
		case zf > 0.05*xi && zf < 0.4*xi:
			bfT += bf[i]
			dfT += df[i]
			nT++
		case th-zf > 0.05*xi && th-zf < 0.4*xi:
			bfB += bf[i]
			dfB += df[i]
			nB++
		}
	}
	if nT < 5 || nB < 5 {
		t.Fatalf("only %g and %g columns in the outer-fringe windows", nT, nB)
	}
	return bfT / nT, bfB / nB, dfT / nT, dfB / nB, xT, st.ReadingLines()[0]
}

// sign returns +1 for a bright fringe (above the perfect crystal), −1 for
// a dark one, and 0 for one too faint to call: |contrast| below 0.02 of
// the incident beam.
func fringeSign(c float64) int {
	switch {
	case c > 0.02:
		return 1
	case c < -0.02:
		return -1
	}
	return 0
}

// The rules a microscopist uses to tell an intrinsic from an extrinsic
// fault, reproduced from rendered images of an inclined (1 1 1) fault in
// copper at s = 0 with absorption (ξ_g/ξ'_g = 0.1):
//
//  1. In bright field the two outer fringes are alike; in dark field they
//     are unlike; the outer fringe at the top surface is the same in bright
//     and dark field (Hashimoto, Howie & Whelan 1962, Proc. R. Soc. A 269,
//     80; Hirsch et al. 1965, Electron Microscopy of Thin Crystals, ch. 10).
//  2. With g drawn from the centre of the fault's dark-field image, for g
//     of type {111}, {220} and {400} g points away from the bright outer
//     fringe when the fault is intrinsic and towards it when it is
//     extrinsic; for {200}, {222} and {440} the reverse (Gevers, Art &
//     Amelinckx 1963, phys. stat. sol. 3, 1563; the rule as stated in
//     Edington 1976, Practical Electron Microscopy in Materials Science,
//     Monograph 3, and Williams & Carter 2009, Transmission Electron
//     Microscopy, ch. 25 — from memory).
//
// Why it holds, in the conventions of the README (a check on the rule as
// remembered, not a substitute for it): α = 2π g·R with R = ∓1/3[1 1 1]
// for the intrinsic/extrinsic fault, so α = ∓2π(h+k+l)/3 for g = (h k l):
// ∓2π/3 for g·[1 1 1] = ±1, ±4 ({111}, {220}, {400}) and the opposite for
// ±2, ±8 ({200}, {222}, {440}). Rule 1's top fringe is bright for
// sin α > 0 (Hashimoto et al.); and the top end of a fault whose normal n
// has n_z > 0 lies towards +n_h, so g·n_h > 0 means g points to the top.
//
// Each g is used both ways round (g and −g), which swaps the end g points
// to; the foil is 5.4 ξ_g thick for every g. Each fault is given once by
// its shift and once by its kind, for which the program works out R.
func TestFaultTypeFromOuterFringes(t *testing.T) {
	families := []struct {
		family  string
		g, beam vec3
		typeA   bool // {111}, {220}, {400}
	}{
		{"{111}", vec3{1, 1, -1}, vec3{0, 1, 1}, true},
		{"{220}", vec3{2, 0, 2}, vec3{1, 2, -1}, true},
		{"{400}", vec3{4, 0, 0}, vec3{0, 1, 1}, true},
		{"{200}", vec3{2, 0, 0}, vec3{0, 1, 1}, false},
		{"{222}", vec3{2, 2, -2}, vec3{0, 1, 1}, false},
		{"{440}", vec3{4, 0, 4}, vec3{1, 2, -1}, false},
	}
	for _, f := range families {
		for _, gs := range []float64{1, -1} {
			g := f.g.scale(gs)
			for _, kind := range []struct {
				name      string
				vector    string
				intrinsic bool
			}{
				{"intrinsic", `"shift": "` + intrinsic111 + `"`, true},
				{"extrinsic", `"shift": "` + extrinsic111 + `"`, false},
				{"intrinsic", `"kind": "intrinsic"`, true},
				{"extrinsic", `"kind": "extrinsic"`, false},
			} {
				name := fmt.Sprintf("%s g=%v %s", f.family, g, kind.vector)
				bfT, bfB, dfT, dfB, xT, reading := outerFringes(t, g, f.beam, kind.vector)
				t.Logf("%s: BF top %+.3f bottom %+.3f, DF top %+.3f bottom %+.3f, top end at x = %.0f nm", name, bfT, bfB, dfT, dfB, xT)
				sBT, sBB, sDT, sDB := fringeSign(bfT), fringeSign(bfB), fringeSign(dfT), fringeSign(dfB)
				if sBT == 0 || sBB == 0 || sDT == 0 || sDB == 0 {
					t.Errorf("%s: an outer fringe too faint to call", name)
					continue
				}
				// Rule 1 (Hashimoto, Howie & Whelan 1962).
				if sBT != sBB {
					t.Errorf("%s: bright-field outer fringes unlike (top %+.3f, bottom %+.3f)", name, bfT, bfB)
				}
				if sDT == sDB {
					t.Errorf("%s: dark-field outer fringes alike (top %+.3f, bottom %+.3f)", name, dfT, dfB)
				}
				if sDT != sBT {
					t.Errorf("%s: top fringe differs between bright field (%+.3f) and dark field (%+.3f)", name, bfT, dfT)
				}
				// Rule 2 (Gevers, Art & Amelinckx 1963): where is the bright
				// dark-field outer fringe, and does g point to it?
				xBright := xT
				if sDT < 0 {
					xBright = -xT
				}
				towards := xBright > 0
				wantIntrinsic := towards != f.typeA
				// The program's own reading of the fault must agree.
				kindWord := map[bool]string{true: "intrinsic", false: "extrinsic"}[kind.intrinsic]
				if !strings.Contains(reading, kindWord+" (R =") || !strings.HasSuffix(reading, "reads as "+kindWord) ||
					!strings.Contains(reading, map[bool]string{true: "g points towards", false: "g points away from"}[towards]) {
					t.Errorf("%s: the program reads %q", name, reading)
				}
				if wantIntrinsic != kind.intrinsic {
					t.Errorf("%s: g points %s the bright dark-field outer fringe, which the rule reads as %s",
						name, map[bool]string{true: "towards", false: "away from"}[towards],
						map[bool]string{true: "intrinsic", false: "extrinsic"}[wantIntrinsic])
				}
			}
		}
	}
}
