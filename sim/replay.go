package sim

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"
)

// Replay: the field samples of a render, reused when only the conditions
// change.
//
// Everything the column integrator takes from the displacement field is,
// per column, a sequence of steps: slabs (length h, chord rise of g·R,
// departures d1 and d2 at the Gauss nodes), jumps of g·R, and stretches of
// vacuum. None of them depends on the model's constants (s, ξ_g,
// absorption, the number of beams) nor on the exit surface beyond the
// depth reached. Record keeps them; Samples.Replay integrates every column
// again through the same steps with another model and a thickness up to
// the recorded one, without evaluating the field. Each replayed slab is
// checked against the step control's criterion with the new model's beat
// (the departures are the same, the beat is not), unless the new model's
// beat is nowhere above the beat the slabs were recorded with (beatWithin;
// the indicator grows with the beat, so those slabs pass); a column with
// a slab that fails it is integrated afresh from the field. The slab that
// the exit surface cuts is integrated over its part above the surface
// with g·R interpolated by the cubic through the slab's four samples (its
// ends and its Gauss nodes, the samples the step itself uses), so a replay
// is as accurate as a fresh render (TestReplayAgreesWithRender: within
// 1e-4 of the incident beam).
//
// Memory: one step is stepBytes (24) bytes; a column of the demo scene
// takes about 25 steps, so about 0.6 kB per column, 40 MB at 256², 160 MB
// at 512². RecordOptions.MaxBytes caps it (DefaultSamplesBytes).

// DefaultSamplesBytes is the default cap on the memory of recorded samples.
const DefaultSamplesBytes = 256 << 20

// stepBytes is the size of one recorded step.
const stepBytes = 24

// ErrReplayRange is returned by Replay for a thickness beyond the recorded
// one or a model that cannot be used.
var ErrReplayRange = errors.New("outside the recorded range")

// step is one recorded step of a column. A slab has h > 0 and d1, d2
// finite; a jump has h = 0 and rise the jump of g·R; vacuum has h > 0 and
// d1 NaN.
type step struct {
	h, rise float64
	d1, d2  float32
}

// recorder collects the steps of one column; a nil recorder records
// nothing.
type recorder struct {
	steps  []step
	gamma0 float64
}

func (r *recorder) begin(g float64) {
	if r != nil {
		r.gamma0 = g
	}
}

func (r *recorder) slab(h, rise, d1, d2 float64) {
	if r != nil {
		r.steps = append(r.steps, step{h: h, rise: rise, d1: float32(d1), d2: float32(d2)})
	}
}

func (r *recorder) shift(dg float64) {
	if r != nil {
		r.steps = append(r.steps, step{rise: dg})
	}
}

func (r *recorder) vacuum(h float64) {
	if r != nil {
		r.steps = append(r.steps, step{h: h, d1: float32(math.NaN())})
	}
}

// RecordOptions control Record.
type RecordOptions struct {
	Options
	// MaxThicknessNm is the thickness up to which the samples reach, so
	// that Replay serves any thickness up to it; 0 means the problem's.
	MaxThicknessNm float64
	// Also lists further models the slabs must serve: their beats also
	// limit the slab lengths, so a replay with any of them (or one
	// between them) rarely falls back to a fresh column.
	Also []Model
	// MaxBytes caps the memory of the samples (0: DefaultSamplesBytes).
	MaxBytes int64
}

// Samples are the recorded steps of every column of a render (see Record).
type Samples struct {
	p      Problem              // the recorded problem, ThicknessNm the recorded one
	phase  func(r3.Vec) float64 // g·R of the field, shared by the replays
	rows   [][]step
	starts [][]int32 // per row, the first step of each column and the end
	gamma0 []float64
	bytes  int64
	// models are the models whose beats limited the recorded slabs.
	models []Model
}

// Bytes returns the memory the samples hold.
func (s *Samples) Bytes() int64 { return s.bytes }

// MaxThicknessNm returns the largest thickness Replay serves.
func (s *Samples) MaxThicknessNm() float64 { return s.p.ThicknessNm }

