package defects

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// jumpMergeNm is the distance below which two reported jump depths are one:
// the simulator would otherwise split the column into a zero-length piece.
const jumpMergeNm = 1e-9

// Sum superposes fields: R is the sum of the members' R (linear elasticity);
// Jumps and Voids merge the reports of the members that implement them.
type Sum []Field

// R returns Σ R_i(p).
func (s Sum) R(p r3.Vec) r3.Vec {
	var r r3.Vec
	for _, f := range s {
		r = r3.Add(r, f.R(p))
	}
	return r
}

// Jumps appends, in increasing order and without duplicates (closer than
// 1e-9 nm), the jump depths of every member in (z0, z1).
func (s Sum) Jumps(x, y, z0, z1 float64, dst []float64) []float64 {
	start := len(dst)
	for _, f := range s {
		if j, ok := f.(jumper); ok {
			dst = j.Jumps(x, y, z0, z1, dst)
		}
	}
	tail := dst[start:]
	slices.Sort(tail)
	out := tail[:0]
	for _, z := range tail {
		if len(out) > 0 && math.Abs(z-out[len(out)-1]) <= jumpMergeNm {
			continue
		}
		out = append(out, z)
	}
	return dst[:start+len(out)]
}

// Voids appends the union of the members' void intervals within [z0, z1],
// in increasing order, overlapping or touching intervals merged.
func (s Sum) Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64 {
	start := len(dst)
	for _, f := range s {
		if v, ok := f.(voider); ok {
			dst = v.Voids(x, y, z0, z1, dst)
		}
	}
	tail := dst[start:]
	slices.SortFunc(tail, func(a, b [2]float64) int {
		switch {
		case a[0] < b[0]:
			return -1
		case a[0] > b[0]:
			return 1
		}
		return 0
	})
	out := tail[:0]
	for _, iv := range tail {
		if n := len(out); n > 0 && iv[0] <= out[n-1][1]+jumpMergeNm {
			out[n-1][1] = math.Max(out[n-1][1], iv[1])
			continue
		}
		out = append(out, iv)
	}
	return dst[:start+len(out)]
}
