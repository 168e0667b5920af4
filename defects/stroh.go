package defects

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// strohClosureTol is the largest accepted residual of the Stroh closure
// relations (see newStrohField). Above it the sextic is treated as
// degenerate and the fallback rule applies.
const strohClosureTol = 1e-8

// strohField is the anisotropic field of a straight dislocation in its own
// frame (x', y', u), in Stroh's sextic formalism (Stroh 1958, Phil. Mag. 3,
// 625; Hirth & Lothe 1982, ch. 13; Ting, Anisotropic Elasticity, 1996,
// ch. 5 and §8.1):
//
//	u(x', y') = (1/π) Im Σ_α A_α (B_αᵀ b) ln(x' + p_α y'),   Im p_α > 0,
//
// stored as c_α = A_α B_αᵀ b, so a point costs three complex logarithms.
// When the sextic is degenerate, fallback holds the rule's replacement.
type strohField struct {
	p        [3]complex128
	cr, ci   [3]r3.Vec // Re c_α, Im c_α
	fallback *isoEdgeScrew
	// energy is the energy-factor matrix L = −2i B Bᵀ (Ting 1996, ch. 7;
	// the prelogarithmic factor of the energy is bᵀLb/4π) in the
	// dislocation frame, GPa.
	energy [3][3]float64
}

// newStrohField builds the Stroh solution for the image-frame stiffness c
// (GPa), the dislocation frame ex, ey, u and the Burgers vector bl in that
// frame. The eigenproblem, which depends on the stiffness in the
// dislocation frame alone, is taken from cache when it holds it (cache
// may be nil).
//
// With the stiffness rotated into the dislocation frame, Q_ik = C_i1k1,
// R_ik = C_i1k2, T_ik = C_i2k2, and the fundamental 6×6 eigenproblem
// (Ting 1996, eq. 5.5-3)
//
//	N ξ = p ξ,  N = ⎡ −T⁻¹Rᵀ          T⁻¹  ⎤,  ξ = (a, b)
//	                ⎣ R T⁻¹ Rᵀ − Q   −R T⁻¹ ⎦
//
// is solved by mat.Eigen. The three eigenpairs with Im p > 0 are kept and
// normalised to 2 a_αᵀ b_α = 1 (unconjugated), so that the closure
// relations A Bᵀ + Ā B̄ᵀ = I, A Aᵀ + Ā Āᵀ = 0, B Bᵀ + B̄ B̄ᵀ = 0 hold
// (Ting 1996, eq. 5.5-13). These make the displacement jump by exactly b
// round the line and the net force vanish.
//
// Degenerate rule: if the closure relations fail by more than 1e-8 (in
// units of their natural scale) — the eigenvectors of a degenerate sextic do
// not span, the exactly isotropic medium being the standard case, the
// transversely isotropic medium with the line along its axis another — the
// field is replaced by the solution of the medium made isotropic in the
// plane perpendicular to the line: plane strain with λ, μ the 2-D rotation
// average of the in-plane stiffness, λ = (C11+C22+6C12−4C66)/8,
// μ = (C11+C22−2C12+4C66)/8 (dislocation-frame Voigt constants),
// ν = λ/(2(λ+μ)), in Hirth & Lothe's isotropic formulas, plus the exact
// anti-plane screw field u_3 = (b_3/2π) arg(x' + p₃ y'),
// p₃ = (−C45 + i√(C44C55 − C45²))/C44, with the in-plane/anti-plane coupling
// constants (C14, C15, C24, C25, C46, C56) dropped. This is exact in both
// named cases; near them the sextic is only degenerate within ~1e-8 of C,
// so the error of the rule is of that order.
func newStrohField(c [6][6]float64, cache *StrohCache, ex, ey, u, bl r3.Vec) (*strohField, error) {
	rot := [3][3]float64{{ex.X, ex.Y, ex.Z}, {ey.X, ey.Y, ey.Z}, {u.X, u.Y, u.Z}}
	cd := RotateStiffness(c, rot)
	sol, err := cache.solve(cd)
	if err != nil {
		return nil, err
	}
	return sol.field(bl), nil
}