// Record renders p like Render and keeps every column's steps for Replay.
// It returns the image and the samples; when the samples would need more
// than the cap, it returns the image of a plain render and nil samples.
func Record(ctx context.Context, p *Problem, opt RecordOptions) (*Image, *Samples, error) {
	if err := p.Validate(); err != nil {
		return nil, nil, err
	}
	for _, m := range opt.Also {
		if err := m.Validate(); err != nil {
			return nil, nil, fmt.Errorf("model %s: %w", m.Name(), err)
		}
	}
	rp := *p
	if opt.MaxThicknessNm > rp.ThicknessNm {
		rp.ThicknessNm = opt.MaxThicknessNm
	}
	limit := opt.MaxBytes
	if limit <= 0 {
		limit = DefaultSamplesBytes
	}
	g := rp.Grid
	s := &Samples{p: rp, rows: make([][]step, g.NY), starts: make([][]int32, g.NY), gamma0: make([]float64, g.NX*g.NY)}
	phase := rp.phase()
	im := newImage(&rp)
	var used atomic.Int64
	rctx, cancel := context.WithCancel(ctx)
	defer cancel()
	over := false
	err := rowPool(rctx, 0, g.NY, opt.Options, func() func(j int) {
		c := newColumn(&rp, phase)
		c.rec = &recorder{}
		for _, m := range opt.Also {
			c.also = append(c.also, m.NewStepper())
		}
		return func(j int) {
			y := g.Y(j)
			c.rec.steps = c.rec.steps[:0]
			st := make([]int32, g.NX+1)
			for i := 0; i < g.NX; i++ {
				st[i] = int32(len(c.rec.steps))
				c.run(g.X(i), y)
				s.gamma0[j*g.NX+i] = c.rec.gamma0
				im.set(i, j, c.out)
			}
			st[g.NX] = int32(len(c.rec.steps))
			s.rows[j] = append([]step(nil), c.rec.steps...)
			s.starts[j] = st
			if used.Add(int64(len(c.rec.steps))*stepBytes+int64(g.NX)*12) > limit {
				cancel()
			}
		}
	})
	if err != nil && ctx.Err() == nil || used.Load() > limit {
		over = true
	} else if err != nil {
		return nil, nil, err
	}
	if over {
		im, err := Render(ctx, p, opt.Options)
		return im, nil, err
	}
	if err := im.checkFinite(p.Field != nil); err != nil {
		return nil, nil, err
	}
	s.bytes = used.Load()
	s.phase = phase
	s.models = append([]Model{p.Model}, opt.Also...)
	if rp.ThicknessNm != p.ThicknessNm {
		im, _, err = s.Replay(ctx, p.Model, p.ThicknessNm, opt.Options)
		if err != nil {
			return nil, nil, err
		}
	}
	return im, s, nil
}

// Serves reports whether Replay can render p from these samples: the same
// field (the same value, as a scene's unchanged geometry stage hands on),
// g, foil normal, grid and tolerance, and a thickness up to the recorded
// one. The model may differ in anything.
func (s *Samples) Serves(p *Problem) bool {
	return s.servesThickness(p) && sameField(p.Field, s.p.Field)
}

// servesThickness reports whether p shares the recorded problem's frame
// and asks for a thickness up to the recorded one.
func (s *Samples) servesThickness(p *Problem) bool {
	return sameFrame(p, &s.p) && p.ThicknessNm > 0 && p.ThicknessNm <= s.p.ThicknessNm
}

// sameFrame reports whether p and q share g, the foil normal, the grid
// and the tolerance: what the field samples of a render depend on
// besides the field and the thickness.
func sameFrame(p, q *Problem) bool {
	return p.GPerNm == q.GPerNm && p.Normal == q.Normal && p.Grid == q.Grid && p.Tolerance == q.Tolerance
}

// sameField reports whether a and b are the same field value: equal
// pointers, or slices over the same elements, or equal comparable values.
func sameField(a, b Displacement) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	va, vb := reflect.ValueOf(a), reflect.ValueOf(b)
	if va.Type() != vb.Type() {
		return false
	}
	switch va.Kind() {
	case reflect.Pointer, reflect.Map, reflect.Func, reflect.Chan, reflect.UnsafePointer:
		return va.Pointer() == vb.Pointer()
	case reflect.Slice:
		return va.Len() == vb.Len() && (va.Len() == 0 || va.Pointer() == vb.Pointer())
	}
	return va.Comparable() && va.Equal(vb)
}

// Replay integrates every column again through the recorded steps with
// model and thickness (at most MaxThicknessNm), and returns the image and
// the number of columns that were integrated afresh because a slab failed
// the step control with the new model's beat.
func (s *Samples) Replay(ctx context.Context, model Model, thicknessNm float64, opt Options) (*Image, int, error) {
	if !(thicknessNm > 0) || thicknessNm > s.p.ThicknessNm*(1+1e-12) {
		return nil, 0, fmt.Errorf("thickness %g nm: %w (recorded up to %g nm)", thicknessNm, ErrReplayRange, s.p.ThicknessNm)
	}
	p := s.p
	p.Model = model
	p.ThicknessNm = thicknessNm
	if err := p.Validate(); err != nil {
		return nil, 0, err
	}
	g := p.Grid
	phase := s.phase
	im := newImage(&p)
	var fresh atomic.Int64
	check := !beatWithin(model, s.models)
	err := rowPool(ctx, 0, g.NY, opt, func() func(j int) {
		c := newColumn(&p, phase)
		c.check = check
		return func(j int) {
			y := g.Y(j)
			row, st := s.rows[j], s.starts[j]
			for i := 0; i < g.NX; i++ {
				x := g.X(i)
				if !c.replay(x, y, row[st[i]:st[i+1]], s.gamma0[j*g.NX+i]) {
					fresh.Add(1)
					c.run(x, y)
				}
				im.set(i, j, c.out)
			}
		}
	})
	if err != nil {
		return nil, 0, err
	}
	if err := im.checkFinite(s.p.Field != nil); err != nil {
		return nil, 0, err
	}
	return im, int(fresh.Load()), nil
}

