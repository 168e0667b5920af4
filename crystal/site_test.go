package crystal

import (
	"strings"
	"testing"
)

func TestSiteOccupancyAndDebyeWallerLimits(t *testing.T) {
	cell := Cubic(0.36)
	for _, c := range []struct {
		atoms []Atom
		want  string
	}{
		// Two copies of one atom on a site would double its scattering.
		{[]Atom{{Element: "Cu", Occupancy: 1}, {Element: "Cu", XYZ: [3]float64{1, 1, 1}, Occupancy: 1}}, "occupancies add up to 2"},
		{[]Atom{{Element: "Cu", Occupancy: 0.7}, {Element: "Ni", Occupancy: 0.7}}, "Cu 0.7 + Ni 0.7"},
		{[]Atom{{Element: "Cu", Occupancy: 1, BIsoNm2: 10}}, "more than 1 nm²"},
	} {
		_, err := New("test", cell, c.atoms, nil, "F")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: error %v, want %q", c.atoms, err, c.want)
		}
	}
	// A mixed site that is full is fine.
	if _, err := New("test", cell, []Atom{{Element: "Cu", Occupancy: 0.5}, {Element: "Ni", Occupancy: 0.5}}, nil, "F"); err != nil {
		t.Errorf("mixed site 0.5 + 0.5: %v", err)
	}
}
