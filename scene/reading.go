package scene

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// A Reading is what a microscopist would read from the image of one defect
// under the scene's g and s: its nature in words and the contrast rule
// that tells it, in the sign conventions of the README's "Conventions".
type Reading struct {
	Path string // "defects[i]"
	Text string // "loop 2: vacancy (b·n > 0), …"
}

// Readings returns one reading per defect of the scene, in order. The
// rules behind them are reproduced from rendered images by the tests in
// tests/ named in the README's "Reading the signs":
//
//   - fault: α = 2π g·R (modulo 2π, in (−180°, 180°]); in a thick foil
//     near s = 0 the bright-field outer fringes are bright for sin α > 0 and
//     dark for sin α < 0, and in dark field the top fringe matches the
//     bright field while the bottom one is reversed (Hashimoto, Howie &
//     Whelan 1962); for fcc {111} faults and g of type {111}, {220}, {400},
//     g points away from the bright dark-field outer fringe of an intrinsic
//     fault, and the reverse for {200}, {222}, {440} (Gevers, Art &
//     Amelinckx 1963).
//   - dislocation: g·b and g·(b×u); for g·b ≠ 0 the image lies along
//     sign((g·b)s)·(u × z) (Hirsch, Howie & Whelan 1960); for g·b = 0
//     residual contrast from g·(b×u) (weak below 0.64: Hirsch et al. 1965,
//     ch. 11 — from memory).
//   - loop: nature from b·n (vacancy b·n > 0); outside contrast when
//     (g·b)s > 0 with b taken for the line sense clockwise seen from the
//     electron source, i.e. (g·b)s(n·z) > 0 (Groves & Kelly 1961; Maher &
//     Eyre 1971); for small loops, the sense of the dark-field
//     black–white lobes at s ≈ 0 by depth layer (Wilkens & Rühle 1972;
//     Eyre, Maher & Perrin 1977).
//   - inclusion: expanding (misfit > 0) or contracting, and the lobe sense
//     near either surface (Ashby & Brown 1963).
//
// A defect whose indices cannot be read (Build would have refused it)
// gets a reading that says so.
func (st *Setup) Readings() []Reading {
	out := make([]Reading, len(st.Scene.Defects))
	for i := range st.Scene.Defects {
		d := &st.Scene.Defects[i]
		path := fmt.Sprintf("defects[%d]", i)
		text, err := st.reading(d)
		if err != nil {
			text = "cannot be read: " + err.Error()
		}
		out[i] = Reading{Path: path, Text: fmt.Sprintf("%s %d: %s", d.Type, i+1, text)}
	}
	return out
}

// ReadingLines returns the readings as lines of text.
func (st *Setup) ReadingLines() []string {
	var lines []string
	for _, r := range st.Readings() {
		lines = append(lines, r.Text)
	}
	return lines
}

// gVec is g in the image frame, 1/nm: along +x.
func (st *Setup) gVec() r3.Vec { return r3.Vec{X: st.GPerNm} }

// sNearZero tells whether s is too small to give an image a side: |w| below
// 0.1 (common practice: w ≈ 0 is "at the Bragg position").
func (st *Setup) sNearZero() bool { return math.Abs(st.W) < 0.1 }

func (st *Setup) reading(d *Defect) (string, error) {
	rd := &reader{st: st}
	switch d.Type {
	case "dislocation":
		b := rd.burgers("b", d.B)
		u := rd.direction("line", d.Line)
		if rd.err != nil {
			return "", rd.err
		}
		return st.dislocationReading(d.B, b, r3.Unit(u)), nil
	case "dissociated":
		b1 := rd.burgers("partials[0]", d.Partials[0])
		b2 := rd.burgers("partials[1]", d.Partials[1])
		u := rd.direction("line", d.Line)
		if rd.err != nil {
			return "", rd.err
		}
		g := st.gVec()
		a := faultAngleDeg(r3.Dot(g, b1))
		return fmt.Sprintf("partials g·b1 = %s, g·b2 = %s; the ribbon between them is a fault with α = 2π g·b1 = %+.0f°; %s",
			fmtFrac(r3.Dot(g, b1)), fmtFrac(r3.Dot(g, b2)), a, st.sideWords(r3.Dot(g, r3.Add(b1, b2)), r3.Unit(u))), nil
	case "fault":
		n := rd.planeNormal("plane", d.Plane)
		text, R := rd.faultShift("", d)
		if rd.err != nil {
			return "", rd.err
		}
		return st.faultReading(d, text, r3.Unit(n), R), nil
	case "loop":
		b, n, _ := rd.loopBurgers("", d)
		if rd.err != nil {
			return "", rd.err
		}
		return st.loopReading(d, b, r3.Unit(n)), nil
	case "inclusion":
		return st.inclusionReading(d), nil
	case "cavity":
		return fmt.Sprintf("radius %g nm: no strain field; its contrast comes from the missing thickness of crystal, and it carries no sign to read", *d.RadiusNm), nil
	}
	return "", fmt.Errorf("unknown type %q", d.Type)
}

