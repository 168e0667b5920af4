package match

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/scene"
)

// Micrograph is one picture of a series: its pixels (with their size) as
// the micrograph reader returned them, the direction of g in it, which beam
// it shows, and the imaging conditions that replace the base scene's
// "diffraction" section (nil keeps the base's).
type Micrograph struct {
	Name        string
	Raster      *Raster
	GAngleDeg   float64
	Kind        Kind
	Diffraction json.RawMessage
}

// Candidate is one trial value of the varied defect: a Burgers vector, a
// loop's nature or a fault's kind, applied with scene.Set at Path.
type Candidate struct {
	Label string
	Path  string
	Value any
	// B is the Burgers vector as fractional [uvw] when the candidate is
	// one (for g·b), else nil.
	B *[3]float64
}

// Series is a g·b series to identify: a base scene (JSON, with the
// crystal, foil and defect geometry), the directory its relative paths are
// in, the micrographs and the candidates.
type Series struct {
	Base        []byte
	Dir         string
	Defect      int // index of the varied defect
	Micrographs []Micrograph
	Candidates  []Candidate
	// BlurNm is the σ of a Gaussian applied to every simulation to match
	// the micrographs' resolution (0: none).
	BlurNm float64
	// RefineRotationDeg: see Options.
	RefineRotationDeg float64
}

// Cell is the comparison of one candidate with one micrograph.
type Cell struct {
	Micrograph string
	Score      float64 // normalised correlation at the best placement
	Error      float64 // its standard error (see scoreError)
	Shift      Shift
	// RotationDeg is the turn of the simulation (counter-clockwise as
	// displayed) that the optional rotation refinement found.
	RotationDeg float64
	GDotB       float64 // NaN when the candidate is not a Burgers vector
	GDotBxU     float64 // g·(b × u), u the unit line direction; NaN without a line
	Simulated   *Raster // the simulation, placed as registered
	// Flat is true when the simulation showed no contrast and the score
	// is the micrograph's flatness (see compare).
	Flat bool
}

// Ranked is one candidate's result.
type Ranked struct {
	Candidate Candidate
	Score     float64 // mean of the cells' scores
	Error     float64 // its standard error
	Rank      int     // 1 for the best; tied candidates share a rank
	Tied      bool    // cannot be told apart from the candidate ranked above it
	Cells     []Cell
}

// Options of Identify.
type Options struct {
	Workers  int
	Progress func(done, total int)
	// RefineRotationDeg, if positive, also turns each simulation by up
	// to this angle either way (whole degrees, then a parabola through
	// the best three) to absorb a small error in a micrograph's g angle;
	// at most 3°.
	RefineRotationDeg float64
	// MaxShiftPx bounds the registration's search about the centred
	// placement (0: any shift with half the picture overlapping).
	MaxShiftPx int
}

// ErrSeries is wrapped by errors about the content of a series.
var ErrSeries = errors.New("invalid series")

// SceneFor returns the base scene with micrograph m's conditions.
func (s *Series) SceneFor(m *Micrograph) (*scene.Scene, error) {
	if len(m.Diffraction) == 0 {
		return scene.Parse(s.Base)
	}
	var base map[string]json.RawMessage
	if err := json.Unmarshal(s.Base, &base); err != nil {
		return nil, fmt.Errorf("%w: base scene: %v", ErrSeries, err)
	}
	base["diffraction"] = m.Diffraction
	data, err := json.Marshal(base)
	if err != nil {
		return nil, err
	}
	return scene.Parse(data)
}

