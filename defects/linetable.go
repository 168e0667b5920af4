package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Angular table of a straight dislocation.
//
// In the plane perpendicular to its line, every component of a straight
// dislocation's displacement is K ln r + F(θ): the isotropic field of
// Hirth & Lothe (1982, eqs. 3-2, 3-45) has ln r² and functions of θ alone,
// and Stroh's (Hirth & Lothe 1982, eq. 13-87) Im Σ c_α ln(x' + p_α y')
// = Σ (Im c_α ln r + Im c_α ln|cos θ + p_α sin θ| + Re c_α arg(cos θ +
// p_α sin θ)). So is g·R for any g. The table holds F for one g as a
// piecewise cubic in the pseudo-angle
//
//	ψ = y'/(|x'| + |y'|)          for x' ≥ 0,       ψ ∈ [−1, 1]
//	ψ = ±2 − y'/(|x'| + |y'|)     for x' < 0, y' ≷ 0, ψ ∈ [1, 2] or [−2, −1]
//
// which rises monotonically with θ = atan2(y', x') from −2 at θ = −π to 2
// at θ = π (the cut) and needs one division instead of an arctangent. ψ(θ)
// is smooth inside each quadrant, so every cubic is fitted on four nodes of
// its own quadrant (no interval spans a quadrant corner), and the number of
// nodes is doubled until the table agrees with the direct formula to
// angularTol at three points inside every interval.
const (
	// angularTol is the largest accepted error of the table, in cycles.
	angularTol = 2e-9
	// angularMinNodes and angularMaxNodes bound the nodes per quadrant.
	angularMinNodes = 32
	angularMaxNodes = 8192
)

// lineTable evaluates g·R = k·ln r² + F(ψ) for one straight dislocation
// and one g: x' = ex·p − cx, y' = ey·p − cy (Dislocation.frame), the
// rotation of g into the dislocation frame and the constants folded into
// k and F. (x', y') are rounded as in Dislocation.R, so even on the line
// itself, where the direction is rounding noise, both give the same value.
type lineTable struct {
	ex, ey r3.Vec
	cx, cy float64
	// shared: ex and ey are those of the line before it in a phaseSum,
	// so ex·p and ey·p are too.
	shared bool
	k      float64
	n      float64 // intervals per unit of ψ, a power of two
	last   uint    // index of the last entry of poly (4n)
	// poly holds F on interval i as c0 + t(c1 + t(c2 + t c3)),
	// t ∈ [0, 1], and, as entry 4n, F(2) alone (c1 = c2 = c3 = 0) for
	// ψ = 2 exactly.
	poly [][4]float64
}

// coreR2Nm2 is the square of coreRadiusNm, below which r² is held.
const coreR2Nm2 = coreRadiusNm * coreRadiusNm

// angular returns F at pseudo-angle ψ from the table (for building and
// testing it; phaseSum.phase reads the table itself).
func (l *lineTable) angular(psi float64) float64 {
	u := (psi + 2) * l.n
	i := int(u)
	if uint(i) > l.last {
		i = int(l.last)
	}
	t := u - float64(i)
	c := &l.poly[i]
	return c[0] + t*(c[1]+t*(c[2]+t*c[3]))
}

// direction returns the point of the unit diamond |x| + |y| = 1 at
// pseudo-angle ψ ∈ [−2, 2] (the inverse of the map in angular), with
// y = −0 at ψ = −2 so that the direct formula sees θ = −π there.
func direction(psi float64) (x, y float64) {
	switch {
	case psi <= -2:
		return -1, math.Copysign(0, -1)
	case psi < -1:
		a := psi + 2
		return -(1 - a), -a
	case psi <= 1:
		return 1 - math.Abs(psi), psi
	default:
		a := 2 - psi
		return -(1 - a), a
	}
}

// newLineTable tabulates g·R of the field gr(x', y') (cycles, as a
// function of the dislocation-frame coordinates) of the line with frame
// ex, ey, cx, cy (see Dislocation.frame). It returns nil if no table up to angularMaxNodes
// nodes per quadrant meets angularTol; the caller then evaluates directly.
func newLineTable(gr func(x, y float64) float64, ex, ey r3.Vec, cx, cy float64) *lineTable {
	// k: g·R at r² = e and r² = 1 in the same direction differ by k.
	se := math.Sqrt(math.E)
	k := 0.0
	for _, th := range []float64{0.3, 1.9, -2.4} {
		c, s := math.Cos(th), math.Sin(th)
		k += (gr(se*c, se*s) - gr(c, s)) / 3
	}
	f := func(psi float64) float64 {
		x, y := direction(psi)
		r := math.Hypot(x, y)
		return gr(x/r, y/r)
	}
	for n := angularMinNodes; n <= angularMaxNodes; {
		l := &lineTable{ex: ex, ey: ey, cx: cx, cy: cy, k: k,
			n: float64(n), last: uint(4 * n), poly: make([][4]float64, 4*n+1)}
		h := 1 / float64(n)
		val := make([]float64, 4*n+1)
		for i := range val {
			val[i] = f(-2 + float64(i)*h)
		}
		for q := range 4 {
			lo := q * n // first node of the quadrant
			for j := range n {
				// Four nodes inside the quadrant around interval j.
				s := min(max(j-1, 0), n-3)
				var xs, ys [4]float64
				for m := range 4 {
					xs[m] = float64(s + m - j)
					ys[m] = val[lo+s+m]
				}
				l.poly[lo+j] = cubicCoefficients(xs, ys)
			}
		}
		c := l.poly[4*n-1]
		l.poly[4*n] = [4]float64{c[0] + c[1] + c[2] + c[3]}
		err := l.maxError(f)
		if err <= angularTol {
			return l
		}
		// The error of a cubic falls as n⁻⁴: go straight to the n that
		// should meet the tolerance, at least doubling.
		next := 2 * n
		for float64(next) < 1.1*float64(n)*math.Pow(err/angularTol, 0.25) {
			next *= 2
		}
		n = next
	}
	return nil
}

// maxError is the largest difference between the table and f at the
// quarter points of every interval and at ψ = 2, the last entry.
func (l *lineTable) maxError(f func(psi float64) float64) float64 {
	worst := math.Abs(l.angular(2) - f(2))
	h := 1 / l.n
	for i := range int(l.last) {
		for _, t := range []float64{0.25, 0.5, 0.75} {
			psi := -2 + (float64(i)+t)*h
			worst = math.Max(worst, math.Abs(l.angular(psi)-f(psi)))
		}
	}
	return worst
}

// cubicCoefficients returns the power-series coefficients in t of the
// cubic through (xs[m], ys[m]) (Lagrange's interpolating polynomial).
func cubicCoefficients(xs, ys [4]float64) [4]float64 {
	var c [4]float64
	for m := range 4 {
		// Basis polynomial ∏_{j≠m} (t − x_j)/(x_m − x_j), expanded.
		p := [4]float64{1}
		den := 1.0
		deg := 0
		for j := range 4 {
			if j == m {
				continue
			}
			den *= xs[m] - xs[j]
			// p ← p·(t − x_j)
			for d := deg + 1; d > 0; d-- {
				p[d] = p[d-1] - xs[j]*p[d]
			}
			p[0] = -xs[j] * p[0]
			deg++
		}
		for d := range 4 {
			c[d] += ys[m] * p[d] / den
		}
	}
	return c
}