// replay integrates the column through (x, y) along the recorded steps up
// to the exit surface of c's problem (the slab the surface cuts by
// partSlab), and leaves the intensities in c.out. It reports false, with
// c.psi undefined, if a slab fails the step control with c's model.
func (c *column) replay(x, y float64, steps []step, gamma0 float64) bool {
	c.x, c.y = x, y
	z, zEnd := c.p.surfaces(x, y)
	c.st.Start(c.psi)
	gam := gamma0
	for _, o := range steps {
		if z >= zEnd-1e-12 {
			z = zEnd
			break
		}
		switch {
		case o.h == 0:
			c.st.Shift(c.psi, o.rise)
			gam += o.rise
		case o.d1 != o.d1: // NaN: vacuum
			h := math.Min(o.h, zEnd-z)
			c.st.Vacuum(c.psi, h)
			z += o.h
			if z >= zEnd {
				z = zEnd
			}
		default:
			h, rise, d1, d2 := o.h, o.rise, float64(o.d1), float64(o.d2)
			if z+h > zEnd+1e-12 {
				h, rise, d1, d2 = partSlab(h, rise, d1, d2, (zEnd-z)/h)
			}
			slope := rise / h
			if c.check && !accept(indicator(d1, d2, c.st.Beat(slope)*h), c.tol, h) {
				return false
			}
			c.st.Crystal(c.psi, h, slope, d1, d2)
			z += h
			gam += rise
		}
	}
	c.st.Intensities(c.psi, c.out)
	return true
}

// partSlab returns the first fraction f of a recorded slab (length h,
// chord rise, departures d1, d2 at the Gauss nodes): its length, rise and
// departures from its own chord at its own Gauss nodes, with the
// departure interpolated by the cubic u(1−u)(α + βu) through the slab's
// samples (zero at its ends, d1 and d2 at the nodes u1,2 = 1/2 ∓ √3/6,
// where u(1−u) = 1/6).
func partSlab(h, rise, d1, d2, f float64) (float64, float64, float64, float64) {
	slope, e1, e2 := cubicPart(h, rise/h, d1, d2, 0, f)
	return f * h, slope * f * h, e1, e2
}

// cubicPart returns the chord slope and the Gauss-node departures of the
// part [u0, u1] (fractions of its length h) of a slab with chord slope
// slope whose departure is the cubic u(1−u)(α + βu) through its samples
// (zero at its ends, d1 and d2 at the nodes, where u(1−u) = 1/6).
func cubicPart(h, slope, d1, d2, u0, u1 float64) (float64, float64, float64) {
	alpha, beta := cubic(d1, d2)
	dep := func(u float64) float64 { return u * (1 - u) * (alpha + beta*u) }
	c0, c1 := dep(u0), dep(u1)
	du := u1 - u0
	e1 := dep(u0+gaussNodes[0]*du) - c0 - gaussNodes[0]*(c1-c0)
	e2 := dep(u0+gaussNodes[1]*du) - c0 - gaussNodes[1]*(c1-c0)
	return slope + (c1-c0)/(du*h), e1, e2
}

// beatWithin reports whether slabs recorded with the recorded models
// pass m's step control unchecked: for two-beam (and kinematical) models
// with the same ξ_g, when m's beat is nowhere above the largest of the
// recorded models' beats, at any chord slope (m's s lies within the
// recorded ones' range, the beat sqrt((s + β)² + 1/ξ_g²) being convex in
// s, and m's 1/ξ_g is not larger); for a systematic row, when the
// recorded models are all systematic rows (rowsOnly). Otherwise every
// replayed slab is checked.
func beatWithin(m Model, recorded []Model) bool {
	lo, hi := math.Inf(1), math.Inf(-1)
	switch m := m.(type) {
	case TwoBeam:
		for _, r := range recorded {
			r, ok := r.(TwoBeam)
			if !ok || r.XiGNm > m.XiGNm {
				return false
			}
			lo, hi = math.Min(lo, r.SPerNm), math.Max(hi, r.SPerNm)
		}
		return m.SPerNm >= lo && m.SPerNm <= hi
	case Kinematical:
		for _, r := range recorded {
			r, ok := r.(Kinematical)
			if !ok {
				return false
			}
			lo, hi = math.Min(lo, r.SPerNm), math.Max(hi, r.SPerNm)
		}
		return m.SPerNm >= lo && m.SPerNm <= hi
	case SystematicRow:
		return rowsOnly(recorded)
	}
	return false
}

// rowsOnly reports whether every model is a systematic row: slabs recorded
// with them passed the Bloch-wave step's indicator, which does not depend
// on the model (see the step control in column.go), so they serve any
// systematic row unchecked.
func rowsOnly(models []Model) bool {
	for _, m := range models {
		if _, ok := m.(SystematicRow); !ok {
			return false
		}
	}
	return len(models) > 0
}
