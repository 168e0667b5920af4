package sim

import (
	"math"
	"strings"
	"testing"
)

func TestBlurKeepsUniformAndSpreadsAPoint(t *testing.T) {
	g := Grid{NX: 41, NY: 41, WidthNm: 41, HeightNm: 41}
	im := &Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{make([]float64, 41*41), make([]float64, 41*41)}}
	for i := range im.Intensity[0] {
		im.Intensity[0][i] = 0.7
	}
	im.Intensity[1][20*41+20] = 1
	if err := Blur(im, 2); err != nil {
		t.Fatal(err)
	}
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

// TestBlurLimits: a blur outside its range is refused before anything is
// allocated (1e12 nm once sized a kernel of 10¹³ taps), with the range in
// the message; 1e-200 nm once gave NaN (σ² underflows); 1e300 nm would
// flatten the image to its mean.
func TestBlurLimits(t *testing.T) {
	g := Grid{NX: 16, NY: 8, WidthNm: 100, HeightNm: 50}
	for _, c := range []struct {
		sigma float64
		ok    bool
	}{
		{0, true}, {MinBlurNm, true}, {25, true}, {1, true},
		{1e-200, false}, {5e-324, false}, {-1, false}, {25.01, false}, {1e12, false}, {1e300, false},
		{math.NaN(), false}, {math.Inf(1), false},
	} {
		im := &Image{Grid: g, Beams: []int{0}, Intensity: [][]float64{make([]float64, 16*8)}}
		for i := range im.Intensity[0] {
			im.Intensity[0][i] = float64(i % 3)
		}
		err := Blur(im, c.sigma)
		if c.ok != (err == nil) {
			t.Errorf("σ = %g nm: %v", c.sigma, err)
		}
		if err != nil && !strings.Contains(err.Error(), "from 0.001 nm to 25 nm") {
			t.Errorf("σ = %g nm: %q does not state the range", c.sigma, err)
		}
		for _, v := range im.Intensity[0] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("σ = %g nm: %g in the image", c.sigma, v)
			}
		}
	}
	// The kernel stops at the image: a blur as wide as allowed on a
	// one-pixel-high strip allocates three taps across it.
	if k := gaussKernel(1e9, 2); len(k) != 3 {
		t.Errorf("kernel of %d taps for a line of 2 pixels", len(k))
	}
}
