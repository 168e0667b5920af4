package figure_test

import (
	"fmt"

	"faultline/figure"
)

func ExampleScaleBarNm() {
	for _, w := range []float64{200, 100, 1000, 3} {
		fmt.Println(w, "nm field:", figure.LengthLabel(figure.ScaleBarNm(w)))
	}
	// Output:
	// 200 nm field: 50 nm
	// 100 nm field: 20 nm
	// 1000 nm field: 200 nm
	// 3 nm field: 1 nm
}

func ExampleGray() {
	// Intensities as fractions of the incident beam, in a 4×1 image.
	data := []float64{0, 0.25, 0.5, 1}
	fmt.Println(figure.Gray(data, 4, 1, figure.Mapping{}).Pix)
	fmt.Println(figure.Gray(data, 4, 1, figure.Mapping{Mode: "fixed", Max: 0.5}).Pix)
	fmt.Println(figure.Gray(data, 4, 1, figure.Mapping{Mode: "auto", Invert: true}).Pix)
	// Output:
	// [0 64 128 255]
	// [0 128 255 255]
	// [255 191 127 0]
}
