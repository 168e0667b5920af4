package scene

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/defects"
)

// buildDefects turns the scene's defects into one displacement field in the
// image frame.
func (st *Setup) buildDefects() (defects.Sum, error) {
	var sum defects.Sum
	for i := range st.Scene.Defects {
		f, err := st.buildDefect(fmt.Sprintf("defects[%d]", i), &st.Scene.Defects[i])
		if err != nil {
			return nil, err
		}
		sum = append(sum, f)
	}
	return sum, nil
}

// reader turns the indices of a defect into image-frame vectors, keeping
// the first error, so a defect reads its fields in a row and checks once.
type reader struct {
	st  *Setup
	err error
}

// medium returns the elastic medium, which the defect at path needs.
func (r *reader) medium(path string) defects.Medium {
	if r.err != nil {
		return defects.Medium{}
	}
	if !r.st.Crystal.HasElastic {
		r.err = fieldErr("crystal.elastic", "needed by %s: give {c11, c12, c44} (cubic), {c11, c12, c13, c33, c44} (hexagonal), {cij} or {shear_gpa, poisson}", path)
		return defects.Medium{}
	}
	return r.st.medium()
}

// burgers reads a Burgers vector (or fault shift) written as text and
// returns it in nm in the image frame.
func (r *reader) burgers(path, text string) r3.Vec {
	if r.err != nil {
		return r3.Vec{}
	}
	uvw, err := r.st.Crystal.Cell.Burgers(text)
	if err != nil {
		r.err = wrapErr(path, err)
		return r3.Vec{}
	}
	return r.st.ImageVector(uvw)
}

// direction returns the direction [uvw] (three or four indices) in the
// image frame.
func (r *reader) direction(path string, v []float64) r3.Vec {
	if r.err != nil {
		return r3.Vec{}
	}
	uvw, err := r.st.Crystal.Cell.DirectionIndices(v)
	if err != nil {
		r.err = wrapErr(path, err)
		return r3.Vec{}
	}
	return r.st.ImageVector(uvw)
}

// planeNormal returns the normal of the plane (hkl) in the image frame.
func (r *reader) planeNormal(path string, v []float64) r3.Vec {
	if r.err != nil {
		return r3.Vec{}
	}
	hkl, err := r.st.Crystal.Cell.PlaneIndices(v)
	if err != nil {
		r.err = wrapErr(path, err)
		return r3.Vec{}
	}
	return r.st.rotate(r.st.Crystal.Cell.Reciprocal(hkl))
}

// anisotropic tells whether a dislocation uses Stroh's anisotropic field:
// as asked, or by default wherever the full elastic constants are known.
func (r *reader) anisotropic(path string, d *Defect, m defects.Medium) bool {
	if r.err != nil {
		return false
	}
	switch d.Elasticity {
	case "anisotropic":
		if m.C == nil {
			r.err = fieldErr(path+".elasticity", "anisotropic needs the full elastic constants of the crystal, and it has only {shear_gpa, poisson}")
		}
		return true
	case "isotropic":
		return false
	}
	return m.C != nil
}

