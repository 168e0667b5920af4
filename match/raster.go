package match

import "math"

// Raster is a greyscale image on square pixels: Pix[j*W+i] is pixel (i, j),
// i to the right and j down the picture as displayed. A NaN pixel holds no
// data (outside a rotated simulation, say) and is left out of every sum.
type Raster struct {
	W, H    int
	Pix     []float64
	NmPerPx float64
}

// NewRaster returns a W × H raster of zeros.
func NewRaster(w, h int, nmPerPx float64) *Raster {
	return &Raster{W: w, H: h, Pix: make([]float64, w*h), NmPerPx: nmPerPx}
}

// FromFloat32 copies float32 pixels (as micrograph readers return them).
func FromFloat32(w, h int, pix []float32, nmPerPx float64) *Raster {
	r := NewRaster(w, h, nmPerPx)
	for k, v := range pix {
		r.Pix[k] = float64(v)
	}
	return r
}

// At returns pixel (i, j), NaN outside the raster.
func (r *Raster) At(i, j int) float64 {
	if i < 0 || j < 0 || i >= r.W || j >= r.H {
		return math.NaN()
	}
	return r.Pix[j*r.W+i]
}

// Bilinear samples the raster at the continuous pixel position (u, v),
// where pixel (i, j) has its centre at (i, j): NaN if any of the four
// neighbours holds no data or lies outside.
func (r *Raster) Bilinear(u, v float64) float64 {
	i0, j0 := math.Floor(u), math.Floor(v)
	fu, fv := u-i0, v-j0
	i, j := int(i0), int(j0)
	if fu == 0 && fv == 0 {
		return r.At(i, j)
	}
	a, b := r.At(i, j), r.At(i+1, j)
	c, d := r.At(i, j+1), r.At(i+1, j+1)
	if fv == 0 {
		return a*(1-fu) + b*fu
	}
	if fu == 0 {
		return a*(1-fv) + c*fv
	}
	return (a*(1-fu)+b*fu)*(1-fv) + (c*(1-fu)+d*fu)*fv
}

// Crop returns the part of r from pixel (x0, y0), w × h pixels.
func (r *Raster) Crop(x0, y0, w, h int) *Raster {
	out := NewRaster(w, h, r.NmPerPx)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			out.Pix[j*w+i] = r.At(x0+i, y0+j)
		}
	}
	return out
}