// Identify compares every candidate with every micrograph and ranks the
// candidates by their mean score. Candidates whose mean score lies within
// twice the combined standard error of the best are marked tied with it:
// the micrographs cannot tell them apart.
//
// The simulation of each (candidate, micrograph) is rendered on the
// micrograph's raster (sim.Turn) and placed by Register; the score is the
// normalised correlation over the overlap (Score).
func Identify(ctx context.Context, s *Series, opt Options) ([]Ranked, error) {
	if len(s.Candidates) == 0 {
		return nil, fmt.Errorf("%w: candidates: the list is empty", ErrSeries)
	}
	if len(s.Micrographs) == 0 {
		return nil, fmt.Errorf("%w: micrographs: the list is empty", ErrSeries)
	}
	total := len(s.Candidates) * len(s.Micrographs)
	done := 0
	out := make([]Ranked, len(s.Candidates))
	for ci := range s.Candidates {
		out[ci].Candidate = s.Candidates[ci]
	}
	for mi := range s.Micrographs {
		m := &s.Micrographs[mi]
		sc0, err := s.SceneFor(m)
		if err != nil {
			return nil, fmt.Errorf("micrographs[%d].diffraction: %w", mi, err)
		}
		if s.Defect < 0 || s.Defect >= len(sc0.Defects) {
			return nil, fmt.Errorf("%w: defect %d: the base scene has %d defects", ErrSeries, s.Defect, len(sc0.Defects))
		}
		v := View{W: m.Raster.W, H: m.Raster.H, NmPerPx: m.Raster.NmPerPx, GAngleDeg: m.GAngleDeg}
		// The crystal and its Stroh solutions are built once per
		// micrograph; each candidate rebuilds only the defect geometry.
		var builder scene.Builder
		for ci, c := range s.Candidates {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			sc, err := cloneScene(sc0)
			if err != nil {
				return nil, err
			}
			if err := scene.Set(sc, c.Path, c.Value); err != nil {
				return nil, fmt.Errorf("candidate %s: %w", c.Label, err)
			}
			st, err := builder.Build(sc, s.Dir)
			if err != nil {
				return nil, fmt.Errorf("micrographs[%d] with candidate %s: %w", mi, c.Label, err)
			}
			simR, err := Simulate(ctx, st, v, m.Kind, s.BlurNm, opt.Workers)
			if err != nil {
				return nil, fmt.Errorf("micrographs[%d] with candidate %s: %w", mi, c.Label, err)
			}
			if opt.MaxShiftPx == 0 {
				opt.MaxShiftPx = max(v.W, v.H) / 4
			}
			if opt.RefineRotationDeg == 0 {
				opt.RefineRotationDeg = s.RefineRotationDeg
			}
			cell, err := compare(m, simR, opt)
			if err != nil {
				return nil, fmt.Errorf("micrographs[%d] (%s) with candidate %s: %w", mi, m.Name, c.Label, err)
			}
			cell.GDotB, cell.GDotBxU = gDotB(st, sc.Defects[s.Defect], c.B)
			out[ci].Cells = append(out[ci].Cells, cell)
			done++
			if opt.Progress != nil {
				opt.Progress(done, total)
			}
		}
	}
	for i := range out {
		var sum, se2 float64
		for _, c := range out[i].Cells {
			sum += c.Score
			se2 += c.Error * c.Error
		}
		n := float64(len(out[i].Cells))
		out[i].Score = sum / n
		out[i].Error = math.Sqrt(se2) / n
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Score > out[j].Score })
	rank := 1
	for i := range out {
		if i > 0 {
			// Tied with the one above: within twice their combined error.
			d := out[i-1].Score - out[i].Score
			if d <= 2*math.Hypot(out[i-1].Error, out[i].Error) {
				out[i].Tied = true
				out[i].Rank = out[i-1].Rank
				continue
			}
			rank = i + 1
		}
		out[i].Rank = rank
	}
	return out, nil
}

// ContrastFloor is the smallest range of a simulated image, as a fraction
// of the incident beam, that counts as contrast: below it the image is
// flat to within what a micrograph could show (the floor the figures use to
// refuse stretching rounding noise).
const ContrastFloor = 1e-3

