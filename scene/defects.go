package scene

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/defects"
)

// buildDefects turns the scene's defects into one displacement field in the
// image frame.
func (st *Setup) buildDefects() (defects.Sum, error) {
	var sum defects.Sum
	cell := st.Crystal.Cell
	needMedium := func(path string) (defects.Medium, error) {
		if !st.Crystal.HasElastic {
			return defects.Medium{}, fieldErr("crystal.elastic", "needed by %s: give {c11, c12, c44} (cubic), {c11, c12, c13, c33, c44} (hexagonal), {cij} or {shear_gpa, poisson}", path)
		}
		return st.medium(), nil
	}
	burgers := func(path, text string) (r3.Vec, error) {
		uvw, err := cell.Burgers(text)
		if err != nil {
			return r3.Vec{}, wrapErr(path, err)
		}
		return st.ImageVector(uvw), nil
	}
	direction := func(path string, v []float64) (r3.Vec, error) {
		uvw, err := cell.DirectionIndices(v)
		if err != nil {
			return r3.Vec{}, wrapErr(path, err)
		}
		return st.ImageVector(uvw), nil
	}
	planeNormal := func(path string, v []float64) (r3.Vec, error) {
		hkl, err := cell.PlaneIndices(v)
		if err != nil {
			return r3.Vec{}, wrapErr(path, err)
		}
		return st.rotate(cell.Reciprocal(hkl)), nil
	}
	for i := range st.Scene.Defects {
		d := &st.Scene.Defects[i]
		path := fmt.Sprintf("defects[%d]", i)
		at := r3.Vec{}
		if len(d.AtNm) == 3 {
			at = r3.Vec{X: d.AtNm[0], Y: d.AtNm[1], Z: d.AtNm[2]}
		}
		var (
			f   defects.Field
			err error
		)
		switch d.Type {
		case "dislocation":
			m, err := needMedium(path)
			if err != nil {
				return nil, err
			}
			b, err := burgers(path+".b", d.B)
			if err != nil {
				return nil, err
			}
			line, err := direction(path+".line", d.Line)
			if err != nil {
				return nil, err
			}
			aniso := st.anisotropic(d, m)
			if d.Elasticity == "anisotropic" && m.C == nil {
				return nil, fieldErr(path+".elasticity", "anisotropic needs the full elastic constants of the crystal, and it has only {shear_gpa, poisson}")
			}
			dis, err := defects.NewDislocation(b, line, at, m, aniso)
			if err != nil {
				return nil, defectErr(path, err)
			}
			f = dis
		case "fault":
			n, err := planeNormal(path+".plane", d.Plane)
			if err != nil {
				return nil, err
			}
			shift, err := burgers(path+".shift", d.Shift)
			if err != nil {
				return nil, err
			}
			if f, err = defects.NewFault(at, n, shift); err != nil {
				return nil, defectErr(path, err)
			}
		case "inclusion":
			strain := 0.0
			if d.Strain != nil {
				strain = *d.Strain
			} else {
				m, err := needMedium(path)
				if err != nil {
					return nil, err
				}
				// Ashby & Brown (1963): ε = δ(1+ν)/(3(1−ν)).
				strain = defects.StrainFromMisfit(*d.Misfit, m.Poisson)
				st.Notes = append(st.Notes, fmt.Sprintf("%s: misfit %g gives constrained strain ε = %.4g (ν = %.3g)", path, *d.Misfit, strain, m.Poisson))
			}
			if f, err = defects.NewInclusion(at, *d.RadiusNm, strain); err != nil {
				return nil, defectErr(path, err)
			}
		default:
			return nil, fieldErr(path+".type", "%s defects are not built yet; the simulator has dislocation, fault and inclusion", d.Type)
		}
		_ = err
		sum = append(sum, f)
	}
	return sum, nil
}

// anisotropic tells whether a dislocation uses Stroh's anisotropic field:
// as asked, or by default wherever the full elastic constants are known.
func (st *Setup) anisotropic(d *Defect, m defects.Medium) bool {
	switch d.Elasticity {
	case "anisotropic":
		return true
	case "isotropic":
		return false
	}
	return m.C != nil
}