// buildDefect makes the displacement field of one defect.
func (st *Setup) buildDefect(path string, d *Defect) (defects.Field, error) {
	at := r3.Vec{}
	if len(d.AtNm) == 3 {
		at = r3.Vec{X: d.AtNm[0], Y: d.AtNm[1], Z: d.AtNm[2]}
	}
	var (
		f   defects.Field
		err error
	)
	rd := &reader{st: st}
	switch d.Type {
	case "dislocation":
		m := rd.medium(path)
		b := rd.burgers(path+".b", d.B)
		line := rd.direction(path+".line", d.Line)
		aniso := rd.anisotropic(path, d, m)
		if rd.err != nil {
			return nil, rd.err
		}
		f, err = defects.NewDislocation(b, line, at, m, aniso)
	case "fault":
		n := rd.planeNormal(path+".plane", d.Plane)
		shiftText, shift := rd.faultShift(path, d)
		if rd.err != nil {
			return nil, rd.err
		}
		if d.Kind != "" {
			st.Notes = append(st.Notes, fmt.Sprintf("%s: %s fault on %s: R = %s (on the side the plane normal points to)", path, d.Kind, fmtPlane(d.Plane), shiftText))
		}
		if d.Edge == nil {
			f, err = defects.NewFault(at, n, shift)
			break
		}
		edge := rd.direction(path+".edge", d.Edge)
		if rd.err != nil {
			return nil, rd.err
		}
		if math.Abs(r3.Dot(r3.Unit(edge), r3.Unit(n))) > 1e-6 {
			return nil, fieldErr(path+".edge", "%s does not lie in the fault plane %s", fmtIdx(d.Edge), fmtPlane(d.Plane))
		}
		f, err = defects.NewBoundedFault(at, n, shift, edge, d.BoundsNm[0], d.BoundsNm[1])
	case "dissociated":
		if err := st.checkDissociation(path, d); err != nil {
			return nil, err
		}
		m := rd.medium(path)
		b := rd.burgers(path+".b", d.B)
		b1 := rd.burgers(path+".partials[0]", d.Partials[0])
		b2 := rd.burgers(path+".partials[1]", d.Partials[1])
		line := rd.direction(path+".line", d.Line)
		n := rd.planeNormal(path+".plane", d.Plane)
		aniso := rd.anisotropic(path, d, m)
		if rd.err != nil {
			return nil, rd.err
		}
		var sep float64
		if d.SeparationNm != nil {
			sep = *d.SeparationNm
		} else {
			if sep, err = defects.SeparationFromSFE(b1, b2, line, m, *d.SFEmJm2, aniso); err != nil {
				return nil, defectErr(path, err)
			}
			kind := "isotropic"
			if aniso {
				kind = "anisotropic"
			}
			st.Notes = append(st.Notes, fmt.Sprintf("%s: partial separation %.2f nm from the stacking-fault energy %g mJ/m² (%s elasticity)", path, sep, *d.SFEmJm2, kind))
		}
		f, err = defects.NewDissociated(b, b1, b2, line, at, n, sep, m, aniso)
	case "loop":
		m := rd.medium(path)
		b, n, reversed := rd.loopBurgers(path, d)
		if rd.err != nil {
			return nil, rd.err
		}
		if reversed {
			st.Notes = append(st.Notes, fmt.Sprintf("%s: %s loop: b = −(%s), so that b·n %s 0", path, d.Nature, d.B, map[bool]string{true: ">", false: "<"}[d.Nature == "vacancy"]))
		}
		f, err = defects.NewLoop(at, n, b, *d.RadiusNm, m)
	case "cavity":
		// Checked against the foil once the foil is known (the last
		// stage of the build).
		st.spheres = append(st.spheres, sphere{path: path, at: at, radius: *d.RadiusNm})
		f, err = defects.NewCavity(at, *d.RadiusNm)
	case "inclusion":
		strain := 0.0
		if d.Strain != nil {
			strain = *d.Strain
		} else {
			m := rd.medium(path)
			if rd.err != nil {
				return nil, rd.err
			}
			// Ashby & Brown (1963): ε = δ(1+ν)/(3(1−ν)).
			strain = defects.StrainFromMisfit(*d.Misfit, m.Poisson)
			st.Notes = append(st.Notes, fmt.Sprintf("%s: misfit %g (%s) gives constrained strain ε = %.4g (ν = %.3g)", path, *d.Misfit, expanding(*d.Misfit), strain, m.Poisson))
		}
		f, err = defects.NewInclusion(at, *d.RadiusNm, strain)
	}
	if err != nil {
		return nil, defectErr(path, err)
	}
	return f, nil
}

// insideFoil checks that a cavity lies inside the foil of thickness t and
// surface normal n (zero: along the beam): its distance from both surface
// planes is at least its radius.
func insideFoil(s sphere, n r3.Vec, t float64) error {
	path, c, r := s.path, s.at, s.radius
	if n == (r3.Vec{}) {
		n = r3.Vec{Z: 1}
	}
	top := r3.Dot(n, c)            // distance below the entrance plane n·p = 0
	bottom := t*n.Z - r3.Dot(n, c) // distance above the exit plane n·p = t n_z
	if top < r || bottom < r {
		return fieldErr(path, "a cavity of radius %g nm at depth %g nm reaches outside the foil (%g nm thick); cavities must lie inside it", r, c.Z, t)
	}
	return nil
}

// checkDissociation checks a dissociated dislocation in the indices the
// user wrote: the line, b and both partials lie in the glide plane
// (h u + k v + l w = 0, the Weiss zone law) and the partials add up to b.
func (st *Setup) checkDissociation(path string, d *Defect) error {
	cell := st.Crystal.Cell
	hkl, err := cell.PlaneIndices(d.Plane)
	if err != nil {
		return wrapErr(path+".plane", err)
	}
	inPlane := func(field, what string, uvw [3]float64) error {
		dot := hkl[0]*uvw[0] + hkl[1]*uvw[1] + hkl[2]*uvw[2]
		if math.Abs(dot) > 1e-9 {
			return fieldErr(field, "%s does not lie in the glide plane %s", what, fmtPlane(d.Plane))
		}
		return nil
	}
	line, err := cell.DirectionIndices(d.Line)
	if err != nil {
		return wrapErr(path+".line", err)
	}
	if err := inPlane(path+".line", "the line "+fmtIdx(d.Line), line); err != nil {
		return err
	}
	b, err := cell.Burgers(d.B)
	if err != nil {
		return wrapErr(path+".b", err)
	}
	if err := inPlane(path+".b", "b = "+d.B, b); err != nil {
		return err
	}
	var sum [3]float64
	for i, text := range d.Partials {
		p, err := cell.Burgers(text)
		if err != nil {
			return wrapErr(fmt.Sprintf("%s.partials[%d]", path, i), err)
		}
		if err := inPlane(fmt.Sprintf("%s.partials[%d]", path, i), "the partial "+text, p); err != nil {
			return err
		}
		for k := range sum {
			sum[k] += p[k]
		}
	}
	for k := range sum {
		if math.Abs(sum[k]-b[k]) > 1e-9 {
			return fieldErr(path+".partials", "%s + %s does not add up to b = %s", d.Partials[0], d.Partials[1], d.B)
		}
	}
	return nil
}

// expanding names the sign of an inclusion's misfit or strain: an
// expanding inclusion (> 0) is larger than its hole.
func expanding(x float64) string {
	switch {
	case x > 0:
		return "expanding"
	case x < 0:
		return "contracting"
	}
	return "no misfit"
}
