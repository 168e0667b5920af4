package match

import (
	"fmt"

	"faultline/crystal"
	"faultline/scene"
)

// CandidatesFor returns the varied defect's index and its candidates for
// a built scene: vary is "b" (or ""), "nature" or "kind"; given are the
// families or vectors for b, or the words for nature and kind (empty: both
// words); defect picks the varied defect (nil: the first that fits, see
// SetFile). The set file and the window both come here.
func CandidatesFor(st *scene.Setup, vary string, given []string, defect *int) (int, []Candidate, error) {
	k, err := pickDefect(st.Scene, vary, defect)
	if err != nil {
		return 0, nil, err
	}
	var cs []Candidate
	switch vary {
	case "", "b":
		cs, err = BurgersCandidates(st.Crystal.Cell, given, k)
	case "nature", "kind":
		cs, err = wordCandidates(vary, given, k)
	default:
		err = setErr("vary", "%q: want b, nature or kind", vary)
	}
	return k, cs, err
}

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
