package sim

import (
	"fmt"
	"math"
	"strings"
	"sync"
)

// The Bloch-wave slab of the systematic row.
//
// In a slab whose g·R departs from its chord by δ(z) (δ = 0 at both
// ends), the gauge y = E⁻¹χ, E = diag(e^{−2πi n δ(z)}), takes the departure
// out of the couplings: y' = (A(β) + 2πi δ'(z) N) y, where A(β) is the
// perfect-crystal matrix at the chord slope β (SystematicRow's equations
// with s_n → s_n + nβ) and N = diag(n); E = I at the slab's ends, so y = χ
// there. The slab is thus a perfect crystal whose local slope β + δ'(z)
// wanders about the chord. A(β) depends on s and β through
// σ = s_1 + β alone (rowShape), which is rounded to a grid,
// σ = σ_q + r with |r| ≤ blochSlopeStep/2, and the perfect-crystal matrix
// there, A = V Λ V⁻¹ (its Bloch waves; Hirsch et al. 1965, ch. 12), is kept
// for each grid point met, for every s of the row. In the Bloch basis
// u = V⁻¹y,
//
//	u' = (Λ + 2πi f(z) P) u,   P = V⁻¹ N V,   f(z) = r + δ'(z),
//
// The diagonal of P, constant in the slab, is taken exactly with Λ at
// first order in r: λ'_j = λ_j + 2πi r P_jj. In the interaction picture
// v = e^{−Λ'z} u the Magnus expansion (Magnus 1954, Commun. Pure Appl.
// Math. 7, 649; Blanes, Casas, Oteo & Ros 2009, Phys. Rep. 470, 151) then
// gives
//
//	u(h) = e^{Λ'h} exp(Ω) u(0),
//	Ω_jk = 2πi P_jk ∫₀^h f(z) e^{(λ'_k − λ'_j) z} dz   (j ≠ k),
//
// its first term, with the integrals in closed form for the cubic δ
// through δ(0) = δ(h) = 0 and the two Gauss-node departures d1, d2 (the
// information the Stepper receives); on the diagonal, ∫δ' = 0 and the
// second term's part from the constant r, (2πi r h)² Σ_k P_jk P_kj
// (sinh x_jk / x_jk² − 1/x_jk), x_jk = (λ'_k − λ'_j)h, the secular
// second-order shift of the wave numbers. The fast phases of the weakly
// excited outer beams enter only through e^{Λ'h} and these integrals, both
// exact; what is left out is the rest of the second Magnus term, of second
// order in the departure. TestRowBlochSlab measures the step's order
// (local error about h⁴ for a smooth g·R) and that it is 18–80 times more
// accurate than the fourth-order Magnus–Taylor step at the same slab.
// Without absorption Λ is imaginary, V unitary and Ω anti-Hermitian, so the
// slab conserves Σ|φ_n|². exp(Ω) is applied by its Taylor series, Ω being
// small (‖Ω‖_F ≤ blochMaxOmega; a slab beyond it is halved, and one still
// beyond it after three halvings takes the Magnus–Taylor step instead, in
// pieces short against the beat: rowStepper.magnusPieces).
//
// The step control (column.go) relies on this step's error being of
// second order in the departure: TestRowSlabErrorModel measures it.

const (
	// blochSlopeStep is the grid of σ = s_1 + β (cycles per nm) at which
	// Bloch waves are kept. The remainder r is taken to first order (and
	// the secular part of the second); what is left grows as the step
	// squared: measured on the scene of BenchmarkRowRender (16² columns,
	// at the Bragg position) at the default tolerance, 2.2e-7 of the
	// incident intensity at 1e-4 (1.5e-5 at 1e-3), well below what the
	// step control leaves; per slab at most 1.5e-6 whatever its length
	// and departure (TestRowSlabErrorModel).
	blochSlopeStep = 1e-4
	// blochAnchorEvery is the spacing, in grid slopes, of the anchors
	// decomposed from scratch (see bloch): 256 steps, 0.0256 cycles/nm.
	// Continuing across it takes a few Newton iterations and costs about a
	// third of a decomposition by gonum.
	blochAnchorEvery = 256
	// blochRelayEvery is the spacing of the relay slopes, continued from
	// the anchors; the other grid slopes are continued from the nearest
	// relay, a short step that takes two or three Newton iterations.
	blochRelayEvery = 16
	// blochMaxOmega bounds ‖Ω‖_F for the Bloch-wave slab: the left-out
	// second Magnus term is of order ‖Ω‖² times the beat phase of the slab.
	// A slab beyond it is halved, at most blochMaxHalvings times.
	blochMaxOmega    = 0.02
	blochMaxHalvings = 3
	// blochSeriesX is the |x| = |λ_k − λ_j|·h below which the integrals are
	// summed as series rather than in closed form (whose terms cancel as
	// 1/x³ for small x).
	blochSeriesX = 0.15
	// blochSeriesTerms is the number of terms of those series: the first
	// omitted one is below 0.15⁹/9! < 1e-13 of the sum's scale.
	blochSeriesTerms = 9
	// blochExpTol bounds the first omitted term of the Taylor series of
	// exp(Ω) relative to the vector (2-norms): 1e-11, so that a slab conserves
	// Σ|φ_n|² to about 1e-11 without absorption (a column of a few dozen
	// slabs well within TestRowConservationWithoutAbsorption's 1e-9).
	blochExpTol = 1e-11
)

