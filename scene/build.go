package scene

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/crystal"
	"faultline/defects"
	"faultline/sim"
)

// Setup is a scene turned into what the simulator and the figures need:
// the crystal, the imaging condition in numbers, and the sim.Problem in the
// image frame.
type Setup struct {
	Scene   *Scene
	Crystal *crystal.Crystal

	VoltageKV    float64
	WavelengthNm float64
	G            [3]float64 // g as three-index hkl
	Beam         [3]float64 // beam direction as three-index uvw
	GPerNm       float64    // |g|
	DSpacingNm   float64
	XiGNm        float64 // extinction distance used
	XiGComputed  bool    // false when extinction_nm overrides it
	SPerNm       float64 // excitation error of g
	W            float64 // s ξ_g
	Absorption   float64 // ξ_g/ξ'_g used (0 for the kinematical model)
	Model        string

	// Rotation takes crystal Cartesian vectors into the image frame:
	// row 0 is x (along g), row 1 is y = z × x, row 2 is z (the beam).
	Rotation [3][3]float64

	Problem *sim.Problem
	// Notes records defaults applied and values derived (a dissociation
	// width from a stacking-fault energy), for display.
	Notes []string
}

// Build turns a validated scene into a Setup. dir is the directory that
// relative paths in the scene (a CIF file) are relative to.
func Build(sc *Scene, dir string) (*Setup, error) {
	if err := sc.Validate(); err != nil {
		return nil, err
	}
	st := &Setup{Scene: sc, VoltageKV: sc.Microscope.VoltageKV}
	var err error
	if st.Crystal, err = buildCrystal(&sc.Crystal, dir); err != nil {
		return nil, err
	}
	cell := st.Crystal.Cell
	st.WavelengthNm = crystal.Wavelength(st.VoltageKV)

	d := &sc.Diffraction
	if st.G, err = cell.PlaneIndices(d.G); err != nil {
		return nil, wrapErr("diffraction.g", err)
	}
	if st.Beam, err = cell.DirectionIndices(d.Beam); err != nil {
		return nil, wrapErr("diffraction.beam", err)
	}
	gc := cell.Reciprocal(st.G)
	bc := cell.Direction(st.Beam)
	st.GPerNm = r3.Norm(gc)
	st.DSpacingNm = 1 / st.GPerNm
	if dot := st.G[0]*st.Beam[0] + st.G[1]*st.Beam[1] + st.G[2]*st.Beam[2]; math.Abs(dot) > 1e-9*(1+math.Abs(dot)) {
		return nil, fieldErr("diffraction.g", "%s is not perpendicular to the beam %s (g·B = %g)", fmtIdx(d.G), fmtIdx(d.Beam), dot)
	}
	if 2*math.Asin(math.Min(1, st.WavelengthNm*st.GPerNm/2)) > math.Pi/6 {
		return nil, fieldErr("diffraction.g", "%s: Bragg angle too large for the column approximation at %g kV", fmtIdx(d.G), st.VoltageKV)
	}
	x := r3.Unit(gc)
	z := r3.Unit(bc)
	y := r3.Cross(z, x)
	st.Rotation = [3][3]float64{{x.X, x.Y, x.Z}, {y.X, y.Y, y.Z}, {z.X, z.Y, z.Z}}

	// Extinction distance and deviation.
	if d.ExtinctionNm != nil {
		st.XiGNm = *d.ExtinctionNm
	} else {
		xi, err := st.Crystal.ExtinctionDistance(st.G, st.VoltageKV)
		if err != nil {
			if errors.Is(err, crystal.ErrForbidden) {
				return nil, &FieldError{Path: "diffraction.g", Msg: fmt.Sprintf("%s is kinematically forbidden in %s; give diffraction.extinction_nm to image it anyway", fmtIdx(d.G), st.Crystal.Name), Err: err}
			}
			return nil, wrapErr("diffraction.g", err)
		}
		st.XiGNm = xi
		st.XiGComputed = true
	}
	switch {
	case d.SPerNm != nil:
		st.SPerNm = *d.SPerNm
	case d.W != nil:
		st.SPerNm = *d.W / st.XiGNm
	case d.WeakBeam != nil:
		// s_g = (n − 1) λ g²/2 puts n·g at the Bragg position (the g(ng)
		// weak-beam condition; Cockayne, Ray & Whelan 1969).
		st.SPerNm = (d.WeakBeam.N - 1) * st.WavelengthNm * st.GPerNm * st.GPerNm / 2
		st.Notes = append(st.Notes, fmt.Sprintf("weak beam g(%gg): s = %.4f /nm, computed with g alone; the other beams of the systematic row are left out (the many-beam model is not built yet)", d.WeakBeam.N, st.SPerNm))
	case d.Kikuchi != nil:
		s, err := crystal.DeviationFromKikuchi(st.WavelengthNm, st.GPerNm, d.Kikuchi.Offset, d.Kikuchi.Spacing)
		if err != nil {
			return nil, wrapErr("diffraction.deviation_from_kikuchi", err)
		}
		st.SPerNm = s
	}
	st.W = st.SPerNm * st.XiGNm

	ratio := DefaultAbsorptionRatio
	if d.AbsorptionRatio != nil {
		ratio = *d.AbsorptionRatio
	} else if d.Model != "kinematical" {
		st.Notes = append(st.Notes, fmt.Sprintf("absorption ratio ξ_g/ξ'_g = %g (default)", ratio))
	}
	st.Model = d.Model
	if st.Model == "" {
		st.Model = DefaultModel
	}
	var model sim.Model
	switch st.Model {
	case "kinematical":
		model = sim.Kinematical{SPerNm: st.SPerNm, XiGNm: st.XiGNm}
	case "two-beam":
		tb := sim.TwoBeam{SPerNm: st.SPerNm, XiGNm: st.XiGNm}
		if ratio > 0 {
			tb.XiGAbsNm = st.XiGNm / ratio
			tb.Xi0AbsNm = tb.XiGAbsNm
		}
		st.Absorption = ratio
		model = tb
	case "systematic-row":
		return nil, fieldErr("diffraction.model", "systematic-row (many-beam) is not built yet; use two-beam or kinematical")
	}

	// Foil.
	normal := r3.Vec{}
	if len(sc.Foil.Normal) > 0 {
		uvw, err := cell.DirectionIndices(sc.Foil.Normal)
		if err != nil {
			return nil, wrapErr("foil.normal", err)
		}
		n := r3.Unit(st.rotate(cell.Direction(uvw)))
		if n.Z < 0 {
			n = r3.Scale(-1, n) // the same surfaces; point it into the foil
		}
		if n.Z < math.Cos(80*math.Pi/180) {
			return nil, fieldErr("foil.normal", "%s is %.0f° from the beam; the foil must be tilted less than 80°", fmtIdx(sc.Foil.Normal), math.Acos(n.Z)*180/math.Pi)
		}
		normal = n
	}

	st.Problem = &sim.Problem{
		Model:       model,
		GPerNm:      st.GPerNm,
		ThicknessNm: sc.Foil.ThicknessNm,
		Normal:      normal,
		Grid: sim.Grid{NX: sc.Image.Pixels[0], NY: sc.Image.Pixels[1],
			WidthNm: sc.Image.WidthNm, HeightNm: sc.Image.HeightNm},
	}
	if len(sc.Defects) > 0 {
		field, err := st.buildDefects()
		if err != nil {
			return nil, err
		}
		st.Problem.Field = field
	}
	if err := st.Problem.Validate(); err != nil {
		// Everything the problem holds was checked above except what the
		// crystal produced: the extinction distance and the model built
		// from it.
		return nil, fieldErr("diffraction", "%v (from the crystal's structure factor; check its atoms or give extinction_nm)", err)
	}
	return st, nil
}

