package crystal

import (
	"strings"
	"testing"
)

// TestCentringCounts: atoms per conventional cell of the common structures
// (International Tables Vol. A; Cullity 1978, ch. 2): fcc 4, bcc 2,
// diamond 8, hcp 2, rock salt 4 + 4, B2 1 + 1, L1₂ 3 + 1.
func TestCentringCounts(t *testing.T) {
	for _, tc := range []struct {
		name string
		want map[string]int
	}{
		{"Cu", map[string]int{"Cu": 4}},
		{"Fe", map[string]int{"Fe": 2}},
		{"Si", map[string]int{"Si": 8}},
		{"Ge", map[string]int{"Ge": 8}},
		{"Ti", map[string]int{"Ti": 2}},
		{"NiAl", map[string]int{"Ni": 1, "Al": 1}},
		{"Ni3Al", map[string]int{"Ni": 3, "Al": 1}},
	} {
		c, err := Preset(tc.name)
		if err != nil {
			t.Fatal(err)
		}
		got := map[string]int{}
		for _, a := range c.Atoms {
			got[a.Element]++
		}
		for el, n := range tc.want {
			if got[el] != n || len(got) != len(tc.want) {
				t.Errorf("%s: atoms %v, want %v", tc.name, got, tc.want)
				break
			}
		}
	}
}

// TestSymmetryExpansionMerges: rock salt from its asymmetric unit with the
// F centring and the point operators of m-3m that move a site at 0,0,0 or
// 1/2,1/2,1/2 onto itself must still give 4 Na + 4 Cl (Wyckoff positions 4a
// and 4b of Fm-3m, International Tables Vol. A).
func TestSymmetryExpansionMerges(t *testing.T) {
	ops := []string{"x,y,z", "-x,-y,-z", "y,x,z", "-y,x,-z", "z,x,y", "x+1/2,y+1/2,z", "x,y+1/2,z+1/2", "x+1/2,y,z+1/2"}
	c, err := New("NaCl", Cubic(0.564), []Atom{
		{Element: "Na", Occupancy: 1},
		{Element: "cl", XYZ: [3]float64{0.5, 0.5, 0.5}, Occupancy: 1},
	}, ops, "")
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]int{}
	for _, a := range c.Atoms {
		got[a.Element]++
		for _, x := range a.XYZ {
			if x < 0 || x >= 1 {
				t.Errorf("%s at %v not wrapped into [0, 1)", a.Element, a.XYZ)
			}
		}
	}
	if got["Na"] != 4 || got["Cl"] != 4 {
		t.Errorf("rock salt expanded to %v, want 4 Na + 4 Cl", got)
	}
	// Centring letter and explicit operators give the same cell.
	f, err := New("NaCl", Cubic(0.564), []Atom{
		{Element: "Na", Occupancy: 1},
		{Element: "Cl", XYZ: [3]float64{0.5, 0.5, 0.5}, Occupancy: 1},
	}, nil, "F")
	if err != nil || len(f.Atoms) != 8 {
		t.Errorf("F-centred rock salt: %d atoms, %v", len(f.Atoms), err)
	}
	// R centring on hexagonal axes triples the sites (International Tables
	// Vol. A, obverse setting).
	r, err := New("R", Hexagonal(0.5, 1.4), []Atom{{Element: "Bi", XYZ: [3]float64{0, 0, 0.23}, Occupancy: 1}}, []string{"x,y,z", "-x,-y,-z"}, "R")
	if err != nil || len(r.Atoms) != 6 {
		t.Errorf("R-centred: %d atoms, %v", len(r.Atoms), err)
	}
}

