package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// loopSagittaNm is the largest radial departure of a loop's polygon from
// the circle it stands for.
const loopSagittaNm = 0.005

// Loop is a planar circular dislocation loop (prismatic, shear or mixed) in
// an isotropic medium, represented by regular polygons whose area equals
// the circle's. The finest has N = max(24, ⌈π √(r/(3·0.005 nm))⌉) sides
// and departs from the circle by about 0.005 nm; coarser ones halve N
// down to 24. A point at distance d from the circle uses the coarsest
// polygon whose radial departure (sagitta) is at most max(0.005 nm, d/100).
// Moving a line element by δ changes the field at distance d by about
// |b|δ/(2πd), so the polygon error is below ~0.002|b| wherever d ≥ 0.5 nm
// (and the steps where the choice of polygon changes are of that size:
// a phase of at most ~0.01 g·b rad, far below what an image shows).
//
// The line sense runs right-handedly about the normal n̂ (anticlockwise
// seen from the side n̂ points to). With the package's Burgers convention,
// R then jumps across the loop's disc by R(n̂ side) − R(other side) = −b:
// b·n̂ < 0 is an interstitial (extra-plane) loop, b·n̂ > 0 a vacancy loop.
//
// Burgers' formula (Burgers 1939, Proc. Kon. Ned. Akad. Wet. 42, 293 and
// 378; Hirth & Lothe 1982, §4-4): with R = |r − r'|, r' on the loop C taken
// in its line sense, and Ω the solid angle the loop subtends at r (positive
// where the loop is seen running anticlockwise, so Ω jumps by +4π crossing
// the disc along n̂),
//
//	u(r) = −b Ω/4π − (1/4π) ∮_C (b × dl')/R
//	       + 1/(8π(1−ν)) ∇ ∮_C [(b × (r' − r))·dl']/R.
//
// The gradient expands to ∮ (b × dl')/R + ∮ [(b × (r' − r))·dl'] (r' − r)/R³.
// Along a straight side from A to B (unit t, r' = A + s t), (b × (r' − r))·t
// is the constant (b × (A − r))·t and the side integrals are closed forms:
//
//	∫ ds/R = ln((R_B − e_B)/(R_A − e_A)),
//	∫ (r − r')/R³ ds = t (1/R_B − 1/R_A) + ρ (e_A/R_A − e_B/R_B)/ρ²,
//
// e = t·(r − vertex), ρ the part of r − A perpendicular to t; both are
// evaluated in forms free of cancellation off the side's own span. Ω is
// summed over the fan of triangles (centre, V_k, V_k+1) by Van Oosterom &
// Strackee's formula (IEEE Trans. Biomed. Eng. 30 (1983) 125),
// tan(Ω/2) = r₀·(r₁×r₂) / (r₀r₁r₂ + (r₀·r₁)r₂ + (r₀·r₂)r₁ + (r₁·r₂)r₀)
// with the sign turned to the convention above. The sign of every term is
// tested: the Burgers circuit, the jump across the disc, equilibrium, and
// the match to a straight dislocation near the line of a large loop.
type Loop struct {
	c, n, b r3.Vec
	a1, a2  r3.Vec // in-plane axes, a1 × a2 = n
	radius  float64
	levels  []loopPolygon // finest first
	k1, k2  float64       // 1/4π, 1/(8π(1−ν))
}

// loopPolygon is one equal-area polygon standing for the circle.
type loopPolygon struct {
	verts   []r3.Vec // relative to the centre, anticlockwise about n
	tang    []r3.Vec // unit side directions
	bxt     []r3.Vec // b × t per side
	apothem float64
	sagitta float64 // largest radial departure from the circle, nm
}

// NewLoop returns the circular loop of radius radiusNm centred on at (nm)
// in the plane with the given normal, Burgers vector b (nm), in the
// isotropic medium m (only m.Poisson enters).
func NewLoop(at, normal, b r3.Vec, radiusNm float64, m Medium) (*Loop, error) {
	if err := checkVec("at_nm", "centre", at, false); err != nil {
		return nil, err
	}
	if err := checkVec("normal", "loop plane normal", normal, true); err != nil {
		return nil, err
	}
	if err := checkVec("b", "Burgers vector", b, true); err != nil {
		return nil, err
	}
	if err := checkPositive("radius_nm", "loop radius", radiusNm); err != nil {
		return nil, err
	}
	if err := m.checkIsotropic(); err != nil {
		return nil, err
	}
	n := r3.Unit(normal)
	a1 := perpendicularUnit(n, r3.Vec{X: 1}, r3.Vec{Y: 1})
	l := &Loop{c: at, n: n, b: b, a1: a1, a2: r3.Cross(n, a1), radius: radiusNm,
		k1: 1 / (4 * math.Pi), k2: 1 / (8 * math.Pi * (1 - m.Poisson))}
	sides := int(math.Ceil(math.Pi * math.Sqrt(radiusNm/(3*loopSagittaNm))))
	if sides > 1<<16 {
		return nil, inputErr("radius_nm", fmt.Sprintf("loop radius %g nm is too large (more than 65536 polygon sides)", radiusNm))
	}
	for {
		sides = max(sides, loopMinSides)
		l.levels = append(l.levels, l.polygon(sides))
		if sides == loopMinSides {
			break
		}
		sides = (sides + 1) / 2
	}
	return l, nil
}

// loopMinSides is the fewest sides a loop's polygon has.
const loopMinSides = 24

