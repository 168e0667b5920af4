package plan

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"faultline/scene"
)

// GBTable is the plan of a g·b series: for every candidate Burgers vector
// b (the families expanded by the crystal's symmetry, one of each ±b
// pair) and every low-order reflection g of the zone (one of each ±g
// pair), g·b and, when the scene has a dislocation line u, g·(b×u) with u
// a unit vector. A dislocation is invisible, for an isotropic screw
// exactly and for an edge nearly, where g·b = 0 and g·(b×u) = 0 (Hirsch
// et al. 1965, ch. 11): "residual contrast" remains where only g·b = 0.
type GBTable struct {
	Candidates []string // as the trade writes them
	G          []string // (hkl)
	GB         [][]float64
	GBxU       [][]float64 // nil without a line
	Line       string      // u, or "" without a dislocation in the scene
	b          [][3]float64
}

// gbReflections is the largest |g|, in units of the scene's, of the
// reflections in the table.
const gbReflections = 1.8

func gbTable(st *scene.Setup, families []string) (*GBTable, error) {
	cell := st.Crystal.Cell
	t := &GBTable{}
	seen := map[[3]float64]bool{}
	for _, f := range families {
		bs, err := cell.Family(f)
		if err != nil {
			return nil, fmt.Errorf("--candidates %s: %w", f, err)
		}
		for _, b := range bs {
			if seen[b] || seen[[3]float64{-b[0], -b[1], -b[2]}] {
				continue
			}
			seen[b] = true
			t.b = append(t.b, b)
			t.Candidates = append(t.Candidates, cell.FormatDirection(b))
		}
	}
	refl, err := st.Reflections(gbReflections)
	if err != nil {
		return nil, err
	}
	var gs [][3]float64
	gseen := map[[3]float64]bool{}
	for _, r := range refl {
		if r.Forbidden || (len(r.HKL) != 3 && len(r.HKL) != 4) || r.DNm*st.GPerNm < 1/gbReflections-1e-9 {
			continue
		}
		var h [3]float64
		if len(r.HKL) == 4 {
			h = [3]float64{r.HKL[0], r.HKL[1], r.HKL[3]}
		} else {
			copy(h[:], r.HKL)
		}
		if gseen[[3]float64{-h[0], -h[1], -h[2]}] || gseen[h] {
			continue
		}
		gseen[h] = true
		gs = append(gs, h)
		t.G = append(t.G, cell.FormatPlane(h))
	}
	// The line of the scene's first dislocation, if any.
	var u r3.Vec
	for _, d := range st.Scene.Defects {
		if (d.Type == "dislocation" || d.Type == "dissociated") && len(d.Line) > 0 {
			uvw, err := cell.DirectionIndices(d.Line)
			if err == nil {
				u = r3.Unit(cell.Direction(uvw))
				t.Line = cell.FormatDirection(uvw)
			}
			break
		}
	}
	for _, b := range t.b {
		row := make([]float64, len(gs))
		var rowU []float64
		bc := cell.Direction(b)
		for k, h := range gs {
			row[k] = clean(h[0]*b[0] + h[1]*b[1] + h[2]*b[2])
			if t.Line != "" {
				rowU = append(rowU, clean(r3.Dot(cell.Reciprocal(h), r3.Cross(bc, u))))
			}
		}
		t.GB = append(t.GB, row)
		if t.Line != "" {
			t.GBxU = append(t.GBxU, rowU)
		}
	}
	return t, nil
}

func clean(x float64) float64 {
	if math.Abs(x) < 1e-9 {
		return 0
	}
	return math.Round(x*1e6) / 1e6
}

// Invisible returns, for candidate i, the reflections with g·b = 0 and
// those among them with g·(b×u) = 0 as well.
func (t *GBTable) Invisible(i int) (gb0, both []string) {
	for k, g := range t.G {
		if t.GB[i][k] == 0 {
			gb0 = append(gb0, g)
			if t.GBxU != nil && t.GBxU[i][k] == 0 {
				both = append(both, g)
			}
		}
	}
	return gb0, both
}
