package sweep

import (
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"

	"faultline/internal/atomicfile"
	"faultline/scene"
)

// DefaultLabelWidthPx is the label half-width when the sweep file gives
// none: a pixel belongs to a line or an outline when its centre is within
// this many pixels of it.
const DefaultLabelWidthPx = 2.0

// LabelVersion is the version of the labels.json format.
const LabelVersion = 1

// Labels is the content of labels.json: every defect's projected geometry
// in pixel coordinates (x right, y down, the origin at the top-left corner
// of the image, so pixel (i, j) covers [i, i+1) × [j, j+1) and its centre
// is (i + 0.5, j + 0.5)).
type Labels struct {
	Version     int           `json:"version"`
	Pixels      [2]int        `json:"pixels"`
	NmPerPx     float64       `json:"nm_per_px"`
	Coordinates string        `json:"coordinates"`
	LabelPNG    string        `json:"label_png"`
	WidthPx     float64       `json:"label_width_px"`
	Rule        string        `json:"label_rule"`
	Defects     []LabelDefect `json:"defects"`
}

// LabelDefect is one defect: its label value, type, the parameters it was
// given in the scene, and its geometry.
type LabelDefect struct {
	Label      int             `json:"label"`
	Index      int             `json:"index"`
	Type       string          `json:"type"`
	Parameters json.RawMessage `json:"parameters"`
	Polylines  [][][2]float64  `json:"polylines"`
	Polygons   [][][2]float64  `json:"polygons"`
	Ellipses   []LabelEllipse  `json:"ellipses"`
	Circles    []LabelCircle   `json:"circles"`
	// LabelPixels is how many pixels of labels.png carry this label.
	LabelPixels int `json:"label_pixels"`
}

// LabelEllipse is a loop: centre, semi-axes (major, minor) and the angle of
// the major axis from x toward y, in degrees.
type LabelEllipse struct {
	Center   [2]float64 `json:"center"`
	SemiAxes [2]float64 `json:"semi_axes"`
	AngleDeg float64    `json:"angle_deg"`
}

// LabelCircle is an inclusion or a cavity.
type LabelCircle struct {
	Center [2]float64 `json:"center"`
	Radius float64    `json:"radius"`
}

const labelRule = "labels.png is 16-bit grey: 0 background, label k (defects[k-1] of the scene) where a pixel centre lies within label_width_px of a dislocation line or a loop's outline, or inside (or within label_width_px of) an inclusion, a cavity or a fault polygon; where two overlap, the later defect wins"

// MakeLabels computes the labels of a built scene: the geometry of every
// defect from scene.Setup.Outlines, in pixel coordinates, and the label
// image. widthPx is the half-width of a line's label.
func MakeLabels(st *scene.Setup, widthPx float64) (*Labels, *image.Gray16, error) {
	outs, err := st.Outlines()
	if err != nil {
		return nil, nil, err
	}
	g := st.Problem.Grid
	sx, sy := float64(g.NX)/g.WidthNm, float64(g.NY)/g.HeightNm
	px := func(p scene.Point) [2]float64 {
		return [2]float64{p.X*sx + float64(g.NX)/2, p.Y*sy + float64(g.NY)/2}
	}
	lab := &Labels{
		Version: LabelVersion, Pixels: [2]int{g.NX, g.NY}, NmPerPx: g.WidthNm / float64(g.NX),
		Coordinates: "pixels: x right, y down, origin at the top-left corner of the image; pixel (i, j) covers [i, i+1) x [j, j+1), its centre is (i + 0.5, j + 0.5)",
		LabelPNG:    "labels.png", WidthPx: widthPx, Rule: labelRule,
	}
	img := image.NewGray16(image.Rect(0, 0, g.NX, g.NY))
	for i, o := range outs {
		params, err := json.Marshal(st.Scene.Defects[i])
		if err != nil {
			return nil, nil, err
		}
		ld := LabelDefect{Label: i + 1, Index: i, Type: o.Type, Parameters: params,
			Polylines: [][][2]float64{}, Polygons: [][][2]float64{}, Ellipses: []LabelEllipse{}, Circles: []LabelCircle{}}
		var strokes [][][2]float64 // open or closed paths labelled within the width
		var fills [][][2]float64   // closed areas labelled inside
		path := func(l []scene.Point) [][2]float64 {
			pl := make([][2]float64, len(l))
			for j, p := range l {
				pl[j] = px(p)
			}
			return pl
		}
		for _, l := range o.Lines {
			pl := path(l)
			ld.Polylines = append(ld.Polylines, pl)
			strokes = append(strokes, pl)
		}
		for _, poly := range o.Polygons {
			pl := path(poly)
			ld.Polygons = append(ld.Polygons, pl)
			fills = append(fills, pl)
			strokes = append(strokes, append(pl[:len(pl):len(pl)], pl[0]))
		}
		for _, e := range o.Ellipses {
			le := LabelEllipse{Center: px(e.Center), SemiAxes: [2]float64{e.SemiMajor * sx, e.SemiMinor * sx}, AngleDeg: e.AngleDeg}
			ld.Ellipses = append(ld.Ellipses, le)
			strokes = append(strokes, ellipsePath(le, 256))
		}
		for _, c := range o.Circles {
			lc := LabelCircle{Center: px(c.Center), Radius: c.Radius * sx}
			ld.Circles = append(ld.Circles, lc)
			fills = append(fills, ellipsePath(LabelEllipse{Center: lc.Center, SemiAxes: [2]float64{lc.Radius, lc.Radius}}, 256))
			strokes = append(strokes, ellipsePath(LabelEllipse{Center: lc.Center, SemiAxes: [2]float64{lc.Radius, lc.Radius}}, 256))
		}
		for j := 0; j < g.NY; j++ {
			for i2 := 0; i2 < g.NX; i2++ {
				c := [2]float64{float64(i2) + 0.5, float64(j) + 0.5}
				hit := false
				for _, f := range fills {
					if inside(c, f) {
						hit = true
						break
					}
				}
				for _, s := range strokes {
					if hit {
						break
					}
					hit = pathDistance(c, s) <= widthPx
				}
				if hit {
					img.SetGray16(i2, j, color.Gray16{Y: uint16(i + 1)})
				}
			}
		}
		lab.Defects = append(lab.Defects, ld)
	}
	if len(outs) > math.MaxUint16 {
		return nil, nil, fmt.Errorf("labels: %d defects, more than a 16-bit label image holds", len(outs))
	}
	// Count after all are drawn, so overlaps are counted once.
	for j := 0; j < g.NY; j++ {
		for i := 0; i < g.NX; i++ {
			if v := img.Gray16At(i, j).Y; v > 0 {
				lab.Defects[v-1].LabelPixels++
			}
		}
	}
	return lab, img, nil
}