// polygon builds the equal-area regular polygon of the given number of
// sides: (N/2) ρ² sin(2π/N) = π r².
func (l *Loop) polygon(sides int) loopPolygon {
	N := float64(sides)
	rho := l.radius * math.Sqrt(2*math.Pi/(N*math.Sin(2*math.Pi/N)))
	pg := loopPolygon{apothem: rho * math.Cos(math.Pi/N)}
	pg.sagitta = math.Max(rho-l.radius, l.radius-pg.apothem)
	for k := range sides {
		phi := 2 * math.Pi * float64(k) / N
		pg.verts = append(pg.verts, r3.Add(r3.Scale(rho*math.Cos(phi), l.a1), r3.Scale(rho*math.Sin(phi), l.a2)))
	}
	for k := range sides {
		t := r3.Unit(r3.Sub(pg.verts[(k+1)%sides], pg.verts[k]))
		pg.tang = append(pg.tang, t)
		pg.bxt = append(pg.bxt, r3.Cross(l.b, t))
	}
	return pg
}

// Sides returns the number of sides of the loop's finest polygon.
func (l *Loop) Sides() int { return len(l.levels[0].verts) }

// R returns Burgers' displacement at p (nm).
func (l *Loop) R(p r3.Vec) r3.Vec {
	omega, lineInt, gradInt := l.parts(p)
	u := r3.Scale(-omega*l.k1, l.b)
	u = r3.Add(u, r3.Scale(l.k2-l.k1, lineInt))
	return r3.Add(u, r3.Scale(l.k2, gradInt))
}

// level picks the coarsest polygon whose sagitta is at most
// max(0.005 nm, d/100), d the distance of r (relative to the centre) from
// the circle.
func (l *Loop) level(r r3.Vec) *loopPolygon {
	h := r3.Dot(r, l.n)
	rho := math.Sqrt(math.Max(r3.Norm2(r)-h*h, 0))
	d := math.Hypot(rho-l.radius, h)
	allowed := math.Max(loopSagittaNm, d/100)
	for k := len(l.levels) - 1; k > 0; k-- {
		if l.levels[k].sagitta <= allowed {
			return &l.levels[k]
		}
	}
	return &l.levels[0]
}

// parts returns Ω, Σ_k (b×t_k) ∫ds/R and Σ_k c_k ∫(r' − r)/R³ ds with
// c_k = (b × (A_k − r))·t_k.
func (l *Loop) parts(p r3.Vec) (omega float64, lineInt, gradInt r3.Vec) {
	r := r3.Sub(p, l.c)
	pg := l.level(r)
	r0 := r3.Scale(-1, r)
	n0 := math.Sqrt(r3.Norm2(r0))
	nv := len(pg.verts)
	dA := r3.Sub(r, pg.verts[0])
	RA := math.Sqrt(r3.Norm2(dA))
	for k := range nv {
		dB := r3.Sub(r, pg.verts[(k+1)%nv])
		RB := math.Sqrt(r3.Norm2(dB))
		t := pg.tang[k]
		// Solid angle of triangle (centre, V_k, V_k+1) seen from p.
		r1, r2 := r3.Scale(-1, dA), r3.Scale(-1, dB)
		num := r3.Dot(r0, r3.Cross(r1, r2))
		den := n0*RA*RB + r3.Dot(r0, r1)*RB + r3.Dot(r0, r2)*RA + r3.Dot(r1, r2)*n0
		omega -= 2 * math.Atan2(num, den)
		// Side integrals.
		eA, eB := r3.Dot(dA, t), r3.Dot(dB, t) // eA − eB = side length
		var iln float64
		if eA > 0 && eB > 0 {
			iln = math.Log((RA + eA) / (RB + eB))
		} else {
			iln = math.Log((RB - eB) / (RA - eA))
		}
		rho := r3.Sub(dA, r3.Scale(eA, t))
		rho2 := r3.Norm2(rho)
		var f float64 // (eA/RA − eB/RB)/ρ²
		if eA*eB > 0 {
			f = (eA*eA - eB*eB) / ((eA*RB + eB*RA) * RA * RB)
		} else if rho2 > 0 {
			f = (eA/RA - eB/RB) / rho2
		}
		ivec := r3.Add(r3.Scale(1/RB-1/RA, t), r3.Scale(f, rho))
		lineInt = r3.Add(lineInt, r3.Scale(iln, pg.bxt[k]))
		// (b × (r' − r))·t = −(b × dA)·t is constant along the side.
		ck := -r3.Dot(r3.Cross(l.b, dA), t)
		gradInt = r3.Sub(gradInt, r3.Scale(ck, ivec))
		dA, RA = dB, RB
	}
	return omega, lineInt, gradInt
}

// Jumps appends the depth at which the column crosses the loop's disc (the
// polygon), where R jumps by −b going along n̂.
func (l *Loop) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	z, ok := planeCrossing(l.c, l.n, x, y)
	if !ok || !(z > z0 && z < z1) {
		return dst
	}
	q := r3.Sub(r3.Vec{X: x, Y: y, Z: z}, l.c)
	u, v := r3.Dot(q, l.a1), r3.Dot(q, l.a2)
	pg := &l.levels[0]
	nv := len(pg.verts)
	phi := math.Atan2(v, u)
	if phi < 0 {
		phi += 2 * math.Pi
	}
	k := int(phi / (2 * math.Pi / float64(nv)))
	k = min(max(k, 0), nv-1)
	// Inside the sector's side: distance to the side's line below the apothem.
	mid := r3.Unit(r3.Add(pg.verts[k], pg.verts[(k+1)%nv]))
	if r3.Dot(q, mid) < pg.apothem {
		dst = append(dst, z)
	}
	return dst
}
