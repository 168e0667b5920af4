package scene

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/defects"
)

// Point is a point of the image plane in nm: x along the image frame's x
// (g by default), y down the picture, the origin at the centre of the
// image (the column x = y = 0).
type Point struct{ X, Y float64 }

// Ellipse is a loop's outline seen along the beam: the circle of radius
// SemiMajor in a plane whose normal makes an angle θ with the beam shows
// as an ellipse with SemiMinor = SemiMajor·|cos θ|, its major axis
// perpendicular to the projected normal, at AngleDeg from x toward y.
type Ellipse struct {
	Center               Point
	SemiMajor, SemiMinor float64
	AngleDeg             float64
}

// Circle is a sphere's outline seen along the beam.
type Circle struct {
	Center Point
	Radius float64
}

// Outline is the geometry of one defect projected along the beam onto the
// image plane (parallel projection: the column approximation looks straight
// down every column), in nm:
//   - dislocation: its line, clipped to the foil and to the prism of
//     columns of the image (Lines, one polyline of two points; the points
//     coincide for a line along the beam);
//   - dissociated: the two partials (Lines) and the faulted ribbon between
//     them (Polygons);
//   - fault: the polygon of its plane's intersection with the foil under
//     the image (bounded faults: with their strip);
//   - loop: an ellipse;
//   - inclusion and cavity: a circle.
//
// An empty outline (no lines, polygons, ellipses or circles) is a defect
// whose geometry lies outside the imaged part of the foil.
type Outline struct {
	// Index is the defect's index in the scene's defects list.
	Index    int
	Type     string
	Lines    [][]Point
	Polygons [][]Point
	Ellipses []Ellipse
	Circles  []Circle
}

// Outlines returns the projected geometry of every defect of the scene,
// in the order of the scene's defects list.
func (st *Setup) Outlines() ([]Outline, error) {
	var fields defects.Sum
	if st.Problem != nil {
		fields, _ = st.Problem.Field.(defects.Sum)
	}
	out := make([]Outline, len(st.Scene.Defects))
	for i := range st.Scene.Defects {
		d := &st.Scene.Defects[i]
		var f defects.Field
		if i < len(fields) {
			f = fields[i]
		}
		o, err := st.outline(fmt.Sprintf("defects[%d]", i), d, f)
		if err != nil {
			return nil, err
		}
		o.Index, o.Type = i, d.Type
		out[i] = o
	}
	return out, nil
}

// box is the part of the foil under the image: |x| ≤ W/2, |y| ≤ H/2 and
// 0 ≤ n·p ≤ t n_z (n the foil normal, pointing into the foil), as
// half-spaces a·p ≤ b.
func (st *Setup) box() []halfSpace {
	n := st.Problem.Normal
	if n == (r3.Vec{}) {
		n = r3.Vec{Z: 1}
	}
	w, h, t := st.Scene.Image.WidthNm/2, st.Scene.Image.HeightNm/2, st.Problem.ThicknessNm
	return []halfSpace{
		{r3.Vec{X: 1}, w}, {r3.Vec{X: -1}, w},
		{r3.Vec{Y: 1}, h}, {r3.Vec{Y: -1}, h},
		{r3.Scale(-1, n), 0}, {n, t * n.Z},
	}
}

type halfSpace struct {
	a r3.Vec
	b float64
}

