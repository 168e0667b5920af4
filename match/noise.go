package match

import "math"

// scoreError estimates the standard error of the normalised correlation r
// between a and b over their common pixels: Fisher's large-sample
// standard error of a correlation coefficient, (1 − r²)/sqrt(N − 1)
// (Fisher 1915, Biometrika 10, 507), with N the effective number of
// independent pixels. Neighbouring pixels of a micrograph are not
// independent (blur, detector spread), so N is the pixel count reduced by
// the lag-one autocorrelation ρ of the residual a − (p b + q) along each
// axis, N_eff = N (1 − ρx)/(1 + ρx) · (1 − ρy)/(1 + ρy), the usual
// effective sample size of a first-order autoregressive series (Bretherton
// et al. 1999, J. Climate 12, 1990).
func scoreError(a, b *Raster, r float64) float64 {
	// Least-squares gain and offset of a on b over the common pixels.
	var n, sa, sb, sbb, sab float64
	for k, x := range a.Pix {
		y := b.Pix[k]
		if math.IsNaN(x) || math.IsNaN(y) {
			continue
		}
		n++
		sa += x
		sb += y
		sbb += y * y
		sab += x * y
	}
	if n < 3 {
		return math.Inf(1)
	}
	vb := sbb - sb*sb/n
	p := 0.0
	if vb > 0 {
		p = (sab - sa*sb/n) / vb
	}
	q := (sa - p*sb) / n
	res := make([]float64, len(a.Pix))
	for k, x := range a.Pix {
		y := b.Pix[k]
		if math.IsNaN(x) || math.IsNaN(y) {
			res[k] = math.NaN()
			continue
		}
		res[k] = x - p*y - q
	}
	rho := func(dx, dy int) float64 {
		var s0, s1 float64
		for j := 0; j+dy < a.H; j++ {
			for i := 0; i+dx < a.W; i++ {
				u, v := res[j*a.W+i], res[(j+dy)*a.W+i+dx]
				if math.IsNaN(u) || math.IsNaN(v) {
					continue
				}
				s0 += u * u
				s1 += u * v
			}
		}
		if s0 == 0 {
			return 0
		}
		return math.Max(0, math.Min(0.99, s1/s0))
	}
	rx, ry := rho(1, 0), rho(0, 1)
	neff := n * (1 - rx) / (1 + rx) * (1 - ry) / (1 + ry)
	if neff < 3 {
		neff = 3
	}
	return (1 - r*r) / math.Sqrt(neff-1)
}

// NoiseSigma estimates the standard deviation of white noise in r by the
// method of Immerkær (1996, "Fast noise variance estimation", Computer
// Vision and Image Understanding 64, 300): the mean absolute response to
// the difference of two Laplacians,
//
//	N = [1 −2 1; −2 4 −2; 1 −2 1],  σ = sqrt(π/2) Σ|r ∗ N| / (6 (W−2)(H−2)),
//
// which cancels smooth image structure to second order. Pixels next to
// missing data are skipped. It returns NaN for a raster under 3 × 3.
func NoiseSigma(r *Raster) float64 {
	var s float64
	n := 0
	for j := 1; j+1 < r.H; j++ {
		for i := 1; i+1 < r.W; i++ {
			at := func(di, dj int) float64 { return r.Pix[(j+dj)*r.W+i+di] }
			v := at(-1, -1) - 2*at(0, -1) + at(1, -1) -
				2*at(-1, 0) + 4*at(0, 0) - 2*at(1, 0) +
				at(-1, 1) - 2*at(0, 1) + at(1, 1)
			if math.IsNaN(v) {
				continue
			}
			s += math.Abs(v)
			n++
		}
	}
	if n == 0 {
		return math.NaN()
	}
	return math.Sqrt(math.Pi/2) * s / (6 * float64(n))
}

// flatScore scores a simulation without contrast against the micrograph m:
// such a simulation predicts that m holds noise alone, so the score is the
// fraction of m's variance that its noise explains, σ²/var(m) (at most 1):
// 1 for a featureless micrograph, near 0 for one with strong contrast. On
// the scale of the normalised correlation this is 1 − r_max², r_max the
// best correlation any image could reach against m's noise. Its standard
// error is taken as that of a correlation with r² = 1 − score (Fisher).
func flatScore(m *Raster) (score, stderr float64) {
	sigma := NoiseSigma(m)
	var s, ss float64
	n := 0
	for _, x := range m.Pix {
		if math.IsNaN(x) {
			continue
		}
		s += x
		ss += x * x
		n++
	}
	if n < 3 || math.IsNaN(sigma) {
		return 0, math.Inf(1)
	}
	v := (ss - s*s/float64(n)) / float64(n-1)
	if v <= 0 {
		return 1, 0
	}
	score = math.Min(1, sigma*sigma/v)
	return score, score / math.Sqrt(float64(n-1))
}