// dislocationReading: g·b, g·(b×u) and the side of the image.
func (st *Setup) dislocationReading(bText string, b, u r3.Vec) string {
	g := st.gVec()
	gb := r3.Dot(g, b)
	gbu := r3.Dot(g, r3.Cross(b, u))
	if math.Abs(gb) < 1e-6 {
		switch {
		case math.Abs(gbu) < 1e-6:
			return "g·b = 0, g·(b×u) = 0: invisible in isotropic elasticity (anisotropy can leave weak residual contrast)"
		case math.Abs(gbu) < 0.64:
			return fmt.Sprintf("g·b = 0, g·(b×u) = %.2f: weak residual contrast (below 0.64)", gbu)
		}
		return fmt.Sprintf("g·b = 0, g·(b×u) = %.2f: residual contrast", gbu)
	}
	return fmt.Sprintf("b = %s, g·b = %s, g·(b×u) = %.2f; %s", bText, fmtFrac(gb), gbu, st.sideWords(gb, u))
}

// sideWords says on which side of a line of sense u the image of a
// dislocation with the given g·b lies: along sign((g·b)s)·(u × z).
func (st *Setup) sideWords(gb float64, u r3.Vec) string {
	if math.Abs(gb) < 1e-6 {
		return "g·b = 0 for the total Burgers vector"
	}
	side := r3.Cross(u, r3.Vec{Z: 1})
	if r3.Norm(side) < 1e-6 {
		return "the line is end-on: its image has no side"
	}
	if st.sNearZero() {
		return "s ≈ 0: the image is centred on the line; tilt to s ≠ 0 to read its side"
	}
	rel := "> 0"
	if gb*st.SPerNm < 0 {
		side = r3.Scale(-1, side)
		rel = "< 0"
	}
	return fmt.Sprintf("(g·b)s %s → image on the %s side of the line (g points %s)", rel, st.pictureDirection(side), st.gWord())
}

// faultReading: kind, α, and the outer fringes.
func (st *Setup) faultReading(d *Defect, shift string, n, R r3.Vec) string {
	g := st.gVec()
	alpha := faultAngleDeg(r3.Dot(g, R))
	var b strings.Builder
	kind := d.Kind
	if kind == "" {
		kind = st.faultKind(d, n, R)
	}
	if kind != "" {
		fmt.Fprintf(&b, "%s (R = %s on %s), ", kind, shift, fmtPlane(d.Plane))
	} else {
		fmt.Fprintf(&b, "R = %s on %s, ", shift, fmtPlane(d.Plane))
	}
	if math.Abs(alpha) < 0.5 {
		b.WriteString("α = 0°")
	} else {
		fmt.Fprintf(&b, "α = %+.0f°", alpha)
	}
	switch {
	case math.Abs(alpha) < 0.5:
		b.WriteString(": invisible (g·R a whole number)")
		return b.String()
	case math.Abs(math.Abs(alpha)-180) < 0.5:
		b.WriteString(": the outer fringes do not tell the sign of R at α = 180°")
		return b.String()
	case math.Abs(n.Z) > 1-1e-6:
		b.WriteString(": the fault lies parallel to the foil (no fringes to read)")
		return b.String()
	case math.Abs(n.Z) < 1e-6:
		b.WriteString(": the fault is edge-on (no fringes to read)")
		return b.String()
	}
	bright := math.Sin(alpha*math.Pi/180) > 0
	top := r3.Scale(math.Copysign(1, n.Z), r3.Vec{X: n.X, Y: n.Y})
	word := map[bool]string{true: "bright", false: "dark"}
	fmt.Fprintf(&b, "; thick foil near s = 0: bright-field outer fringes %s; dark field: %s at the top end (%s), %s at the bottom end",
		word[bright], word[bright], st.pictureDirection(top), word[!bright])
	brightEnd := top
	if !bright {
		brightEnd = r3.Scale(-1, top)
	}
	if math.Abs(brightEnd.X) > 1e-6 {
		towards := brightEnd.X > 0
		fmt.Fprintf(&b, "; g points %s the bright dark-field fringe", map[bool]string{true: "towards", false: "away from"}[towards])
		if fam := st.geversFamily(d); fam != 0 {
			intrinsic := towards != (fam == 1)
			fmt.Fprintf(&b, ", which for this g reads as %s", map[bool]string{true: "intrinsic", false: "extrinsic"}[intrinsic])
		}
	}
	return b.String()
}

