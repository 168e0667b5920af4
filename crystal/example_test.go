package crystal_test

import (
	"fmt"

	"faultline/crystal"
)

func ExampleParseIndices() {
	ix, err := crystal.ParseIndices("1/3[1 1 -2 0]")
	if err != nil {
		panic(err)
	}
	fmt.Printf("factor %.4f, indices %v, bracket %c\n", ix.Factor, ix.V, ix.Bracket)
	// Output: factor 0.3333, indices [1 1 -2 0], bracket [
}

func ExampleCell_Burgers() {
	ti, _ := crystal.Preset("Ti")
	b, _ := ti.Cell.Burgers("1/3[1 1 -2 0]")
	fmt.Println(b, ti.Cell.FormatDirection(b))
	// Output: [1 1 0] 1/3[1 1 -2 0]
}

func ExampleCrystal_ExtinctionDistance() {
	cu, _ := crystal.Preset("Cu")
	for _, g := range [][3]float64{{1, 1, 1}, {2, 0, 0}, {1, 1, 0}} {
		xi, err := cu.ExtinctionDistance(g, 200)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%v: %.1f nm\n", g, xi)
	}
	// Output:
	// [1 1 1]: 38.0 nm
	// [2 0 0]: 42.8 nm
	// (1 1 0) of Cu: kinematically forbidden reflection (|F_g| = 0 for this structure); give the extinction distance explicitly to image it anyway
}

func ExampleDeviationFromKikuchi() {
	// Excess Kikuchi line of Cu 200 a fifth of the 000–g spacing beyond g.
	lam := crystal.Wavelength(200)
	s, _ := crystal.DeviationFromKikuchi(lam, 2/0.36149, 0.2, 1)
	fmt.Printf("s = %.4f 1/nm\n", s)
	// Output: s = 0.0154 1/nm
}
