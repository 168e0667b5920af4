package scene

import (
	"fmt"
	"math"
	"strings"

	"faultline/sim"
)

// Models lists the values of diffraction.model.
var Models = []string{"kinematical", "two-beam", "systematic-row"}

// Defaults of optional values (documented in the README's scene section).
const (
	// DefaultModel is used when diffraction.model is left out.
	DefaultModel = "two-beam"
	// DefaultAbsorptionRatio is ξ_g/ξ'_g when absorption_ratio is left
	// out: 0.1, common practice for two-beam images of metals (Hirsch et
	// al. 1965 use values of 0.05–0.1).
	DefaultAbsorptionRatio = 0.1
)

// Validate checks everything that can be checked without the crystal:
// required fields, ranges, one-of choices and the fields that belong to
// each defect type. Build checks the rest (indices against the cell, g
// perpendicular to the beam, allowed reflections).
func (sc *Scene) Validate() error {
	if sc.Version != Version {
		if sc.Version == 0 {
			return fieldErr("version", "missing; this program reads version %d", Version)
		}
		return fieldErr("version", "%d is not supported; this program reads version %d", sc.Version, Version)
	}
	if err := sc.Crystal.validate("crystal"); err != nil {
		return err
	}
	if err := checkRange("microscope.voltage_kv", sc.Microscope.VoltageKV, VoltageRange); err != nil {
		return err
	}
	if err := sc.Diffraction.validate("diffraction"); err != nil {
		return err
	}
	if err := checkRange("foil.thickness_nm", sc.Foil.ThicknessNm, ThicknessRange); err != nil {
		return err
	}
	if len(sc.Foil.Normal) > 0 {
		if err := indices("foil.normal", sc.Foil.Normal); err != nil {
			return err
		}
	}
	for i := range sc.Defects {
		if err := sc.Defects[i].validate(fmt.Sprintf("defects[%d]", i)); err != nil {
			return err
		}
	}
	return sc.Image.validate("image")
}

func (c *Crystal) validate(path string) error {
	n := 0
	for _, set := range []bool{c.Material != "", c.CIF != "", c.Cell != nil} {
		if set {
			n++
		}
	}
	if n != 1 {
		return fieldErr(path, "give exactly one of material, cif or cell (found %d)", n)
	}
	if c.Cell == nil && (len(c.Atoms) > 0 || len(c.Symmetry) > 0 || c.Centering != "") {
		return fieldErr(path, "atoms, symmetry and centering go with cell")
	}
	if c.Cell != nil {
		if len(c.Atoms) == 0 {
			return fieldErr(path+".atoms", "a cell needs at least one atom")
		}
		if len(c.Symmetry) > 0 && c.Centering != "" {
			return fieldErr(path, "give symmetry or centering, not both")
		}
		k := c.Cell
		for _, f := range []struct {
			name string
			v    float64
			r    Range
		}{{"a_nm", k.ANm, CellEdgeRange}, {"b_nm", k.BNm, CellEdgeRange}, {"c_nm", k.CNm, CellEdgeRange},
			{"alpha_deg", k.AlphaDeg, CellAngleRange}, {"beta_deg", k.BetaDeg, CellAngleRange}, {"gamma_deg", k.GammaDeg, CellAngleRange}} {
			if err := checkRange(path+".cell."+f.name, f.v, f.r); err != nil {
				return err
			}
		}
		for i, a := range c.Atoms {
			p := fmt.Sprintf("%s.atoms[%d]", path, i)
			if a.Element == "" {
				return fieldErr(p+".element", "missing")
			}
			for j, x := range a.XYZ {
				if err := checkRange(fmt.Sprintf("%s.xyz[%d]", p, j), x, FractionalRange); err != nil {
					return err
				}
			}
			if err := checkOptional(p+".occupancy", a.Occupancy, OccupancyRange); err != nil {
				return err
			}
			if err := checkOptional(p+".b_iso_nm2", a.BIsoNm2, BIsoRange); err != nil {
				return err
			}
		}
	}
	if e := c.Elastic; e != nil {
		iso := e.ShearGPa != nil || e.Poisson != nil
		aniso := e.C11 != nil || e.C12 != nil || e.C13 != nil || e.C33 != nil || e.C44 != nil || e.Cij != nil
		switch {
		case iso && aniso:
			return fieldErr(path+".elastic", "give either stiffness constants or {shear_gpa, poisson}, not both")
		case iso:
			if e.ShearGPa == nil || e.Poisson == nil {
				return fieldErr(path+".elastic", "an isotropic medium needs both shear_gpa and poisson")
			}
			if err := checkRange(path+".elastic.shear_gpa", *e.ShearGPa, ShearRange); err != nil {
				return err
			}
			if err := checkRange(path+".elastic.poisson", *e.Poisson, PoissonRange); err != nil {
				return err
			}
		case !aniso:
			return fieldErr(path+".elastic", "empty: give {c11, c12, c44}, {c11, c12, c13, c33, c44}, {cij} or {shear_gpa, poisson}")
		}
		for name, v := range map[string]*float64{"c11": e.C11, "c12": e.C12, "c13": e.C13, "c33": e.C33, "c44": e.C44} {
			if err := checkOptional(path+".elastic."+name, v, StiffnessRange); err != nil {
				return err
			}
		}
		if e.Cij != nil {
			for i := range e.Cij {
				for j, x := range e.Cij[i] {
					if err := checkRange(fmt.Sprintf("%s.elastic.cij[%d][%d]", path, i, j), x, StiffnessRange); err != nil {
						return err
					}
				}
			}
		}
	}
	return nil
}

