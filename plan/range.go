package plan

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// MaxRangePoints bounds the number of values of a Range.
const MaxRangePoints = 2001

// Range is an inclusive arithmetic range From, From+Step, …, ≤ To.
type Range struct{ From, To, Step float64 }

// ParseRange reads "A:B:STEP" (From A to B by STEP); flag names the
// option in errors.
func ParseRange(flag, text string) (Range, error) {
	parts := strings.Split(text, ":")
	if len(parts) != 3 {
		return Range{}, fmt.Errorf("%s: %q: write A:B:STEP, e.g. 0:200:5", flag, text)
	}
	var v [3]float64
	for i, p := range parts {
		x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return Range{}, fmt.Errorf("%s: %q is not a finite number", flag, p)
		}
		v[i] = x
	}
	r := Range{v[0], v[1], v[2]}
	if !(r.Step > 0) {
		return Range{}, fmt.Errorf("%s: step %g must be positive", flag, r.Step)
	}
	if r.To < r.From {
		return Range{}, fmt.Errorf("%s: end %g is below the start %g", flag, r.To, r.From)
	}
	if n := (r.To-r.From)/r.Step + 1; n > MaxRangePoints {
		return Range{}, fmt.Errorf("%s: %.0f points, at most %d", flag, n, MaxRangePoints)
	}
	return r, nil
}

// Values lists the range's values.
func (r Range) Values() []float64 {
	var out []float64
	for k := 0; ; k++ {
		x := r.From + float64(k)*r.Step
		if x > r.To+1e-9*r.Step {
			break
		}
		out = append(out, x)
	}
	return out
}
