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
