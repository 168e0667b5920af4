package sim

import (
	"fmt"
	"math"
)

// MinBlurNm is the smallest non-zero blur accepted, nm: far below any
// resolution a micrograph has, and large enough that σ² cannot underflow
// at any pixel size a grid may have.
const MinBlurNm = 1e-3

// MaxBlurNm returns the largest blur accepted on grid g: a quarter of the
// larger side of the field. A Gaussian wider than that flattens the image
// towards its mean, showing nothing of the defects.
func MaxBlurNm(g Grid) float64 { return math.Max(g.WidthNm, g.HeightNm) / 4 }

// CheckBlur reports whether sigmaNm is a usable blur on grid g: 0 (none)
// or from MinBlurNm to MaxBlurNm(g). The error states the range; the
// caller names the field.
func CheckBlur(sigmaNm float64, g Grid) error {
	if sigmaNm == 0 {
		return nil
	}
	if hi := MaxBlurNm(g); !(sigmaNm >= MinBlurNm && sigmaNm <= hi) {
		return fmt.Errorf("%g nm: must be 0 (no blur) or from %g nm to %.4g nm (a quarter of the larger side of the field)", sigmaNm, MinBlurNm, hi)
	}
	return nil
}

// Blur convolves every beam of im in place with a Gaussian of standard
// deviation sigmaNm (nm), standing in for the finite resolution of a
// micrograph. The kernel is cut at 4σ, and at the size of the image (taps
// beyond it touch no pixel), and renormalised at the edges of the image, so
// a uniform image stays uniform. A blur outside CheckBlur's range is an
// error, found before anything is allocated.
func Blur(im *Image, sigmaNm float64) error {
	g := im.Grid
	if err := CheckBlur(sigmaNm, g); err != nil {
		return err
	}
	if sigmaNm == 0 {
		return nil
	}
	kx := gaussKernel(sigmaNm*float64(g.NX)/g.WidthNm, g.NX)
	ky := gaussKernel(sigmaNm*float64(g.NY)/g.HeightNm, g.NY)
	tmp := make([]float64, g.NX*g.NY)
	for _, plane := range im.Intensity {
		convolve(plane, tmp, g.NX, g.NY, 1, g.NX, kx)
		convolve(tmp, plane, g.NY, g.NX, g.NX, 1, ky)
	}
	return nil
}

// gaussKernel returns exp(−d²/2σ²) for d = −r…r, r = ⌈4σ⌉ but at most
// n − 1 (a line of n pixels has no farther neighbour).
func gaussKernel(sigmaPx float64, n int) []float64 {
	r := int(math.Min(math.Ceil(4*sigmaPx), float64(max(n-1, 0))))
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