func (d *Diffraction) validate(path string) error {
	if len(d.G) != 3 && len(d.G) != 4 {
		return fieldErr(path+".g", "%v: needs 3 indices (hkl) or 4 (hkil)", d.G)
	}
	if err := indexErr(path+".g", d.G, true); err != nil {
		return err
	}
	if err := indices(path+".beam", d.Beam); err != nil {
		return err
	}
	var set []string
	if d.SPerNm != nil {
		set = append(set, "s_per_nm")
	}
	if d.W != nil {
		set = append(set, "w")
	}
	if d.WeakBeam != nil {
		set = append(set, "weak_beam")
	}
	if d.Kikuchi != nil {
		set = append(set, "deviation_from_kikuchi")
	}
	if len(set) != 1 {
		if len(set) == 0 {
			return fieldErr(path, "give the deviation: one of s_per_nm, w, weak_beam or deviation_from_kikuchi")
		}
		return fieldErr(path, "give only one deviation setting, found %s", strings.Join(set, " and "))
	}
	if err := checkOptional(path+".s_per_nm", d.SPerNm, SRange); err != nil {
		return err
	}
	if err := checkOptional(path+".w", d.W, WRange); err != nil {
		return err
	}
	if wb := d.WeakBeam; wb != nil {
		switch n := wb.N; {
		case n != math.Trunc(n) || math.Abs(n) > 20:
			return fieldErr(path+".weak_beam.n", "%g: the g(ng) condition needs a whole number n from −20 to 20 (any other s: use s_per_nm)", n)
		case n == 1:
			return fieldErr(path+".weak_beam.n", "1: g(1g) is the Bragg condition, not a weak-beam one; use s_per_nm 0, or n = 3 for g(3g)")
		case n == 0:
			return fieldErr(path+".weak_beam.n", "0: g(0g) would put the transmitted beam at the Bragg position, which it always is; use n = 3 for g(3g) or n = −1 for g(−g)")
		}
	}
	if t := d.TiltOffZoneDeg; t != nil && !(math.Abs(*t) < 90) {
		return fieldErr(path+".tilt_off_zone_deg", "%g°: the rotation about g must be less than 90° either way", *t)
	}
	if k := d.Kikuchi; k != nil {
		if err := checkRange(path+".deviation_from_kikuchi.spacing", k.Spacing, KikuchiSpaceRange); err != nil {
			return err
		}
		if err := checkRange(path+".deviation_from_kikuchi.offset", k.Offset, KikuchiRange); err != nil {
			return err
		}
	}
	switch d.Model {
	case "":
		if d.Beams != 0 && d.WeakBeam == nil {
			return fieldErr(path+".beams", "applies only to the systematic-row model (set model to systematic-row)")
		}
		if d.Beams != 0 && (d.Beams < 3 || d.Beams%2 == 0 || d.Beams > 2*sim.MaxRowOrder+1) {
			return fieldErr(path+".beams", "%d: the systematic row needs an odd number of beams from 3 to %d (−N…N)", d.Beams, 2*sim.MaxRowOrder+1)
		}
	case "kinematical", "two-beam":
		if d.Beams != 0 {
			return fieldErr(path+".beams", "applies only to the systematic-row model")
		}
	case "systematic-row":
		if d.Beams != 0 && (d.Beams < 3 || d.Beams%2 == 0 || d.Beams > 2*sim.MaxRowOrder+1) {
			return fieldErr(path+".beams", "%d: the systematic row needs an odd number of beams from 3 to %d (−N…N)", d.Beams, 2*sim.MaxRowOrder+1)
		}
	default:
		return fieldErr(path+".model", "%q is not a model; use one of %s", d.Model, strings.Join(Models, ", "))
	}
	if err := checkOptional(path+".extinction_nm", d.ExtinctionNm, ExtinctionRange); err != nil {
		return err
	}
	if err := checkOptional(path+".absorption_ratio", d.AbsorptionRatio, AbsorptionRange); err != nil {
		return err
	}
	return nil
}