// ellipsePath is a closed polygon of n points on the ellipse.
func ellipsePath(e LabelEllipse, n int) [][2]float64 {
	a, b := e.SemiAxes[0], e.SemiAxes[1]
	th := e.AngleDeg * math.Pi / 180
	c, s := math.Cos(th), math.Sin(th)
	out := make([][2]float64, n+1)
	for k := 0; k <= n; k++ {
		t := 2 * math.Pi * float64(k%n) / float64(n)
		x, y := a*math.Cos(t), b*math.Sin(t)
		out[k] = [2]float64{e.Center[0] + c*x - s*y, e.Center[1] + s*x + c*y}
	}
	return out
}

// pathDistance is the distance from q to the polyline p.
func pathDistance(q [2]float64, p [][2]float64) float64 {
	d := math.Inf(1)
	if len(p) == 1 {
		return math.Hypot(q[0]-p[0][0], q[1]-p[0][1])
	}
	for i := 0; i+1 < len(p); i++ {
		a, b := p[i], p[i+1]
		dx, dy := b[0]-a[0], b[1]-a[1]
		l2 := dx*dx + dy*dy
		t := 0.0
		if l2 > 0 {
			t = math.Max(0, math.Min(1, ((q[0]-a[0])*dx+(q[1]-a[1])*dy)/l2))
		}
		d = math.Min(d, math.Hypot(q[0]-a[0]-t*dx, q[1]-a[1]-t*dy))
	}
	return d
}

// inside tells whether q is inside the polygon p (even-odd rule).
func inside(q [2]float64, p [][2]float64) bool {
	in := false
	for i, j := 0, len(p)-1; i < len(p); j, i = i, i+1 {
		a, b := p[i], p[j]
		if (a[1] > q[1]) != (b[1] > q[1]) && q[0] < (b[0]-a[0])*(q[1]-a[1])/(b[1]-a[1])+a[0] {
			in = !in
		}
	}
	return in
}

// labelFiles are labels.json and labels.png of a job.
func (sw *Sweep) labelFiles(st *scene.Setup) ([]atomicfile.File, error) {
	w := DefaultLabelWidthPx
	if sw.File.LabelWidthPx != nil {
		w = *sw.File.LabelWidthPx
	}
	lab, img, err := MakeLabels(st, w)
	if err != nil {
		return nil, err
	}
	data, err := json.MarshalIndent(lab, "", "  ")
	if err != nil {
		return nil, err
	}
	data = append(data, '\n')
	return []atomicfile.File{
		{Name: "labels.json", Encode: func(w io.Writer) error { _, err := w.Write(data); return err }},
		{Name: "labels.png", Encode: func(w io.Writer) error { return png.Encode(w, img) }},
	}, nil
}
