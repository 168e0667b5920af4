package crystal

import (
	"math"
	"testing"
)

func TestElasticValidate(t *testing.T) {
	// Born stability of a cubic crystal: C11 > |C12|, C11 + 2C12 > 0,
	// C44 > 0 (Born & Huang, Dynamical Theory of Crystal Lattices, 1954).
	for _, tc := range []struct {
		name          string
		c11, c12, c44 float64
		ok            bool
	}{
		{"Cu (Simmons & Wang 1971, from memory)", 168.4, 121.4, 75.4, true},
		{"C11 < C12", 100, 120, 50, false},
		{"C11 + 2 C12 < 0", 100, -60, 50, false},
		{"C44 = 0", 168, 121, 0, false},
		{"C44 < 0", 168, 121, -5, false},
		{"NaN", math.NaN(), 121, 75, false},
	} {
		_, err := CubicElastic(tc.c11, tc.c12, tc.c44)
		if (err == nil) != tc.ok {
			t.Errorf("%s: CubicElastic error %v, want ok = %v", tc.name, err, tc.ok)
		}
	}
	// Hexagonal: C11 > |C12|, (C11 + C12) C33 > 2 C13², C44 > 0.
	if _, err := HexagonalElastic(162.4, 92, 69, 180.7, 46.7); err != nil {
		t.Errorf("Ti constants rejected: %v", err)
	}
	if _, err := HexagonalElastic(100, 50, 120, 100, 30); err == nil {
		t.Error("hexagonal constants with 2 C13² > (C11 + C12) C33 accepted")
	}
	var asym Elastic
	asym.C = [6][6]float64{{200, 100, 100}, {90, 200, 100}, {100, 100, 200}, {3: 50}, {4: 50}, {5: 50}}
	asym.Full = true
	if err := asym.Validate(); err == nil {
		t.Error("non-symmetric stiffness accepted")
	}
	for _, tc := range []struct{ mu, nu float64 }{{0, 0.3}, {-10, 0.3}, {40, 0.5}, {40, -1}, {40, math.NaN()}} {
		if _, err := IsotropicElastic(tc.mu, tc.nu); err == nil {
			t.Errorf("IsotropicElastic(%g, %g) accepted", tc.mu, tc.nu)
		}
	}
}

// TestVoigtAverage: for an isotropic stiffness (C11 − C12 = 2 C44) the Voigt
// average returns μ = C44 and ν = C12/(C11 + C12) exactly (textbook
// identity, e.g. Nye 1957). For a cubic crystal the Voigt shear modulus
// reduces to (C11 − C12 + 3 C44)/5 (Hirth & Lothe 1982, ch. 13): 54.64 GPa
// for the Cu constants.
func TestVoigtAverage(t *testing.T) {
	e, err := CubicElastic(200, 80, 60)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(e.ShearGPa-60) > 1e-12 || math.Abs(e.Poisson-80.0/280) > 1e-12 {
		t.Errorf("isotropic cubic: μ = %g, ν = %g; want 60, %g", e.ShearGPa, e.Poisson, 80.0/280)
	}
	cu, _ := Preset("Cu")
	if math.Abs(cu.Elastic.ShearGPa-54.64) > 1e-9 {
		t.Errorf("Cu Voigt shear modulus %g GPa, want 54.64", cu.Elastic.ShearGPa)
	}
	iso, err := IsotropicElastic(40, 0.25)
	if err != nil {
		t.Fatal(err)
	}
	// λ = 2μν/(1−2ν) = 40 GPa, so C11 = λ + 2μ = 120, C12 = 40.
	if iso.C[0][0] != 120 || iso.C[0][1] != 40 || iso.C[3][3] != 40 || iso.Full {
		t.Errorf("isotropic stiffness %v", iso.C)
	}
}
