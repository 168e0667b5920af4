package scene

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/defects"
	"faultline/sim"
)

// Thresholds of the warnings.
const (
	// opaqueFraction: a foil whose mean absorption leaves less than this
	// fraction of the beam, exp(−2πt/ξ'_0), is opaque.
	opaqueFraction = 1e-3
	// farRadii: an inclusion or loop whose centre lies more than this many
	// radii outside the foil cannot show (its field falls as r⁻², so at
	// three radii it is a ninth of its value at the interface, and falls on).
	farRadii = 3
	// farExtinction: a dislocation parallel to the foil and further than
	// this many extinction distances outside it cannot show.
	farExtinction = 3
	// residualContrast: a bright-field departure from the perfect crystal
	// above this fraction of the incident beam is residual contrast
	// (1 %, common practice for what an image shows above its noise).
	residualContrast = 0.01
)

// warnSpecimen adds the warnings about the specimen to st.Warnings
// (notes, not refusals; the imaging condition's are warnConditions'):
//
//   - defects that cannot show: an inclusion or loop whose centre lies
//     more than three radii outside the foil, a dislocation parallel to
//     the foil more than three extinction distances outside it;
//   - an opaque foil: the mean absorption leaves less than 1e-3 of the
//     beam, exp(−2πt/ξ'_0);
//   - an anisotropic dislocation imaged with g·b = 0 that still shows
//     residual contrast (a small render around it against the perfect
//     crystal gives the figure).
func (st *Setup) warnSpecimen() {
	st.Warnings = append(st.Warnings, st.unseenDefects()...)
	if w := st.opaque(); w != "" {
		st.Warnings = append(st.Warnings, w)
	}
	st.Warnings = append(st.Warnings, st.residuals()...)
}

// unseenDefects warns of defects whose field cannot reach the foil.
func (st *Setup) unseenDefects() []string {
	t := st.Problem.ThicknessNm
	var out []string
	// outside is how far below the exit surface or above the entrance
	// surface the depth z lies (0 inside).
	outside := func(z float64) float64 { return math.Max(-z, z-t) }
	for i := range st.Scene.Defects {
		d := &st.Scene.Defects[i]
		if len(d.AtNm) != 3 {
			continue
		}
		path := fmt.Sprintf("defects[%d]", i)
		z := d.AtNm[2]
		switch d.Type {
		case "inclusion", "loop":
			r := *d.RadiusNm
			if o := outside(z); o > farRadii*r {
				out = append(out, fmt.Sprintf("%s: %s centred %.4g nm outside the %g nm foil (more than %d radii): its field cannot reach the foil, so it shows no contrast", path, d.Type, o, t, farRadii))
			}
		case "dislocation", "dissociated":
			rd := &reader{st: st}
			u := rd.direction(path+".line", d.Line)
			if rd.err != nil {
				continue
			}
			if math.Abs(r3.Unit(u).Z) > 1e-9 {
				continue // it crosses the foil's depth somewhere
			}
			if o := outside(z); o > farExtinction*st.XiGNm {
				out = append(out, fmt.Sprintf("%s: the dislocation runs parallel to the foil %.4g nm outside it (more than %d extinction distances): it shows no contrast", path, o, farExtinction))
			}
		}
	}
	return out
}

// opaque warns when the mean absorption leaves less than opaqueFraction
// of the beam: exp(−2πt/ξ'_0).
func (st *Setup) opaque() string {
	if math.IsInf(st.Xi0AbsNm, 1) || st.Xi0AbsNm <= 0 {
		return ""
	}
	t := st.Problem.ThicknessNm
	f := math.Exp(-2 * math.Pi * t / st.Xi0AbsNm)
	if f >= opaqueFraction {
		return ""
	}
	return fmt.Sprintf("opaque foil: at %g nm the mean absorption leaves %.1e of the beam (exp(−2πt/ξ'_0), ξ'_0 = %.4g nm); a real image would be dark and noisy", t, f, st.Xi0AbsNm)
}

// residuals warns of anisotropic dislocations imaged with g·b = 0 that
// show residual contrast: an 11 × 11 grid of columns over one extinction
// distance around the dislocation is rendered with its field alone and
// compared with the perfect crystal.
func (st *Setup) residuals() []string {
	var out []string
	if len(st.fields) != len(st.Scene.Defects) {
		return nil
	}
	for i := range st.Scene.Defects {
		d := &st.Scene.Defects[i]
		dis, ok := st.fields[i].(*defects.Dislocation)
		if d.Type != "dislocation" || !ok || !dis.Anisotropic() {
			continue
		}
		if gb := r3.Dot(st.gVec(), dis.BurgersNm()); math.Abs(gb) > 1e-6 {
			continue
		}
		c, err := st.residualContrast(st.fields[i], d.AtNm)
		if err != nil || c < residualContrast {
			continue
		}
		out = append(out, fmt.Sprintf("defects[%d]: g·b = 0, yet the anisotropic field leaves residual contrast: the bright field departs from the perfect crystal by up to %.3f of the beam within one extinction distance; the isotropic g·b = 0 invisibility rule does not hold here", i, c))
	}
	return out
}

// residualContrast is the largest |BF − BF_perfect| over the grid around
// the defect at (position in the scene's frame).
func (st *Setup) residualContrast(f defects.Field, at []float64) (float64, error) {
	x, y := at[0], at[1]
	if phi := st.GAngleDeg * math.Pi / 180; phi != 0 {
		c, s := math.Cos(phi), math.Sin(phi)
		x, y = x*c-y*s, x*s+y*c
	}
	n := 11
	side := math.Min(st.XiGNm, 2*MaxLengthNm)
	p := sim.Problem{
		Model:       st.Problem.Model,
		GPerNm:      st.GPerNm,
		ThicknessNm: st.Problem.ThicknessNm,
		Normal:      st.normalG,
		Grid:        sim.Grid{NX: n, NY: n, WidthNm: side, HeightNm: side},
		Field:       shifted{f: f, dx: x, dy: y},
	}
	im, err := sim.Render(context.Background(), &p, sim.Options{Workers: 1})
	if err != nil {
		return 0, err
	}
	p.Field = nil
	ref, err := sim.Render(context.Background(), &p, sim.Options{Workers: 1})
	if err != nil {
		return 0, err
	}
	worst := 0.0
	a, b := im.Beam(0), ref.Beam(0)
	for k := range a {
		worst = math.Max(worst, math.Abs(a[k]-b[k]))
	}
	return worst, nil
}

// shifted is a field moved by (−dx, −dy): the grid's centre lands on the
// point (dx, dy) of the field.
type shifted struct {
	f      defects.Field
	dx, dy float64
}

func (s shifted) R(p r3.Vec) r3.Vec { return s.f.R(r3.Vec{X: p.X + s.dx, Y: p.Y + s.dy, Z: p.Z}) }