func (im *Image) validate(path string) error {
	if err := checkRange(path+".width_nm", im.WidthNm, FieldRange); err != nil {
		return err
	}
	if err := checkRange(path+".height_nm", im.HeightNm, FieldRange); err != nil {
		return err
	}
	if len(im.Pixels) != 2 {
		return fieldErr(path+".pixels", "%v: needs two numbers [nx, ny]", im.Pixels)
	}
	nx, ny := im.Pixels[0], im.Pixels[1]
	if nx <= 0 || ny <= 0 {
		return fieldErr(path+".pixels", "%v: both must be positive", im.Pixels)
	}
	if nx > sim.MaxPixels || ny > sim.MaxPixels || nx*ny > sim.MaxPixels {
		return fieldErr(path+".pixels", "%v: more than %d columns in all (4096 × 4096), the limit that keeps a render in memory", im.Pixels, sim.MaxPixels)
	}
	px, py := im.WidthNm/float64(nx), im.HeightNm/float64(ny)
	if math.Abs(px-py) > 1e-6*math.Max(px, py) {
		return fieldErr(path+".pixels", "%v over %g × %g nm gives pixels %.4g nm wide and %.4g nm high; pixels must be square", im.Pixels, im.WidthNm, im.HeightNm, px, py)
	}
	if len(im.XAxis) > 0 {
		if err := indices(path+".x_axis", im.XAxis); err != nil {
			return err
		}
	}
	return im.checkBlur(path + ".blur_nm")
}

// MaxLengthNm bounds every length in a scene (positions, sizes, the
// field of view, the thickness): 1 mm, far beyond any TEM specimen, so that
// no field is evaluated where its arithmetic overflows.
const MaxLengthNm = 1e6

func positive(path string, v float64) error {
	if v > MaxLengthNm {
		return fieldErr(path, "%g nm: more than %g nm (1 mm)", v, MaxLengthNm)
	}
	if !(v > 0) || math.IsInf(v, 0) {
		if v == 0 {
			return fieldErr(path, "missing or zero; must be positive")
		}
		return fieldErr(path, "%g: must be positive", v)
	}
	return nil
}

// indices checks direction indices (beam, foil normal, a defect's line,
// loop normal or fault edge): see crystal.CheckIndices.
func indices(path string, v []float64) error { return indexErr(path, v, false) }

// planeIndices checks plane indices (hkl), whole numbers.
func planeIndices(path string, v []float64) error { return indexErr(path, v, true) }

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func allFinite(v []float64) bool {
	for _, x := range v {
		if !finite(x) {
			return false
		}
	}
	return true
}

func allZero(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return false
		}
	}
	return true
}