// rowBloch is the Bloch-wave decomposition of the row's perfect-crystal
// matrix at one grid slope, with p = 2πi P = 2πi V⁻¹NV.
type rowBloch struct {
	lam        []complex128
	v, vinv, p []complex128 // row-major nb×nb
	// pp[j·nb+k] = p_jk p_kj for j < k.
	pp []complex128
}

// setPP fills b.pp from b.p.
func (b *rowBloch) setPP(nb int) *rowBloch {
	b.pp = make([]complex128, nb*nb)
	for j := 0; j < nb; j++ {
		for k := j + 1; k < nb; k++ {
			b.pp[j*nb+k] = b.p[j*nb+k] * b.p[k*nb+j]
		}
	}
	return b
}

// seriesInv[m] = 1/m and seriesInvFact[m] = 1/m! for the series of the
// slab integrals.
var seriesInv, seriesInvFact [blochSeriesTerms + 3]float64

func init() {
	f := 1.0
	for m := range seriesInv {
		if m > 0 {
			seriesInv[m] = 1 / float64(m)
			f *= float64(m)
		}
		seriesInvFact[m] = 1 / f
	}
}

// bloch returns the kept decomposition for grid slope index k, computing it
// if needed; nil if the matrix is too close to defective (then the caller
// uses the Magnus–Taylor step). Every blochAnchorEvery-th grid slope is an
// anchor, decomposed by gonum's eigensolver; every blochRelayEvery-th is a
// relay, continued from its anchor by Newton's method (continueBloch), and
// the others are continued from their relay; a slope whose continuation
// fails is decomposed like an anchor. So the result depends on k alone, and the render
// is the same whatever the order in which columns are done.
func (st *rowStepper) bloch(k int64) *rowBloch {
	if b, ok := st.kept[k]; ok {
		return b
	}
	if st.kept == nil || len(st.kept) >= st.store.limit {
		st.kept = make(map[int64]*rowBloch)
	}
	b, ok := st.store.get(k)
	if !ok {
		// The slope to continue from: the nearest relay slope, or for a
		// relay the nearest anchor.
		a := blochRelayEvery * int64(math.Round(float64(k)/blochRelayEvery))
		if a == k {
			a = blochAnchorEvery * int64(math.Round(float64(k)/blochAnchorEvery))
		}
		if a != k {
			if ba := st.bloch(a); ba != nil {
				b = st.continueBloch(ba, float64(k-a)*blochSlopeStep)
			}
		}
		if b == nil {
			b = st.eigenBloch(float64(k) * blochSlopeStep)
		}
		if b != nil {
			b.setPP(st.nb)
		}
		st.store.put(k, b)
	}
	st.kept[k] = b
	return b
}

// rowStore keeps the Bloch waves of one systematic row by grid point of
// σ = s_1 + β, shared by the steppers of all workers and by later renders
// of the same row at any s (a decomposition depends on the row's shape,
// couplings and absorption and on σ alone; rowShape). Each stepper also
// keeps the ones it has used, without the lock.
type rowStore struct {
	mu    sync.Mutex
	m     map[int64]*rowBloch
	limit int // entries kept, about blochKeptBytes
}

// blochKeptBytes bounds the memory of one store; blochStores stores are
// kept, the least recently made one dropped first.
const (
	blochKeptBytes = 24 << 20
	blochStores    = 2
)

var rowStores struct {
	mu    sync.Mutex
	keys  []string
	store []*rowStore
}

