package scene

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/crystal"
)

// FaultKinds lists the values of a fault's kind.
var FaultKinds = []string{"intrinsic", "extrinsic", "I1", "I2", "E"}

// FaultKindShift returns the fault vector R of a fault of the named kind
// on the plane (hkl) of cell, as the trade writes it, in the README's
// convention (R moves the crystal on the side the plane normal points to):
//
//   - a {111} plane of a cubic cell (the close-packed plane of the fcc and
//     diamond structures): an intrinsic fault is a removed layer, the two
//     sides closing up by one layer spacing d = |1/3<111>| along the
//     normal, R = −1/3[h k l] for the plane (h k l) with |h| = |k| = |l|
//     = 1; an extrinsic fault is an inserted layer, R = +1/3[h k l]
//     (Hirsch et al. 1965, Electron Microscopy of Thin Crystals, ch. 10;
//     Hirth & Lothe 1982, Theory of Dislocations, ch. 10);
//   - the basal plane (0 0 0 1) of a hexagonal cell: the three faults of
//     the close-packed hexagonal stacking (Hirth & Lothe 1982, ch. 10 —
//     from memory): I1 (one change of stacking, a removed layer followed
//     by shear), R = 1/6[2 −2 0 3]; I2 (shear), R = 1/3[1 −1 0 0]; and E
//     (an inserted layer), R = 1/2[0 0 0 1]. Their c components are half
//     a lattice vector, so R and −R differ by a lattice vector and give
//     the same image; of the equivalent in-plane parts one is chosen.
//
// Other planes and cells have no named fault: give the shift.
func FaultKindShift(cell crystal.Cell, plane []float64, kind string) (string, error) {
	hkl, err := cell.PlaneIndices(plane)
	if err != nil {
		return "", err
	}
	cubic := near(cell.A, cell.B) && near(cell.A, cell.C) && near(cell.Alpha, 90) && near(cell.Beta, 90) && near(cell.Gamma, 90)
	hexagonal := near(cell.A, cell.B) && near(cell.Alpha, 90) && near(cell.Beta, 90) && near(cell.Gamma, 120)
	plane111 := hkl[0] != 0 && math.Abs(hkl[0]) == math.Abs(hkl[1]) && math.Abs(hkl[1]) == math.Abs(hkl[2])
	basal := hkl[0] == 0 && hkl[1] == 0 && hkl[2] != 0
	switch kind {
	case "intrinsic", "extrinsic":
		if hexagonal && basal {
			return "", fmt.Errorf("%s: on the basal plane of a hexagonal crystal the faults are I1, I2 and E", kind)
		}
		if !cubic || !plane111 {
			return "", fmt.Errorf("%s: R is worked out for a {1 1 1} plane of a cubic crystal; for %s give the shift", kind, fmtPlane(plane))
		}
		sign := -1.0
		if kind == "extrinsic" {
			sign = 1
		}
		var v [3]int
		for i := range v {
			v[i] = int(sign * math.Copysign(1, hkl[i]))
		}
		return fmt.Sprintf("1/3[%d %d %d]", v[0], v[1], v[2]), nil
	case "I1", "I2", "E":
		if !hexagonal || !basal {
			return "", fmt.Errorf("%s: a fault of the basal plane (0 0 0 1) of a hexagonal crystal; for %s give the shift", kind, fmtPlane(plane))
		}
		return map[string]string{"I1": "1/6[2 -2 0 3]", "I2": "1/3[1 -1 0 0]", "E": "1/2[0 0 0 1]"}[kind], nil
	}
	return "", fmt.Errorf("%q: use %s", kind, fmtList(FaultKinds))
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }

func fmtList(s []string) string {
	out := ""
	for i, x := range s {
		switch {
		case i == 0:
		case i == len(s)-1:
			out += " or "
		default:
			out += ", "
		}
		out += x
	}
	return out
}

// faultShift returns a fault's vector as text (its shift, or the vector
// its kind names) and in nm in the frame of g.
func (r *reader) faultShift(path string, d *Defect) (string, r3.Vec) {
	if r.err != nil {
		return "", r3.Vec{}
	}
	text := d.Shift
	if d.Kind != "" {
		var err error
		if text, err = FaultKindShift(r.st.Crystal.Cell, d.Plane, d.Kind); err != nil {
			r.err = wrapErr(path+".kind", err)
			return "", r3.Vec{}
		}
		return text, r.burgers(path+".kind", text)
	}
	return text, r.burgers(path+".shift", text)
}

// loopBurgers returns a loop's Burgers vector in nm in the frame of g,
// with the sign its nature asks for (vacancy: b·n > 0; interstitial:
// b·n < 0; see the README's Conventions) when a nature is given, and as
// written otherwise; and whether the sign was reversed.
func (r *reader) loopBurgers(path string, d *Defect) (b, n r3.Vec, reversed bool) {
	b = r.burgers(path+".b", d.B)
	n = r.direction(path+".normal", d.Normal)
	if r.err != nil || d.Nature == "" {
		return b, n, false
	}
	bn := r3.Dot(b, r3.Unit(n))
	if math.Abs(bn) < 1e-9*r3.Norm(b) {
		r.err = fieldErr(path+".nature", "b = %s lies in the loop's plane %s (a shear loop), which is neither vacancy nor interstitial; leave nature out", d.B, fmtIdx(d.Normal))
		return b, n, false
	}
	if (bn > 0) != (d.Nature == "vacancy") {
		return r3.Scale(-1, b), n, true
	}
	return b, n, false
}
