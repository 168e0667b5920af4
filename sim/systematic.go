package sim

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// MaxRowOrder is the largest N of a systematic row −N…N that the model
// accepts (15 beams).
const MaxRowOrder = 7

// SystematicRow is the many-beam dynamical model of the systematic row: the
// Darwin–Howie–Whelan equations for the beams n·g, n = −N…N (Howie & Whelan
// 1961; Hirsch, Howie, Nicholson, Pashley & Whelan 1965, Electron
// Microscopy of Thin Crystals, ch. 8 and 12), in the phase-factor form
//
//	dφ_n/dz = −(π/ξ'_0) φ_n
//	          + Σ_{m≠n} q_{n−m} φ_m exp(2πi((s_m − s_n) z + (m − n) g·R))
//	q_h = iπ λU_{hg} − π λU'_{hg}
//
// where λU_{hg} = exp(iη_h)/ξ_{hg} is the elastic Fourier coefficient of
// the reflection hg (with its phase η_h) times the wavelength, and λU'_{hg}
// its absorptive part. For N = 1 with real U this is the two-beam model.
// The excitation errors s_n are given beam by beam (RowExcitation gives the
// usual ones); s_0 must be 0.
type SystematicRow struct {
	// SPerNm[k] is the excitation error of beam n = k − N, 1/nm; the length
	// is 2N+1 and the middle entry (the transmitted beam) is 0.
	SPerNm []float64
	// LambdaU[h+2N] is λU_{hg} for h = −2N…2N, 1/nm (|λU_{hg}| = 1/ξ_{hg});
	// the middle entry (h = 0) is not used.
	LambdaU []complex128
	// LambdaUAbs[h+2N] is the absorptive part λU'_{hg}, 1/nm; nil for no
	// anomalous absorption.
	LambdaUAbs []complex128
	// Xi0AbsNm is the mean absorption length ξ'_0; +Inf or 0 means none.
	Xi0AbsNm float64
}

// RowExcitation returns the excitation errors of the beams n·g,
// n = −N…N, when g itself has excitation error s1:
//
//	s_n = n s_1 + n(1 − n) λ g²/2
//
// The Ewald sphere is taken to second order in the scattering angle (its
// parabolic approximation, k ≫ g): the order the column approximation
// keeps; the next term is O(λ³ g⁴). In particular s_n = 0 for n ≠ 0, 1
// when s_1 = (n − 1) λ g²/2, the weak-beam condition g(ng), and g and −g
// are equally excited at s_1 = −λ g²/2 (Hirsch et al. 1965, ch. 4;
// Cockayne, Ray & Whelan 1969, Phil. Mag. 20, 1265).
func RowExcitation(n int, s1, lambdaNm, gPerNm float64) []float64 {
	s := make([]float64, 2*n+1)
	c := lambdaNm * gPerNm * gPerNm / 2
	for k := range s {
		m := float64(k - n)
		s[k] = m*s1 + m*(1-m)*c
	}
	return s
}

// order returns N from the lengths, or −1 if they are inconsistent.
func (m SystematicRow) order() int {
	if len(m.SPerNm)%2 != 1 || len(m.SPerNm) < 3 {
		return -1
	}
	return len(m.SPerNm) / 2
}

// Name implements Model.
func (m SystematicRow) Name() string { return "systematic-row" }

// Beams implements Model: −N…N.
func (m SystematicRow) Beams() []int {
	n := m.order()
	if n < 0 {
		return nil
	}
	b := make([]int, 2*n+1)
	for k := range b {
		b[k] = k - n
	}
	return b
}

