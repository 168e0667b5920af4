package crystal

import "testing"

// The number of members of each family, both signs counted: cubic
// 1/2<110> has 12, <100> 6, 1/2<111> 8, 1/6<112> 24; hexagonal
// 1/3<11-20> has 6, <0001> 2, 1/3<11-23> 12 (the standard multiplicities
// of the point groups m-3m and 6/mmm; from memory, e.g. Hirth & Lothe 1982,
// ch. 10 and 11).
func TestFamilySizes(t *testing.T) {
	cub := Cubic(0.36)
	hex := Hexagonal(0.295, 0.468)
	for _, c := range []struct {
		cell Cell
		fam  string
		n    int
	}{
		{cub, "1/2<110>", 12}, {cub, "<100>", 6}, {cub, "1/2<111>", 8},
		{cub, "1/6<112>", 24}, {cub, "1/3<111>", 8},
		{hex, "1/3<11-20>", 6}, {hex, "<0001>", 2}, {hex, "1/3<11-23>", 12},
		{cub, "1/2[1 0 1]", 1},
	} {
		got, err := c.cell.Family(c.fam)
		if err != nil {
			t.Fatalf("%s: %v", c.fam, err)
		}
		if len(got) != c.n {
			t.Errorf("%s: %d members, want %d: %v", c.fam, len(got), c.n, got)
		}
		// Every member has the length of the prototype.
		l0 := 0.0
		for i, v := range got {
			d := c.cell.Direction(v)
			n := d.X*d.X + d.Y*d.Y + d.Z*d.Z
			if i == 0 {
				l0 = n
			} else if n-l0 > 1e-12 || l0-n > 1e-12 {
				t.Errorf("%s: member %v has length² %g, want %g", c.fam, v, n, l0)
			}
		}
	}
}

func TestFamilyErrors(t *testing.T) {
	cub := Cubic(0.36)
	for _, bad := range []string{"", "1/2(110)", "<0 0 0>", "{111}", "1/2<11>"} {
		if _, err := cub.Family(bad); err == nil {
			t.Errorf("%q: no error", bad)
		}
	}
	// A four-index family on a cubic cell is refused.
	if _, err := cub.Family("1/3<11-20>"); err == nil {
		t.Error("four-index family on a cubic cell: no error")
	}
}
