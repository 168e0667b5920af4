package crystal

import (
	"fmt"
	"sort"
	"strings"
)

// A preset is a built-in material. Every number below names where it came
// from. Lattice parameters are room-temperature values; "from memory" marks
// values recalled by the author from the handbook named, not re-read from it.
//
// Debye–Waller factors B (room temperature, 293–300 K), in Å² as tabulated,
// converted to nm² by ×0.01. From memory, as close as recalled to Peng,
// Ren, Dudarev & Whelan (1996), Acta Cryst. A52, 456 ("Debye–Waller factors
// and absorptive scattering factors of elemental crystals"), table at 293 K;
// alloy values from memory of the order reported for the constituent metals.
//
// Elastic constants (GPa, room temperature): from memory of Simmons & Wang,
// Single Crystal Elastic Constants and Calculated Aggregate Properties
// (MIT Press, 1971), as also reproduced in Hirth & Lothe, Theory of
// Dislocations (1982), Table 13-1; original measurements as named.
type preset struct {
	structure string // fcc, bcc, diamond, hcp, B2, L12
	a, c      float64
	elements  []string  // one per site of the structure
	bAng2     []float64 // B per site, Å²
	elastic   func() (Elastic, error)
	note      string
}

func cubicC(c11, c12, c44 float64) func() (Elastic, error) {
	return func() (Elastic, error) { return CubicElastic(c11, c12, c44) }
}

func hexC(c11, c12, c13, c33, c44 float64) func() (Elastic, error) {
	return func() (Elastic, error) { return HexagonalElastic(c11, c12, c13, c33, c44) }
}

