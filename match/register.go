package match

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Score is the zero-mean normalised cross-correlation of a and b over the
// pixels where both hold data:
//
//	r = Σ (a − ā)(b − b̄) / sqrt(Σ (a − ā)² Σ (b − b̄)²),
//
// with the means taken over those pixels. r lies in [−1, 1]; it is 1 for
// b = p·a + q with any gain p > 0 and offset q, so a micrograph's
// brightness and contrast settings do not change it. roi, if not nil,
// restricts the sum to pixels where roi is true (indexed like a.Pix).
// a and b must have the same size. It returns the number of pixels used.
func Score(a, b *Raster, roi []bool) (r float64, n int) {
	var sa, sb, saa, sbb, sab float64
	for k, x := range a.Pix {
		y := b.Pix[k]
		if math.IsNaN(x) || math.IsNaN(y) || (roi != nil && !roi[k]) {
			continue
		}
		n++
		sa += x
		sb += y
		saa += x * x
		sbb += y * y
		sab += x * y
	}
	return zncc(float64(n), sa, sb, saa, sbb, sab), n
}

// zncc is the normalised correlation from the five sums over N pixels.
// A flat image (no variance) correlates with nothing: 0.
func zncc(n, sa, sb, saa, sbb, sab float64) float64 {
	if n < 2 {
		return 0
	}
	va := saa - sa*sa/n
	vb := sbb - sb*sb/n
	// Variances below the rounding of their sums are zero.
	if va <= 1e-12*saa || vb <= 1e-12*sbb || va <= 0 || vb <= 0 {
		return 0
	}
	r := (sab - sa*sb/n) / math.Sqrt(va*vb)
	return math.Max(-1, math.Min(1, r))
}

// Shift is the placement found by Register: the moving image's pixel (0, 0)
// lies at (DX, DY) in the fixed image's pixels.
type Shift struct {
	DX, DY  float64 // sub-pixel estimate
	IX, IY  int     // integer peak
	Score   float64 // the normalised correlation at the integer peak
	Overlap int     // pixels in the overlap there
}

// ErrNoOverlap is returned when no allowed shift overlaps enough pixels.
var ErrNoOverlap = errors.New("the images do not overlap enough to be compared")

// RegisterOptions bound the search.
type RegisterOptions struct {
	// MinOverlap is the smallest overlap, as a fraction of the smaller
	// image's valid pixels, at which a shift is considered (default 0.5):
	// a correlation over a sliver of the images means little.
	MinOverlap float64
	// MaxShiftPx, if positive, bounds |DX| and |DY| relative to the
	// placement that centres the moving image on the fixed one.
	MaxShiftPx int
}

// Register finds the translation of mov that best matches fixed: the
// normalised cross-correlation (see Score) over the overlap, for every
// integer shift at once, by the masked Fourier-domain method of Padfield
// (2012, "Masked object registration in the Fourier domain", IEEE Trans.
// Image Process. 21, 2706): six correlations of the images, their squares
// and their masks give, for every shift u, the overlap N(u) and the sums
// Σa, Σb, Σa², Σb², Σab over it, each by FFT. NaN pixels are masked out.
// The peak is refined to sub-pixel by a parabola through its neighbours.
func Register(fixed, mov *Raster, opt RegisterOptions) (Shift, error) {
	if opt.MinOverlap <= 0 {
		opt.MinOverlap = 0.5
	}
	pw := goodSize(fixed.W + mov.W - 1)
	ph := goodSize(fixed.H + mov.H - 1)
	f, f2, mf, nf := planes(fixed, pw, ph)
	g, g2, mg, ng := planes(mov, pw, ph)
	if nf < 2 || ng < 2 {
		return Shift{}, ErrNoOverlap
	}
	t := newFFT2(pw, ph)
	F, F2, MF := t.forward(f), t.forward(f2), t.forward(mf)
	G, G2, MG := t.forward(g), t.forward(g2), t.forward(mg)
	N := t.corr(MF, MG)
	SA := t.corr(F, MG)
	SB := t.corr(MF, G)
	SAA := t.corr(F2, MG)
	SBB := t.corr(MF, G2)
	SAB := t.corr(F, G)

	minN := opt.MinOverlap * float64(min(nf, ng))
	cx := float64(fixed.W-mov.W) / 2
	cy := float64(fixed.H-mov.H) / 2
	best := Shift{Score: math.Inf(-1)}
	score := make([]float64, pw*ph)
	for k := range score {
		score[k] = math.NaN()
	}
	for v := 0; v < ph; v++ {
		dy := v
		if v > ph-mov.H {
			dy = v - ph
		}
		if dy > fixed.H-1 || dy < -(mov.H-1) {
			continue
		}
		for u := 0; u < pw; u++ {
			dx := u
			if u > pw-mov.W {
				dx = u - pw
			}
			if dx > fixed.W-1 || dx < -(mov.W-1) {
				continue
			}
			if opt.MaxShiftPx > 0 && (math.Abs(float64(dx)-cx) > float64(opt.MaxShiftPx) || math.Abs(float64(dy)-cy) > float64(opt.MaxShiftPx)) {
				continue
			}
			k := v*pw + u
			n := math.Round(N[k])
			if n < minN {
				continue
			}
			s := zncc(n, SA[k], SB[k], SAA[k], SBB[k], SAB[k])
			score[k] = s
			if s > best.Score {
				best = Shift{IX: dx, IY: dy, Score: s, Overlap: int(n)}
			}
		}
	}
	if math.IsInf(best.Score, -1) {
		return Shift{}, ErrNoOverlap
	}
	at := func(dx, dy int) float64 {
		u, v := (dx+pw)%pw, (dy+ph)%ph
		return score[v*pw+u]
	}
	best.DX = float64(best.IX) + parabolicPeak(at(best.IX-1, best.IY), best.Score, at(best.IX+1, best.IY))
	best.DY = float64(best.IY) + parabolicPeak(at(best.IX, best.IY-1), best.Score, at(best.IX, best.IY+1))
	return best, nil
}

