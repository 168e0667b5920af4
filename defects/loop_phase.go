package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// loopPhase is g·R of a Loop for one g, from the scalars of its closed
// form (loopNear) and of its far field (farCoefficients) with the
// products of g with the loop's fixed vectors taken once: no vector is
// built per point.
type loopPhase struct {
	l                *Loop
	g                r3.Vec
	gb, gn, ga1, ga2 float64 // g·b, g·n̂, g·a1, g·a2
	gba1, gba2       float64 // g·(b × a1), g·(b × a2)
}

// Phase implements Phaser: g·R with R's switch distances (Loop).
func (l *Loop) Phase(g r3.Vec) func(p r3.Vec) float64 {
	lp := &loopPhase{l: l, g: g, gb: r3.Dot(g, l.b), gn: r3.Dot(g, l.n),
		ga1: r3.Dot(g, l.a1), ga2: r3.Dot(g, l.a2),
		gba1: r3.Dot(g, r3.Cross(l.b, l.a1)), gba2: r3.Dot(g, r3.Cross(l.b, l.a2))}
	return lp.phase
}

func (lp *loopPhase) phase(p r3.Vec) float64 {
	l := lp.l
	q := r3.Vec{X: p.X - l.c.X, Y: p.Y - l.c.Y, Z: p.Z - l.c.Z}
	d2 := q.X*q.X + q.Y*q.Y + q.Z*q.Z
	if d2 >= l.farNm*l.farNm {
		return lp.far(q, d2)
	}
	if d2 <= l.nearNm*l.nearNm {
		return lp.near(q)
	}
	w := smoothStep((math.Sqrt(d2) - l.nearNm) / (l.farNm - l.nearNm))
	return (1-w)*lp.near(q) + w*lp.far(q, d2)
}

// near is g·near(q): with ê_ρ = c1 a1 + c2 a2, ê_ψ = c1 a2 − c2 a1,
// g·(b × ê_ψ) = c1 g·(b × a2) − c2 g·(b × a1).
func (lp *loopPhase) near(q r3.Vec) float64 {
	l := lp.l
	t := l.nearTerms(q)
	ger, gep := t.c1*lp.ga1+t.c2*lp.ga2, t.c1*lp.ga2-t.c2*lp.ga1
	gbep := t.c1*lp.gba2 - t.c2*lp.gba1
	return -t.omega*l.k1*lp.gb + (l.k2-l.k1)*t.rI1*gbep + l.k2*(t.gr*ger+t.gp*gep+t.gn*lp.gn)
}

// far is g·far(q), |q|² = f2: g·V̂ = η g·b + β g·n̂ − (b·n̂) g·ŷ.
func (lp *loopPhase) far(q r3.Vec, f2 float64) float64 {
	l, g := lp.l, lp.g
	inv := 1 / math.Sqrt(f2)
	eta := (l.n.X*q.X + l.n.Y*q.Y + l.n.Z*q.Z) * inv
	beta := (l.b.X*q.X + l.b.Y*q.Y + l.b.Z*q.Z) * inv
	gy := (g.X*q.X + g.Y*q.Y + g.Z*q.Z) * inv
	s, cb, cv, cy, cn := l.farCoefficients(f2, eta, beta)
	return s * (cb*lp.gb + cv*(eta*lp.gb+beta*lp.gn-l.bn*gy) + cy*gy + cn*lp.gn)
}
