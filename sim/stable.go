package sim

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/dsp/fourier"
)

// The exit intensities tabulated in s: a Chebyshev series per column.
//
// Through a fixed sequence of steps (the recorded samples of a column),
// every exit intensity is an entire function of the excitation error s:
// each step's transfer matrix is the exponential of a matrix whose entries
// are polynomial in s. Such a function is approximated on an interval
// [sLo, sHi] by its Chebyshev interpolant p_N, whose coefficients decay
// faster than any geometric sequence (Trefethen 2013, Approximation Theory
// and Approximation Practice, ch. 8), and the interpolant is evaluated at
// any s of the interval by Clenshaw's recurrence (Clenshaw 1955, Math.
// Tables Aids Comput. 9, 118) in N multiply-adds per column and beam.
//
// TabulateS replays the samples of every column at the Chebyshev–Lobatto
// points s_j = (sLo+sHi)/2 + (sHi−sLo)/2 · cos(πj/N), j = 0…N (the
// interpolant's coefficients are then a discrete cosine transform of the
// values, Trefethen ch. 3), doubling N (which keeps the points already
// replayed) until, for EVERY column and beam, the tail of the coefficients
//
//	tail = 2 Σ_{k ≥ ⌈3N/4⌉} |c_k|
//
// is at most STableOptions.TailBound (DefaultSTableTail). The estimate is
// that of the aliasing bound |f − p_N| ≤ 2 Σ_{k>N} |a_k| (Trefethen ch. 4,
// Theorem 4.2), with the top quarter of the computed coefficients standing
// in for the unknown ones beyond N: for coefficients that decay
// geometrically or faster it exceeds them. It is an estimate, not a proof;
// TestSTableAgreesWithReplay measures the actual error against replays at
// random s. If the cap on N (STableOptions.MaxDegree) or on the memory is
// reached first, TabulateS returns an error and no table.
//
// Every column is replayed through the same steps at every point, so that
// the tabulated function is smooth: the recorded steps up to the exit
// surface, the slab the surface cuts taken over its part above it as
// Samples.Replay takes it (partSlab), each checked against the step
// control with the fastest beat of the models at sLo, the middle and sHi
// (for the two-beam and kinematical models the beat is convex in s, so
// that bounds it over the interval); a column whose recorded slabs fail
// is integrated afresh from the field once, recording its steps. Each
// point's replay checks every slab against its own model's beat where the
// edges' beats do not bound it, as Samples.Replay does, and a failure is
// an error.
//
// Memory: the build holds the values at the points, (N+1)·beams·8 bytes
// per column, and while doubling those of the previous set too; before
// each set the cap (STableOptions.MaxBytes) is checked against
// (2N+1)·beams·8 bytes per column, more than both. The table keeps the
// coefficients up to the last one that matters, L·beams·8 bytes per
// column. On the demo scene over s ± 0.01 /nm (two beams, N = 20): at
// most 512 bytes per column while building, 13 coefficients or 208 bytes
// per column kept (14 MB at 256²).

// DefaultSTableTail is the default bound on the tail of every column's
// and beam's Chebyshev coefficients, in units of the incident intensity.
const DefaultSTableTail = 1e-6

// DefaultSTableBytes is the default cap on the memory of a table's build.
const DefaultSTableBytes = 256 << 20

// Degrees of the Chebyshev interpolant: the first tried (N = 10, 20, 40,
// 80: 11, 21, 41, 81 replays), and the default cap. On the demo scene
// (t = 120 nm, s ± 0.01 /nm) the coefficients fall below 1e-7 from about
// the 13th on, so N = 20 meets the default bound.
const (
	minSTableDegree     = 10
	DefaultSTableDegree = 80
)

// ErrSTableRange is returned by STable.Image for an s outside the table.
var ErrSTableRange = errors.New("outside the tabulated s range")

// ErrSTableCap is returned by TabulateS when the tail does not fall below
// the bound within the cap on the degree or the memory.
var ErrSTableCap = errors.New("the Chebyshev tail does not meet the bound within the cap")

// STableOptions control TabulateS.
type STableOptions struct {
	Options
	// TailBound bounds the tail of every column's and beam's coefficients
	// (0: DefaultSTableTail).
	TailBound float64
	// MaxDegree caps N (0: DefaultSTableDegree); N doubles from 10.
	MaxDegree int
	// MaxBytes caps the memory of the build (0: DefaultSTableBytes).
	MaxBytes int64
	// Wait, if not nil, is called by every worker before each row it
	// replays and may block: the window holds a build there while it
	// renders what the user asked for. It must return once ctx is done.
	Wait func()
}

