package sim

import "math"

// Bloch waves of the systematic row by continuation in the slope.
//
// The perfect-crystal matrix at slope β_a + Δ is A(β_a) + 2πiΔ N, which in
// the basis of the Bloch waves at β_a (A(β_a) = V_a Λ_a V_a⁻¹) reads
//
//	B = Λ_a + 2πiΔ P_a,   P_a = V_a⁻¹ N V_a,
//
// nearly diagonal for the small Δ between neighbouring grid slopes. Each
// eigenpair (x_j, λ_j) of B is found by Newton's method on
//
//	(B − λ I) x = 0,   x_j = 1,
//
// from the first-order perturbation of e_j, B_jj (the eigenvalue problem as
// a system of equations,
// whose Newton iteration converges quadratically near a simple eigenvalue;
// Peters & Wilkinson 1979, SIAM Rev. 21, 339). Then V = V_a X with the
// columns normalised, V⁻¹ = X⁻¹ V_a⁻¹ and P = X⁻¹ P_a X. The result is
// checked: every residual at rounding level and X well conditioned, else
// nil (the caller then decomposes from scratch).

const (
	// contMaxIter bounds the Newton iterations per eigenpair.
	contMaxIter = 12
	// contResidual is the accepted residual |(B − λI)x|₁ relative to
	// ‖B‖₁.
	contResidual = 1e-14
	// contMaxCond bounds the 1-norm condition number of X.
	contMaxCond = 1e6
)

// continueBloch returns the decomposition at the anchor's slope plus dBeta,
// or nil if the continuation does not converge cleanly.
func (st *rowStepper) continueBloch(ba *rowBloch, dBeta float64) *rowBloch {
	n := st.nb
	bm := make([]complex128, n*n)
	scale := 0.0
	for j := 0; j < n; j++ {
		for k := 0; k < n; k++ {
			v := ba.p[j*n+k] * complex(dBeta, 0)
			if j == k {
				v += ba.lam[j]
			}
			bm[j*n+k] = v
			scale = math.Max(scale, abs1(real(v), imag(v)))
		}
	}
	scale *= float64(n)
	x := make([]complex128, n*n) // columns are the eigenvectors of B
	lam := make([]complex128, n)
	jac := make([]complex128, n*n)
	res := make([]complex128, n)
	col := make([]complex128, n)
	for j := 0; j < n; j++ {
		// First-order start: x_i = B_ij/(B_jj − B_ii), λ = B_jj + Σ B_jk x_k.
		l := bm[j*n+j]
		for i := range col {
			col[i] = 0
			if i != j {
				if d := l - bm[i*n+i]; d != 0 {
					col[i] = bm[i*n+j] / d
				}
			}
		}
		col[j] = 1
		for k := 0; k < n; k++ {
			if k != j {
				l += bm[j*n+k] * col[k]
			}
		}
		ok := false
		for it := 0; it < contMaxIter; it++ {
			// Residual r = (B − λI)x and its size.
			rn := 0.0
			for i := 0; i < n; i++ {
				var acc complex128
				for k := 0; k < n; k++ {
					acc += bm[i*n+k] * col[k]
				}
				acc -= l * col[i]
				res[i] = -acc
				rn += abs1(real(acc), imag(acc))
			}
			if rn <= contResidual*scale {
				ok = true
				break
			}
			// Jacobian: B − λI with column j replaced by −x.
			for i := 0; i < n; i++ {
				for k := 0; k < n; k++ {
					v := bm[i*n+k]
					if i == k {
						v -= l
					}
					if k == j {
						v = -col[i]
					}
					jac[i*n+k] = v
				}
			}
			if !solveComplex(jac, res, n, 1) {
				return nil
			}
			for i := 0; i < n; i++ {
				if i == j {
					l += res[i]
				} else {
					col[i] += res[i]
				}
			}
		}
		if !ok {
			return nil
		}
		lam[j] = l
		for i := 0; i < n; i++ {
			x[i*n+j] = col[i]
		}
	}
	// X⁻¹ and its condition.
	xi := append([]complex128(nil), x...)
	if !invertComplex(xi, n) {
		return nil
	}
	if norm1(x, n)*norm1(xi, n) > contMaxCond {
		return nil
	}
	b := &rowBloch{lam: lam, v: make([]complex128, n*n), vinv: make([]complex128, n*n), p: make([]complex128, n*n)}
	matMul(b.v, ba.v, x, n)
	matMul(b.vinv, xi, ba.vinv, n)
	tmp := make([]complex128, n*n)
	matMul(tmp, ba.p, x, n)
	matMul(b.p, xi, tmp, n)
	// Unit columns of V (and rows of V⁻¹, P scaled to match): the scaling
	// leaves V Λ V⁻¹ unchanged and keeps Ω's norm meaningful.
	for k := 0; k < n; k++ {
		s := 0.0
		for i := 0; i < n; i++ {
			s += sq(b.v[i*n+k])
		}
		s = math.Sqrt(s)
		if !(s > 0) {
			return nil
		}
		for i := 0; i < n; i++ {
			b.v[i*n+k] /= complex(s, 0)
			b.vinv[k*n+i] *= complex(s, 0)
			b.p[k*n+i] *= complex(s, 0)
			b.p[i*n+k] /= complex(s, 0)
		}
	}
	return b
}