// rowShape splits the excitation errors s_n of a row of 2n+1 beams into
// s_1 and the shape c_n = s_n − n s_1, rounded to 2⁻⁴⁰ /nm. The
// perfect-crystal matrix at chord slope β has s_n + nβ = c_n + n(s_1 + β)
// on its diagonal, so its Bloch waves depend on c and on σ = s_1 + β
// alone: rows that differ only in s (their c_n = n(1−n)λg²/2 the same)
// share them, and blochSlab keeps them on a grid of σ. The rounding, at
// most 5e-13 /nm, makes the decompositions a function of the store's key
// alone, whichever model made the store; it is left out of the step (a
// phase below 1e-9 over a micrometre).
func rowShape(s []float64, n int) (s1 float64, c []float64) {
	s1 = s[n+1]
	c = make([]float64, len(s))
	for k, v := range s {
		c[k] = math.Round((v-float64(k-n)*s1)*(1<<40)) / (1 << 40)
	}
	return s1, c
}

// storeFor returns the store of the row m with shape c (rowShape),
// making it if needed.
func storeFor(m SystematicRow, c []float64) *rowStore {
	var key strings.Builder
	for _, v := range c {
		fmt.Fprintf(&key, "%x,", math.Float64bits(v))
	}
	for _, v := range m.LambdaU {
		fmt.Fprintf(&key, "%x,%x,", math.Float64bits(real(v)), math.Float64bits(imag(v)))
	}
	key.WriteString("|")
	for _, v := range m.LambdaUAbs {
		fmt.Fprintf(&key, "%x,%x,", math.Float64bits(real(v)), math.Float64bits(imag(v)))
	}
	fmt.Fprintf(&key, "|%x", math.Float64bits(m.Xi0AbsNm))
	k := key.String()
	rowStores.mu.Lock()
	defer rowStores.mu.Unlock()
	for i, kk := range rowStores.keys {
		if kk == k {
			return rowStores.store[i]
		}
	}
	nb := max(1, len(m.SPerNm))
	st := &rowStore{m: make(map[int64]*rowBloch), limit: max(256, blochKeptBytes/(64*nb*nb))}
	if len(rowStores.keys) >= blochStores {
		rowStores.keys = rowStores.keys[1:]
		rowStores.store = rowStores.store[1:]
	}
	rowStores.keys = append(rowStores.keys, k)
	rowStores.store = append(rowStores.store, st)
	return st
}

func (s *rowStore) get(k int64) (*rowBloch, bool) {
	s.mu.Lock()
	b, ok := s.m[k]
	s.mu.Unlock()
	return b, ok
}

// put keeps b for k (two workers may both compute it; the results are the
// same).
func (s *rowStore) put(k int64, b *rowBloch) {
	s.mu.Lock()
	if len(s.m) >= s.limit {
		s.m = make(map[int64]*rowBloch)
	}
	s.m[k] = b
	s.mu.Unlock()
}

// eigenBloch decomposes the perfect-crystal matrix at σ = s_1 + β = sigma
// (the diagonal c_n + nσ, rowShape) with gonum's eigensolver
// (newRowEigen); nil if it cannot be trusted.
func (st *rowStepper) eigenBloch(sigma float64) *rowBloch {
	nb := st.nb
	st.fillFrom(st.c, 1, sigma, nil)
	e := newRowEigen(st.f, nb, 0)
	if e == nil {
		return nil
	}
	b := &rowBloch{lam: e.lam, v: e.v, vinv: e.vinv, p: make([]complex128, nb*nb)}
	// 2πi P = 2πi V⁻¹ N V: (V⁻¹)_jm n_m V_mk.
	for j := 0; j < nb; j++ {
		for kk := 0; kk < nb; kk++ {
			var acc complex128
			for m := 0; m < nb; m++ {
				acc += b.vinv[j*nb+m] * complex(float64(m-st.half), 0) * b.v[m*nb+kk]
			}
			b.p[j*nb+kk] = complex(0, 2*math.Pi) * acc
		}
	}
	return b
}

// crystalBloch advances psi through the slab by the Bloch-wave step
// described above and reports true, or reports false (psi untouched) if
// the slab is outside its reach even when halved blochMaxHalvings times.
func (st *rowStepper) crystalBloch(psi []complex128, h, slope, d1, d2 float64) bool {
	return st.blochSlab(psi, h, slope, d1, d2, blochMaxHalvings)
}