// STable holds every column's exit intensities as Chebyshev series in s
// over [sLo, sHi], at one thickness (see TabulateS).
type STable struct {
	p        Problem // the samples' problem at the table's thickness; Model is that at the middle
	model    func(s float64) Model
	lo, hi   float64
	nb       int       // beams
	n        int       // coefficients kept per column and beam
	coef     []float64 // ((j*NX+i)*nb + b)*n + k
	degree   int
	replays  int
	fresh    int
	tail     float64
	chopped  float64
	withFild bool
}

// Range returns the tabulated interval of s, 1/nm.
func (t *STable) Range() (lo, hi float64) { return t.lo, t.hi }

// ThicknessNm returns the thickness the table is for.
func (t *STable) ThicknessNm() float64 { return t.p.ThicknessNm }

// Degree returns N, the degree of the interpolant that met the bound.
func (t *STable) Degree() int { return t.degree }

// Replays returns the number of replays of the samples the build took
// (N+1).
func (t *STable) Replays() int { return t.replays }

// FreshColumns returns the number of columns whose recorded slabs did not
// serve the interval and were integrated afresh (once) for the table.
func (t *STable) FreshColumns() int { return t.fresh }

// ErrorEstimate returns the estimated largest error of the table against
// the function it interpolates (every column replayed through the table's
// fixed steps at the same s), in units of the incident intensity: the
// largest tail over columns and beams plus the largest sum of the
// coefficients dropped after the fit (the latter a bound, the former an
// estimate). Those steps are the ones Samples.Replay takes when none is
// integrated afresh (TestSTableAgreesWithReplay: within 1e-5 of a replay,
// measured up to 7e-7 on the demo scenes).
func (t *STable) ErrorEstimate() float64 { return t.tail + t.chopped }

// Bytes returns the memory the table holds.
func (t *STable) Bytes() int64 { return int64(len(t.coef)) * 8 }

// Coefficients returns the number of coefficients kept per column and
// beam.
func (t *STable) Coefficients() int { return t.n }

// Serves reports whether Image(s) renders p: the samples' field, g, foil
// normal, grid and tolerance, the table's thickness, s inside the range
// and p's model the table's model at s.
func (t *STable) Serves(p *Problem, s float64) bool {
	return s >= t.lo && s <= t.hi && SameBesidesModel(p, &t.p) && reflect.DeepEqual(p.Model, t.model(s))
}

// SameBesidesModel reports whether p and q differ at most in their models:
// the same field value (see Samples.Serves), g, foil normal, grid,
// tolerance and thickness.
func SameBesidesModel(p, q *Problem) bool {
	return sameFrame(p, q) && p.ThicknessNm == q.ThicknessNm && sameField(p.Field, q.Field)
}