// pivotRow returns the row r ≥ c of the row-major n×n matrix a with the
// largest |a[r][c]| (in the 1-norm of its parts), or −1 when that column
// is zero from row c down.
func pivotRow(a []complex128, n, c int) int {
	p, best := -1, 0.0
	for r := c; r < n; r++ {
		if m := abs1(real(a[r*n+c]), imag(a[r*n+c])); m > best {
			p, best = r, m
		}
	}
	return p
}

// solveComplex solves a·X = b in place (X in b) for the m right-hand
// sides that are the columns of the row-major n×m matrix b, by Gaussian
// elimination with partial pivoting; a is destroyed. It reports false for
// a singular a.
func solveComplex(a, b []complex128, n, m int) bool {
	for c := 0; c < n; c++ {
		p := pivotRow(a, n, c)
		if p < 0 {
			return false
		}
		if p != c {
			for k := 0; k < n; k++ {
				a[c*n+k], a[p*n+k] = a[p*n+k], a[c*n+k]
			}
			for k := 0; k < m; k++ {
				b[c*m+k], b[p*m+k] = b[p*m+k], b[c*m+k]
			}
		}
		inv := 1 / a[c*n+c]
		for r := c + 1; r < n; r++ {
			f := a[r*n+c] * inv
			if f == 0 {
				continue
			}
			for k := c; k < n; k++ {
				a[r*n+k] -= f * a[c*n+k]
			}
			for k := 0; k < m; k++ {
				b[r*m+k] -= f * b[c*m+k]
			}
		}
	}
	for c := n - 1; c >= 0; c-- {
		inv := 1 / a[c*n+c]
		for k := 0; k < m; k++ {
			acc := b[c*m+k]
			for j := c + 1; j < n; j++ {
				acc -= a[c*n+j] * b[j*m+k]
			}
			b[c*m+k] = acc * inv
		}
	}
	return true
}

// invertComplex replaces a by its inverse (solveComplex with the identity
// as right-hand sides); it reports false for a singular a.
func invertComplex(a []complex128, n int) bool {
	inv := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		inv[i*n+i] = 1
	}
	if !solveComplex(a, inv, n, n) {
		return false
	}
	copy(a, inv)
	return true
}

// matMul sets dst = a·b for row-major n×n matrices (dst distinct from both):
// each row of dst as the sum of the rows of b weighted by that row of a,
// along contiguous rows.
func matMul(dst, a, b []complex128, n int) {
	for i := 0; i < n; i++ {
		d := dst[i*n : i*n+n]
		for k := range d {
			d[k] = 0
		}
		for m, c := range a[i*n : i*n+n] {
			row := b[m*n : m*n+n]
			row = row[:len(d)]
			cr, ci := real(c), imag(c)
			for k, v := range row {
				d[k] += complex(cr*real(v)-ci*imag(v), cr*imag(v)+ci*real(v))
			}
		}
	}
}

// norm1 is the 1-norm (largest column sum of |re| + |im|) of an n×n matrix.
func norm1(a []complex128, n int) float64 {
	w := 0.0
	for k := 0; k < n; k++ {
		c := 0.0
		for i := 0; i < n; i++ {
			c += abs1(real(a[i*n+k]), imag(a[i*n+k]))
		}
		w = math.Max(w, c)
	}
	return w
}
