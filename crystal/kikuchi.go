package crystal

import (
	"fmt"
	"math"
)

// DeviationFromKikuchi returns the excitation error s (1/nm) of reflection
// g from the position of its excess Kikuchi line:
//
//	s = λ g² Δx / x
//
// (Hirsch et al., Electron Microscopy of Thin Crystals, 1965, ch. 4;
// Williams & Carter, Transmission Electron Microscopy, 2009, ch. 19), with
// λ in nm, g = |g| in 1/nm, Δx (offset) the distance of the excess line
// from the g spot and x (spacing) the distance from 000 to g, both measured
// on the same pattern in any one unit. Δx is positive when the excess line
// lies beyond the g spot (away from 000), which gives s > 0; it is zero at
// the exact Bragg condition. Δx may exceed x: in the weak-beam setting
// g(ng), with the excess line of ng through the ng spot, the excess line of
// g lies (n−1)x/2 beyond the g spot and s = (n−1) λ g²/2 (Cockayne, Ray &
// Whelan 1969, Phil. Mag. 20, 1265).
func DeviationFromKikuchi(lambdaNm, gPerNm, offset, spacing float64) (float64, error) {
	switch {
	case !(lambdaNm > 0) || math.IsInf(lambdaNm, 0):
		return 0, fmt.Errorf("kikuchi: wavelength %g nm must be positive and finite", lambdaNm)
	case !(gPerNm > 0) || math.IsInf(gPerNm, 0):
		return 0, fmt.Errorf("kikuchi: |g| = %g 1/nm must be positive and finite", gPerNm)
	case !(spacing > 0) || math.IsInf(spacing, 0):
		return 0, fmt.Errorf("kikuchi: spacing %g (000 to g) must be positive and finite", spacing)
	case math.IsNaN(offset) || math.IsInf(offset, 0):
		return 0, fmt.Errorf("kikuchi: offset %g must be finite", offset)
	}
	return lambdaNm * gPerNm * gPerNm * offset / spacing, nil
}