// TabulateS builds the table of the exit intensities of every column for
// s in [sLo, sHi] and thickness thicknessNm (at most the samples'), with
// model(s) the model at s (which must differ from model(s') in s alone and
// have the same beams), from the samples s. See the comment above for the
// method, its error estimate and its memory.
func TabulateS(ctx context.Context, smp *Samples, model func(s float64) Model, sLo, sHi, thicknessNm float64, opt STableOptions) (*STable, error) {
	if smp == nil {
		return nil, errors.New("s table: no samples")
	}
	if math.IsNaN(sLo) || math.IsNaN(sHi) || math.IsInf(sLo, 0) || math.IsInf(sHi, 0) || !(sHi > sLo) {
		return nil, fmt.Errorf("s table: range [%g, %g] /nm: must be finite with sLo < sHi", sLo, sHi)
	}
	if !(thicknessNm > 0) || thicknessNm > smp.p.ThicknessNm*(1+1e-12) {
		return nil, fmt.Errorf("s table: thickness %g nm: %w (recorded up to %g nm)", thicknessNm, ErrReplayRange, smp.p.ThicknessNm)
	}
	bound := opt.TailBound
	if bound <= 0 {
		bound = DefaultSTableTail
	}
	maxDeg := opt.MaxDegree
	if maxDeg <= 0 {
		maxDeg = DefaultSTableDegree
	}
	limit := opt.MaxBytes
	if limit <= 0 {
		limit = DefaultSTableBytes
	}
	mid := (sLo + sHi) / 2
	edge := []Model{model(sLo), model(mid), model(sHi)}
	nb := len(edge[1].Beams())
	for _, m := range edge {
		if err := m.Validate(); err != nil {
			return nil, fmt.Errorf("s table: model %s: %w", m.Name(), err)
		}
		if len(m.Beams()) != nb {
			return nil, errors.New("s table: the models at the ends of the range follow different beams")
		}
	}
	p := smp.p
	p.ThicknessNm = thicknessNm
	p.Model = edge[1]
	g := p.Grid
	cols := g.NX * g.NY
	sAt := func(j, n int) float64 { return mid + (sHi-sLo)/2*math.Cos(math.Pi*float64(j)/float64(n)) }

	var vals []float64 // ((pix*nb + b)*(n+1) + j
	var fresh atomic.Int64
	n, replays := minSTableDegree, 0
	for {
		if need := int64(cols) * int64(nb) * int64(2*n+1) * 8; need > limit {
			return nil, fmt.Errorf("s table: %d points would take %d bytes (%d per column), above the cap of %d: %w",
				n+1, need, need/int64(cols), limit, ErrSTableCap)
		}
		// The points to replay: all of them at first, then the odd ones
		// of the doubled set, the even ones being the previous points.
		next := make([]float64, cols*nb*(n+1))
		var todo []int
		if vals == nil {
			for j := 0; j <= n; j++ {
				todo = append(todo, j)
			}
		} else {
			for q := 0; q < cols*nb; q++ {
				old, now := vals[q*(n/2+1):(q+1)*(n/2+1)], next[q*(n+1):(q+1)*(n+1)]
				for j, v := range old {
					now[2*j] = v
				}
			}
			for j := 1; j < n; j += 2 {
				todo = append(todo, j)
			}
		}
		vals = next
		models := make([]Model, len(todo))
		check := make([]bool, len(todo))
		for k, j := range todo {
			models[k] = model(sAt(j, n))
			// The fixed steps pass the step control with the edges'
			// beats; a point's own beat needs checking only where it is
			// not bounded by them (beatWithin, as Samples.Replay).
			check[k] = !beatWithin(models[k], edge)
		}
		// Slabs recorded with systematic rows serve the edges unchecked
		// if those are rows too (beatWithin).
		checkFixed := !(rowsOnly(edge) && rowsOnly(smp.models))
		fresh.Store(0)
		var failed error
		var failOnce sync.Once
		rctx, cancel := context.WithCancel(ctx)
		err := rowPool(rctx, 0, g.NY, opt.Options, func() func(j int) {
			prep := newColumn(&p, smp.phase)
			prep.st = edge[0].NewStepper()
			prep.also = []Stepper{edge[1].NewStepper(), edge[2].NewStepper()}
			sts := make([]Stepper, len(models))
			for k, m := range models {
				sts[k] = m.NewStepper()
			}
			psi := make([]complex128, nb)
			out := make([]float64, nb)
			var steps []step
			return func(j int) {
				if opt.Wait != nil {
					opt.Wait()
				}
				y := g.Y(j)
				row, st := smp.rows[j], smp.starts[j]
				for i := 0; i < g.NX; i++ {
					var ok bool
					steps, ok = prep.fixedSteps(g.X(i), y, row[st[i]:st[i+1]], smp.gamma0[j*g.NX+i], steps, checkFixed)
					if !ok {
						fresh.Add(1)
					}
					pix := j*g.NX + i
					for k, s := range sts {
						if !applySteps(s, psi, steps, prep.tol, check[k]) {
							failOnce.Do(func() {
								failed = fmt.Errorf("s table: column (%d, %d): a slab fails the step control at s = %g /nm: %w",
									i, j, sAt(todo[k], n), ErrReplayRange)
								cancel()
							})
							return
						}
						s.Intensities(psi, out)
						for b := 0; b < nb; b++ {
							vals[(pix*nb+b)*(n+1)+todo[k]] = out[b]
						}
					}
				}
			}
		})
		cancel()
		if failed != nil {
			return nil, failed
		}
		if err != nil {
			return nil, err
		}
		replays += len(todo)
		for _, v := range vals {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, errors.New("s table: a replay gave a non-finite intensity")
			}
		}
		tail := chebTails(vals, cols*nb, n, false)
		if tail <= bound {
			chebTails(vals, cols*nb, n, true) // values to coefficients, in place
			t := &STable{p: p, model: model, lo: sLo, hi: sHi, nb: nb, degree: n, replays: replays,
				fresh: int(fresh.Load()), tail: tail, withFild: p.Field != nil}
			t.chop(vals, n+1, bound)
			return t, nil
		}
		if 2*n > maxDeg {
			return nil, fmt.Errorf("s table: after %d replays (N = %d) the largest tail is %.2g, above the bound %.2g: %w",
				replays, n, tail, bound, ErrSTableCap)
		}
		n *= 2
	}
}

