package scene

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/sim"
)

func TestWeakBeamUsesTheSystematicRow(t *testing.T) {
	// weak_beam {"n": 3} puts 3g at the Bragg position: s_g = (n−1)λg²/2
	// (Cockayne, Ray & Whelan 1969), and by default the 7-beam row.
	st := mustBuild(t, replace(t, `"s_per_nm": 0.01`, `"weak_beam": {"n": 3}`))
	m, ok := st.Problem.Model.(sim.SystematicRow)
	if !ok || st.Model != "systematic-row" {
		t.Fatalf("model %T %q, want the systematic row", st.Problem.Model, st.Model)
	}
	lg2 := st.WavelengthNm * st.GPerNm * st.GPerNm
	if math.Abs(st.SPerNm-lg2) > 1e-12 || len(m.SPerNm) != 7 || math.Abs(m.SPerNm[6]) > 1e-12 {
		t.Errorf("s_g %g (want λg² = %g), row %v (want 7 beams, s_3 = 0)", st.SPerNm, lg2, m.SPerNm)
	}
	// Mean absorption ξ'_0 = ξ'_g = ξ_g/ratio, as in the two-beam model.
	if math.Abs(m.Xi0AbsNm-st.XiGNm/DefaultAbsorptionRatio) > 1e-9 {
		t.Errorf("ξ'_0 = %g, want ξ_g/%g = %g", m.Xi0AbsNm, DefaultAbsorptionRatio, st.XiGNm/DefaultAbsorptionRatio)
	}
	// Couplings: 1/ξ of each order, from the crystal (Cu is centrosymmetric
	// with the origin on an atom: U real and positive).
	for h := -6; h <= 6; h++ {
		if h == 0 {
			continue
		}
		k := float64(h)
		xi, err := st.Crystal.ExtinctionDistance([3]float64{2 * k, 0, 0}, st.VoltageKV)
		if err != nil {
			t.Fatal(err)
		}
		if u := m.LambdaU[h+6]; math.Abs(real(u)-1/xi) > 1e-12 || math.Abs(imag(u)) > 1e-12 {
			t.Errorf("order %d: λU = %v, want 1/ξ = %g", h, u, 1/xi)
		}
		if a := m.LambdaUAbs[h+6]; math.Abs(real(a)-DefaultAbsorptionRatio/xi) > 1e-12 {
			t.Errorf("order %d: λU' = %v, want %g/ξ", h, a, DefaultAbsorptionRatio)
		}
	}
	if len(st.Row) != 7 || st.Row[4].N != 1 || math.Abs(st.Row[4].W-st.W) > 1e-9 {
		t.Errorf("Row %+v", st.Row)
	}
	// Weaker than the common-practice condition (|s| = 0.077 /nm): warned.
	if len(st.Warnings) == 0 || !strings.Contains(st.Warnings[0], "common-practice weak-beam condition") {
		t.Errorf("warnings %q", st.Warnings)
	}
	// g(−g): s_g = −λg², and the beams may be given.
	st = mustBuild(t, replace(t, `"s_per_nm": 0.01`, `"weak_beam": {"n": -1}, "beams": 5`))
	if math.Abs(st.SPerNm+lg2) > 1e-12 || len(st.Row) != 5 || math.Abs(st.Row[1].SPerNm) > 1e-12 {
		t.Errorf("g(−g): s_g %g, row %+v", st.SPerNm, st.Row)
	}
	// A strong enough condition is not warned about: g(6g) of Cu 200 at
	// 200 kV has s = 0.19 /nm … still under 0.2; g(7g), 15 beams, 0.23.
	st = mustBuild(t, replace(t, `"s_per_nm": 0.01`, `"weak_beam": {"n": 7}`))
	if len(st.Row) != 15 {
		t.Errorf("g(7g): %d beams by default, want 15 (to hold 7g)", len(st.Row))
	}
	for _, w := range st.Warnings {
		if strings.Contains(w, "weak_beam") {
			t.Errorf("g(7g), s = %g /nm, w = %g: warned %q", st.SPerNm, st.W, w)
		}
	}
}