// faultKind names a fault whose vector is one layer spacing along the
// plane normal: R = −d n̂ (the sides close up: intrinsic) or +d n̂
// (extrinsic), with d the spacing of the planes (h k l) as written. Other
// vectors get no name.
func (st *Setup) faultKind(d *Defect, n, R r3.Vec) string {
	hkl, err := st.Crystal.Cell.PlaneIndices(d.Plane)
	if err != nil {
		return ""
	}
	spacing := 1 / r3.Norm(st.Crystal.Cell.Reciprocal(hkl))
	along := r3.Dot(R, n)
	if r3.Norm(r3.Sub(R, r3.Scale(along, n))) > 1e-6*spacing || math.Abs(math.Abs(along)-spacing) > 1e-6*spacing {
		return ""
	}
	if along < 0 {
		return "intrinsic"
	}
	return "extrinsic"
}

// geversFamily returns 1 for a cubic crystal, a {111} fault plane and g of
// type {111}, {220} or {400}; −1 for {200}, {222} or {440}; 0 otherwise.
func (st *Setup) geversFamily(d *Defect) int {
	c := st.Crystal.Cell
	if math.Abs(c.A-c.B) > 1e-9 || math.Abs(c.A-c.C) > 1e-9 || math.Abs(c.Alpha-90) > 1e-9 || math.Abs(c.Beta-90) > 1e-9 || math.Abs(c.Gamma-90) > 1e-9 {
		return 0
	}
	hkl, err := c.PlaneIndices(d.Plane)
	if err != nil || math.Abs(hkl[0]) != math.Abs(hkl[1]) || math.Abs(hkl[1]) != math.Abs(hkl[2]) || hkl[0] == 0 {
		return 0
	}
	g := []float64{math.Abs(st.G[0]), math.Abs(st.G[1]), math.Abs(st.G[2])}
	sort.Float64s(g)
	switch fmt.Sprint(g) {
	case "[1 1 1]", "[0 2 2]", "[0 0 4]":
		return 1
	case "[0 0 2]", "[2 2 2]", "[0 4 4]":
		return -1
	}
	return 0
}

// loopReading: nature, inside or outside, and for small loops the
// dark-field lobes by depth layer.
func (st *Setup) loopReading(d *Defect, b, n r3.Vec) string {
	var w strings.Builder
	nature := "vacancy (b·n > 0)"
	vacancy := r3.Dot(b, n) > 0
	if !vacancy {
		nature = "interstitial (b·n < 0)"
	}
	if math.Abs(r3.Dot(b, n)) < 1e-9 {
		nature = "shear loop (b in its plane: neither vacancy nor interstitial)"
	}
	w.WriteString(nature)
	// b for the line sense clockwise seen from the electron source: the
	// sense right-handed about the normal that points along the beam.
	bDown := b
	if n.Z < 0 {
		bDown = r3.Scale(-1, b)
	}
	gb := r3.Dot(st.gVec(), bDown)
	switch {
	case math.Abs(gb) < 1e-6:
		w.WriteString(", g·b = 0: weak contrast, no inside–outside reading")
	case math.Abs(n.Z) < 1e-6:
		w.WriteString(", the loop is edge-on: no inside–outside reading")
	case st.sNearZero():
		fmt.Fprintf(&w, ", g·b = %s, s ≈ 0: tilt to s ≠ 0 for an inside–outside reading", fmtFrac(gb))
	default:
		rel, where := "> 0", "outside"
		if gb*st.SPerNm < 0 {
			rel, where = "< 0", "inside"
		}
		fmt.Fprintf(&w, ", (g·b)s %s (g·b = %s for the line clockwise seen from the electron source) → %s contrast expected", rel, fmtFrac(gb), where)
	}
	if *d.RadiusNm <= smallLoopNm && math.Abs(r3.Dot(b, n)) >= 1e-9 && len(d.AtNm) == 3 {
		w.WriteString("; " + st.layerWords(st.depth(d.AtNm), vacancy))
	}
	return w.String()
}

// smallLoopNm is the radius up to which a loop is read by its black–white
// dark-field lobes (common practice: loops of a few nm).
const smallLoopNm = 5

