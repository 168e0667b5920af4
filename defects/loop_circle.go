package defects

import (
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/spatial/r3"
)

// loopMinDistNm is the smallest distance from the loop line at which the
// field is evaluated: closer points are moved out to it along the
// meridian (so R stays finite on the line itself).
const loopMinDistNm = 1e-3

// near returns Burgers' displacement of the circle in closed form (see
// Loop), at q relative to the centre.
func (l *Loop) near(q r3.Vec) r3.Vec {
	t := l.nearTerms(q)
	er := r3.Add(r3.Scale(t.c1, l.a1), r3.Scale(t.c2, l.a2))
	ep := r3.Sub(r3.Scale(t.c1, l.a2), r3.Scale(t.c2, l.a1)) // n̂ × ê_ρ
	u := r3.Scale(-t.omega*l.k1, l.b)
	u = r3.Add(u, r3.Scale((l.k2-l.k1)*t.rI1, r3.Cross(l.b, ep)))
	g := r3.Add(r3.Add(r3.Scale(t.gr, er), r3.Scale(t.gp, ep)), r3.Scale(t.gn, l.n))
	return r3.Add(u, r3.Scale(l.k2, g))
}

// loopNear holds the closed form at a point as scalars:
//
//	u = −Ω k₁ b + (k₂ − k₁) r I₁ (b × ê_ψ) + k₂ (G_ρ ê_ρ + G_ψ ê_ψ + G_n n̂),
//
// ê_ρ = c1 a1 + c2 a2 and ê_ψ = n̂ × ê_ρ = c1 a2 − c2 a1 (a1, a2 the
// loop's in-plane axes), so that R (near) and g·R (Loop.Phase) both follow
// from them.
type loopNear struct {
	omega, rI1, gr, gp, gn, c1, c2 float64
}

// nearTerms returns the closed form's scalars at q (see Loop and
// loopNear).
func (l *Loop) nearTerms(q r3.Vec) loopNear {
	r := l.radius
	// In-plane coordinates from the in-plane axes, so that ê_ρ lies in
	// the plane however close p is to the axis.
	h, x1, x2 := r3.Dot(q, l.n), r3.Dot(q, l.a1), r3.Dot(q, l.a2)
	rho := math.Sqrt(x1*x1 + x2*x2)
	c1, c2 := 1.0, 0.0
	if rho > 0 {
		c1, c2 = x1/rho, x2/rho
	}
	// Hold the point at least loopMinDistNm (and a relative 1e-6) from the
	// line, keeping its direction about the line.
	if dr, dmin := rho-r, max(loopMinDistNm, 1e-6*r); dr*dr+h*h < dmin*dmin {
		f := math.Hypot(dr, h)
		if f == 0 {
			dr, h = dmin, 0
		} else {
			dr, h = dr*dmin/f, h*dmin/f
		}
		rho = r + dr
	}

	S := (r+rho)*(r+rho) + h*h   // largest distance², to the far side
	R12 := (r-rho)*(r-rho) + h*h // smallest distance², to the near side
	m := 4 * r * rho / S
	mc := R12 / S
	sq := math.Sqrt(S)

	B, D := mathext.CompleteB(m), mathext.CompleteD(m)
	K, E := B+D, B+mc*D
	Q := loopQ(m, B, D)

	I1 := 4 * m * Q / sq       // ∫ cosθ/R dθ
	L := 16 * r * Q / (S * sq) // I1/ρ = ∫ sin²θ/R³ dθ · r
	J0 := 4 * E / (R12 * sq)   // ∫ dθ/R³
	D01 := 8 * D / (S * sq)    // ∫ (1 − cosθ)/R³ dθ

	// Solid angle of the disc, positive on the n̂ side.
	sigma := (r - rho) / (r + rho)
	var T, step float64
	if sigma == 0 {
		T, step = math.Pi/(2*math.Sqrt(mc)), 2*math.Pi
	} else {
		T = bulirschCel(math.Sqrt(mc), sigma*sigma, sigma, sigma)
		if sigma > 0 {
			step = 2 * math.Pi
		}
	}
	omega := step - 2*math.Abs(h)/sq*(K+T)
	if h < 0 {
		omega = -omega
	}

	bn := l.bn
	br, bp := c1*l.ba1+c2*l.ba2, c1*l.ba2-c2*l.ba1 // b·ê_ρ, b·ê_ψ
	return loopNear{
		omega: omega,
		rI1:   r * I1,
		gr:    r * (bn*((r-rho)*(r-rho)*J0-(r*r+rho*rho)*D01+I1) + br*h*((r-rho)*J0+rho*D01-L)),
		gp:    r * h * bp * L,
		gn:    -h * r * (bn*((r-rho)*J0+rho*D01) + br*h*(J0-D01)),
		c1:    c1, c2: c2,
	}
}

// loopQSeriesM is the parameter below which loopQ sums its series.
const loopQSeriesM = 0.05

// loopQCoef holds c_j = (π/2) [(2j−1)!!/(2j)!!]² j/(j+1), j = 1, 2, ….
var loopQCoef = func() []float64 {
	var c []float64
	f := 1.0 // (2j−1)!!/(2j)!!
	for j := 1; j <= 14; j++ {
		f *= float64(2*j-1) / float64(2*j)
		c = append(c, math.Pi/2*f*f*float64(j)/float64(j+1))
	}
	return c
}()

// loopQ returns (D(m) − B(m))/m = ∫₀^{π/2} (2sin²φ − 1)/(m√(1 − m sin²φ)) dφ,
// from B and D where that loses no precision and from its power series
// Σ_{j≥1} c_j m^{j−1} (term by term from the binomial series of the
// integrand and Wallis' integrals) for small m.
func loopQ(m, B, D float64) float64 {
	if m >= loopQSeriesM {
		return (D - B) / m
	}
	var s float64
	for j := len(loopQCoef) - 1; j >= 0; j-- {
		s = s*m + loopQCoef[j]
	}
	return s
}

// bulirschCel is Bulirsch's general complete elliptic integral for p > 0,
//
//	cel(kc, p, a, b) = ∫₀^{π/2} (a cos²φ + b sin²φ) dφ / ((cos²φ + p sin²φ) √(cos²φ + kc² sin²φ)),
//
// by Bulirsch's algorithm (R. Bulirsch, Numer. Math. 13 (1969) 305), which
// converges quadratically; the complete integral of the third kind is
// Π(n, m) = cel(√(1−m), 1−n, 1, 1). gonum's mathext has the first and
// second kinds only.
func bulirschCel(kc, p, a, b float64) float64 {
	const ca = 1e-8 // the relative error is about ca²
	qc := math.Abs(kc)
	e, em := qc, 1.0
	p = math.Sqrt(p)
	b /= p
	for {
		f, ip := a, 1/p
		a += b * ip
		g := e * ip
		b += f * g
		b += b
		p += g
		g = em
		em += qc
		if math.Abs(g-qc) <= g*ca {
			break
		}
		qc = 2 * math.Sqrt(e)
		e = qc * em
	}
	return math.Pi / 2 * (b + a*em) / (em * (em + p))
}