// strohSolution is the part of the Stroh solution that depends on the
// stiffness in the dislocation frame only (not on b): the roots p_α, the
// normalised eigenvectors A_α, B_α and the energy-factor matrix, or the
// mark that the sextic is degenerate.
type strohSolution struct {
	cd         [6][6]float64 // stiffness in the dislocation frame
	p          [3]complex128
	A, B       [3][3]complex128 // A[α][i] = (a_α)_i
	energy     [3][3]float64
	degenerate bool
}

// solveStroh sets up and solves the sextic eigenproblem for the
// dislocation-frame stiffness cd (see newStrohField).
func solveStroh(cd [6][6]float64) (*strohSolution, error) {
	scale := 0.0
	for i := range 6 {
		for j := range 6 {
			scale = math.Max(scale, math.Abs(cd[i][j]))
		}
	}
	var q, r, t mat.Dense
	q.ReuseAs(3, 3)
	r.ReuseAs(3, 3)
	t.ReuseAs(3, 3)
	for i := range 3 {
		for k := range 3 {
			q.Set(i, k, cd[voigtIndex(i, 0)][voigtIndex(k, 0)])
			r.Set(i, k, cd[voigtIndex(i, 0)][voigtIndex(k, 1)])
			t.Set(i, k, cd[voigtIndex(i, 1)][voigtIndex(k, 1)])
		}
	}
	var ti mat.Dense
	if err := ti.Inverse(&t); err != nil {
		return nil, inputErr("elastic", "stiffness gives a singular Stroh matrix T (is C positive definite?)")
	}
	var n1, n3, rt mat.Dense
	n1.Mul(&ti, r.T())
	n1.Scale(-1, &n1)
	rt.Mul(&r, &ti)
	n3.Mul(&rt, r.T())
	n3.Sub(&n3, &q)
	n := mat.NewDense(6, 6, nil)
	for i := range 3 {
		for j := range 3 {
			n.Set(i, j, n1.At(i, j))
			n.Set(i, j+3, ti.At(i, j))
			n.Set(i+3, j, n3.At(i, j))
			n.Set(i+3, j+3, n1.At(j, i))
		}
	}
	sol := &strohSolution{cd: cd}
	var eig mat.Eigen
	ok := eig.Factorize(n, mat.EigenRight)
	if ok {
		ok = sol.fromEigen(&eig, scale)
	}
	if !ok {
		sol.degenerate = true
		sol.energy = degenerateFallback(cd, r3.Vec{}).energyFactor()
	}
	return sol, nil
}

// fromEigen keeps the Im p > 0 eigenpairs, normalises them, checks the
// closure relations and fills sol. It reports false if the sextic is
// degenerate (closure relations fail).
func (sol *strohSolution) fromEigen(eig *mat.Eigen, scale float64) bool {
	vals := eig.Values(nil)
	var vecs mat.CDense
	eig.VectorsTo(&vecs)
	idx := []int{0, 1, 2, 3, 4, 5}
	slices.SortFunc(idx, func(i, j int) int {
		switch {
		case imag(vals[i]) > imag(vals[j]):
			return -1
		case imag(vals[i]) < imag(vals[j]):
			return 1
		}
		return 0
	})
	A, B := &sol.A, &sol.B
	for al := range 3 {
		k := idx[al]
		if !(imag(vals[k]) > 0) {
			return false
		}
		sol.p[al] = vals[k]
		var norm complex128
		for i := range 3 {
			norm += vecs.At(i, k) * vecs.At(i+3, k)
		}
		f := 1 / cmplx.Sqrt(2*norm)
		for i := range 3 {
			A[al][i] = vecs.At(i, k) * f
			B[al][i] = vecs.At(i+3, k) * f
		}
	}
	// Closure residuals: ‖2Re(ABᵀ) − I‖, ‖Re(BBᵀ)‖/scale, ‖Re(AAᵀ)‖·scale.
	res := 0.0
	for i := range 3 {
		for j := range 3 {
			var ab, bb, aa complex128
			for al := range 3 {
				ab += A[al][i] * B[al][j]
				bb += B[al][i] * B[al][j]
				aa += A[al][i] * A[al][j]
			}
			want := 0.0
			if i == j {
				want = 1
			}
			res = math.Max(res, math.Abs(2*real(ab)-want))
			res = math.Max(res, math.Abs(2*real(bb))/scale)
			res = math.Max(res, math.Abs(2*real(aa))*scale)
			sol.energy[i][j] = 2 * imag(bb) // L = −2i BBᵀ, BBᵀ imaginary
		}
	}
	return res < strohClosureTol
}