// blochSlab is crystalBloch with at most halvings halvings left. A slab
// whose Ω is too large (a long slab, whose r h is large) is taken as its
// two halves, each with the chord and the Gauss-node departures of the
// same cubic δ: the halves see exactly the g·R the whole slab models.
func (st *rowStepper) blochSlab(psi []complex128, h, slope, d1, d2 float64, halvings int) bool {
	// The grid is over σ = s_1 + slope (rowShape).
	sigma := st.s1 + slope
	kq := math.Round(sigma / blochSlopeStep)
	if math.Abs(kq) > 1<<40 || h <= 0 {
		return false
	}
	// The last grid slope's Bloch waves are kept at hand: consecutive
	// slabs often share it.
	b := st.lastB
	if k := int64(kq); k != st.lastK || b == nil {
		b = st.bloch(k)
		st.lastK, st.lastB = k, b
	}
	if b == nil {
		return false
	}
	r := sigma - kq*blochSlopeStep
	nb := st.nb
	// δ(t) = t(1−t)(a + b t), t = z/h, through the Gauss-node departures
	// (t(1−t) = 1/6 at both nodes); F(t) = h f = r h + dδ/dt is quadratic:
	// F(t) = F0 + F1 t + F2 t²/2.
	aa, bb := cubic(d1, d2)
	rh := r * h
	f0 := rh + aa        // F(0)
	f1 := 2 * (bb - aa)  // F'(0)
	f2 := -6 * bb        // F''
	fe := f0 + f1 + f2/2 // F(1)
	fe1 := f1 + f2       // F'(1)
	mom := st.mom[:blochSeriesTerms]
	haveMom := false
	// λ' = λ + 2πi r P_jj, the Bloch waves' wave numbers to first order in
	// r (the perturbation's diagonal, constant in the slab, taken exactly),
	// and λ'h, e^{λ'h}, e^{−λ'h}.
	//
	// The mean absorption μ, common to every wave, is left out of
	// e^{±λ'h} (the integrals need only their ratios) and applied once at
	// the end: what is left of the real parts is the anomalous absorption,
	// small enough for expNear0's polynomial.
	mh := st.mu * h
	lh, eps, inv := st.lam[:nb], st.eps[:nb], st.einv[:nb]
	for j, l := range b.lam {
		l = (l + b.p[j*nb+j]*complex(r, 0)) * complex(h, 0)
		lh[j] = l
		ex := expNear0(real(l) + mh)
		s, c := math.Sincos(imag(l))
		eps[j] = complex(ex*c, ex*s)
		ie := 1 / ex
		inv[j] = complex(c*ie, -s*ie)
	}
	// Ω (the factor 2πi is in b.p) and its Frobenius norm. Its diagonal,
	// 2πi P_jj ∫δ', is zero. The pairs (j, k)
	// and (k, j) share x up to its sign.
	om := st.om[:nb*nb]
	// The diagonal's secular terms, gathered apart.
	var dgs [2*MaxRowOrder + 1]complex128
	dg := dgs[:len(lh)]
	r2h2 := rh * rh
	hs := r2h2 / 2
	fro := 0.0 // ‖Ω‖²_F
	p, pp := b.p[:nb*nb], b.pp[:nb*nb]
	eps, inv = eps[:len(lh)], inv[:len(lh)]
	for j := range lh {
		lj, ej, ij := lh[j], eps[j], inv[j]
		pj, ppj, oj := p[j*nb:j*nb+nb], pp[j*nb:j*nb+nb], om[j*nb:j*nb+nb]
		pj, ppj, oj = pj[:len(lh)], ppj[:len(lh)], oj[:len(lh)]
		for k := j + 1; k < len(lh); k++ {
			x := lh[k] - lj
			xr, xi := real(x), imag(x)
			var ijk, ikj, sec complex128
			if abs1(xr, xi) < blochSeriesX {
				if !haveMom {
					// ∫₀¹ F(t) e^{xt} dt = Σ_m x^m/m! ∫₀¹ F t^m dt.
					for m := range mom {
						mom[m] = (f0*seriesInv[m+1] + f1*seriesInv[m+2] + f2*seriesInv[m+3]/2) * seriesInvFact[m]
					}
					haveMom = true
				}
				ijk, ikj, sec = seriesPair(x, mom)
				sec *= complex(r2h2, 0)
			} else {
				// ∫₀¹ F e^{xt} dt = (F(1)eˣ − F(0))/x − (F'(1)eˣ − F'(0))/x²
				//                  + F''(eˣ − 1)/x³, and the same at −x: the
				// odd powers of u = 1/x change sign.
				d := 1 / (xr*xr + xi*xi)
				ur, ui := xr*d, -xi*d
				u2r, u2i := ur*ur-ui*ui, 2*ur*ui
				u3r, u3i := f2*(u2r*ur-u2i*ui), f2*(u2r*ui+u2i*ur)
				// Odd and even parts at t = 1 and t = 0.
				o1r, o1i := fe*ur+u3r, fe*ui+u3i
				e1r, e1i := -fe1*u2r, -fe1*u2i
				o0r, o0i := f0*ur+u3r, f0*ui+u3i
				e0r, e0i := -f1*u2r, -f1*u2i
				ex := eps[k] * ij // e^{x}
				emx := ej * inv[k]
				ijk = ex*complex(e1r+o1r, e1i+o1i) - complex(e0r+o0r, e0i+o0i)
				ikj = emx*complex(e1r-o1r, e1i-o1i) - complex(e0r-o0r, e0i-o0i)
				// (r h)² times the secular integral.
				sec = (ex-emx)*complex(u2r*hs, u2i*hs) - complex(ur*r2h2, ui*r2h2)
			}
			ojk, okj := pj[k]*ijk, p[k*nb+j]*ikj
			oj[k] = ojk
			om[k*nb+j] = okj
			fro += sq(ojk) + sq(okj)
			// The second Magnus term of the constant r, on the diagonal.
			d2 := ppj[k] * sec
			dg[j] += d2
			dg[k] -= d2
		}
	}
	// ‖Ω‖_F, a bound on its 2-norm.
	for j := range lh {
		om[j*nb+j] = dg[j]
		fro += sq(dg[j])
	}
	if fro > blochMaxOmega*blochMaxOmega {
		if halvings == 0 {
			return false
		}
		// Each half with its own chord and departures, from the cubic.
		sa, a1, a2 := cubicPart(h, slope, d1, d2, 0, 0.5)
		sb, b1, b2 := cubicPart(h, slope, d1, d2, 0.5, 1)
		hh := h / 2
		if !st.blochSlab(psi, hh, sa, a1, a2, halvings-1) {
			return false
		}
		if !st.blochSlab(psi, hh, sb, b1, b2, halvings-1) {
			// psi has taken the first half: finish by the Magnus–Taylor
			// step.
			st.magnusPieces(psi, hh, sb, b1, b2)
		}
		return true
	}
	// u = V⁻¹ psi, or psi itself when it is already in this basis.
	u, t, w := st.w[:nb], st.w[nb:2*nb], st.w[2*nb:3*nb]
	if st.basis == b {
		for j := range u {
			u[j] = psi[j]
		}
	} else {
		st.toBeams(psi)
		matVec(u, b.vinv, psi, nb)
	}
	// u ← exp(Ω) u by its Taylor series, until the next term would be
	// below blochExpTol of the vector (in 2-norm; compared squared).
	for j, v := range u {
		t[j] = v
	}
	un := 0.0
	for _, v := range u[:nb] {
		un += sq(v)
	}
	tol2 := blochExpTol * blochExpTol * un
	for m := 1; m < 30; m++ {
		tn := taylorTerm(w, u, om, t, 1/float64(m))
		t, w = w, t
		// The next term is at most this one times ‖Ω‖/(m+1).
		if d := float64(m + 1); tn*fro <= tol2*d*d {
			break
		}
	}
	// psi stays in the Bloch basis (see rowStepper.basis).
	am := expNear0(-mh)
	for j := range u[:nb] {
		psi[j] = u[j] * eps[j] * complex(am, 0)
	}
	st.basis = b
	return true
}