// compare registers the simulation on the micrograph and scores it. A
// simulation without contrast (its range under ContrastFloor, as at
// g·b = 0) cannot be registered or correlated; it is scored by flatScore.
func compare(m *Micrograph, simR *Raster, opt Options) (Cell, error) {
	if lo, hi := rangeOf(simR); !(hi-lo >= ContrastFloor) {
		s, e := flatScore(m.Raster)
		return Cell{Micrograph: m.Name, Score: s, Error: e, Simulated: simR, Flat: true}, nil
	}
	sh, err := Register(m.Raster, simR, RegisterOptions{MaxShiftPx: opt.MaxShiftPx})
	if err != nil {
		return Cell{}, err
	}
	rot := 0.0
	if r := math.Min(opt.RefineRotationDeg, 3); r > 0 {
		view := View{W: simR.W, H: simR.H, NmPerPx: simR.NmPerPx}
		try := func(deg float64) (*Raster, Shift, bool) {
			view.GAngleDeg = deg
			turned := Place(simR, 0, view)
			s, err := Register(m.Raster, turned, RegisterOptions{MaxShiftPx: opt.MaxShiftPx})
			return turned, s, err == nil
		}
		scores := map[float64]float64{0: sh.Score}
		best := 0.0
		for d := 1.0; d <= r; d++ {
			for _, deg := range []float64{-d, d} {
				if turned, s, ok := try(deg); ok {
					scores[deg] = s.Score
					if s.Score > sh.Score {
						sh, simR, best = s, turned, deg
					}
				}
			}
		}
		a, okA := scores[best-1]
		c, okC := scores[best+1]
		if okA && okC {
			if d := best + parabolicPeak(a, scores[best], c); d != best {
				if turned, s, ok := try(d); ok && s.Score > sh.Score {
					sh, simR, best = s, turned, d
				}
			}
		}
		rot = best
	}
	placed := m.Raster.Crop(0, 0, m.Raster.W, m.Raster.H)
	for k := range placed.Pix {
		placed.Pix[k] = math.NaN()
	}
	for j := 0; j < simR.H; j++ {
		for i := 0; i < simR.W; i++ {
			x, y := i+sh.IX, j+sh.IY
			if x >= 0 && y >= 0 && x < placed.W && y < placed.H {
				placed.Pix[y*placed.W+x] = simR.Pix[j*simR.W+i]
			}
		}
	}
	return Cell{Micrograph: m.Name, Score: sh.Score, Error: scoreError(m.Raster, placed, sh.Score), Shift: sh, RotationDeg: rot, Simulated: placed}, nil
}

// gDotB returns g·b and g·(b × u) for a Burgers-vector candidate b of
// defect d (u its unit line direction, when it has one); NaN otherwise.
func gDotB(st *scene.Setup, d scene.Defect, b *[3]float64) (gb, gbu float64) {
	if b == nil {
		return math.NaN(), math.NaN()
	}
	g := st.G
	gb = g[0]*b[0] + g[1]*b[1] + g[2]*b[2]
	gbu = math.NaN()
	if len(d.Line) > 0 {
		cell := st.Crystal.Cell
		uvw, err := cell.DirectionIndices(d.Line)
		if err == nil {
			u := r3.Unit(cell.Direction(uvw))
			gbu = r3.Dot(cell.Reciprocal(g), r3.Cross(cell.Direction(*b), u))
		}
	}
	return clean(gb), clean(gbu)
}

// clean rounds away the last bits of sums of products of small fractions,
// so that a g·b of 0 prints as 0 and 1/2 as 0.5.
func clean(x float64) float64 {
	r := math.Round(x*1e9) / 1e9
	if r == 0 {
		return 0
	}
	return r
}

func cloneScene(sc *scene.Scene) (*scene.Scene, error) {
	data, err := scene.Marshal(sc)
	if err != nil {
		return nil, err
	}
	return scene.Parse(data)
}

// rangeOf returns the smallest and largest pixel, NaN pixels left out.
func rangeOf(r *Raster) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range r.Pix {
		if x < lo {
			lo = x
		}
		if x > hi {
			hi = x
		}
	}
	return lo, hi
}
