package match

import (
	"fmt"

	"faultline/crystal"
)

// BurgersCandidates expands families in the trade's notation ("1/2<110>",
// "1/3<11-20>") or explicit vectors ("1/2[1 0 1]") into candidates for the
// Burgers vector of defect k, each member once (both signs: the images of
// b and −b differ at s ≠ 0), in a fixed order.
func BurgersCandidates(cell crystal.Cell, families []string, k int) ([]Candidate, error) {
	if len(families) == 0 {
		return nil, fmt.Errorf("%w: candidates: the list is empty", ErrSeries)
	}
	var out []Candidate
	seen := map[[3]float64]bool{}
	for i, f := range families {
		vs, err := cell.Family(f)
		if err != nil {
			return nil, fmt.Errorf("%w: candidates[%d]: %v", ErrSeries, i, err)
		}
		for _, v := range vs {
			if seen[v] {
				continue
			}
			seen[v] = true
			b := v
			label := cell.FormatDirection(v)
			out = append(out, Candidate{Label: label, Path: fmt.Sprintf("defects[%d].b", k), Value: label, B: &b})
		}
	}
	return out, nil
}