// rotate takes a crystal Cartesian vector into the image frame.
func (st *Setup) rotate(v r3.Vec) r3.Vec {
	r := st.Rotation
	return r3.Vec{
		X: r[0][0]*v.X + r[0][1]*v.Y + r[0][2]*v.Z,
		Y: r[1][0]*v.X + r[1][1]*v.Y + r[1][2]*v.Z,
		Z: r[2][0]*v.X + r[2][1]*v.Y + r[2][2]*v.Z,
	}
}

// ImageVector returns the crystal direction uvw (three or four indices,
// scaled by factor) as a Cartesian vector in nm in the image frame.
func (st *Setup) ImageVector(uvw [3]float64) r3.Vec {
	return st.rotate(st.Crystal.Cell.Direction(uvw))
}

func buildCrystal(c *Crystal, dir string) (*crystal.Crystal, error) {
	var (
		cr  *crystal.Crystal
		err error
	)
	switch {
	case c.Material != "":
		if cr, err = crystal.Preset(c.Material); err != nil {
			return nil, wrapErr("crystal.material", err)
		}
	case c.CIF != "":
		path := c.CIF
		if !filepath.IsAbs(path) {
			path = filepath.Join(dir, path)
		}
		if cr, err = loadCIF(path); err != nil {
			return nil, wrapErr("crystal.cif", err)
		}
	default:
		k := c.Cell
		cell, err := crystal.NewCell(k.ANm, k.BNm, k.CNm, k.AlphaDeg, k.BetaDeg, k.GammaDeg)
		if err != nil {
			return nil, wrapErr("crystal.cell", err)
		}
		atoms := make([]crystal.Atom, len(c.Atoms))
		for i, a := range c.Atoms {
			atoms[i] = crystal.Atom{Element: a.Element, XYZ: a.XYZ, Occupancy: 1}
			if a.Occupancy != nil {
				atoms[i].Occupancy = *a.Occupancy
			}
			if a.BIsoNm2 != nil {
				atoms[i].BIsoNm2 = *a.BIsoNm2
			}
		}
		if cr, err = crystal.New("explicit cell", cell, atoms, c.Symmetry, c.Centering); err != nil {
			return nil, wrapErr("crystal.atoms", err)
		}
	}
	if e := c.Elastic; e != nil {
		el, err := elastic(e, cr.Cell)
		if err != nil {
			return nil, wrapErr("crystal.elastic", err)
		}
		if cr, err = cr.WithElastic(el); err != nil {
			return nil, wrapErr("crystal.elastic", err)
		}
	}
	return cr, nil
}