// secondOrder marks the row's step for the column's step control: its
// error is of second order in the departures (see column.go). Where the
// Bloch-wave step is out of reach, magnusPieces keeps that true.
func (st *rowStepper) secondOrder() {}

// magnusPieceCycles is the most beat cycles a piece of magnusPieces
// holds: the fourth-order step's error per unit departure, about 12 c²
// (TestSlabErrorModel), is then 0.12, about the step control's floor.
const magnusPieceCycles = 0.1

// magnusPieces takes a slab by the Magnus–Taylor step (crystalMagnus) in
// equal pieces of at most magnusPieceCycles beat cycles, each with its
// chord and departures from the slab's cubic: the step for a slab the
// Bloch-wave step cannot take, whose length the step control chose for
// the Bloch-wave step's error.
func (st *rowStepper) magnusPieces(psi []complex128, h, slope, d1, d2 float64) {
	n := math.Ceil(math.Sqrt(st.beat2(slope)) * h / magnusPieceCycles)
	if !(n > 1) {
		st.crystalMagnus(psi, h, slope, d1, d2)
		return
	}
	n = math.Min(n, 1<<16)
	for k := 0.0; k < n; k++ {
		sp, e1, e2 := cubicPart(h, slope, d1, d2, k/n, (k+1)/n)
		st.crystalMagnus(psi, h/n, sp, e1, e2)
	}
}

