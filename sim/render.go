package sim

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"
)

// MaxPixels is the largest image, in columns, that Render accepts: 4096 ×
// 4096. Each column keeps one float64 per beam, so the limit keeps the
// result of a many-beam render well under a gigabyte.
const MaxPixels = 4096 * 4096

// ErrNonFinite is wrapped by the error of a render in which some column's
// intensity came out NaN or infinite (a field evaluated where it is not
// finite), so no silent NaN reaches an image.
var ErrNonFinite = errors.New("non-finite result")

// Problem is everything the integrator needs: plain numbers in the image
// frame (x along g, z along the beam into the foil, y = z × x), no crystal
// and no files.
type Problem struct {
	Model  Model
	GPerNm float64 // |g|, 1/nm; g points along +x
	// Field is the displacement field of all defects, or nil for a perfect
	// crystal. It may implement Jumper and Voider.
	Field Displacement
	// ThicknessNm is the foil thickness measured along the beam.
	ThicknessNm float64
	// Normal is the foil normal in the image frame; the zero vector means
	// along the beam. The entrance surface passes through the origin.
	Normal r3.Vec
	Grid   Grid
	// Tolerance is the step-control tolerance on g·R in cycles (0: the
	// default, DefaultTolerance).
	Tolerance float64
}

// Validate reports the first problem that cannot be integrated.
func (p *Problem) Validate() error {
	if p.Model == nil {
		return errors.New("model: none given")
	}
	if err := p.Model.Validate(); err != nil {
		return fmt.Errorf("model %s: %w", p.Model.Name(), err)
	}
	if !(p.GPerNm > 0) || math.IsInf(p.GPerNm, 0) {
		return fmt.Errorf("g: length %g /nm must be positive", p.GPerNm)
	}
	if !(p.ThicknessNm > 0) || math.IsInf(p.ThicknessNm, 0) {
		return fmt.Errorf("thickness %g nm: must be positive", p.ThicknessNm)
	}
	if n := p.Normal; n != (r3.Vec{}) && !(n.Z > 1e-6*r3.Norm(n)) {
		return fmt.Errorf("foil normal %v: must point into the foil along the beam (z > 0)", n)
	}
	g := p.Grid
	if g.NX <= 0 || g.NY <= 0 {
		return fmt.Errorf("pixels [%d %d]: both must be positive", g.NX, g.NY)
	}
	if g.NX*g.NY > MaxPixels || g.NX > MaxPixels || g.NY > MaxPixels {
		return fmt.Errorf("pixels [%d %d]: more than %d columns", g.NX, g.NY, MaxPixels)
	}
	if !(g.WidthNm > 0) || !(g.HeightNm > 0) || math.IsInf(g.WidthNm+g.HeightNm, 0) {
		return fmt.Errorf("image size %g × %g nm: both must be positive", g.WidthNm, g.HeightNm)
	}
	return nil
}

// surfaces returns the depths of the entrance and exit surfaces on the
// column through (x, y): the entrance plane passes through the origin with
// the foil normal, the exit plane lies ThicknessNm further along the beam.
func (p *Problem) surfaces(x, y float64) (z0, z1 float64) {
	n := p.Normal
	if n != (r3.Vec{}) {
		z0 = -(n.X*x + n.Y*y) / n.Z
	}
	return z0, z0 + p.ThicknessNm
}

// phase returns g·R of the field (see Phaser), or nil for a perfect crystal.
func (p *Problem) phase() func(r3.Vec) float64 {
	if p.Field == nil {
		return nil
	}
	return phaseFunc(p.Field, p.GPerNm)
}

// Column returns the exit intensities of the beams of p.Model for the
// single column through (x, y).
func (p *Problem) Column(x, y float64) []float64 {
	c := newColumn(p, p.phase())
	c.run(x, y)
	return append([]float64(nil), c.out...)
}

