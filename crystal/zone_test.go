package crystal

import (
	"math"
	"testing"
)

// TestZoneFCC001: the [001] zone of an fcc crystal up to |g| = √8/a holds
// the allowed 200-type (4), 220-type (4) and the forbidden 100 (4), 110 (4),
// 210 (8) reflections: all hk0 with h² + k² ≤ 8, excluding 000 (a count from
// the zone law h u + k v + l w = 0 and the fcc rule of unmixed indices).
func TestZoneFCC001(t *testing.T) {
	cu, _ := Preset("Cu")
	gMax := math.Sqrt(8) / cu.Cell.A
	z, err := cu.Zone([3]float64{0, 0, 1}, gMax)
	if err != nil {
		t.Fatal(err)
	}
	allowed, forbidden := 0, 0
	for _, r := range z {
		if r.HKL[2] != 0 {
			t.Errorf("%v is not in the [001] zone", r.HKL)
		}
		if r.Forbidden {
			forbidden++
		} else {
			allowed++
		}
		if math.Abs(r.DNm-cu.Cell.DSpacing(r.HKL)) > 1e-15 {
			t.Errorf("%v: d = %g", r.HKL, r.DNm)
		}
	}
	if allowed != 8 || forbidden != 16 {
		t.Errorf("[001] zone: %d allowed, %d forbidden; want 8 and 16", allowed, forbidden)
	}
	if z[0].HKL != [3]float64{1, 0, 0} || !z[0].Forbidden {
		t.Errorf("first reflection %+v, want the forbidden (1 0 0)", z[0])
	}
	for i := 1; i < len(z); i++ {
		if z[i].GPerNm < z[i-1].GPerNm-1e-12 {
			t.Errorf("not sorted by |g| at %d", i)
		}
	}
}

// TestZoneFCC110: the [110] zone of fcc holds ±(1 -1 ±1), ±(0 0 2), ±(2 -2 0)
// as its lowest allowed reflections (Williams & Carter 2009, ch. 18, the
// [011] pattern): every allowed g satisfies h + k = 0 and unmixed parity.
func TestZoneFCC110(t *testing.T) {
	cu, _ := Preset("Cu")
	gs := cu.ZoneReflections([3]float64{1, 1, 0}, 3/cu.Cell.DSpacing([3]float64{1, 1, 1}))
	var low [][3]float64
	for _, g := range gs {
		if g[0]+g[1] != 0 {
			t.Errorf("%v violates the zone law for [110]", g)
		}
		if !cu.Forbidden(g) && len(low) < 8 {
			low = append(low, g)
		}
	}
	want := [][3]float64{{1, -1, 1}, {1, -1, -1}, {-1, 1, 1}, {-1, 1, -1}, {0, 0, 2}, {0, 0, -2}, {2, -2, 0}, {-2, 2, 0}}
	for _, w := range want {
		found := false
		for _, g := range low {
			found = found || g == w
		}
		if !found {
			t.Errorf("lowest allowed reflections %v lack %v", low, w)
		}
	}
}

// TestZoneHexagonal: in the [0001] zone of hcp every g is (hki0) (zone law
// in three indices: l = 0), and none of the lowest is forbidden: for the
// sites 1/3 2/3 1/4 and 2/3 1/3 3/4, (1 0 -1 0) has |F| = f and (1 1 -2 0)
// |F| = 2f.
func TestZoneHexagonal(t *testing.T) {
	mg, _ := Preset("Mg")
	z, err := mg.Zone([3]float64{0, 0, 1}, 1.01/mg.Cell.DSpacing([3]float64{1, 1, 0}))
	if err != nil {
		t.Fatal(err)
	}
	// |g| ≤ |g(11-20)|: six {10-10} and six {11-20} (hexagonal d-spacings,
	// d(10-10) = √3 a/2, d(11-20) = a/2).
	if len(z) != 12 {
		t.Errorf("%d reflections, want 12: %v", len(z), z)
	}
	for _, r := range z {
		if r.HKL[2] != 0 || r.Forbidden {
			t.Errorf("%+v", r)
		}
	}
}

func TestZoneBadInput(t *testing.T) {
	cu, _ := Preset("Cu")
	for _, tc := range []struct {
		beam [3]float64
		g    float64
	}{
		{[3]float64{0, 0, 0}, 10},
		{[3]float64{0, 0, 1}, 0},
		{[3]float64{0, 0, 1}, -1},
		{[3]float64{0, 0, 1}, 1e6},
		{[3]float64{math.NaN(), 0, 1}, 10},
	} {
		if _, err := cu.Zone(tc.beam, tc.g); err == nil {
			t.Errorf("Zone(%v, %g) accepted", tc.beam, tc.g)
		}
		if cu.ZoneReflections(tc.beam, tc.g) != nil {
			t.Errorf("ZoneReflections(%v, %g) not nil", tc.beam, tc.g)
		}
	}
}

// TestDeviationFromKikuchi: s = λ g² Δx/x (Hirsch et al. 1965); at 200 kV
// for Cu 200 with the excess line a quarter spacing beyond g. Also the
// weak-beam identity: with Δx = (n−1)x/2, s = (n−1)λg²/2 (Cockayne, Ray &
// Whelan 1969).
func TestDeviationFromKikuchi(t *testing.T) {
	lam := Wavelength(200)
	g := 2 / 0.36149
	s, err := DeviationFromKikuchi(lam, g, 0.25, 1)
	if err != nil || math.Abs(s-lam*g*g/4) > 1e-15 {
		t.Errorf("s = %g, %v; want %g", s, err, lam*g*g/4)
	}
	for n := 2; n <= 5; n++ {
		s, _ := DeviationFromKikuchi(lam, g, float64(n-1)/2*7.3, 7.3)
		if want := float64(n-1) * lam * g * g / 2; math.Abs(s-want) > 1e-12*want {
			t.Errorf("g(%dg): s = %g, want %g", n, s, want)
		}
	}
	if s, _ := DeviationFromKikuchi(lam, g, -0.5, 2); s >= 0 {
		t.Errorf("line inside g gave s = %g ≥ 0", s)
	}
	for _, bad := range [][4]float64{{0, g, 0.1, 1}, {lam, 0, 0.1, 1}, {lam, g, 0.1, 0}, {lam, g, math.NaN(), 1}, {lam, g, 0.1, -1}, {math.Inf(1), g, 0.1, 1}} {
		if _, err := DeviationFromKikuchi(bad[0], bad[1], bad[2], bad[3]); err == nil {
			t.Errorf("DeviationFromKikuchi%v accepted", bad)
		}
	}
}