func TestNewBadInput(t *testing.T) {
	ok := Atom{Element: "Cu", Occupancy: 1}
	for _, tc := range []struct {
		name      string
		cell      Cell
		atoms     []Atom
		ops       []string
		centring  string
		inMessage string
	}{
		{"unknown element", Cubic(0.36), []Atom{{Element: "Xx", Occupancy: 1}}, nil, "", `unknown element "Xx"`},
		{"occupancy 0", Cubic(0.36), []Atom{{Element: "Cu"}}, nil, "", "occupancy 0"},
		{"occupancy 1.2", Cubic(0.36), []Atom{{Element: "Cu", Occupancy: 1.2}}, nil, "", "occupancy 1.2"},
		{"negative B", Cubic(0.36), []Atom{{Element: "Cu", Occupancy: 1, BIsoNm2: -0.01}}, nil, "", "Debye–Waller"},
		{"no atoms", Cubic(0.36), nil, nil, "", "no atoms"},
		{"bad centring", Cubic(0.36), []Atom{ok}, nil, "Q", `centring "Q"`},
		{"R on cubic", Cell{0.3, 0.4, 0.5, 90, 90, 90}, []Atom{ok}, nil, "R", "centring R"},
		{"bad operator", Cubic(0.36), []Atom{ok}, []string{"x,y"}, "", "symmetry[0]"},
		{"singular operator", Cubic(0.36), []Atom{ok}, []string{"x,x,z"}, "", "determinant"},
		{"bad term", Cubic(0.36), []Atom{ok}, []string{"x,y,z+q"}, "", "component 3"},
		{"impossible cell", Cell{1, 1, 1, 30, 30, 90}, []Atom{ok}, nil, "", "impossible"},
	} {
		_, err := New("test", tc.cell, tc.atoms, tc.ops, tc.centring)
		if err == nil {
			t.Errorf("%s: accepted", tc.name)
			continue
		}
		if !strings.Contains(err.Error(), tc.inMessage) {
			t.Errorf("%s: error %q does not mention %q", tc.name, err, tc.inMessage)
		}
	}
}

func TestParseSymOp(t *testing.T) {
	for _, tc := range []struct {
		text string
		in   [3]float64
		want [3]float64
	}{
		{"x,y,z", [3]float64{0.1, 0.2, 0.3}, [3]float64{0.1, 0.2, 0.3}},
		{"-x+1/2, y, -z", [3]float64{0.1, 0.2, 0.3}, [3]float64{0.4, 0.2, -0.3}},
		{"x-y,x,1/2+z", [3]float64{0.1, 0.2, 0.3}, [3]float64{-0.1, 0.1, 0.8}},
		{"X,Y+0.5,-Z", [3]float64{0.1, 0.2, 0.3}, [3]float64{0.1, 0.7, -0.3}},
		{"+y,-x+y,z-1/3", [3]float64{0.1, 0.2, 0.3}, [3]float64{0.2, 0.1, 0.3 - 1.0/3}},
	} {
		op, err := ParseSymOp(tc.text)
		if err != nil {
			t.Errorf("ParseSymOp(%q): %v", tc.text, err)
			continue
		}
		got := op.Apply(tc.in)
		for i := range got {
			if d := got[i] - tc.want[i]; d > 1e-12 || d < -1e-12 {
				t.Errorf("%q applied to %v = %v, want %v", tc.text, tc.in, got, tc.want)
				break
			}
		}
	}
	for _, bad := range []string{"", "x,y", "x,y,z,x", "x,,z", "x,y,1/2", "x,y,z+", "x,y,z/0", "x,y,zz", "2x,y,z"} {
		if _, err := ParseSymOp(bad); err == nil {
			t.Errorf("ParseSymOp(%q) accepted", bad)
		}
	}
}

func TestPresets(t *testing.T) {
	// Every preset named in the design and the crystal issue exists, builds,
	// and carries validated elastic constants.
	want := []string{"Ag", "Al", "Au", "Co", "Cr", "Cu", "Fe", "Ge", "Mg", "Mo", "Nb", "Ni", "Ni3Al", "NiAl", "Pd", "Pt", "Si", "Ta", "Ti", "W", "Zn", "Zr"}
	names := PresetNames()
	if strings.Join(names, ",") != strings.Join(want, ",") {
		t.Errorf("PresetNames = %v, want %v", names, want)
	}
	for _, n := range names {
		c, err := Preset(n)
		if err != nil {
			t.Fatal(err)
		}
		if !c.HasElastic || !c.Elastic.Full || c.Elastic.Validate() != nil {
			t.Errorf("%s: elastic constants missing or invalid", n)
		}
		for _, a := range c.Atoms {
			// Room-temperature B of metals lies in 0.1–2 Å² (common practice).
			if a.BIsoNm2 < 0.001 || a.BIsoNm2 > 0.02 {
				t.Errorf("%s: B = %g nm² outside 0.1–2 Å²", n, a.BIsoNm2)
			}
		}
	}
	if c, err := Preset("cu"); err != nil || c.Name != "Cu" {
		t.Errorf("Preset is not case-insensitive: %v", err)
	}
	_, err := Preset("Unobtainium")
	if err == nil || !strings.Contains(err.Error(), `"Unobtainium"`) || !strings.Contains(err.Error(), "Cu, Fe") {
		t.Errorf("unknown preset error %v should name it and list the presets", err)
	}
}