func elastic(e *Elastic, cell crystal.Cell) (crystal.Elastic, error) {
	v := func(p *float64) float64 {
		if p == nil {
			return math.NaN()
		}
		return *p
	}
	switch {
	case e.ShearGPa != nil:
		return crystal.IsotropicElastic(*e.ShearGPa, *e.Poisson)
	case e.Cij != nil:
		if e.C11 != nil || e.C12 != nil || e.C13 != nil || e.C33 != nil || e.C44 != nil {
			return crystal.Elastic{}, errors.New("give cij or the named constants, not both")
		}
		return crystal.FullElastic(*e.Cij)
	case e.C13 != nil || e.C33 != nil:
		if e.C11 == nil || e.C12 == nil || e.C13 == nil || e.C33 == nil || e.C44 == nil {
			return crystal.Elastic{}, errors.New("hexagonal constants need c11, c12, c13, c33 and c44")
		}
		return crystal.HexagonalElastic(v(e.C11), v(e.C12), v(e.C13), v(e.C33), v(e.C44))
	default:
		if e.C11 == nil || e.C12 == nil || e.C44 == nil {
			return crystal.Elastic{}, errors.New("cubic constants need c11, c12 and c44")
		}
		if cell.IsHexagonal() {
			return crystal.Elastic{}, errors.New("a hexagonal cell needs c11, c12, c13, c33 and c44")
		}
		return crystal.CubicElastic(v(e.C11), v(e.C12), v(e.C44))
	}
}

// fmtPlane writes plane indices as the trade does: (1 -1 1).
func fmtPlane(v []float64) string {
	t := fmtIdx(v)
	return "(" + t[1:len(t)-1] + ")"
}

func fmtIdx(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = fmt.Sprintf("%g", x)
	}
	return "[" + strings.Join(parts, " ") + "]"
}

// medium is the elastic description of the crystal in the image frame.
func (st *Setup) medium() defects.Medium {
	e := st.Crystal.Elastic
	m := defects.Medium{ShearGPa: e.ShearGPa, Poisson: e.Poisson}
	if e.Full {
		c := defects.RotateStiffness(e.C, st.Rotation)
		m.C = &c
	}
	return m
}

// defectErr names the defect field a lower-layer error is about.
func defectErr(path string, err error) error {
	var ie *defects.InputError
	if errors.As(err, &ie) {
		return &FieldError{Path: path + "." + ie.Field, Msg: ie.Problem, Err: err}
	}
	return wrapErr(path, err)
}
