package sim_test

import (
	"context"
	"fmt"
	"math"

	"faultline/sim"
)

// A perfect crystal in the two-beam model at the Bragg condition without
// absorption: the dark field is sin²(πt/ξ_g) (Hirsch et al. 1965, ch. 8),
// so a foil a quarter of ξ_g thick sends half the beam into g.
func ExampleRender() {
	p := &sim.Problem{
		Model:       sim.TwoBeam{SPerNm: 0, XiGNm: 40},
		GPerNm:      5,
		ThicknessNm: 10, // ξ_g / 4
		Grid:        sim.Grid{NX: 4, NY: 4, WidthNm: 20, HeightNm: 20},
	}
	im, err := sim.Render(context.Background(), p, sim.Options{Workers: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	bf, df := im.BF()[0], im.DF()[0]
	fmt.Printf("BF %.6f  DF %.6f  sin²(π/4) %.6f\n", bf, df, math.Pow(math.Sin(math.Pi/4), 2))
	// Output:
	// BF 0.500000  DF 0.500000  sin²(π/4) 0.500000
}

// The pixel grid and its inverse: pixel (i, j) is the column at
// (X(i), Y(j)), and PixelAt finds the pixel whose square holds a point.
func ExampleGrid_PixelAt() {
	g := sim.Grid{NX: 4, NY: 2, WidthNm: 40, HeightNm: 20}
	fmt.Println(g.X(0), g.X(3), g.Y(1))
	i, j, ok := g.PixelAt(-12, 3)
	fmt.Println(i, j, ok)
	_, _, ok = g.PixelAt(25, 0)
	fmt.Println(ok)
	// Output:
	// -15 15 5
	// 0 1 true
	// false
}