// Validate implements Model.
func (m SystematicRow) Validate() error {
	n := m.order()
	if n < 1 {
		return fmt.Errorf("%d beams: must be odd and at least 3", len(m.SPerNm))
	}
	if n > MaxRowOrder {
		return fmt.Errorf("%d beams: at most %d", len(m.SPerNm), 2*MaxRowOrder+1)
	}
	if len(m.LambdaU) != 4*n+1 {
		return fmt.Errorf("%d Fourier coefficients for %d beams: need %d (orders −%d…%d)", len(m.LambdaU), 2*n+1, 4*n+1, 2*n, 2*n)
	}
	if m.LambdaUAbs != nil && len(m.LambdaUAbs) != 4*n+1 {
		return fmt.Errorf("%d absorptive Fourier coefficients for %d beams: need %d", len(m.LambdaUAbs), 2*n+1, 4*n+1)
	}
	if m.SPerNm[n] != 0 {
		return fmt.Errorf("excitation error of the transmitted beam %g /nm: must be 0", m.SPerNm[n])
	}
	for k, s := range m.SPerNm {
		if math.IsNaN(s) || math.IsInf(s, 0) {
			return fmt.Errorf("excitation error of beam %d %g /nm: must be finite", k-n, s)
		}
	}
	for h := -2 * n; h <= 2*n; h++ {
		u := m.LambdaU[h+2*n]
		if cmplx.IsNaN(u) || cmplx.IsInf(u) {
			return fmt.Errorf("Fourier coefficient of order %d: must be finite", h)
		}
		if m.LambdaUAbs != nil && (cmplx.IsNaN(m.LambdaUAbs[h+2*n]) || cmplx.IsInf(m.LambdaUAbs[h+2*n])) {
			return fmt.Errorf("absorptive Fourier coefficient of order %d: must be finite", h)
		}
	}
	if cmplx.Abs(m.LambdaU[2*n+1]) == 0 {
		return fmt.Errorf("Fourier coefficient of g is zero: g is not excited")
	}
	if m.Xi0AbsNm < 0 || math.IsNaN(m.Xi0AbsNm) {
		return fmt.Errorf("mean absorption length ξ'_0 %g nm: must be positive", m.Xi0AbsNm)
	}
	return nil
}

// NewStepper implements Model.
func (m SystematicRow) NewStepper() Stepper {
	n := m.order()
	nb := 2*n + 1
	st := &rowStepper{
		nb:   nb,
		half: n,
		s:    append([]float64(nil), m.SPerNm...),
		mu:   math.Pi * inverse(m.Xi0AbsNm),
		q:    make([]complex128, 4*n+1),
		f:    make([]complex128, nb*nb),
		w:    make([]complex128, 3*nb),
		ph:   make([]complex128, 2*(4*n+1)),
		mom:  make([]float64, blochSeriesTerms),
		lam:  make([]complex128, nb),
		eps:  make([]complex128, nb),
		einv: make([]complex128, nb),
		om:   make([]complex128, nb*nb),
	}
	st.s1, st.c = rowShape(st.s, n)
	st.store = storeFor(m, st.c)
	for h := -2 * n; h <= 2*n; h++ {
		if h == 0 {
			continue
		}
		q := complex(0, math.Pi) * m.LambdaU[h+2*n]
		if m.LambdaUAbs != nil {
			q -= complex(math.Pi, 0) * m.LambdaUAbs[h+2*n]
		}
		st.q[h+2*n] = q
		// The Bloch-wave splitting of beam 0 and n: the coupling strength
		// that sets the beat frequencies in Beat.
		if a := cmplx.Abs(m.LambdaU[h+2*n]); a > st.maxInvXi {
			st.maxInvXi = a
		}
	}
	return st
}

// rowStepper advances the 2N+1 amplitudes χ_n = φ_n exp(2πi(s_n z + n γ))
// of a systematic row; each worker owns one.
type rowStepper struct {
	nb, half int
	s        []float64
	// s1 is s_1, the excitation error of g, and c the row's shape
	// s_n − n s_1 (see rowShape): the Bloch waves depend on them through
	// c_n + n(s_1 + β) alone.
	s1       float64
	c        []float64
	mu       float64
	q        []complex128 // q_h at h+2N
	maxInvXi float64
	f        []complex128 // nb×nb exponent, row-major
	w        []complex128 // scratch vectors
	ph       []complex128 // phase factors for the two Gauss nodes
	eig      []*rowEigen  // perfect-crystal decompositions by slope
	// kept are the Bloch waves by grid slope this stepper has used, store
	// those of all steppers of the row (see rowbloch.go); then the scratch
	// space of the Bloch-wave step.
	kept      map[int64]*rowBloch
	store     *rowStore
	mom       []float64
	lam       []complex128
	eps, einv []complex128
	om        []complex128
	// lastK and lastB are the grid slope of the last Bloch-wave slab and
	// its decomposition (lastB nil: none yet).
	lastK int64
	lastB *rowBloch
	// basis, when not nil, says that psi holds the amplitudes of the Bloch
	// waves of basis (u = V⁻¹χ) rather than χ: consecutive Bloch-wave
	// slabs at the same grid slope skip the V and V⁻¹ between them. Every other
	// method returns psi to χ first (toBeams); Start resets it.
	basis *rowBloch
}

func (st *rowStepper) Start(psi []complex128) {
	for k := range psi {
		psi[k] = 0
	}
	psi[st.half] = 1
	st.basis = nil
}