var presets = map[string]preset{
	// fcc. Lattice parameters: Pearson, Handbook of Lattice Spacings and
	// Structures of Metals (1958/1967), and Wyckoff, Crystal Structures vol. 1
	// (1963), at ~293 K; from memory.
	"Cu": {structure: "fcc", a: 0.36149, elements: []string{"Cu"}, bAng2: []float64{0.55},
		elastic: cubicC(168.4, 121.4, 75.4), note: "elastic: Overton & Gaffney 1955 via Simmons & Wang 1971, from memory"},
	"Al": {structure: "fcc", a: 0.40495, elements: []string{"Al"}, bAng2: []float64{0.86},
		elastic: cubicC(108.2, 61.3, 28.5), note: "elastic: Kamm & Alers 1964 via Simmons & Wang 1971, from memory"},
	"Ni": {structure: "fcc", a: 0.35240, elements: []string{"Ni"}, bAng2: []float64{0.37},
		elastic: cubicC(246.5, 147.3, 124.7), note: "elastic: Alers, Neighbours & Sato 1960 via Simmons & Wang 1971, from memory"},
	"Au": {structure: "fcc", a: 0.40782, elements: []string{"Au"}, bAng2: []float64{0.62},
		elastic: cubicC(192.9, 163.8, 41.5), note: "elastic: Neighbours & Alers 1958 via Simmons & Wang 1971, from memory"},
	"Ag": {structure: "fcc", a: 0.40853, elements: []string{"Ag"}, bAng2: []float64{0.65},
		elastic: cubicC(124.0, 93.4, 46.1), note: "elastic: Neighbours & Alers 1958 via Simmons & Wang 1971, from memory"},
	"Pd": {structure: "fcc", a: 0.38907, elements: []string{"Pd"}, bAng2: []float64{0.46},
		elastic: cubicC(227.1, 176.0, 71.7), note: "elastic: Rayne 1960 via Simmons & Wang 1971, from memory"},
	"Pt": {structure: "fcc", a: 0.39242, elements: []string{"Pt"}, bAng2: []float64{0.32},
		elastic: cubicC(346.7, 250.7, 76.5), note: "elastic: MacFarlane, Rayne & Jones 1965 via Simmons & Wang 1971, from memory"},
	// bcc. Lattice parameters as for fcc above, from memory.
	"Fe": {structure: "bcc", a: 0.28665, elements: []string{"Fe"}, bAng2: []float64{0.35},
		elastic: cubicC(231.4, 134.7, 116.4), note: "α-Fe; elastic: Rayne & Chandrasekhar 1961 via Simmons & Wang 1971, from memory"},
	"W": {structure: "bcc", a: 0.31652, elements: []string{"W"}, bAng2: []float64{0.16},
		elastic: cubicC(522.4, 204.4, 160.6), note: "elastic: Featherston & Neighbours 1963 via Simmons & Wang 1971, from memory"},
	"Mo": {structure: "bcc", a: 0.31470, elements: []string{"Mo"}, bAng2: []float64{0.20},
		elastic: cubicC(440.8, 172.4, 121.7), note: "elastic: Featherston & Neighbours 1963 via Simmons & Wang 1971, from memory"},
	"Nb": {structure: "bcc", a: 0.33004, elements: []string{"Nb"}, bAng2: []float64{0.47},
		elastic: cubicC(246.5, 133.3, 28.1), note: "elastic: Carroll 1965 via Simmons & Wang 1971, from memory"},
	"Ta": {structure: "bcc", a: 0.33030, elements: []string{"Ta"}, bAng2: []float64{0.26},
		elastic: cubicC(266.3, 158.2, 87.4), note: "elastic: Featherston & Neighbours 1963 via Simmons & Wang 1971, from memory"},
	"Cr": {structure: "bcc", a: 0.28846, elements: []string{"Cr"}, bAng2: []float64{0.24},
		elastic: cubicC(339.8, 58.6, 99.0), note: "elastic: Bolef & de Klerk 1963 via Simmons & Wang 1971, from memory"},
	// Diamond cubic. Si: a = 0.543102 nm (CODATA 2018 lattice spacing
	// d220 = 192.0155716 pm × √8); Ge: 0.56579 nm, Wyckoff 1963, from memory.
	"Si": {structure: "diamond", a: 0.543102, elements: []string{"Si"}, bAng2: []float64{0.46},
		elastic: cubicC(165.7, 63.9, 79.6), note: "elastic: McSkimin 1953 via Simmons & Wang 1971, from memory"},
	"Ge": {structure: "diamond", a: 0.56579, elements: []string{"Ge"}, bAng2: []float64{0.57},
		elastic: cubicC(128.9, 48.3, 67.1), note: "elastic: McSkimin 1953 via Simmons & Wang 1971, from memory"},
	// hcp, P6₃/mmc, atoms at 1/3 2/3 1/4 and 2/3 1/3 3/4. Lattice parameters:
	// Pearson (1967), room temperature, from memory.
	"Ti": {structure: "hcp", a: 0.29508, c: 0.46855, elements: []string{"Ti"}, bAng2: []float64{0.60},
		elastic: hexC(162.4, 92.0, 69.0, 180.7, 46.7), note: "α-Ti; elastic: Fisher & Renken 1964 via Simmons & Wang 1971, from memory"},
	"Mg": {structure: "hcp", a: 0.32094, c: 0.52107, elements: []string{"Mg"}, bAng2: []float64{1.55},
		elastic: hexC(59.7, 26.2, 21.7, 61.7, 16.4), note: "elastic: Slutsky & Garland 1957 via Simmons & Wang 1971, from memory"},
	"Zr": {structure: "hcp", a: 0.32317, c: 0.51476, elements: []string{"Zr"}, bAng2: []float64{0.64},
		elastic: hexC(143.4, 72.8, 65.3, 164.8, 32.0), note: "α-Zr; elastic: Fisher & Renken 1964 via Simmons & Wang 1971, from memory"},
	"Zn": {structure: "hcp", a: 0.26649, c: 0.49468, elements: []string{"Zn"}, bAng2: []float64{1.08},
		elastic: hexC(163.7, 36.4, 53.0, 63.5, 38.8), note: "elastic: Alers & Neighbours 1958 via Simmons & Wang 1971, from memory"},
	"Co": {structure: "hcp", a: 0.25071, c: 0.40695, elements: []string{"Co"}, bAng2: []float64{0.33},
		elastic: hexC(307.1, 165.0, 102.7, 358.1, 75.5), note: "α-Co; elastic: McSkimin 1955 via Simmons & Wang 1971, from memory"},
	// Ordered alloys. NiAl (B2, CsCl type): a = 0.2887 nm, Bradley & Taylor
	// 1937 via Pearson, from memory; elastic: Wasilewski 1966, from memory.
	"NiAl": {structure: "B2", a: 0.2887, elements: []string{"Ni", "Al"}, bAng2: []float64{0.48, 0.55},
		elastic: cubicC(211.5, 143.2, 112.1), note: "stoichiometric, fully ordered"},
	// Ni₃Al (γ′, L1₂, Cu₃Au type): a = 0.3572 nm, Pearson, from memory;
	// elastic: Kayser & Stassis 1981 (Phys. Status Solidi A 64, 335), from memory.
	"Ni3Al": {structure: "L12", a: 0.3572, elements: []string{"Ni", "Al"}, bAng2: []float64{0.45, 0.50},
		elastic: cubicC(223.0, 148.0, 125.0), note: "stoichiometric, fully ordered; Ni on face centres, Al on corners"},
}