func TestSystematicRowBadInput(t *testing.T) {
	for _, c := range []struct{ edit, path, want string }{
		{`"s_per_nm": 0.01, "model": "systematic-row", "beams": 4`, "diffraction.beams", "odd number of beams from 3 to 15"},
		{`"s_per_nm": 0.01, "model": "systematic-row", "beams": 17`, "diffraction.beams", "odd number of beams from 3 to 15"},
		{`"s_per_nm": 0.01, "model": "systematic-row", "beams": 1`, "diffraction.beams", "odd number of beams"},
		{`"s_per_nm": 0.01, "model": "two-beam", "beams": 7`, "diffraction.beams", "applies only to the systematic-row model"},
		{`"weak_beam": {"n": 0}`, "diffraction.weak_beam.n", "0: g(0g)"},
		{`"weak_beam": {"n": 1}`, "diffraction.weak_beam.n", "the Bragg condition"},
		{`"s_per_nm": 0.01, "tilt_off_zone_deg": 90`, "diffraction.tilt_off_zone_deg", "less than 90°"},
		{`"s_per_nm": 0.01, "tilt_off_zone_deg": -120`, "diffraction.tilt_off_zone_deg", "less than 90°"},
	} {
		sc, err := Parse([]byte(replace(t, `"s_per_nm": 0.01`, c.edit)))
		if err == nil {
			_, err = Build(sc, ".")
		}
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Path != c.path || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want %s: …%s…", c.edit, err, c.path, c.want)
		}
	}
}

func TestTiltOffZoneMovesOnlyTheOtherReflections(t *testing.T) {
	// The beam rotated right-handedly about g by φ: k̂ = R_g(φ)·k̂_0, with
	// k̂_0 the zone-axis beam tilted about the axis ⊥ g to give g its s.
	// The excitation error of h is s_h = −k̂·h − λh²/2 for the Ewald sphere
	// |K + h| = |K| to second order (Hirsch et al. 1965, ch. 4); here k̂ is
	// built by explicit rotations (gonum r3), independently of the formula
	// in Reflections, which drops the cos of the small Bragg tilt (a relative
	// 3e-5 here).
	text := replace(t, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "model": "systematic-row", "beams": 5, "tilt_off_zone_deg": 7`)
	st := mustBuild(t, text)
	st0 := mustBuild(t, replace(t, `"s_per_nm": 0.01`, `"s_per_nm": 0.01, "model": "systematic-row", "beams": 5`))
	r, err := st.Reflections(ZoneLimitFactor)
	if err != nil {
		t.Fatal(err)
	}
	r0, _ := st0.Reflections(ZoneLimitFactor)
	lam := st.WavelengthNm
	g := st.GPerNm
	// Image frame: x along g, z along the zone axis. Tilt about y by α so
	// that −k̂·g − λg²/2 = s_g, then rotate about x (g) by φ.
	alpha := math.Asin((st.SPerNm + lam*g*g/2) / g)
	k0 := r3.Vec{X: -math.Sin(alpha), Z: math.Cos(alpha)}
	k := r3.NewRotation(7*math.Pi/180, r3.Vec{X: 1}).Rotate(k0)
	rowSeen := 0
	for i, ref := range r {
		var hkl [3]float64
		copy(hkl[:], ref.HKL)
		h := st.rotate(st.Crystal.Cell.Reciprocal(hkl))
		want := -r3.Dot(k, h) - lam*r3.Dot(h, h)/2
		if math.Abs(ref.SPerNm-want) > 1e-4*(1+math.Abs(want)) {
			t.Errorf("%v: s = %.6f, explicit rotation %.6f", ref.HKL, ref.SPerNm, want)
		}
		if ref.Row != nil {
			rowSeen++
			if math.Abs(ref.SPerNm-r0[i].SPerNm) > 1e-12 {
				t.Errorf("row beam %v: s %g with the tilt, %g without", ref.HKL, ref.SPerNm, r0[i].SPerNm)
			}
		}
	}
	if rowSeen != 4 {
		t.Errorf("%d row beams marked, want 4 (−2…2 but 0)", rowSeen)
	}
	// On the zone axis the (020)-type reflections are strongly excited and
	// warned about; 7° off the zone they are not.
	warned := func(st *Setup) bool {
		for _, w := range st.Warnings {
			if strings.Contains(w, "strongly excited") {
				return true
			}
		}
		return false
	}
	if !warned(st0) || warned(st) {
		t.Errorf("strong-reflection warning on the zone %v, 7° off %v; want true, false", st0.Warnings, st.Warnings)
	}
}