// layerWords gives the sense of the dark-field black-to-white vector l of
// a small loop (or, with vacancy = false, an expanding inclusion) at depth
// z (nm below the entrance surface), near s = 0: along g for a vacancy
// loop in layers L1 and L3, against g in L2, the reverse for an
// interstitial loop. The layer bounds are those of the depth oscillation
// (TestSmallLoopLobesReverseWithDepthAndNature): the sense is clear within
// them and mixed between.
func (st *Setup) layerWords(z float64, vacancy bool) string {
	f := z / st.XiGNm
	var layer string
	var first bool // L1 or L3
	switch {
	case f < 0.22:
		layer, first = "L1", true
	case f > 0.3 && f < 0.65:
		layer, first = "L2", false
	case f > 0.78 && f < 1.1:
		layer, first = "L3", true
	case f >= 1.2:
		return fmt.Sprintf("small loop at depth %.2f ξ_g, deeper than the layers L1–L3: its black–white lobes do not tell its nature", f)
	default:
		return fmt.Sprintf("small loop at depth %.2f ξ_g, between depth layers: its black–white lobes are mixed", f)
	}
	sense := "along"
	if first != vacancy {
		sense = "against"
	}
	return fmt.Sprintf("small loop at depth %.2f ξ_g (layer %s): in dark field near s = 0, l (black → white) %s g", f, layer, sense)
}

// inclusionReading: expanding or contracting, and the lobes near a
// surface.
func (st *Setup) inclusionReading(d *Defect) string {
	var w strings.Builder
	var sign float64
	if d.Misfit != nil {
		sign = *d.Misfit
		fmt.Fprintf(&w, "misfit %+g", *d.Misfit)
	} else {
		sign = *d.Strain
		fmt.Fprintf(&w, "strain %+g", *d.Strain)
	}
	switch {
	case sign > 0:
		w.WriteString(" (expanding)")
	case sign < 0:
		w.WriteString(" (contracting)")
	default:
		w.WriteString(" (no strain: invisible)")
		return w.String()
	}
	w.WriteString("; line of no contrast perpendicular to g")
	if len(d.AtNm) != 3 {
		return w.String()
	}
	z, t := st.depth(d.AtNm), st.Problem.ThicknessNm
	dark := map[bool]string{true: "dark", false: "bright"}[sign > 0]
	light := map[bool]string{true: "bright", false: "dark"}[sign > 0]
	switch {
	case z < 0.25*st.XiGNm:
		fmt.Fprintf(&w, "; near the entrance surface at s ≈ 0 the lobe on the side g points to (%s) is %s in bright and dark field", st.gWord(), dark)
	case t-z < 0.25*st.XiGNm:
		fmt.Fprintf(&w, "; near the exit surface at s ≈ 0 the lobe on the side g points to (%s) is %s in dark field and %s in bright field", st.gWord(), dark, light)
	default:
		w.WriteString("; deeper than ξ_g/4 from both surfaces the lobes' sense depends on depth")
	}
	return w.String()
}

// depth returns how far below the entrance surface, along the beam, a
// point at (nm, image frame) lies: the entrance surface is the plane
// through the origin normal to the foil normal.
func (st *Setup) depth(at []float64) float64 {
	n := st.Problem.Normal
	if n == (r3.Vec{}) || n.Z == 0 {
		return at[2]
	}
	return (n.X*at[0] + n.Y*at[1] + n.Z*at[2]) / n.Z
}

// faultAngleDeg returns 360·x reduced to (−180°, 180°].
func faultAngleDeg(cycles float64) float64 {
	a := math.Mod(cycles, 1)
	if a > 0.5+1e-9 {
		a--
	} else if a <= -0.5+1e-9 {
		a++
	}
	a *= 360
	if math.Abs(a) < 1e-6 {
		a = 0
	}
	return a
}

// fmtFrac writes a value that is usually a small fraction (g·b of a
// partial, 1/3, 2/3) as such, otherwise with two decimals.
func fmtFrac(v float64) string {
	for _, den := range []float64{1, 2, 3, 4, 6} {
		num := math.Round(v * den)
		if math.Abs(num-v*den) < 1e-6 {
			if den == 1 {
				return fmt.Sprintf("%+g", num)
			}
			return fmt.Sprintf("%+g/%g", num, den)
		}
	}
	return fmt.Sprintf("%+.2f", v)
}

// pictureDirection names the direction, as displayed, of a vector in the
// frame of g (x along g, y = z × x): right, upper right, up, … . The
// picture shows that frame turned by GAngleDeg (0 unless image.x_axis
// fixes the picture to the specimen).
func (st *Setup) pictureDirection(v r3.Vec) string {
	return directionName(math.Atan2(-v.Y, v.X)*180/math.Pi + st.GAngleDeg)
}

// gWord names the direction g points in the picture.
func (st *Setup) gWord() string { return directionName(st.GAngleDeg) }

// directionName names a direction in the picture given by its angle in
// degrees, counter-clockwise from right as displayed.
func directionName(deg float64) string {
	names := []string{"right", "upper right", "upper", "upper left", "left", "lower left", "lower", "lower right"}
	k := int(math.Floor(deg/45+0.5)) % 8
	if k < 0 {
		k += 8
	}
	return names[k]
}