// parabolicPeak returns the offset in (−½, ½) of the vertex of the parabola
// through (−1, a), (0, b), (1, c); 0 if a neighbour is missing or b is not
// a maximum.
func parabolicPeak(a, b, c float64) float64 {
	d := a - 2*b + c
	if math.IsNaN(a) || math.IsNaN(c) || d >= 0 {
		return 0
	}
	return math.Max(-0.5, math.Min(0.5, 0.5*(a-c)/d))
}

// planes returns the image, its square and its mask zero-padded to pw × ph,
// and the number of valid pixels.
func planes(r *Raster, pw, ph int) (a, a2, m []float64, n int) {
	a = make([]float64, pw*ph)
	a2 = make([]float64, pw*ph)
	m = make([]float64, pw*ph)
	for j := 0; j < r.H; j++ {
		for i := 0; i < r.W; i++ {
			x := r.Pix[j*r.W+i]
			if math.IsNaN(x) {
				continue
			}
			k := j*pw + i
			a[k], a2[k], m[k] = x, x*x, 1
			n++
		}
	}
	return a, a2, m, n
}

// goodSize returns the smallest n' ≥ n whose prime factors are 2, 3 and 5,
// sizes the FFT handles fastest.
func goodSize(n int) int {
	for m := n; ; m++ {
		k := m
		for _, p := range []int{2, 3, 5} {
			for k%p == 0 {
				k /= p
			}
		}
		if k == 1 {
			return m
		}
	}
}

// fft2 is a two-dimensional complex FFT by rows then columns (gonum's
// one-dimensional transforms).
type fft2 struct {
	w, h       int
	row, col   *fourier.CmplxFFT
	colBuf     []complex128
	colBufOut  []complex128
	normFactor float64
}

func newFFT2(w, h int) *fft2 {
	return &fft2{w: w, h: h, row: fourier.NewCmplxFFT(w), col: fourier.NewCmplxFFT(h),
		colBuf: make([]complex128, h), colBufOut: make([]complex128, h), normFactor: 1 / float64(w*h)}
}

func (t *fft2) forward(a []float64) []complex128 {
	c := make([]complex128, len(a))
	for k, x := range a {
		c[k] = complex(x, 0)
	}
	t.transform(c, false)
	return c
}

func (t *fft2) transform(c []complex128, inverse bool) {
	for j := 0; j < t.h; j++ {
		r := c[j*t.w : (j+1)*t.w]
		if inverse {
			t.row.Sequence(r, r)
		} else {
			t.row.Coefficients(r, r)
		}
	}
	for i := 0; i < t.w; i++ {
		for j := 0; j < t.h; j++ {
			t.colBuf[j] = c[j*t.w+i]
		}
		if inverse {
			t.col.Sequence(t.colBuf, t.colBuf)
		} else {
			t.col.Coefficients(t.colBuf, t.colBuf)
		}
		for j := 0; j < t.h; j++ {
			c[j*t.w+i] = t.colBuf[j]
		}
	}
}

// corr returns c(u) = Σ_x a(x) b(x − u) for every (cyclic) shift u, from
// the transforms A and B: C = A·conj(B).
func (t *fft2) corr(A, B []complex128) []float64 {
	c := make([]complex128, len(A))
	for k := range A {
		b := B[k]
		c[k] = A[k] * complex(real(b), -imag(b))
	}
	t.transform(c, true)
	out := make([]float64, len(c))
	for k, v := range c {
		out[k] = real(v) * t.normFactor
	}
	return out
}