// toBeams returns psi from the Bloch basis st.basis, if it is in one, to
// the beams' amplitudes χ_n.
func (st *rowStepper) toBeams(psi []complex128) {
	if st.basis == nil {
		return
	}
	u := st.w[2*st.nb : 3*st.nb]
	for j := range u {
		u[j] = psi[j]
	}
	matVec(psi, st.basis.v, u, st.nb)
	st.basis = nil
}

// seriesPair returns the pair integrals of blochSlab for small x by their
// series from the moments mom: ∫₀¹ F e^{xt} dt, the same at −x (Horner in
// x and in −x), and the secular integral sinh x/x² − 1/x (without the
// factor (r h)²).
func seriesPair(x complex128, mom []float64) (ijk, ikj, sec complex128) {
	for m := len(mom) - 1; m >= 0; m-- {
		ijk = ijk*x + complex(mom[m], 0)
		ikj = ikj*(-x) + complex(mom[m], 0)
	}
	x2 := x * x
	sec = x * (1.0/6 + x2*(1.0/120+x2*(1.0/5040+x2*(1.0/362880))))
	return ijk, ikj, sec
}

// taylorTerm sets w = c·a·t for the row-major n×n matrix a (n = len(t)),
// adds w to u and returns Σ|w_r|²: one term of a Taylor series.
func taylorTerm(w, u, a, t []complex128, c float64) float64 {
	n := len(t)
	matVec(w, a, t, n)
	w, u = w[:n], u[:n]
	tn := 0.0
	for r, v := range w {
		v = complex(c*real(v), c*imag(v))
		w[r] = v
		u[r] += v
		tn += real(v)*real(v) + imag(v)*imag(v)
	}
	return tn
}

// matVec sets dst = a·x for the row-major n×n matrix a, two rows at a
// time so that their dependent sums overlap.
func matVec(dst, a, x []complex128, n int) {
	x = x[:n]
	dst = dst[:n]
	r := 0
	for ; r+1 < n; r += 2 {
		row0 := a[r*n : r*n+n]
		row1 := a[r*n+n : r*n+2*n]
		row0 = row0[:len(x)]
		row1 = row1[:len(x)]
		var re0, im0, re1, im1 float64
		for k, v := range x {
			c, d := row0[k], row1[k]
			re0 += real(c)*real(v) - imag(c)*imag(v)
			im0 += real(c)*imag(v) + imag(c)*real(v)
			re1 += real(d)*real(v) - imag(d)*imag(v)
			im1 += real(d)*imag(v) + imag(d)*real(v)
		}
		dst[r] = complex(re0, im0)
		dst[r+1] = complex(re1, im1)
	}
	if r < n {
		row := a[r*n : r*n+n]
		row = row[:len(x)]
		var re, im float64
		for k, v := range x {
			c := row[k]
			re += real(c)*real(v) - imag(c)*imag(v)
			im += real(c)*imag(v) + imag(c)*real(v)
		}
		dst[r] = complex(re, im)
	}
}

// expNear0 is e^a: for |a| ≤ 1/8 (the absorption over a slab, nearly
// always) by its Taylor polynomial of degree 11, whose first omitted term
// is below 1e-20 of the sum, else by math.Exp.
func expNear0(a float64) float64 {
	if !(math.Abs(a) <= 0.125) {
		return math.Exp(a)
	}
	const (
		c2  = 1.0 / 2
		c3  = 1.0 / 6
		c4  = 1.0 / 24
		c5  = 1.0 / 120
		c6  = 1.0 / 720
		c7  = 1.0 / 5040
		c8  = 1.0 / 40320
		c9  = 1.0 / 362880
		c10 = 1.0 / 3628800
		c11 = 1.0 / 39916800
	)
	// Even and odd parts in a², two independent chains.
	a2 := a * a
	ev := 1 + a2*(c2+a2*(c4+a2*(c6+a2*(c8+a2*c10))))
	od := a * (1 + a2*(c3+a2*(c5+a2*(c7+a2*(c9+a2*c11)))))
	return ev + od
}