// field is the solution for the Burgers vector bl (dislocation frame):
// c_α = A_α (B_αᵀ b).
func (sol *strohSolution) field(bl r3.Vec) *strohField {
	s := &strohField{p: sol.p, energy: sol.energy}
	if sol.degenerate {
		s.fallback = degenerateFallback(sol.cd, bl)
		return s
	}
	b := [3]float64{bl.X, bl.Y, bl.Z}
	for al := range 3 {
		var qa complex128 // q_α = B_αᵀ b
		for i := range 3 {
			qa += sol.B[al][i] * complex(b[i], 0)
		}
		c := [3]complex128{sol.A[al][0] * qa, sol.A[al][1] * qa, sol.A[al][2] * qa}
		s.cr[al] = r3.Vec{X: real(c[0]), Y: real(c[1]), Z: real(c[2])}
		s.ci[al] = r3.Vec{X: imag(c[0]), Y: imag(c[1]), Z: imag(c[2])}
	}
	return s
}

// u evaluates the displacement in the dislocation frame. With
// z_α = x' + p_α y', Im(c ln z) = Im c · ln|z| + Re c · arg z; arg z_α has its
// branch cut on y' = 0, x' < 0 for every α (Im p_α > 0), the same cut as
// the isotropic θ.
func (s *strohField) u(x, y float64) r3.Vec {
	if s.fallback != nil {
		return s.fallback.u(x, y)
	}
	r2 := x*x + y*y
	if r2 < coreRadiusNm*coreRadiusNm {
		if r2 == 0 {
			x, y = coreRadiusNm, 0
		} else {
			f := coreRadiusNm / math.Sqrt(r2)
			x, y = x*f, y*f
		}
	}
	var out r3.Vec
	for al := range 3 {
		re := x + real(s.p[al])*y
		im := imag(s.p[al]) * y
		lnr := 0.5 * math.Log(re*re+im*im)
		arg := math.Atan2(im, re)
		out = r3.Add(out, r3.Add(r3.Scale(lnr, s.ci[al]), r3.Scale(arg, s.cr[al])))
	}
	return r3.Scale(1/math.Pi, out)
}

// degenerateFallback is the degenerate-sextic rule of newStrohField, from
// the dislocation-frame stiffness cd.
func degenerateFallback(cd [6][6]float64, bl r3.Vec) *isoEdgeScrew {
	lam := (cd[0][0] + cd[1][1] + 6*cd[0][1] - 4*cd[5][5]) / 8
	mu := (cd[0][0] + cd[1][1] - 2*cd[0][1] + 4*cd[5][5]) / 8
	nu := lam / (2 * (lam + mu))
	f := newIsoEdgeScrew(bl, nu, mu)
	c44, c55, c45 := cd[3][3], cd[4][4], cd[3][4]
	f.p3 = complex(-c45/c44, math.Sqrt(c44*c55-c45*c45)/c44)
	f.mu3 = math.Sqrt(c44*c55 - c45*c45)
	return f
}

// voigtIndex maps a tensor index pair (0-based) to its Voigt index in the
// order 11, 22, 33, 23, 13, 12.
func voigtIndex(i, j int) int {
	if i == j {
		return i
	}
	return 6 - i - j
}

func (s *strohField) String() string {
	if s.fallback != nil {
		return "anisotropic (degenerate sextic: in-plane isotropic rule)"
	}
	return fmt.Sprintf("anisotropic (Stroh, p = %.4g, %.4g, %.4g)", s.p[0], s.p[1], s.p[2])
}