// Crystal advances psi through a slab, exactly as the two-beam stepper
// does (see twoBeamStepper.Crystal) but with N×N matrices: with the chord of
// g·R taken out the equations are dχ/dz = M(z) χ,
//
//	M_nn = −π/ξ'_0 + 2πi(s_n + n β)
//	M_nm = q_{n−m} exp(2πi (m − n) δ(z))   (m ≠ n)
//
// For δ ≡ 0 (a perfect crystal with shifted excitation errors) the slab is
// exp(h·M) applied exactly, by a truncated Taylor series with scaling
// (Al-Mohy & Higham 2011, SIAM J. Sci. Comput. 33, 488) or, for a long
// slab, by the eigen-decomposition of M (the Bloch waves), kept for reuse.
// Otherwise the slab is taken in the basis of the Bloch waves at the
// rounded chord slope, with the departure in the interaction picture
// (crystalBloch, rowbloch.go); where that step is out of its reach, by
// the fourth-order commutator-free Magnus integrator of Blanes & Moan
// (2006) with M at the two Gauss–Legendre nodes and the exponentials by
// Taylor series (crystalMagnus).
func (st *rowStepper) Crystal(psi []complex128, h, slope, d1, d2 float64) {
	if d1 == 0 && d2 == 0 {
		st.perfect(psi, h, slope)
		return
	}
	if st.crystalBloch(psi, h, slope, d1, d2) {
		return
	}
	st.magnusPieces(psi, h, slope, d1, d2)
}

// crystalMagnus is the fourth-order commutator-free Magnus step of Crystal
// with the exponentials by Taylor series.
func (st *rowStepper) crystalMagnus(psi []complex128, h, slope, d1, d2 float64) {
	st.toBeams(psi)
	n2 := 2 * st.half
	nq := 2*n2 + 1
	// Powers of the node phases: e_k^j = exp(2πi j d_k), j = −2N…2N.
	e1, e2 := phase(d1), phase(d2)
	p1, p2 := st.ph[:nq], st.ph[nq:]
	p1[n2], p2[n2] = 1, 1
	for j := 1; j <= n2; j++ {
		p1[n2+j] = p1[n2+j-1] * e1
		p2[n2+j] = p2[n2+j-1] * e2
		p1[n2-j] = cmplx.Conj(p1[n2+j])
		p2[n2-j] = cmplx.Conj(p2[n2+j])
	}
	// α1 + α2 = 1/2 for each factor, hence h/2 with the weights doubled.
	for _, w := range [2][2]float64{{cf4a1, cf4a2}, {cf4a2, cf4a1}} {
		a, b := complex(2*w[0], 0), complex(2*w[1], 0)
		st.fill(h/2, slope, func(j int) complex128 { return a*p1[n2+j] + b*p2[n2+j] })
		st.expmv(psi)
	}
}

// fill sets st.f = c·M with the coupling of order m − n multiplied by
// wt(m − n).
func (st *rowStepper) fill(c, slope float64, wt func(j int) complex128) {
	st.fillFrom(st.s, c, slope, wt)
}

// fillFrom is fill with the excitation errors s_n taken from s.
func (st *rowStepper) fillFrom(s []float64, c, slope float64, wt func(j int) complex128) {
	nb, n2 := st.nb, 2*st.half
	cc := complex(c, 0)
	for r := 0; r < nb; r++ {
		row := st.f[r*nb : (r+1)*nb]
		for k := 0; k < nb; k++ {
			if k == r {
				nr := float64(r - st.half)
				row[k] = cc * complex(-st.mu, 2*math.Pi*(s[r]+nr*slope))
				continue
			}
			// M_rk couples beam k into beam r with q_{r−k} and the phase
			// of order k − r.
			row[k] = cc * st.q[r-k+n2]
			if wt != nil {
				row[k] *= wt(k - r)
			}
		}
	}
}

// taylorTheta is the largest norm of one scaled Taylor step. Fewer, longer
// steps need fewer terms in all, but a step of norm θ loses about
// e^θ/√(2πθ) ulps to cancellation among its oscillating terms: 8 keeps that
// below 1e-12, well inside the 1e-9 of TestRowConservationWithoutAbsorption.
const taylorTheta = 8