func (st *Setup) outline(path string, d *Defect, f defects.Field) (Outline, error) {
	var o Outline
	at := r3.Vec{}
	if len(d.AtNm) == 3 {
		at = r3.Vec{X: d.AtNm[0], Y: d.AtNm[1], Z: d.AtNm[2]}
	}
	rd := &reader{st: st}
	box := st.box()
	switch d.Type {
	case "dislocation":
		u := rd.direction(path+".line", d.Line)
		if rd.err != nil {
			return o, rd.err
		}
		if seg, ok := clipLine(at, r3.Unit(u), box); ok {
			o.Lines = append(o.Lines, seg)
		}
	case "dissociated":
		u := rd.direction(path+".line", d.Line)
		n := rd.planeNormal(path+".plane", d.Plane)
		if rd.err != nil {
			return o, rd.err
		}
		dd, ok := f.(*defects.Dissociated)
		if !ok {
			return o, fieldErr(path, "the scene is not built")
		}
		// As defects.NewDissociated places them: the partials at
		// at ± (separation/2)·(n × u).
		n = r3.Unit(n)
		u = r3.Unit(r3.Sub(u, r3.Scale(r3.Dot(u, n), n)))
		s := r3.Cross(n, u)
		half := r3.Scale(dd.SeparationNm()/2, s)
		for _, c := range []r3.Vec{r3.Add(at, half), r3.Sub(at, half)} {
			if seg, ok := clipLine(c, u, box); ok {
				o.Lines = append(o.Lines, seg)
			}
		}
		strip := append(box[:len(box):len(box)],
			halfSpace{s, r3.Dot(s, at) + dd.SeparationNm()/2},
			halfSpace{r3.Scale(-1, s), -r3.Dot(s, at) + dd.SeparationNm()/2})
		if poly := clipPlane(at, n, strip); poly != nil {
			o.Polygons = append(o.Polygons, poly)
		}
	case "fault":
		n := rd.planeNormal(path+".plane", d.Plane)
		if rd.err != nil {
			return o, rd.err
		}
		n = r3.Unit(n)
		hs := box[:len(box):len(box)]
		if d.Edge != nil {
			e := rd.direction(path+".edge", d.Edge)
			if rd.err != nil {
				return o, rd.err
			}
			e = r3.Unit(r3.Sub(e, r3.Scale(r3.Dot(e, n), n)))
			// As defects.NewBoundedFault: the strip from ≤ (p − at)·(n × e) ≤ to.
			w := r3.Cross(n, e)
			hs = append(hs, halfSpace{w, r3.Dot(w, at) + d.BoundsNm[1]}, halfSpace{r3.Scale(-1, w), -r3.Dot(w, at) - d.BoundsNm[0]})
		}
		if poly := clipPlane(at, n, hs); poly != nil {
			o.Polygons = append(o.Polygons, poly)
		}
	case "loop":
		n := rd.direction(path+".normal", d.Normal)
		if rd.err != nil {
			return o, rd.err
		}
		n = r3.Unit(n)
		r := *d.RadiusNm
		e := Ellipse{Center: Point{at.X, at.Y}, SemiMajor: r, SemiMinor: r * math.Abs(n.Z)}
		if math.Hypot(n.X, n.Y) > 1e-12 {
			// The major axis is the in-plane direction ⊥ the beam: ⊥ (n_x, n_y).
			e.AngleDeg = math.Atan2(n.X, -n.Y) * 180 / math.Pi
		}
		o.Ellipses = append(o.Ellipses, e)
	case "inclusion", "cavity":
		o.Circles = append(o.Circles, Circle{Center: Point{at.X, at.Y}, Radius: *d.RadiusNm})
	}
	return o, nil
}

// clipLine clips the line p + s u to the half-spaces (Liang & Barsky 1984)
// and returns its projection, or false when nothing is left.
func clipLine(p, u r3.Vec, hs []halfSpace) ([]Point, bool) {
	lo, hi := math.Inf(-1), math.Inf(1)
	for _, h := range hs {
		au, ap := r3.Dot(h.a, u), r3.Dot(h.a, p)
		if math.Abs(au) < 1e-12 {
			if ap > h.b+1e-9 {
				return nil, false
			}
			continue
		}
		s := (h.b - ap) / au
		if au > 0 {
			hi = math.Min(hi, s)
		} else {
			lo = math.Max(lo, s)
		}
	}
	if math.IsInf(lo, 0) || math.IsInf(hi, 0) || lo > hi {
		return nil, false
	}
	a, b := r3.Add(p, r3.Scale(lo, u)), r3.Add(p, r3.Scale(hi, u))
	return []Point{{a.X, a.Y}, {b.X, b.Y}}, true
}

// clipPlane returns the projection of the polygon where the plane through
// p with normal n meets the intersection of the half-spaces
// (Sutherland & Hodgman 1974, in the plane's own coordinates), or nil.
func clipPlane(p, n r3.Vec, hs []halfSpace) []Point {
	// In-plane axes e1, e2.
	ref := r3.Vec{Z: 1}
	if math.Abs(n.Z) > 0.9 {
		ref = r3.Vec{X: 1}
	}
	e1 := r3.Unit(r3.Cross(n, ref))
	e2 := r3.Cross(n, e1)
	// Start from a square larger than any half-space set here can leave.
	big := 0.0
	for _, h := range hs {
		big = math.Max(big, math.Abs(h.b))
	}
	big = 4*big + 4*r3.Norm(p) + 1
	poly := [][2]float64{{-big, -big}, {big, -big}, {big, big}, {-big, big}}
	for _, h := range hs {
		// a·(p + x e1 + y e2) ≤ b  ⇔  c1 x + c2 y ≤ c.
		c1, c2, c := r3.Dot(h.a, e1), r3.Dot(h.a, e2), h.b-r3.Dot(h.a, p)
		in := func(q [2]float64) bool { return c1*q[0]+c2*q[1] <= c+1e-9 }
		var next [][2]float64
		for i := range poly {
			a, b := poly[i], poly[(i+1)%len(poly)]
			ia, ib := in(a), in(b)
			if ia {
				next = append(next, a)
			}
			if ia != ib {
				da, db := c1*a[0]+c2*a[1]-c, c1*b[0]+c2*b[1]-c
				s := da / (da - db)
				next = append(next, [2]float64{a[0] + s*(b[0]-a[0]), a[1] + s*(b[1]-a[1])})
			}
		}
		poly = next
		if len(poly) < 3 {
			return nil
		}
	}
	out := make([]Point, len(poly))
	for i, q := range poly {
		v := r3.Add(p, r3.Add(r3.Scale(q[0], e1), r3.Scale(q[1], e2)))
		out[i] = Point{v.X, v.Y}
	}
	return out
}
