package sim

import (
	"fmt"
	"math"
)

// Kinematical is the kinematical approximation: the transmitted beam is
// not depleted and the diffracted amplitude is the amplitude–phase integral
//
//	φ_g(t) = (iπ/ξ_g) ∫_0^t exp(−2πi (s z + g·R(z))) dz
//
// (Hirsch et al. 1965, ch. 7). It carries no absorption; the bright field is
// 1 − |φ_g|². It is valid where |φ_g|² ≪ 1, that is for large w = s ξ_g.
type Kinematical struct {
	SPerNm float64 // excitation error s, 1/nm
	XiGNm  float64 // extinction distance ξ_g, nm
}

// Name implements Model.
func (m Kinematical) Name() string { return "kinematical" }

// Beams implements Model.
func (m Kinematical) Beams() []int { return []int{0, 1} }

// Validate implements Model.
func (m Kinematical) Validate() error {
	if !(m.XiGNm > 0) || math.IsInf(m.XiGNm, 0) {
		return fmt.Errorf("extinction distance %g nm: must be positive and finite", m.XiGNm)
	}
	if math.IsNaN(m.SPerNm) || math.IsInf(m.SPerNm, 0) {
		return fmt.Errorf("excitation error %g /nm: must be finite", m.SPerNm)
	}
	return nil
}

// NewStepper implements Model.
func (m Kinematical) NewStepper() Stepper {
	return &kinematicalStepper{q: complex(0, math.Pi/m.XiGNm), s: m.SPerNm}
}

type kinematicalStepper struct {
	q complex128
	s float64
}

func (st *kinematicalStepper) Start(psi []complex128) { psi[0], psi[1] = 1, 0 }

// Crystal integrates dχ_g/dz = iκ χ_g + q e^{−2πiδ(z)} over the slab:
//
//	χ_g ← e^{iκh} χ_g + q ∫_0^h e^{iκ(h−z)} dz
//	          + q ∫_0^h e^{iκ(h−z)} (e^{−2πiδ(z)} − 1) dz,
//
// κ = 2π(s + slope), the first integral in closed form, the second (zero for
// a linear phase) by two-point Gauss–Legendre quadrature at the nodes where
// δ was sampled.
func (st *kinematicalStepper) Crystal(psi []complex128, h, slope, d1, d2 float64) {
	k := st.s + slope
	x := 2 * math.Pi * k * h
	e := phase(k * h)
	var integral complex128 // (e^{ix} − 1)/(ix) · h
	if math.Abs(x) < 1e-3 {
		integral = complex(h, 0) * complex(1-x*x/6, x/2-x*x*x/24)
	} else {
		integral = (e - 1) / complex(0, x) * complex(h, 0)
	}
	if d1 != 0 || d2 != 0 {
		for i, d := range [2]float64{d1, d2} {
			z := gaussNodes[i] * h
			integral += complex(h/2, 0) * phase(k*(h-z)) * (phase(-d) - 1)
		}
	}
	psi[1] = e*psi[1] + st.q*integral
}

// Beat is the frequency of the kinematical phase, |s + β|.
func (st *kinematicalStepper) Beat(slope float64) float64 { return math.Abs(st.s + slope) }

func (st *kinematicalStepper) Vacuum(psi []complex128, h float64) { psi[1] *= phase(st.s * h) }

func (st *kinematicalStepper) Shift(psi []complex128, dGamma float64) { psi[1] *= phase(dGamma) }

func (st *kinematicalStepper) Intensities(psi []complex128, out []float64) {
	df := sq(psi[1])
	out[0] = 1 - df
	out[1] = df
}
