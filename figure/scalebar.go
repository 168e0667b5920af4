package figure

import (
	"fmt"
	"math"
	"strconv"
)

// ScaleBarNm returns the length of the scale bar for a field widthNm wide:
// the largest 1, 2 or 5 × 10^n nm not exceeding widthNm/3. Successive
// round lengths differ by a factor 2 to 2.5, so the bar then spans between
// 2/15 and 1/3 of the field, a fifth to a quarter in the middle of that
// range (common practice: a bar about a fifth to a quarter of the field,
// with a round length). It returns 0 for a width that is not a positive
// finite number.
func ScaleBarNm(widthNm float64) float64 {
	if !(widthNm > 0) || math.IsInf(widthNm, 0) {
		return 0
	}
	limit := widthNm / 3
	e := math.Floor(math.Log10(limit))
	best := 0.0
	// Look one decade either side of the estimate so rounding in Log10
	// cannot skip the right value.
	for d := e - 1; d <= e+1; d++ {
		p := math.Pow(10, d)
		for _, m := range []float64{1, 2, 5} {
			if v := m * p; v <= limit*(1+1e-12) && v > best {
				best = v
			}
		}
	}
	return best
}

// LengthLabel writes a length for a scale bar: "50 nm", "0.5 nm", or in µm
// from 1000 nm on ("2 µm").
func LengthLabel(nm float64) string {
	if nm >= 1000 {
		return fmt.Sprintf("%s µm", strconv.FormatFloat(nm/1000, 'g', 6, 64))
	}
	return fmt.Sprintf("%s nm", strconv.FormatFloat(nm, 'g', 6, 64))
}
