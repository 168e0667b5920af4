package crystal

import (
	"fmt"
	"math"
	"strings"
)

// gaussianFit is one row of the five-Gaussian table: f(s) = Σ A_i exp(−B_i s²).
type gaussianFit struct {
	Symbol string
	A, B   [5]float64
}

// f returns the fit at s (1/Å), in Å.
func (g *gaussianFit) f(s float64) float64 {
	s2 := s * s
	var sum float64
	for i := 0; i < 5; i++ {
		sum += g.A[i] * math.Exp(-g.B[i]*s2)
	}
	return sum
}

var elementZ = func() map[string]int {
	m := make(map[string]int, len(peng1996))
	for z := 1; z < len(peng1996); z++ {
		m[strings.ToLower(peng1996[z].Symbol)] = z
	}
	return m
}()

// MaxZ is the highest atomic number in the scattering-factor table.
const MaxZ = len(peng1996) - 1

// AtomicNumber returns Z of an element symbol (case-insensitive).
func AtomicNumber(element string) (int, error) {
	z, ok := elementZ[strings.ToLower(strings.TrimSpace(element))]
	if !ok {
		return 0, fmt.Errorf("unknown element %q (the electron scattering-factor table covers Z = 1–%d, H to %s)", element, MaxZ, peng1996[MaxZ].Symbol)
	}
	return z, nil
}

func canonicalElement(element string) (string, error) {
	z, err := AtomicNumber(element)
	if err != nil {
		return "", err
	}
	return peng1996[z].Symbol, nil
}

// ScatteringFactor returns the elastic electron scattering factor of the
// neutral atom, in Å, at s = sinθ/λ (1/Å), from the five-Gaussian fits of
// International Tables for Crystallography Vol. C (2004), Table 4.3.2.2
// (Peng, Ren, Dudarev & Whelan 1996):
//
//	f(s) = Σ_{i=1..5} a_i exp(−b_i s²)
//
// The fits are made for 0 ≤ s ≤ 2 1/Å; beyond that they decay smoothly but
// are not fitted. The factor is the non-relativistic one: multiply by
// γ = RelativisticFactor(kV) for the electron's mass.
func ScatteringFactor(element string, sPerAngstrom float64) (float64, error) {
	z, err := AtomicNumber(element)
	if err != nil {
		return 0, err
	}
	if !(sPerAngstrom >= 0) || math.IsInf(sPerAngstrom, 0) {
		return 0, fmt.Errorf("scattering factor of %s: s = %g 1/Å must be finite and non-negative", element, sPerAngstrom)
	}
	return peng1996[z].f(sPerAngstrom), nil
}
