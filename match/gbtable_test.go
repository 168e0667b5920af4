package match

import (
	"testing"

	"faultline/crystal"
)

// The g·b table of the six 1/2<110> Burgers vectors of fcc crystals (one
// sign each) for the common g, as the trade tabulates it for the g·b = 0
// invisibility analysis (e.g. Edington 1975, Practical Electron Microscopy
// in Materials Science, Monograph 3, the fcc table of g·b; reproduced
// here from memory — each entry is the integer sum h u + k v + l w over
// the vector's indices with the factor ½).
func TestFCCGDotBTable(t *testing.T) {
	bs := []string{"1/2[1 1 0]", "1/2[1 -1 0]", "1/2[1 0 1]", "1/2[1 0 -1]", "1/2[0 1 1]", "1/2[0 1 -1]"}
	table := []struct {
		g  [3]float64
		gb [6]float64
	}{
		{[3]float64{1, 1, 1}, [6]float64{1, 0, 1, 0, 1, 0}},
		{[3]float64{1, 1, -1}, [6]float64{1, 0, 0, 1, 0, 1}},
		{[3]float64{1, -1, 1}, [6]float64{0, 1, 1, 0, 0, -1}},
		{[3]float64{-1, 1, 1}, [6]float64{0, -1, 0, -1, 1, 0}},
		{[3]float64{2, 0, 0}, [6]float64{1, 1, 1, 1, 0, 0}},
		{[3]float64{0, 2, 0}, [6]float64{1, -1, 0, 0, 1, 1}},
		{[3]float64{0, 0, 2}, [6]float64{0, 0, 1, -1, 1, -1}},
		{[3]float64{2, 2, 0}, [6]float64{2, 0, 1, 1, 1, 1}},
		{[3]float64{2, -2, 0}, [6]float64{0, 2, 1, 1, -1, -1}},
		{[3]float64{2, 0, 2}, [6]float64{1, 1, 2, 0, 1, -1}},
		{[3]float64{0, 2, -2}, [6]float64{1, -1, -1, 1, 0, 2}},
		{[3]float64{3, 1, 1}, [6]float64{2, 1, 2, 1, 1, 0}},
	}
	cell := crystal.Cubic(0.3615)
	for _, row := range table {
		for i, text := range bs {
			b, err := cell.Burgers(text)
			if err != nil {
				t.Fatal(err)
			}
			got := clean(row.g[0]*b[0] + row.g[1]*b[1] + row.g[2]*b[2])
			if got != row.gb[i] {
				t.Errorf("g = %v, b = %s: g·b = %v, table %v", row.g, text, got, row.gb[i])
			}
		}
	}
	// The family expands to these six and their negatives.
	cs, err := BurgersCandidates(cell, []string{"1/2<110>"}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 12 {
		t.Fatalf("1/2<110>: %d candidates, want 12", len(cs))
	}
	found := map[string]bool{}
	for _, c := range cs {
		found[c.Label] = true
	}
	for _, text := range bs {
		if !found[text] {
			t.Errorf("1/2<110> lacks %s", text)
		}
	}
}
