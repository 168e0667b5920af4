package sim

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// lineField is a straight dislocation-like field for the integrator's
// tests: the isotropic screw and edge displacements (Hirth & Lothe 1982,
// eqs. 3-2 and 3-45) about a line through at with direction u, with the
// θ-cut in the half-plane that contains the beam, so columns do not cross
// it.
type lineField struct {
	at, u, e1, e2 r3.Vec // e1, e2, u right-handed; e1 ⊥ beam-ish
	bScrew        float64
	bEdge         float64 // along e1
	nu            float64
}

func newLineField(at, u r3.Vec, bScrew, bEdge float64) *lineField {
	u = r3.Unit(u)
	z := r3.Vec{Z: 1}
	e1 := r3.Cross(z, u)
	if r3.Norm(e1) < 1e-9 {
		e1 = r3.Vec{X: 1}
	}
	e1 = r3.Unit(e1)
	e2 := r3.Cross(u, e1)
	return &lineField{at: at, u: u, e1: e1, e2: e2, bScrew: bScrew, bEdge: bEdge, nu: 0.34}
}

func (f *lineField) R(p r3.Vec) r3.Vec {
	d := r3.Sub(p, f.at)
	x, y := r3.Dot(d, f.e1), r3.Dot(d, f.e2)
	// θ measured from −e2 so that the cut (θ = ±π) lies along +e2, which is
	// in the plane of u and the beam.
	th := math.Atan2(x, -y)
	r2 := x*x + y*y + 1e-12
	screw := f.bScrew * th / (2 * math.Pi)
	ux := f.bEdge / (2 * math.Pi) * (th + x*y/(2*(1-f.nu)*r2))
	uy := -f.bEdge / (2 * math.Pi) * ((1-2*f.nu)/(4*(1-f.nu))*math.Log(r2) + (x*x-y*y)/(4*(1-f.nu)*r2))
	return r3.Add(r3.Add(r3.Scale(screw, f.u), r3.Scale(ux, f.e1)), r3.Scale(uy, f.e2))
}

// stepFault is a planar fault through at with normal n: R = shift on the
// side n points to.
type stepFault struct {
	at, n, shift r3.Vec
}

func (f stepFault) R(p r3.Vec) r3.Vec {
	if r3.Dot(r3.Sub(p, f.at), f.n) > 0 {
		return f.shift
	}
	return r3.Vec{}
}

func (f stepFault) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	if math.Abs(f.n.Z) < 1e-12 {
		return dst
	}
	z := f.at.Z - (f.n.X*(x-f.at.X)+f.n.Y*(y-f.at.Y))/f.n.Z
	if z > z0 && z < z1 {
		dst = append(dst, z)
	}
	return dst
}

// sphereStrain is the Ashby–Brown field of a coherent spherical inclusion.
type sphereStrain struct {
	at     r3.Vec
	r0, ep float64
}

func (f sphereStrain) R(p r3.Vec) r3.Vec {
	d := r3.Sub(p, f.at)
	r := r3.Norm(d)
	if r <= f.r0 {
		return r3.Scale(f.ep, d)
	}
	return r3.Scale(f.ep*f.r0*f.r0*f.r0/(r*r*r), d)
}

type sum []Displacement

func (s sum) R(p r3.Vec) r3.Vec {
	var t r3.Vec
	for _, f := range s {
		t = r3.Add(t, f.R(p))
	}
	return t
}

// rk4Column integrates the phase-factor form of the two-beam equations
//
//	dT/dz = −μ T + q S exp(+2πi(s z + γ))
//	dS/dz = q T exp(−2πi(s z + γ)) − μ S
//
// with classical fourth-order Runge–Kutta at a fixed small step: an
// independent reference for the slab integrator.
func rk4Column(m TwoBeam, g float64, f Displacement, x, y, t, dz float64) (float64, float64) {
	q := complex(-math.Pi*inverse(m.XiGAbsNm), math.Pi/m.XiGNm)
	mu := complex(math.Pi*inverse(m.Xi0AbsNm), 0)
	ph := func(z float64) complex128 {
		gm := 0.0
		if f != nil {
			gm = g * f.R(r3.Vec{X: x, Y: y, Z: z}).X
		}
		return phase(m.SPerNm*z + gm)
	}
	deriv := func(z float64, T, S complex128) (complex128, complex128) {
		e := ph(z)
		return -mu*T + q*S*e, q*T/e - mu*S
	}
	T, S := complex(1, 0), complex(0, 0)
	n := int(math.Round(t / dz))
	h := t / float64(n)
	hc := complex(h, 0)
	for k := 0; k < n; k++ {
		z := float64(k) * h
		k1t, k1s := deriv(z, T, S)
		k2t, k2s := deriv(z+h/2, T+hc/2*k1t, S+hc/2*k1s)
		k3t, k3s := deriv(z+h/2, T+hc/2*k2t, S+hc/2*k2s)
		k4t, k4s := deriv(z+h, T+hc*k3t, S+hc*k3s)
		T += hc / 6 * (k1t + 2*k2t + 2*k3t + k4t)
		S += hc / 6 * (k1s + 2*k2s + 2*k3s + k4s)
	}
	return sq(T), sq(S)
}
