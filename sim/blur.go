package sim

import "math"

// Blur convolves every beam of im in place with a Gaussian of standard
// deviation sigmaNm (nm), standing in for the finite resolution of a
// micrograph. The kernel is cut at 4σ and renormalised at the edges of the
// image, so a uniform image stays uniform.
func Blur(im *Image, sigmaNm float64) {
	if !(sigmaNm > 0) {
		return
	}
	g := im.Grid
	kx := gaussKernel(sigmaNm * float64(g.NX) / g.WidthNm)
	ky := gaussKernel(sigmaNm * float64(g.NY) / g.HeightNm)
	tmp := make([]float64, g.NX*g.NY)
	for _, plane := range im.Intensity {
		convolve(plane, tmp, g.NX, g.NY, 1, g.NX, kx)
		convolve(tmp, plane, g.NY, g.NX, g.NX, 1, ky)
	}
}

func gaussKernel(sigmaPx float64) []float64 {
	r := int(math.Ceil(4 * sigmaPx))
	k := make([]float64, 2*r+1)
	for i := range k {
		d := float64(i - r)
		k[i] = math.Exp(-d * d / (2 * sigmaPx * sigmaPx))
	}
	return k
}

// convolve filters src into dst along lines of length n (stride step),
// there being m lines (stride lineStep), with edge renormalisation.
func convolve(src, dst []float64, n, m, step, lineStep int, k []float64) {
	r := len(k) / 2
	for l := 0; l < m; l++ {
		base := l * lineStep
		for i := 0; i < n; i++ {
			var s, w float64
			for j := -r; j <= r; j++ {
				ii := i + j
				if ii < 0 || ii >= n {
					continue
				}
				s += k[j+r] * src[base+ii*step]
				w += k[j+r]
			}
			dst[base+i*step] = s / w
		}
	}
}
