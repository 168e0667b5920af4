package defects

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/spatial/r3"
)

// Test helpers: finite differences, tensors from Voigt matrices, frames.
// None of them calls the package's own formulas.

func comp(v r3.Vec, i int) float64 { return [3]float64{v.X, v.Y, v.Z}[i] }

func unitAxis(i int) r3.Vec {
	var a [3]float64
	a[i] = 1
	return r3.Vec{X: a[0], Y: a[1], Z: a[2]}
}

// gradR returns G[i][j] = ∂R_i/∂x_j by central differences with step h (nm).
func gradR(f Field, p r3.Vec, h float64) [3][3]float64 {
	var g [3][3]float64
	for j := range 3 {
		e := r3.Scale(h, unitAxis(j))
		rp, rm := f.R(r3.Add(p, e)), f.R(r3.Sub(p, e))
		for i := range 3 {
			g[i][j] = (comp(rp, i) - comp(rm, i)) / (2 * h)
		}
	}
	return g
}

// hessR returns H[i][j][k] = ∂²R_i/∂x_j∂x_k by central differences.
func hessR(f Field, p r3.Vec, h float64) [3][3][3]float64 {
	var H [3][3][3]float64
	for j := range 3 {
		for k := range 3 {
			ej, ek := r3.Scale(h, unitAxis(j)), r3.Scale(h, unitAxis(k))
			pp := f.R(r3.Add(r3.Add(p, ej), ek))
			pm := f.R(r3.Sub(r3.Add(p, ej), ek))
			mp := f.R(r3.Add(r3.Sub(p, ej), ek))
			mm := f.R(r3.Sub(r3.Sub(p, ej), ek))
			for i := range 3 {
				H[i][j][k] = (comp(pp, i) - comp(pm, i) - comp(mp, i) + comp(mm, i)) / (4 * h * h)
			}
		}
	}
	return H
}

// voigt maps a tensor index pair to its Voigt index (11,22,33,23,13,12).
func voigt(i, j int) int {
	if i == j {
		return i
	}
	return 6 - i - j
}

// tensor4 expands a Voigt stiffness into C_ijkl.
func tensor4(c [6][6]float64) [3][3][3][3]float64 {
	var t [3][3][3][3]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				for l := range 3 {
					t[i][j][k][l] = c[voigt(i, j)][voigt(k, l)]
				}
			}
		}
	}
	return t
}

// isoVoigt is the isotropic stiffness: C11 = λ+2μ, C12 = λ, C44 = μ.
func isoVoigt(mu, nu float64) [6][6]float64 {
	lam := 2 * mu * nu / (1 - 2*nu)
	return cubicVoigt(lam+2*mu, lam, mu)
}

func cubicVoigt(c11, c12, c44 float64) [6][6]float64 {
	var c [6][6]float64
	for i := range 3 {
		for j := range 3 {
			c[i][j] = c12
		}
		c[i][i] = c11
		c[i+3][i+3] = c44
	}
	return c
}

// stress returns σ_ij = C_ijkl ∂_k R_l at p.
func stress(f Field, c [6][6]float64, p r3.Vec, h float64) [3][3]float64 {
	t := tensor4(c)
	g := gradR(f, p, h)
	var s [3][3]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				for l := range 3 {
					s[i][j] += t[i][j][k][l] * g[l][k]
				}
			}
		}
	}
	return s
}

// divStress returns ∂_j σ_ij = C_ijkl ∂_j ∂_k R_l at p.
func divStress(f Field, c [6][6]float64, p r3.Vec, h float64) r3.Vec {
	t := tensor4(c)
	H := hessR(f, p, h)
	var d [3]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				for l := range 3 {
					d[i] += t[i][j][k][l] * H[l][j][k]
				}
			}
		}
	}
	return r3.Vec{X: d[0], Y: d[1], Z: d[2]}
}

// circuit returns ∮ dR around the circle of radius rad about centre in the
// plane with unit normal n, traversed right-handedly about n, by the
// periodic trapezoid rule on the directional derivative of R (central
// differences of step h along the tangent). The cut of R is never straddled
// as long as no sample point lies within h of it.
func circuit(f Field, centre, n r3.Vec, rad float64, samples int, h float64) r3.Vec {
	a := anyPerp(n)
	b := r3.Cross(n, a)
	var sum r3.Vec
	for k := range samples {
		phi := 2 * math.Pi * (float64(k) + 0.5) / float64(samples)
		p := r3.Add(centre, r3.Add(r3.Scale(rad*math.Cos(phi), a), r3.Scale(rad*math.Sin(phi), b)))
		t := r3.Add(r3.Scale(-math.Sin(phi), a), r3.Scale(math.Cos(phi), b))
		d := r3.Scale(1/(2*h), r3.Sub(f.R(r3.Add(p, r3.Scale(h, t))), f.R(r3.Sub(p, r3.Scale(h, t)))))
		sum = r3.Add(sum, r3.Scale(2*math.Pi*rad/float64(samples), d))
	}
	return sum
}

// anyPerp returns a unit vector perpendicular to the unit vector n.
func anyPerp(n r3.Vec) r3.Vec {
	a := r3.Vec{X: 1}
	if math.Abs(n.X) > 0.6 {
		a = r3.Vec{Y: 1}
	}
	return r3.Unit(r3.Sub(a, r3.Scale(r3.Dot(a, n), n)))
}

func randUnit(rng *rand.Rand) r3.Vec {
	for {
		v := r3.Vec{X: 2*rng.Float64() - 1, Y: 2*rng.Float64() - 1, Z: 2*rng.Float64() - 1}
		if n := r3.Norm(v); n > 0.2 && n < 1 {
			return r3.Scale(1/n, v)
		}
	}
}

func vecClose(a, b r3.Vec, tol float64) bool { return r3.Norm(r3.Sub(a, b)) <= tol }

// modB reduces d by the nearest integer multiple of b (the θ branch of a
// dislocation field is fixed only up to whole Burgers vectors).
func modB(d, b r3.Vec) r3.Vec {
	k := math.Round(r3.Dot(d, b) / r3.Norm2(b))
	return r3.Sub(d, r3.Scale(k, b))
}