// chebTails turns each of the m sequences of n+1 values at the
// Chebyshev–Lobatto points cos(πj/n) in vals into the coefficients of
// their interpolant (Trefethen 2013, ch. 3: c_k = (2/n) Σ″ f_j cos(πjk/n),
// the end terms and c_0, c_n halved) and returns the largest tail
// 2 Σ_{k ≥ ⌈3n/4⌉} |c_k|. With inPlace the coefficients replace the
// values; otherwise vals is left as it was.
func chebTails(vals []float64, m, n int, inPlace bool) float64 {
	dct := fourier.NewDCT(n + 1)
	c := make([]float64, n+1)
	from := (3*n + 3) / 4
	worst := 0.0
	for q := 0; q < m; q++ {
		v := vals[q*(n+1) : (q+1)*(n+1)]
		dct.Transform(c, v) // c_k·n, c_0 and c_n twice over
		c[0] /= 2
		c[n] /= 2
		tail := 0.0
		for k := range c {
			c[k] /= float64(n)
			if k >= from {
				tail += math.Abs(c[k])
			}
		}
		worst = math.Max(worst, 2*tail)
		if inPlace {
			copy(v, c)
		}
	}
	return worst
}

// chop keeps of the coefficients (m per column and beam, in vals) the
// first L, the smallest for which the largest sum of the dropped ones over
// columns and beams is at most bound, and records that sum.
func (t *STable) chop(vals []float64, m int, bound float64) {
	q := len(vals) / m
	// dropped[L] = max over series of Σ_{k ≥ L} |c_k|.
	dropped := make([]float64, m+1)
	for s := 0; s < q; s++ {
		c := vals[s*m : (s+1)*m]
		sum := 0.0
		for k := m - 1; k >= 0; k-- {
			sum += math.Abs(c[k])
			dropped[k] = math.Max(dropped[k], sum)
		}
	}
	l := m
	for l > 1 && dropped[l-1] <= bound {
		l--
	}
	t.n = l
	t.chopped = dropped[l]
	if l == m {
		t.coef = vals
		return
	}
	t.coef = make([]float64, q*l)
	for s := 0; s < q; s++ {
		copy(t.coef[s*l:(s+1)*l], vals[s*m:s*m+l])
	}
}

// Image evaluates the table at s (inside the range) by Clenshaw's
// recurrence (Clenshaw 1955) for every column and beam.
func (t *STable) Image(ctx context.Context, s float64, opt Options) (*Image, error) {
	if math.IsNaN(s) || s < t.lo || s > t.hi {
		return nil, fmt.Errorf("s = %g /nm: %w [%g, %g] /nm", s, ErrSTableRange, t.lo, t.hi)
	}
	p := t.p
	p.Model = t.model(s)
	im := newImage(&p)
	x := (2*s - (t.lo + t.hi)) / (t.hi - t.lo)
	g := p.Grid
	nb, n := t.nb, t.n
	err := rowPool(ctx, 0, g.NY, opt, func() func(j int) {
		var out [4]float64
		return func(j int) {
			// The row's series are contiguous: four at a time, so that
			// their recurrences overlap (each is a chain of dependent
			// multiply-adds).
			m0, m1 := j*g.NX*nb, (j+1)*g.NX*nb
			m := m0
			for ; m+4 <= m1; m += 4 {
				clenshaw4(t.coef[m*n:(m+4)*n], n, x, &out)
				for r := 0; r < 4; r++ {
					im.Intensity[(m+r)%nb][(m+r)/nb] = out[r]
				}
			}
			for ; m < m1; m++ {
				im.Intensity[m%nb][m/nb] = clenshaw(t.coef[m*n:(m+1)*n], x)
			}
		}
	})
	if err != nil {
		return nil, err
	}
	if err := im.checkFinite(t.withFild); err != nil {
		return nil, err
	}
	return im, nil
}

