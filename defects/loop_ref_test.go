package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// polyLoop is the reference for the loop field: Burgers' formula summed
// side by side over a regular polygon of equal area (closed-form straight
// segment integrals, and the solid angle of each fan triangle by Van
// Oosterom & Strackee, IEEE Trans. Biomed. Eng. 30 (1983) 125). It shares
// no code with Loop.
type polyLoop struct {
	c, n, b r3.Vec
	verts   []r3.Vec // relative to the centre, anticlockwise about n
	tang    []r3.Vec
	k1, k2  float64
}

// newPolyLoop builds the equal-area polygon of the given number of sides,
// (N/2) ρ² sin(2π/N) = π r², its first vertex along a1.
func newPolyLoop(c, n, b, a1 r3.Vec, radius, nu float64, sides int) *polyLoop {
	n = r3.Unit(n)
	a2 := r3.Cross(n, a1)
	N := float64(sides)
	rho := radius * math.Sqrt(2*math.Pi/(N*math.Sin(2*math.Pi/N)))
	pl := &polyLoop{c: c, n: n, b: b, k1: 1 / (4 * math.Pi), k2: 1 / (8 * math.Pi * (1 - nu))}
	for k := range sides {
		phi := 2 * math.Pi * float64(k) / N
		pl.verts = append(pl.verts, r3.Add(r3.Scale(rho*math.Cos(phi), a1), r3.Scale(rho*math.Sin(phi), a2)))
	}
	for k := range sides {
		pl.tang = append(pl.tang, r3.Unit(r3.Sub(pl.verts[(k+1)%sides], pl.verts[k])))
	}
	return pl
}

func (pl *polyLoop) R(p r3.Vec) r3.Vec {
	r := r3.Sub(p, pl.c)
	r0 := r3.Scale(-1, r)
	n0 := r3.Norm(r0)
	nv := len(pl.verts)
	var omega float64
	var lineInt, gradInt r3.Vec
	dA := r3.Sub(r, pl.verts[0])
	RA := r3.Norm(dA)
	for k := range nv {
		dB := r3.Sub(r, pl.verts[(k+1)%nv])
		RB := r3.Norm(dB)
		t := pl.tang[k]
		r1, r2 := r3.Scale(-1, dA), r3.Scale(-1, dB)
		num := r3.Dot(r0, r3.Cross(r1, r2))
		den := n0*RA*RB + r3.Dot(r0, r1)*RB + r3.Dot(r0, r2)*RA + r3.Dot(r1, r2)*n0
		omega -= 2 * math.Atan2(num, den)
		eA, eB := r3.Dot(dA, t), r3.Dot(dB, t)
		var iln float64
		if eA > 0 && eB > 0 {
			iln = math.Log((RA + eA) / (RB + eB))
		} else {
			iln = math.Log((RB - eB) / (RA - eA))
		}
		rho := r3.Sub(dA, r3.Scale(eA, t))
		rho2 := r3.Norm2(rho)
		var f float64
		if eA*eB > 0 {
			f = (eA*eA - eB*eB) / ((eA*RB + eB*RA) * RA * RB)
		} else if rho2 > 0 {
			f = (eA/RA - eB/RB) / rho2
		}
		ivec := r3.Add(r3.Scale(1/RB-1/RA, t), r3.Scale(f, rho))
		lineInt = r3.Add(lineInt, r3.Scale(iln, r3.Cross(pl.b, t)))
		ck := -r3.Dot(r3.Cross(pl.b, dA), t)
		gradInt = r3.Sub(gradInt, r3.Scale(ck, ivec))
		dA, RA = dB, RB
	}
	u := r3.Scale(-omega*pl.k1, pl.b)
	u = r3.Add(u, r3.Scale(pl.k2-pl.k1, lineInt))
	return r3.Add(u, r3.Scale(pl.k2, gradInt))
}