// Options control a render.
type Options struct {
	// Workers is the number of goroutines; 0 means runtime.GOMAXPROCS(0).
	Workers int
	// Progress, if not nil, is called after each finished row with the
	// number of rows done and the total. Calls come from the worker
	// goroutines, one at a time, with done increasing.
	Progress func(done, total int)
}

// Render integrates every column of the grid and returns the exit
// intensities. The work is split by rows over a pool of workers; each
// column is computed independently by the same sequence of operations, so
// the result is the same to the bit whatever the number of workers. Render
// stops early and returns ctx.Err() when ctx is cancelled.
func Render(ctx context.Context, p *Problem, opt Options) (*Image, error) {
	return RenderRows(ctx, p, 0, p.Grid.NY, opt)
}

// RenderRows is Render restricted to the pixel rows j0 ≤ j < j1 of the
// grid; the other rows of the returned image are zero. Progress counts the
// rows asked for.
func RenderRows(ctx context.Context, p *Problem, j0, j1 int, opt Options) (*Image, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	g := p.Grid
	if j0 < 0 || j1 > g.NY || j0 >= j1 {
		return nil, fmt.Errorf("rows %d to %d: outside the grid's %d rows", j0, j1, g.NY)
	}
	im := newImage(p)
	phase := p.phase()
	err := rowPool(ctx, j0, j1, opt, func() func(j int) {
		c := newColumn(p, phase)
		return func(j int) {
			y := g.Y(j)
			for i := 0; i < g.NX; i++ {
				c.run(g.X(i), y)
				im.set(i, j, c.out)
			}
		}
	})
	if err != nil {
		return nil, err
	}
	if err := im.checkFinite(p.Field != nil); err != nil {
		return nil, err
	}
	return im, nil
}

// newImage returns a zero image of p's grid and beams.
func newImage(p *Problem) *Image {
	g := p.Grid
	beams := p.Model.Beams()
	im := &Image{Grid: g, Beams: append([]int(nil), beams...), Intensity: make([][]float64, len(beams))}
	for k := range im.Intensity {
		im.Intensity[k] = make([]float64, g.NX*g.NY)
	}
	return im
}

// set stores the beams' intensities of pixel (i, j).
func (im *Image) set(i, j int, out []float64) {
	n := j*im.Grid.NX + i
	for k := range im.Intensity {
		im.Intensity[k][n] = out[k]
	}
}

// checkFinite reports the first pixel, in raster order, with a
// non-finite intensity; withField says whether the problem had a
// displacement field to blame.
func (im *Image) checkFinite(withField bool) error {
	bad := -1
	for k := range im.Intensity {
		for n, v := range im.Intensity[k] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				if bad < 0 || n < bad {
					bad = n
				}
				break
			}
		}
	}
	if bad < 0 {
		return nil
	}
	g := im.Grid
	i, j := bad%g.NX, bad/g.NX
	why := "a defect's field is not finite there"
	if !withField {
		why = "the perfect crystal's amplitudes overflowed; check the excitation error, the extinction distance and the thickness"
	}
	return fmt.Errorf("%w: column (%g, %g) nm gave a non-finite intensity; %s", ErrNonFinite, g.X(i), g.Y(j), why)
}

// rowPool runs the rows j0 ≤ j < j1 over opt.Workers goroutines (default
// GOMAXPROCS), each with its own row function from start, reporting
// progress row by row and stopping between rows when ctx is cancelled.
// Every row is computed by the same sequence of operations whichever
// worker takes it.
func rowPool(ctx context.Context, j0, j1 int, opt Options, start func() func(j int)) error {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	rows := j1 - j0
	if workers > rows {
		workers = rows
	}
	var (
		next atomic.Int64
		mu   sync.Mutex
		done int
		wg   sync.WaitGroup
	)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			row := start()
			for {
				if ctx.Err() != nil {
					return
				}
				j := j0 + int(next.Add(1)-1)
				if j >= j1 {
					return
				}
				row(j)
				if opt.Progress != nil {
					mu.Lock()
					done++
					opt.Progress(done, rows)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	return ctx.Err()
}