// clenshaw returns Σ c_k T_k(x) by Clenshaw's recurrence (Clenshaw 1955):
// b_k = c_k + 2x b_{k+1} − b_{k+2}, sum = c_0 + x b_1 − b_2.
func clenshaw(c []float64, x float64) float64 {
	var b1, b2 float64
	for k := len(c) - 1; k >= 1; k-- {
		b1, b2 = c[k]+2*x*b1-b2, b1
	}
	return c[0] + x*b1 - b2
}

// clenshaw4 is clenshaw for the four series of n coefficients each that
// follow each other in c, written to out.
func clenshaw4(c []float64, n int, x float64, out *[4]float64) {
	c0, c1, c2, c3 := c[:n], c[n:2*n], c[2*n:3*n], c[3*n:4*n]
	var a1, a2, b1, b2, d1, d2, e1, e2 float64
	x2 := 2 * x
	for k := n - 1; k >= 1; k-- {
		a1, a2 = c0[k]+x2*a1-a2, a1
		b1, b2 = c1[k]+x2*b1-b2, b1
		d1, d2 = c2[k]+x2*d1-d2, d1
		e1, e2 = c3[k]+x2*e1-e2, e1
	}
	out[0] = c0[0] + x*a1 - a2
	out[1] = c1[0] + x*b1 - b2
	out[2] = c2[0] + x*d1 - d2
	out[3] = c3[0] + x*e1 - e2
}

// fixedSteps writes into dst, and returns, the steps of the column through
// (x, y) from the entrance to the exit surface of c's problem that serve
// every model of the table's range (see the comment above): the recorded
// steps, the one the exit surface cuts by partSlab, when each passes the
// step control with c's fastest beat (or unchecked, check false, when
// they are known to pass it); otherwise the whole column integrated
// afresh (ok false).
func (c *column) fixedSteps(x, y float64, rec []step, gamma0 float64, dst []step, check bool) (out []step, ok bool) {
	c.x, c.y = x, y
	z, zEnd := c.p.surfaces(x, y)
	gam := gamma0
	dst = dst[:0]
	c.st.Start(c.psi)
	for _, o := range rec {
		if z >= zEnd-1e-12 {
			break
		}
		switch {
		case o.h == 0:
			dst = append(dst, o)
			gam += o.rise
		case o.d1 != o.d1: // NaN: vacuum
			dst = append(dst, step{h: math.Min(o.h, zEnd-z), d1: o.d1})
			z = math.Min(z+o.h, zEnd)
		default:
			if z+o.h > zEnd+1e-12 {
				// The exit surface cuts this slab: its part above the
				// surface, as Samples.Replay takes it (partSlab).
				h, rise, d1, d2 := partSlab(o.h, o.rise, float64(o.d1), float64(o.d2), (zEnd-z)/o.h)
				o = step{h: h, rise: rise, d1: float32(d1), d2: float32(d2)}
			}
			slope := o.rise / o.h
			if check && !accept(indicator(float64(o.d1), float64(o.d2), c.beat(slope)*o.h), c.tol, o.h) {
				return c.afresh(x, y, dst)
			}
			dst = append(dst, o)
			z += o.h
			gam += o.rise
		}
	}
	return dst, true
}

// afresh integrates the column through (x, y) from the field, recording
// its steps into dst.
func (c *column) afresh(x, y float64, dst []step) ([]step, bool) {
	c.rec = &recorder{steps: dst[:0]}
	c.run(x, y)
	dst = c.rec.steps
	c.rec = nil
	return dst, false
}

// stableSlack is the relative slack of the step control when a point of
// the table replays a slab: the departures are stored in float32.
const stableSlack = 1e-6

// applySteps integrates psi through steps with st, from the entrance, and
// with check reports false if a slab fails the step control with st's
// beat.
func applySteps(st Stepper, psi []complex128, steps []step, tol float64, check bool) bool {
	st.Start(psi)
	for _, o := range steps {
		switch {
		case o.h == 0:
			st.Shift(psi, o.rise)
		case o.d1 != o.d1:
			st.Vacuum(psi, o.h)
		default:
			d1, d2 := float64(o.d1), float64(o.d2)
			slope := o.rise / o.h
			if check && !accept(indicator(d1, d2, st.Beat(slope)*o.h), tol*(1+stableSlack), o.h) {
				return false
			}
			st.Crystal(psi, o.h, slope, d1, d2)
		}
	}
	return true
}