// expmv replaces psi by exp(F)·psi for F = st.f (destroyed), by the
// truncated Taylor series of Al-Mohy & Higham (2011) with the diagonal's
// centre shifted out, s equal substeps of 1-norm at most taylorTheta, and each
// series summed until two successive terms are below the unit roundoff
// relative to the sum.
func (st *rowStepper) expmv(psi []complex128) {
	nb := st.nb
	f := st.f
	// Shift out the middle of the diagonal's range (real: the mean, the
	// absorption; imaginary: halfway between the extreme excitation
	// errors), which leaves the smallest norm.
	var re float64
	lo, hi := math.Inf(1), math.Inf(-1)
	for k := 0; k < nb; k++ {
		d := f[k*nb+k]
		re += real(d)
		lo = math.Min(lo, imag(d))
		hi = math.Max(hi, imag(d))
	}
	tr := complex(re/float64(nb), (lo+hi)/2)
	for k := 0; k < nb; k++ {
		f[k*nb+k] -= tr
	}
	norm := 0.0
	for k := 0; k < nb; k++ {
		c := 0.0
		for r := 0; r < nb; r++ {
			v := f[r*nb+k]
			c += math.Abs(real(v)) + math.Abs(imag(v))
		}
		norm = math.Max(norm, c)
	}
	steps := int(math.Ceil(norm / taylorTheta))
	if steps < 1 {
		steps = 1
	}
	inv := complex(1/float64(steps), 0)
	for k := range f {
		f[k] *= inv
	}
	eta := cmplx.Exp(tr * inv)
	t, u := st.w[:nb], st.w[nb:2*nb]
	const tol = 0x1p-53
	for step := 0; step < steps; step++ {
		copy(t, psi)
		prev := math.Inf(1)
		for j := 1; j < 200; j++ {
			// u = F t / j, and the sizes of the new term and of the sum.
			cj := 1 / float64(j)
			tn := 0.0
			for r := 0; r < nb; r++ {
				row := f[r*nb : (r+1)*nb]
				var re, im float64
				for k, v := range t[:nb] {
					a := row[k]
					re += real(a)*real(v) - imag(a)*imag(v)
					im += real(a)*imag(v) + imag(a)*real(v)
				}
				re *= cj
				im *= cj
				u[r] = complex(re, im)
				if m := abs1(re, im); m > tn {
					tn = m
				}
			}
			sn := 0.0
			for r := 0; r < nb; r++ {
				psi[r] += u[r]
				if m := abs1(real(psi[r]), imag(psi[r])); m > sn {
					sn = m
				}
			}
			t, u = u, t
			if tn+prev <= tol*sn {
				break
			}
			prev = tn
		}
		if eta != 1 {
			for r := range psi {
				psi[r] *= eta
			}
		}
	}
}

// abs1 is |re| + |im|, a bound on the modulus within a factor √2.
func abs1(re, im float64) float64 { return math.Abs(re) + math.Abs(im) }

// eigenNorm is the 1-norm h·‖M‖ above which a perfect-crystal slab is
// done by eigen-decomposition rather than the Taylor series: the cost of
// one decomposition is about that of a Taylor series of this norm.
const eigenNorm = 60

// perfect applies the exact perfect-crystal transfer matrix exp(h·M) with
// δ = 0: from a kept eigen-decomposition of M for this slope if there is
// one, by a new one if the slab is long, else by the Taylor series.
func (st *rowStepper) perfect(psi []complex128, h, slope float64) {
	st.toBeams(psi)
	for _, e := range st.eig {
		if e.slope == slope {
			e.apply(psi, h)
			return
		}
	}
	st.fill(h, slope, nil)
	norm := 0.0
	for _, v := range st.f {
		norm += cmplx.Abs(v)
	}
	if norm/float64(st.nb) > eigenNorm {
		st.fill(1, slope, nil)
		if e := newRowEigen(st.f, st.nb, slope); e != nil {
			if len(st.eig) >= 4 {
				copy(st.eig, st.eig[1:])
				st.eig = st.eig[:3]
			}
			st.eig = append(st.eig, e)
			e.apply(psi, h)
			return
		}
		st.fill(h, slope, nil)
	}
	st.expmv(psi)
}

// rowEigen is M = V diag(λ) V⁻¹ for the perfect crystal at one slope: the
// Bloch waves of the systematic row (Hirsch et al. 1965, ch. 12), with
// which exp(h·M) = V diag(e^{hλ}) V⁻¹ for any h.
type rowEigen struct {
	slope   float64
	nb      int
	lam     []complex128
	v, vinv []complex128 // row-major
	tmp     []complex128
}

