package scene

import (
	"math"
	"testing"
)

func outlines(t *testing.T, text string) []Outline {
	t.Helper()
	sc, err := Parse([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	st, err := Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	o, err := st.Outlines()
	if err != nil {
		t.Fatal(err)
	}
	return o
}

// Projected geometry against the formulas of a parallel projection along
// the beam [001] of a cubic crystal (textbook solid geometry):
//   - a plane of normal n cut by a foil of thickness t projects to a strip
//     of width t·|n_z|/|n_xy|: t/√2 for (111);
//   - a circle of radius r in a plane of normal n projects to an ellipse
//     of semi-axes r and r·|n_z|: r/√3 for a (111) loop, its major axis
//     along [1 -1 0] (⊥ the projected normal [1 1 0]);
//   - a line [1 -1 0] through the centre of a 100 nm field runs corner to
//     corner, from (−50, 50) to (50, −50) nm with y down the picture
//     (x along g = [200], y = z × x = [010]).
func TestOutlineGeometry(t *testing.T) {
	const thick = 80.0
	o := outlines(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
	 "foil": {"thickness_nm": 80},
	 "defects": [
	   {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 40]},
	   {"type": "fault", "plane": [1, 1, 1], "shift": "1/3[1 1 1]", "at_nm": [0, 0, 40]},
	   {"type": "loop", "b": "1/3[1 1 1]", "normal": [1, 1, 1], "radius_nm": 12, "at_nm": [20, -10, 40]},
	   {"type": "cavity", "radius_nm": 5, "at_nm": [-30, 30, 40]},
	   {"type": "dislocation", "b": "1/2[1 1 0]", "line": [0, 0, 1], "at_nm": [10, 10, 40]}],
	 "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`)
	const tol = 1e-9
	line := o[0].Lines
	if len(line) != 1 {
		t.Fatalf("dislocation: %d lines", len(line))
	}
	a, b := line[0][0], line[0][1]
	if a.X > b.X {
		a, b = b, a
	}
	if math.Abs(a.X+50) > tol || math.Abs(a.Y-50) > tol || math.Abs(b.X-50) > tol || math.Abs(b.Y+50) > tol {
		t.Errorf("line [1 -1 0]: from %v to %v, want (−50, 50) to (50, −50)", a, b)
	}

	// The fault: a strip of width t/√2 across the field; its area is the
	// width times the length of the strip's centre line inside the field.
	if len(o[1].Polygons) != 1 {
		t.Fatalf("fault: %d polygons", len(o[1].Polygons))
	}
	poly := o[1].Polygons[0]
	// Width: the spread of the vertices along the projected normal (1,1)/√2.
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range poly {
		d := (p.X + p.Y) / math.Sqrt2
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	if w := hi - lo; math.Abs(w-thick/math.Sqrt2) > 1e-6 {
		t.Errorf("fault strip width %g nm, want t/√2 = %g", w, thick/math.Sqrt2)
	}

	e := o[2].Ellipses
	if len(e) != 1 {
		t.Fatalf("loop: %d ellipses", len(e))
	}
	if math.Abs(e[0].SemiMajor-12) > tol || math.Abs(e[0].SemiMinor-12/math.Sqrt(3)) > tol {
		t.Errorf("loop ellipse semi-axes %g, %g; want 12 and 12/√3 = %g", e[0].SemiMajor, e[0].SemiMinor, 12/math.Sqrt(3))
	}
	// Major axis along ±[1 -1 0]: at ±45° or ±135° from x, i.e. the
	// direction (1, -1) up to sign.
	th := e[0].AngleDeg * math.Pi / 180
	if math.Abs(math.Abs(math.Cos(th)*1+math.Sin(th)*-1)/math.Sqrt2-1) > 1e-9 {
		t.Errorf("loop major axis at %g°, want along [1 -1 0]", e[0].AngleDeg)
	}
	if e[0].Center != (Point{20, -10}) {
		t.Errorf("loop centre %v", e[0].Center)
	}

	if c := o[3].Circles; len(c) != 1 || c[0].Radius != 5 || c[0].Center != (Point{-30, 30}) {
		t.Errorf("cavity: %v", c)
	}

	// A line along the beam projects to a point.
	if l := o[4].Lines; len(l) != 1 || l[0][0] != l[0][1] || math.Abs(l[0][0].X-10) > tol || math.Abs(l[0][0].Y-10) > tol {
		t.Errorf("end-on dislocation: %v, want the point (10, 10)", l)
	}
}

// A dislocation outside the field has an empty outline.
func TestOutlineOutsideField(t *testing.T) {
	o := outlines(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
	 "foil": {"thickness_nm": 80},
	 "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, 0, 0], "at_nm": [0, 70, 40]}],
	 "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`)
	if len(o[0].Lines) != 0 {
		t.Errorf("a line at y = 70 nm in a 100 nm field: %v", o[0].Lines)
	}
}

// A dissociated dislocation: partials 10 nm apart in (111), line [1 -1 0],
// seen along [001]. The partials are offset along n × u = [1 1 -2]/√6,
// whose projection has length 1/√3, so they appear 10/√3 nm apart, and
// the ribbon between them has that width (parallel projection).
func TestOutlineDissociated(t *testing.T) {
	o := outlines(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
	 "foil": {"thickness_nm": 80},
	 "defects": [{"type": "dissociated", "b": "1/2[1 0 -1]", "line": [1, -1, 0], "plane": [1, 1, 1],
	   "partials": ["1/6[2 -1 -1]", "1/6[1 1 -2]"], "separation_nm": 10, "at_nm": [0, 0, 40]}],
	 "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`)
	d := o[0]
	if len(d.Lines) != 2 || len(d.Polygons) != 1 {
		t.Fatalf("dissociated: %d lines, %d polygons; want 2 and 1", len(d.Lines), len(d.Polygons))
	}
	// Distance of each partial's projection from the centre, along the
	// in-image normal (1, 1)/√2 of the projected line.
	want := 10 / math.Sqrt(3)
	off := func(p Point) float64 { return (p.X + p.Y) / math.Sqrt2 }
	a, b := off(d.Lines[0][0]), off(d.Lines[1][0])
	if math.Abs(math.Abs(a-b)-want) > 1e-9 || math.Abs(a+b) > 1e-9 {
		t.Errorf("partials at %g and %g nm from the centre line, want ±%g", a, b, want/2)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range d.Polygons[0] {
		lo, hi = math.Min(lo, off(p)), math.Max(hi, off(p))
	}
	if math.Abs(hi-lo-want) > 1e-9 {
		t.Errorf("ribbon width %g nm, want 10/√3 = %g", hi-lo, want)
	}
}
