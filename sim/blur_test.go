package sim

import (
	"math"
	"testing"
)

func TestBlurKeepsUniformAndSpreadsAPoint(t *testing.T) {
	g := Grid{NX: 41, NY: 41, WidthNm: 41, HeightNm: 41}
	im := &Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{make([]float64, 41*41), make([]float64, 41*41)}}
	for i := range im.Intensity[0] {
		im.Intensity[0][i] = 0.7
	}
	im.Intensity[1][20*41+20] = 1
	Blur(im, 2)
	for _, v := range im.Intensity[0] {
		if math.Abs(v-0.7) > 1e-12 {
			t.Fatalf("uniform image changed to %g", v)
		}
	}
	// A point spreads into a normalised Gaussian: total conserved, second
	// moment σ² along each axis (σ = 2 px).
	var sum, m2 float64
	for j := 0; j < 41; j++ {
		for i := 0; i < 41; i++ {
			v := im.Intensity[1][j*41+i]
			sum += v
			m2 += v * float64((i-20)*(i-20))
		}
	}
	if math.Abs(sum-1) > 1e-9 || math.Abs(m2/sum-4) > 0.01 {
		t.Errorf("sum %g, variance %g; want 1 and 4", sum, m2/sum)
	}
}
