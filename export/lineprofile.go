package export

import (
	"bufio"
	"fmt"
	"io"
	"math"

	"faultline/sim"
)

// Line is a straight line across the images, from (X0, Y0) to (X1, Y1) in
// nm of the image frame.
type Line struct {
	X0, Y0, X1, Y1 float64
}

// LengthNm is the length of the line.
func (l Line) LengthNm() float64 { return math.Hypot(l.X1-l.X0, l.Y1-l.Y0) }

// LineProfile is the bright and dark field sampled along a line.
type LineProfile struct {
	DistNm, XNm, YNm []float64
	BF, DF           []float64
}

// SampleLine samples both beams of im along l, about two samples per pixel,
// interpolating bilinearly between pixel centres (a point beyond the
// outermost centres takes the edge value). Points outside the field are
// left out.
func SampleLine(im *sim.Image, l Line) LineProfile {
	g := im.Grid
	dx, dy := g.WidthNm/float64(g.NX), g.HeightNm/float64(g.NY)
	length := l.LengthNm()
	n := max(2, int(math.Ceil(2*length/math.Min(dx, dy)))+1)
	var p LineProfile
	bf, df := im.BF(), im.DF()
	for k := 0; k < n; k++ {
		t := float64(k) / float64(n-1)
		x := l.X0 + t*(l.X1-l.X0)
		y := l.Y0 + t*(l.Y1-l.Y0)
		if math.Abs(x) > g.WidthNm/2 || math.Abs(y) > g.HeightNm/2 {
			continue
		}
		p.DistNm = append(p.DistNm, t*length)
		p.XNm = append(p.XNm, x)
		p.YNm = append(p.YNm, y)
		p.BF = append(p.BF, Interpolate(bf, g, x, y))
		p.DF = append(p.DF, Interpolate(df, g, x, y))
	}
	return p
}

// Interpolate returns a plane of grid g at (x, y) nm, bilinear between
// pixel centres; beyond the outermost centres it takes the edge value.
func Interpolate(plane []float64, g sim.Grid, x, y float64) float64 {
	fi, fj := g.Index(x, y)
	fi = math.Max(0, math.Min(fi, float64(g.NX-1)))
	fj = math.Max(0, math.Min(fj, float64(g.NY-1)))
	i0, j0 := int(fi), int(fj)
	i1, j1 := min(i0+1, g.NX-1), min(j0+1, g.NY-1)
	ti, tj := fi-float64(i0), fj-float64(j0)
	at := func(i, j int) float64 { return plane[j*g.NX+i] }
	return (1-tj)*((1-ti)*at(i0, j0)+ti*at(i1, j0)) + tj*((1-ti)*at(i0, j1)+ti*at(i1, j1))
}

// WriteLineProfile writes a line profile as CSV with the header
// distance_nm,x_nm,y_nm,bf,df.
func WriteLineProfile(w io.Writer, p LineProfile) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintln(bw, "distance_nm,x_nm,y_nm,bf,df")
	for k := range p.DistNm {
		fmt.Fprintf(bw, "%.6g,%.6g,%.6g,%.8g,%.8g\n", p.DistNm[k], p.XNm[k], p.YNm[k], p.BF[k], p.DF[k])
	}
	return bw.Flush()
}

// ScaleToRange maps values linearly so that their finite minimum and
// maximum become those of ref: a measured profile (a micrograph's grey
// levels, in units of its own) drawn over a simulated one for its shape.
// NaN values stay NaN. It reports false when either has no finite range.
func ScaleToRange(values, ref []float64) ([]float64, bool) {
	lo, hi, ok := finiteRange(values)
	rlo, rhi, rok := finiteRange(ref)
	if !ok || !rok || !(hi > lo) {
		return nil, false
	}
	out := make([]float64, len(values))
	for k, v := range values {
		out[k] = rlo + (v-lo)*(rhi-rlo)/(hi-lo)
	}
	return out, true
}

func finiteRange(v []float64) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	return lo, hi, lo <= hi
}
