package crystal

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// siteGrid holds points of a periodic cell (fractional coordinates) and
// finds the first one within mergeNm of a query point, by the minimum image
// of each fractional component, in time that does not grow with the
// number of points: the cell is cut into bins along each axis no narrower
// than the fractional width a merge can span, so a match lies in the
// query's bin or a neighbouring one.
//
// Why the neighbours suffice: a fractional offset d maps to the Cartesian
// offset r = Σ d_i a_i, and d_i = a*_i · r (a_i · a*_j = δ_ij), so
// |r| < mergeNm gives |d_i| < |a*_i| mergeNm, at most one bin width.
type siteGrid struct {
	basis [3]r3.Vec
	n     [3]int
	bins  map[[3]int][]int
	xyz   [][3]float64
}

// maxBinsPerAxis bounds the bins along one axis (a cell more than 2.56 nm
// long along an axis gets bins wider than a merge distance, which is only
// slower, never wrong).
const maxBinsPerAxis = 256

func newSiteGrid(cell Cell) *siteGrid {
	a, b, c := cell.Basis()
	as, bs, cs := cell.ReciprocalBasis()
	g := &siteGrid{basis: [3]r3.Vec{a, b, c}, bins: map[[3]int][]int{}}
	for i, v := range [3]r3.Vec{as, bs, cs} {
		w := r3.Norm(v) * mergeNm // widest fractional offset of a merge
		n := 1
		if w > 0 && w < 1 {
			n = int(math.Min(math.Floor(1/w), maxBinsPerAxis))
		}
		g.n[i] = max(n, 1)
	}
	return g
}

func (g *siteGrid) bin(x [3]float64) [3]int {
	var k [3]int
	for i := range x {
		f := x[i] - math.Floor(x[i])
		k[i] = min(int(f*float64(g.n[i])), g.n[i]-1)
	}
	return k
}

// reset empties the grid, keeping its bins' storage.
func (g *siteGrid) reset() {
	for _, k := range g.xyz {
		if b := g.bins[g.bin(k)]; len(b) > 0 {
			g.bins[g.bin(k)] = b[:0]
		}
	}
	g.xyz = g.xyz[:0]
}

// add appends the point x and returns its index.
func (g *siteGrid) add(x [3]float64) int {
	k := g.bin(x)
	g.bins[k] = append(g.bins[k], len(g.xyz))
	g.xyz = append(g.xyz, x)
	return len(g.xyz) - 1
}

// near returns the lowest index of a point within mergeNm of x and the
// offset x − point (each fractional component reduced to [−½, ½]), or −1.
func (g *siteGrid) near(x [3]float64) (int, [3]float64) {
	k0 := g.bin(x)
	best, bestD := -1, [3]float64{}
	var axes [3][3]int
	var na [3]int
	for i := range axes {
		if g.n[i] <= 3 {
			for j := 0; j < g.n[i]; j++ {
				axes[i][j] = j
			}
			na[i] = g.n[i]
			continue
		}
		axes[i] = [3]int{(k0[i] + g.n[i] - 1) % g.n[i], k0[i], (k0[i] + 1) % g.n[i]}
		na[i] = 3
	}
	for _, i := range axes[0][:na[0]] {
		for _, j := range axes[1][:na[1]] {
			for _, l := range axes[2][:na[2]] {
				for _, idx := range g.bins[[3]int{i, j, l}] {
					if best >= 0 && idx > best {
						continue
					}
					var d [3]float64
					for c := range d {
						d[c] = x[c] - g.xyz[idx][c]
						d[c] -= math.Round(d[c])
					}
					r := r3.Add(r3.Add(r3.Scale(d[0], g.basis[0]), r3.Scale(d[1], g.basis[1])), r3.Scale(d[2], g.basis[2]))
					if r3.Norm(r) < mergeNm {
						best, bestD = idx, d
					}
				}
			}
		}
	}
	return best, bestD
}
