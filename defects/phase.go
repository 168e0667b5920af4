package defects

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Phaser is the fast-path capability the simulator looks for
// (sim.Phaser): Phase(g) returns a function that gives g·R(p) in cycles
// directly, for one reciprocal vector g (1/nm, image frame). Fields that do
// not offer it are evaluated through R.
type Phaser interface {
	Phase(g r3.Vec) func(p r3.Vec) float64
}

// PhaseOf returns the g·R function of f: its own fast path when f is a
// Phaser, otherwise g·R(p) through R.
func PhaseOf(f Field, g r3.Vec) func(p r3.Vec) float64 {
	if ph, ok := f.(Phaser); ok {
		return ph.Phase(g)
	}
	return func(p r3.Vec) float64 { return r3.Dot(g, f.R(p)) }
}

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
// and one g: x' = ex·(p − at), y' = ey·(p − at), the rotation of g into the
// dislocation frame and the constants folded into k and F. (x', y') are
// rounded as in Dislocation.R, so even on the line itself, where the
// direction is rounding noise, both give the same value.
type lineTable struct {
	at, ex, ey r3.Vec
	k          float64
	n          float64      // intervals per unit of ψ
	last       int          // index of the last interval
	poly       [][4]float64 // F on interval i: c0 + t(c1 + t(c2 + t c3)), t ∈ [0, 1]
}

// phase returns g·R at p.
func (l *lineTable) phase(p r3.Vec) float64 {
	qx, qy, qz := p.X-l.at.X, p.Y-l.at.Y, p.Z-l.at.Z
	x := qx*l.ex.X + qy*l.ex.Y + qz*l.ex.Z
	y := qx*l.ey.X + qy*l.ey.Y + qz*l.ey.Z
	return l.k*lnPos(max(x*x+y*y, coreRadiusNm*coreRadiusNm)) + l.angular(x, y)
}

// angular returns F at the direction of (x, y).
func (l *lineTable) angular(x, y float64) float64 {
	ax, ay := math.Abs(x), math.Abs(y)
	s := ax + ay
	psi := 0.0
	if s > 0 {
		psi = y / s
	}
	if x < 0 {
		if math.Signbit(y) {
			psi = -2 - psi
		} else {
			psi = 2 - psi
		}
	}
	u := (psi + 2) * l.n
	i := int(u)
	if i > l.last {
		i = l.last
	} else if i < 0 {
		i = 0
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
// function of the dislocation-frame coordinates) of the line through at
// with frame ex, ey. It returns nil if no table up to angularMaxNodes
// nodes per quadrant meets angularTol; the caller then evaluates directly.
func newLineTable(gr func(x, y float64) float64, at, ex, ey r3.Vec) *lineTable {
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
		l := &lineTable{at: at, ex: ex, ey: ey, k: k,
			n: float64(n), last: 4*n - 1, poly: make([][4]float64, 4*n)}
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
// quarter points of every interval.
func (l *lineTable) maxError(f func(psi float64) float64) float64 {
	worst := 0.0
	h := 1 / l.n
	for i := range l.poly {
		for _, t := range []float64{0.25, 0.5, 0.75} {
			psi := -2 + (float64(i)+t)*h
			c := &l.poly[i]
			got := c[0] + t*(c[1]+t*(c[2]+t*c[3]))
			worst = math.Max(worst, math.Abs(got-f(psi)))
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

// Phase implements Phaser: a table of g·R built once for g (see
// lineTable), or g·R through R where no table meets the tolerance.
func (d *Dislocation) Phase(g r3.Vec) func(p r3.Vec) float64 {
	if l := d.table(g); l != nil {
		return l.phase
	}
	return func(p r3.Vec) float64 { return r3.Dot(g, d.R(p)) }
}

// table returns the angular table of g·R, or nil.
func (d *Dislocation) table(g r3.Vec) *lineTable {
	gx, gy, gu := r3.Dot(g, d.ex), r3.Dot(g, d.ey), r3.Dot(g, d.u)
	gr := func(x, y float64) float64 {
		l := d.local(x, y)
		return gx*l.X + gy*l.Y + gu*l.Z
	}
	return newLineTable(gr, d.at, d.ex, d.ey)
}

// Phase implements Phaser: the sum of the partials' tables.
func (d *Dissociated) Phase(g r3.Vec) func(p r3.Vec) float64 {
	a, b := d.lead.Phase(g), d.trail.Phase(g)
	return func(p r3.Vec) float64 { return a(p) + b(p) }
}

// Phase implements Phaser: g·R = ε g·r inside, ε r0³ g·r/|r|³ outside.
func (c *Inclusion) Phase(g r3.Vec) func(p r3.Vec) float64 {
	ge := r3.Scale(c.eps, g)
	g0 := r3.Dot(ge, c.at)
	r02 := c.r0 * c.r0
	r03 := r02 * c.r0
	return func(p r3.Vec) float64 {
		x, y, z := p.X-c.at.X, p.Y-c.at.Y, p.Z-c.at.Z
		gr := ge.X*p.X + ge.Y*p.Y + ge.Z*p.Z - g0
		d2 := x*x + y*y + z*z
		if d2 <= r02 {
			return gr
		}
		return gr * r03 / (d2 * math.Sqrt(d2))
	}
}

// Phase implements Phaser: the sum of the members' g·R, each by its own
// fast path where it has one.
func (s Sum) Phase(g r3.Vec) func(p r3.Vec) float64 {
	fs := make([]func(r3.Vec) float64, len(s))
	for i, f := range s {
		fs[i] = PhaseOf(f, g)
	}
	switch len(fs) {
	case 0:
		return func(r3.Vec) float64 { return 0 }
	case 1:
		return fs[0]
	}
	return func(p r3.Vec) float64 {
		v := 0.0
		for _, f := range fs {
			v += f(p)
		}
		return v
	}
}

// logTable holds ln(1 + (i + 1/2)/logCells) and its inverse argument for
// the cells of the mantissa in lnPos.
const logCells = 256

var logTable = func() (t [logCells][2]float64) {
	for i := range t {
		c := 1 + (float64(i)+0.5)/logCells
		t[i] = [2]float64{math.Log(c), 1 / c}
	}
	return t
}()

// lnPos is the natural logarithm of a positive, normal, finite x, to
// within a few units in the last place: x = m·2^e with m ∈ [1, 2) in one
// of logCells cells of centre c, ln x = e ln 2 + ln c + ln(1 + u),
// u = (m − c)/c, |u| ≤ 1/(2·logCells), by its series to u⁵ (the first
// term left out, u⁶/6, is below 1e-17). It replaces math.Log where a
// straight dislocation's table is evaluated.
func lnPos(x float64) float64 {
	bits := math.Float64bits(x)
	e := int(bits>>52) - 1023
	frac := bits & (1<<52 - 1)
	i := frac >> (52 - 8)
	m := math.Float64frombits(frac | 1023<<52)
	t := &logTable[i]
	u := (m - (1 + (float64(i)+0.5)/logCells)) * t[1]
	ln1p := u * (1 - u*(1.0/2-u*(1.0/3-u*(1.0/4-u*(1.0/5)))))
	return float64(e)*math.Ln2 + t[0] + ln1p
}
