package scene

import (
	"fmt"
	"math"

	"faultline/crystal"
	"faultline/sim"
)

// The physical ranges of the scene's numbers outside the defects (the
// defects' ranges are in their descriptions, describe.go). Each is stated
// in the README's scene reference; TestRangesNameTheirField checks each
// end. A number outside its range is refused where it enters, naming its
// field.
var (
	// From the lowest voltages of conventional TEMs (tens of kV) to the
	// highest-voltage instruments built (3 MV, from memory).
	VoltageRange = Range{Min: 10, Max: 3000, Unit: "kV", Reason: "from low-voltage to the highest-voltage microscopes"}
	// A cell edge: see crystal.MinCellNm and MaxCellNm.
	CellEdgeRange  = Range{Min: crystal.MinCellNm, Max: crystal.MaxCellNm, Unit: "nm", Reason: "real unit cells lie well inside"}
	CellAngleRange = Range{Min: 0, Max: 180, MinOpen: true, MaxOpen: true, Unit: "°"}
	// Fractional coordinates outside the cell are wrapped into it; beyond
	// ±1000 cells the wrap loses digits.
	FractionalRange = Range{Min: -1000, Max: 1000, Reason: "fractional coordinates"}
	OccupancyRange  = Range{Min: 0, Max: 1, MinOpen: true}
	// See crystal.checkAtom: B = 1 nm² (100 Å²) is beyond any solid.
	BIsoRange = Range{Min: 0, Max: 1, Unit: "nm²", Reason: "100 Å², beyond any solid"}
	// Elastic constants: see crystal.MaxStiffnessGPa.
	StiffnessRange = Range{Min: -crystal.MaxStiffnessGPa, Max: crystal.MaxStiffnessGPa, Unit: "GPa", Reason: "diamond has C11 ≈ 1080 GPa"}
	ShearRange     = Range{Min: 0, Max: crystal.MaxStiffnessGPa, MinOpen: true, Unit: "GPa"}
	PoissonRange   = Range{Min: -1, Max: 0.5, MinOpen: true, MaxOpen: true, Reason: "a stable isotropic solid"}
	// An excitation error beyond 10 /nm puts g far from any Bragg
	// condition (the g(20g) weak-beam condition of a high-order g stays
	// below it); the column integration is accurate within it.
	SRange = Range{Min: -10, Max: 10, Unit: "/nm", Reason: "far beyond any useful deviation"}
	// w = s ξ_g; weak-beam images use w of a few to ten.
	WRange = Range{Min: -1000, Max: 1000, Reason: "weak-beam conditions use w of a few to ten"}
	// ξ_g of real reflections runs from about 10 nm (low order, heavy
	// atoms) to thousands of nm (high order).
	ExtinctionRange = Range{Min: 1, Max: 1e5, Unit: "nm"}
	AbsorptionRange = Range{Min: 0, Max: 1, MaxOpen: true, Reason: "ξ_g/ξ'_g; 0 turns absorption off"}
	// A foil thinner than 0.1 nm is less than one atomic plane; none is
	// electron-transparent beyond a few µm even at 3 MV.
	ThicknessRange = Range{Min: 0.1, Max: 1e4, Unit: "nm", Reason: "from one atomic plane to 10 µm, far beyond electron transparency"}
	// A side of the field: a strip one pixel high may be narrow, but below
	// a thousandth of a nanometre it is no length a column resolves.
	FieldRange        = Range{Min: 1e-3, Max: MaxLengthNm, Unit: "nm", Reason: "from a thousandth of a nanometre to 1 mm"}
	KikuchiRange      = Range{Min: -MaxLengthNm, Max: MaxLengthNm, Reason: "in any unit of length, the same for both"}
	KikuchiSpaceRange = Range{Min: 0, Max: MaxLengthNm, MinOpen: true}
	// Indices: see crystal.CheckIndices (each zero or within
	// [crystal.MinIndex, crystal.MaxIndex] in magnitude, g and plane
	// normals whole numbers).
)

// MaxOpacity bounds 2πt/ξ'_0, the mean absorption through the foil: at
// 575 the foil transmits e^−575 ≈ 1e−250 of the beam, an opaque foil
// whose image holds nothing but numerical noise.
const MaxOpacity = 575

// checkRange refuses v outside r, naming path.
func checkRange(path string, v float64, r Range) error {
	if r.Contains(v) {
		return nil
	}
	u := ""
	if r.Unit != "" {
		u = " " + r.Unit
	}
	msg := fmt.Sprintf("%s%s: must be %s", fmtNum(v), u, r)
	if r.Reason != "" {
		msg += " (" + r.Reason + ")"
	}
	if v == 0 && r.Unit != "" {
		msg = "missing or zero; " + msg
	}
	return fieldErr(path, "%s", msg)
}

// checkOptional is checkRange for an optional number.
func checkOptional(path string, v *float64, r Range) error {
	if v == nil {
		return nil
	}
	return checkRange(path, *v, r)
}

// checkDerivedS refuses an excitation error derived from another field
// (w, weak_beam.n, a Kikuchi measurement) outside SRange, naming that
// field and how s followed from it.
func checkDerivedS(path string, s float64, how string) error {
	if SRange.Contains(s) {
		return nil
	}
	return fieldErr(path, "%s gives s = %.4g /nm, outside %s (%s)", how, s, SRange, SRange.Reason)
}

// checkOpacity refuses a foil so thick that the beam does not get through
// (see MaxOpacity); the message names the thickness and what limits it.
func checkOpacity(thicknessNm, xi0AbsNm float64) error {
	if xi0AbsNm <= 0 || math.IsInf(xi0AbsNm, 0) {
		return nil
	}
	if k := 2 * math.Pi * thicknessNm / xi0AbsNm; k > MaxOpacity {
		return fieldErr("foil.thickness_nm", "%g nm with the mean absorption length ξ'_0 = %.4g nm transmits e^−%.0f of the beam: opaque; at most %.4g nm (or lower diffraction.absorption_ratio)", thicknessNm, xi0AbsNm, k, MaxOpacity*xi0AbsNm/(2*math.Pi))
	}
	return nil
}

// checkBlur refuses a blur outside sim.CheckBlur's range for the field.
func (im *Image) checkBlur(path string) error {
	if im.BlurNm == nil {
		return nil
	}
	g := sim.Grid{NX: im.Pixels[0], NY: im.Pixels[1], WidthNm: im.WidthNm, HeightNm: im.HeightNm}
	if err := sim.CheckBlur(*im.BlurNm, g); err != nil {
		return fieldErr(path, "%v", err)
	}
	return nil
}

// indexErr checks indices with crystal.CheckIndices, naming path.
func indexErr(path string, v []float64, whole bool) error {
	if err := crystal.CheckIndices(v, whole); err != nil {
		return fieldErr(path, "%v: %v", fmtVec(v), err)
	}
	return nil
}

func fmtVec(v []float64) string {
	s := "["
	for i, x := range v {
		if i > 0 {
			s += ", "
		}
		s += fmtNum(x)
	}
	return s + "]"
}