// PresetNames returns the names of the built-in materials, sorted.
func PresetNames() []string {
	names := make([]string, 0, len(presets))
	for n := range presets {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// Preset returns a built-in material by name (case-insensitive): cell,
// every atom of the cell, room-temperature Debye–Waller factors and elastic
// constants. The sources of its numbers are named in presets.go.
func Preset(name string) (*Crystal, error) {
	key := ""
	for n := range presets {
		if strings.EqualFold(n, strings.TrimSpace(name)) {
			key = n
		}
	}
	p, ok := presets[key]
	if !ok {
		return nil, fmt.Errorf("unknown material %q; the built-in materials are %s", name, strings.Join(PresetNames(), ", "))
	}
	site := func(i int, x, y, z float64) Atom {
		return Atom{Element: p.elements[i], XYZ: [3]float64{x, y, z}, Occupancy: 1, BIsoNm2: p.bAng2[i] * 0.01}
	}
	var (
		cell      = Cubic(p.a)
		atoms     []Atom
		centering = "P"
		long      string
	)
	switch p.structure {
	case "fcc":
		atoms, centering, long = []Atom{site(0, 0, 0, 0)}, "F", "fcc (Fm-3m)"
	case "bcc":
		atoms, centering, long = []Atom{site(0, 0, 0, 0)}, "I", "bcc (Im-3m)"
	case "diamond":
		atoms, centering, long = []Atom{site(0, 0, 0, 0), site(0, 0.25, 0.25, 0.25)}, "F", "diamond cubic (Fd-3m)"
	case "hcp":
		cell = Hexagonal(p.a, p.c)
		atoms, long = []Atom{site(0, 1.0/3, 2.0/3, 0.25), site(0, 2.0/3, 1.0/3, 0.75)}, "hcp (P6₃/mmc)"
	case "B2":
		atoms, long = []Atom{site(0, 0, 0, 0), site(1, 0.5, 0.5, 0.5)}, "B2 (CsCl type, Pm-3m)"
	case "L12":
		atoms = []Atom{site(1, 0, 0, 0), site(0, 0, 0.5, 0.5), site(0, 0.5, 0, 0.5), site(0, 0.5, 0.5, 0)}
		long = "L1₂ (Cu₃Au type, Pm-3m)"
	default:
		panic("crystal: preset " + key + " has unknown structure " + p.structure)
	}
	c, err := New(key, cell, atoms, nil, centering)
	if err != nil {
		panic("crystal: preset " + key + ": " + err.Error())
	}
	e, err := p.elastic()
	if err != nil {
		panic("crystal: preset " + key + ": " + err.Error())
	}
	c.Elastic, c.HasElastic = e, true
	c.Structure, c.Source = long, p.note
	return c, nil
}
