package micrograph

import (
	"strings"
)

// nmPerUnit gives the length of one unit in nm for the spellings files use
// for lengths. "u" and "micron" stand for µm where a file cannot hold the
// micro sign (ImageJ writes "micron" and "\u00B5m").
var nmPerUnit = map[string]float64{
	"pm": 1e-3,
	"å":  0.1, "a": 0.1, "angstrom": 0.1, "ångström": 0.1, "\u212b": 0.1,
	"nm": 1, "nanometer": 1, "nanometre": 1,
	"µm": 1e3, "μm": 1e3, "um": 1e3, "micron": 1e3, "microns": 1e3, "micrometer": 1e3, "micrometre": 1e3,
	"mm": 1e6, "cm": 1e7, "m": 1e9,
}

// UnitToNm returns the length of one unit in nm: Å, nm, µm (and pm, mm,
// cm, m) in the spellings files use. An unknown or empty unit is an error
// naming it.
func UnitToNm(unit string) (float64, error) {
	u := strings.ToLower(strings.TrimSpace(unit))
	if f, ok := nmPerUnit[u]; ok {
		return f, nil
	}
	if u == "" {
		return 0, errorf("no length unit given")
	}
	return 0, errorf("unit %q is not a length this program converts to nm (it knows pm, Å, nm, µm, mm, cm, m)", unit)
}
