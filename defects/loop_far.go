package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// far returns the far field at q (relative to the centre): the multipole
// expansion of the loop to its second area moments (see Loop).
func (l *Loop) far(q r3.Vec) r3.Vec {
	f2 := r3.Norm2(q)
	f := math.Sqrt(f2)
	y := r3.Scale(1/f, q) // ŷ
	eta, beta := r3.Dot(l.n, y), r3.Dot(l.b, y)
	// V̂ = b η̂ + n̂ β̂ − ŷ (b·n̂)
	v := r3.Sub(r3.Add(r3.Scale(eta, l.b), r3.Scale(beta, l.n)), r3.Scale(l.bn, y))
	s, cb, cv, cy, cn := l.farCoefficients(f2, eta, beta)
	u := r3.Add(r3.Add(r3.Scale(cb, l.b), r3.Scale(cv, v)), r3.Add(r3.Scale(cy, y), r3.Scale(cn, l.n)))
	return r3.Scale(s, u)
}

// farCoefficients returns the far field u = s (cb b + cv V̂ + cy ŷ + cn n̂)
// at |q|² = f2 as its coefficients, from η = n̂·ŷ and β = b·ŷ.
func (l *Loop) farCoefficients(f2, eta, beta float64) (s, cb, cv, cy, cn float64) {
	bn := l.bn
	nu2 := l.oneM2nu
	eps := l.radius * l.radius / (8 * f2)
	cb = eps * (nu2*6*eta + 6*eta)
	cv = nu2 * (1 + eps*(3-15*eta*eta))
	cy = 3*beta*eta + eps*3*(5*beta*eta+10*bn*eta*eta-35*beta*eta*eta*eta)
	cn = eps * 3 * (10*beta*eta*eta - 2*eta*bn)
	s = l.kFar * math.Pi * l.radius * l.radius / f2
	return s, cb, cv, cy, cn
}