// newRowEigen decomposes the complex nb×nb matrix a with gonum's real
// eigensolver applied to the real 2nb×2nb embedding
//
//	[ Re A  −Im A ]
//	[ Im A   Re A ]
//
// which is similar to diag(A, conj(A)): an eigenvector (v; −iv) belongs to
// A, (w; iw) to conj(A). A is first shifted by ic with c above its
// spectral radius, so that the eigenvalues of the two blocks lie in opposite
// half-planes and cannot mix. It returns nil if A is too close to a
// defective matrix for the decomposition to be trusted (the caller then
// uses the Taylor series).
func newRowEigen(a []complex128, nb int, slope float64) *rowEigen {
	c := 0.0
	for _, v := range a {
		c += cmplx.Abs(v)
	}
	c = 2*c + 1
	n2 := 2 * nb
	emb := mat.NewDense(n2, n2, nil)
	for r := 0; r < nb; r++ {
		for k := 0; k < nb; k++ {
			v := a[r*nb+k]
			if r == k {
				v += complex(0, c)
			}
			emb.Set(r, k, real(v))
			emb.Set(r, k+nb, -imag(v))
			emb.Set(r+nb, k, imag(v))
			emb.Set(r+nb, k+nb, real(v))
		}
	}
	var eg mat.Eigen
	if !eg.Factorize(emb, mat.EigenRight) {
		return nil
	}
	vals := eg.Values(nil)
	var vecs mat.CDense
	eg.VectorsTo(&vecs)
	e := &rowEigen{slope: slope, nb: nb, lam: make([]complex128, 0, nb),
		v: make([]complex128, nb*nb), vinv: make([]complex128, nb*nb), tmp: make([]complex128, nb)}
	col := 0
	for j, l := range vals {
		if imag(l) <= 0 { // the conj(A) block
			continue
		}
		if col == nb {
			return nil
		}
		e.lam = append(e.lam, l-complex(0, c))
		for r := 0; r < nb; r++ {
			e.v[r*nb+col] = vecs.At(r, j)
		}
		col++
	}
	if col != nb {
		return nil
	}
	// V⁻¹ through the real embedding of V.
	ve := mat.NewDense(n2, n2, nil)
	for r := 0; r < nb; r++ {
		for k := 0; k < nb; k++ {
			v := e.v[r*nb+k]
			ve.Set(r, k, real(v))
			ve.Set(r, k+nb, -imag(v))
			ve.Set(r+nb, k, imag(v))
			ve.Set(r+nb, k+nb, real(v))
		}
	}
	var vi mat.Dense
	if err := vi.Inverse(ve); err != nil {
		return nil
	}
	if cond := mat.Cond(ve, 1); !(cond < 1e8) {
		return nil
	}
	for r := 0; r < nb; r++ {
		for k := 0; k < nb; k++ {
			e.vinv[r*nb+k] = complex(vi.At(r, k), vi.At(r+nb, k))
		}
	}
	return e
}

// apply replaces psi by V diag(e^{hλ}) V⁻¹ psi.
func (e *rowEigen) apply(psi []complex128, h float64) {
	nb := e.nb
	for r := 0; r < nb; r++ {
		var acc complex128
		for k := 0; k < nb; k++ {
			acc += e.vinv[r*nb+k] * psi[k]
		}
		e.tmp[r] = acc * cmplx.Exp(e.lam[r]*complex(h, 0))
	}
	for r := 0; r < nb; r++ {
		var acc complex128
		for k := 0; k < nb; k++ {
			acc += e.v[r*nb+k] * e.tmp[k]
		}
		psi[r] = acc
	}
}

// Beat returns the fastest beat that matters to the step control: for each
// beam n ≠ 0 the two-beam Pendellösung frequency of beams 0 and n,
// sqrt((s_n + nβ)² + |λU|²), counted only while the beam is excited at least
// weakly (|s_n + nβ| no more than 2/ξ beyond the strongest coupling), since
// a beam far from the Bragg condition carries an amplitude of order
// 1/(ξ|s_n|) and its fast phase is handled exactly by the exponentials.
func (st *rowStepper) Beat(slope float64) float64 {
	return math.Sqrt(st.beat2(slope))
}

// beat2 is the square of Beat, without its square roots (the step
// control needs only the square).
func (st *rowStepper) beat2(slope float64) float64 {
	b := 0.0
	u := st.maxInvXi
	u2 := u * u
	for k, s := range st.s {
		n := float64(k - st.half)
		if n == 0 {
			continue
		}
		x := s + n*slope
		if n == 1 || math.Abs(x) <= 2*u {
			b = math.Max(b, x*x+u2)
		}
	}
	return b
}

func (st *rowStepper) Vacuum(psi []complex128, h float64) {
	st.toBeams(psi)
	for k := range psi {
		psi[k] *= phase(st.s[k] * h)
	}
}

func (st *rowStepper) Shift(psi []complex128, dGamma float64) {
	st.toBeams(psi)
	for k := range psi {
		psi[k] *= phase(float64(k-st.half) * dGamma)
	}
}

func (st *rowStepper) Intensities(psi []complex128, out []float64) {
	st.toBeams(psi)
	for k, v := range psi {
		out[k] = sq(v)
	}
}
