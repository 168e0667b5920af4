package crystal

import (
	"math"
	"testing"
)

func TestWavelength(t *testing.T) {
	// Relativistic electron wavelengths as published to four figures, e.g.
	// Williams & Carter, Transmission Electron Microscopy (2009), Table 1.1
	// (which prints them to three), and Reimer & Kohl, Transmission Electron
	// Microscopy (2008), Table 2.2 — values from memory. Tolerance: half a
	// unit in the last printed digit.
	for _, tc := range []struct{ kv, pm float64 }{
		{100, 3.701},
		{200, 2.508},
		{300, 1.969},
	} {
		got := Wavelength(tc.kv) * 1000 // nm -> pm
		if math.Abs(got-tc.pm) > 0.0005 {
			t.Errorf("Wavelength(%g kV) = %.5f pm, want %.3f pm", tc.kv, got, tc.pm)
		}
	}
	if !math.IsNaN(Wavelength(0)) || !math.IsNaN(Wavelength(-3)) {
		t.Error("Wavelength of a non-positive voltage should be NaN")
	}
}

func TestRelativisticFactor(t *testing.T) {
	// γ = 1 + eU/(m0c²) with m0c² = 510.999 keV (CODATA 2018):
	// 1.1957, 1.3914, 1.5871 at 100, 200, 300 kV (Reimer & Kohl 2008,
	// Table 2.2, from memory). Tolerance half a unit in the 4th decimal.
	for _, tc := range []struct{ kv, gamma float64 }{
		{100, 1.1957}, {200, 1.3914}, {300, 1.5871},
	} {
		if got := RelativisticFactor(tc.kv); math.Abs(got-tc.gamma) > 0.00005 {
			t.Errorf("RelativisticFactor(%g) = %.5f, want %.4f", tc.kv, got, tc.gamma)
		}
	}
}
