package sim

import (
	"math"
	"testing"
)

// The error model of the step control: one slab of the two-beam step with
// a departure δ(z) from the chord of quadratic or cubic shape (peak |δ| at
// the Gauss nodes D), compared with the same slab converged by 4000
// sub-slabs, errs by no more than the indicator D·(floorWeight +
// (c/beatScale)²) in amplitude, c the beat cycles the slab holds, from a
// small fraction of a cycle to several.
func TestSlabErrorModel(t *testing.T) {
	m := TwoBeam{SPerNm: 0.004, XiGNm: 50, XiGAbsNm: 500, Xi0AbsNm: 500}
	st := m.NewStepper()
	const D = 1e-5
	shapes := map[string]func(u float64) float64{
		// u(1−u) is 1/6 at both nodes.
		"quadratic": func(u float64) float64 { return 6 * D * u * (1 - u) },
		// u(1−u)(2u−1) is ∓√3/18 at the nodes.
		"cubic": func(u float64) float64 { return 18 / math.Sqrt(3) * D * u * (1 - u) * (2*u - 1) },
	}
	for name, delta := range shapes {
		for _, slope := range []float64{0, 0.02, -0.05} {
			for _, h := range []float64{1, 2, 5, 10, 20, 30, 50, 80} {
				run := func(n int) []complex128 {
					psi := []complex128{complex(0.8, 0.1), complex(0.3, -0.5)}
					subSlabs(st, psi, h, slope, n, delta, st.Crystal)
					return psi
				}
				one, conv := run(1), run(4000)
				err := 0.0
				for k := range one {
					err = math.Max(err, math.Hypot(real(one[k]-conv[k]), imag(one[k]-conv[k])))
				}
				cyc := st.Beat(slope) * h
				bound := D * (floorWeight + (cyc/beatScale)*(cyc/beatScale))
				if err > bound {
					t.Errorf("%s δ, slope %g, h %g nm (%.2f beat cycles): amplitude error %.3g > indicator %.3g", name, slope, h, cyc, err, bound)
				}
			}
		}
	}
}

// subSlabs advances psi through a slab of length h whose g·R departs by
// δ(u) (u = z/h, δ(0) = δ(1) = 0) from a chord of slope slope, in n equal
// sub-slabs, each taken by crystal in the frame of its own chord.
func subSlabs(st Stepper, psi []complex128, h, slope float64, n int, delta func(float64) float64,
	crystal func(psi []complex128, h, slope, d1, d2 float64)) {
	dh := h / float64(n)
	for k := 0; k < n; k++ {
		ua, ub := float64(k)/float64(n), float64(k+1)/float64(n)
		da, db := delta(ua), delta(ub)
		d1 := delta(ua+gaussNodes[0]/float64(n)) - da - gaussNodes[0]*(db-da)
		d2 := delta(ua+gaussNodes[1]/float64(n)) - da - gaussNodes[1]*(db-da)
		st.Shift(psi, da)
		crystal(psi, dh, slope+(db-da)/dh, d1, d2)
		st.Shift(psi, -db)
	}
}
