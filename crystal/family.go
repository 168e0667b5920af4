package crystal

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// LatticeSymmetry returns the point operations of the lattice (its
// holohedry) as integer matrices M acting on fractional direction indices,
// [uvw]' = M [uvw]: every M with entries −1, 0 or 1 that preserves the
// metric, MᵀGM = G. For a cubic cell these are the 48 signed permutations;
// for a hexagonal cell the 24 operations of 6/mmm in three-index form. The
// lattice's symmetry is at least that of any crystal built on it, which is
// what the equivalence of Burgers vectors (lattice translations) needs.
func (c Cell) LatticeSymmetry() [][3][3]int {
	g := c.Metric()
	var ops [][3][3]int
	var m [3][3]int
	var rec func(k int)
	rec = func(k int) {
		if k == 9 {
			if det3(m) != 0 && preservesMetric(m, g) {
				ops = append(ops, m)
			}
			return
		}
		for _, v := range []int{0, 1, -1} {
			m[k/3][k%3] = v
			rec(k + 1)
		}
	}
	rec(0)
	return ops
}

func det3(m [3][3]int) int {
	return m[0][0]*(m[1][1]*m[2][2]-m[1][2]*m[2][1]) -
		m[0][1]*(m[1][0]*m[2][2]-m[1][2]*m[2][0]) +
		m[0][2]*(m[1][0]*m[2][1]-m[1][1]*m[2][0])
}

// preservesMetric reports whether MᵀGM = G to a relative 1e-9.
func preservesMetric(m [3][3]int, g *mat.SymDense) bool {
	scale := math.Max(g.At(0, 0), math.Max(g.At(1, 1), g.At(2, 2)))
	for i := 0; i < 3; i++ {
		for j := i; j < 3; j++ {
			s := 0.0
			for k := 0; k < 3; k++ {
				for l := 0; l < 3; l++ {
					s += float64(m[k][i]) * g.At(k, l) * float64(m[l][j])
				}
			}
			if math.Abs(s-g.At(i, j)) > 1e-9*scale {
				return false
			}
		}
	}
	return true
}

// Family expands a Burgers-vector family as the trade writes it —
// "1/2<110>", "1/6<112>", "<100>", "1/3<11-20>", "1/3<11-23>" — into every
// lattice-equivalent vector, both signs included, as fractional [uvw]
// (b = u a + v b + w c), in a fixed order. An explicit vector ("1/2[1 0 1]")
// is returned alone.
func (c Cell) Family(text string) ([][3]float64, error) {
	ix, err := ParseIndices(text)
	if err != nil {
		return nil, fmt.Errorf("candidate: %w", err)
	}
	switch ix.Bracket {
	case '[':
		b, err := c.Burgers(text)
		if err != nil {
			return nil, err
		}
		return [][3]float64{b}, nil
	case '<':
	default:
		return nil, fmt.Errorf("candidate %q: write a family of directions <u v w> or one vector [u v w]", text)
	}
	uvw, err := c.DirectionIndices(ix.V)
	if err != nil {
		return nil, fmt.Errorf("candidate %q: %w", text, err)
	}
	for i := range uvw {
		uvw[i] *= ix.Factor
	}
	if uvw == [3]float64{} {
		return nil, fmt.Errorf("candidate %q is zero", text)
	}
	var out [][3]float64
	for _, m := range c.LatticeSymmetry() {
		var v [3]float64
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				v[i] += float64(m[i][j]) * uvw[j]
			}
			if v[i] == 0 {
				v[i] = 0 // no −0
			}
		}
		dup := false
		for _, w := range out {
			if math.Abs(w[0]-v[0])+math.Abs(w[1]-v[1])+math.Abs(w[2]-v[2]) < 1e-9 {
				dup = true
				break
			}
		}
		if !dup {
			out = append(out, v)
		}
	}
	// Order: by the formatted text, so the list reads the same everywhere.
	sort.SliceStable(out, func(i, j int) bool {
		return strings.Compare(c.FormatDirection(out[i]), c.FormatDirection(out[j])) < 0
	})
	return out, nil
}
