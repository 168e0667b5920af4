package crystal

import (
	"fmt"
	"strings"
	"sync"
)

// spaceGroupSetting is one row of spaceGroupTable.
type spaceGroupSetting struct {
	Number    int
	XHM       string // extended Hermann–Mauguin symbol, "F d -3 m:2"
	HM        string // full symbol without the setting, "F d -3 m"
	Ext       string // "1" or "2" (origin choice), "H" or "R" (axes), or ""
	Short     string // "Fd-3m"
	Hall      string // "-F 4vw 2vw 3"
	Ops       string // operators less centring, ";" separated
	Centring  string // centring translations, ";" separated
	Reference bool   // the reference setting of its number
}

// SpaceGroup is one setting of one of the 230 space groups, from the table
// generated from python3-gemmi (International Tables Vol. A).
type SpaceGroup struct{ s *spaceGroupSetting }

// Number is the space-group number, 1–230.
func (g SpaceGroup) Number() int { return g.s.Number }

// Name is the extended Hermann–Mauguin symbol, with the setting after a
// colon where there is a choice ("F d -3 m:2", "R -3 m:H").
func (g SpaceGroup) Name() string { return g.s.XHM }

// Operations returns every operation of the group in its conventional
// cell: each listed operator followed by each centring translation.
func (g SpaceGroup) Operations() []SymOp {
	var ops []SymOp
	cen := strings.Split(g.s.Centring, ";")
	for _, text := range strings.Split(g.s.Ops, ";") {
		op, err := ParseSymOp(text)
		if err != nil {
			panic("crystal: space-group table: " + err.Error()) // the table is generated and tested
		}
		for _, c := range cen {
			o := op
			for i, f := range strings.Split(c, ",") {
				t, err := parseFraction(f)
				if err != nil {
					panic("crystal: space-group table: " + err.Error())
				}
				o.T[i] += t
			}
			ops = append(ops, o)
		}
	}
	return ops
}

var (
	sgOnce   sync.Once
	sgByName map[string][]int
	sgByHall map[string]int
)

// sgKey normalises a symbol for lookup: case and blanks do not count.
func sgKey(s string) string { return strings.ToLower(strings.Join(strings.Fields(s), "")) }

func sgIndex() {
	sgOnce.Do(func() {
		sgByName = map[string][]int{}
		sgByHall = map[string]int{}
		for i := range spaceGroupTable {
			s := &spaceGroupTable[i]
			seen := map[string]bool{}
			for _, k := range []string{s.XHM, s.HM, s.Short} {
				k = sgKey(k)
				if !seen[k] {
					seen[k] = true
					sgByName[k] = append(sgByName[k], i)
				}
			}
			// Synonymous settings share a Hall symbol: the first is kept.
			if h := strings.ToLower(strings.Join(strings.Fields(s.Hall), " ")); sgByHall[h] == 0 && h != "p 1" || i == 0 {
				sgByHall[h] = i
			}
		}
	})
}

// SpaceGroupByName finds a space group by its Hermann–Mauguin symbol, full
// or short, with or without blanks ("P 1 21/c 1", "P21/c", "Fm-3m",
// "F d -3 m:2", "R -3 m:R"). Where the symbol leaves the setting open:
//   - hexagonal or rhombohedral axes of an R group follow the cell;
//   - two origin choices are an error (International Tables gives both,
//     and atoms placed for one are wrong in the other): name one with ":1"
//     or ":2";
//   - otherwise the reference setting is taken (unique axis b for a
//     monoclinic short symbol).
func SpaceGroupByName(name string, cell Cell) (SpaceGroup, error) {
	sgIndex()
	idx, ok := sgByName[sgKey(name)]
	if !ok {
		return SpaceGroup{}, fmt.Errorf("space group %q is not a Hermann–Mauguin symbol this program knows", name)
	}
	return pickSetting(idx, fmt.Sprintf("%q", name), cell)
}

// SpaceGroupByHall finds a space group by its Hall symbol ("-F 4vw 2vw 3"),
// which names one setting.
func SpaceGroupByHall(hall string) (SpaceGroup, error) {
	sgIndex()
	i, ok := sgByHall[strings.ToLower(strings.Join(strings.Fields(hall), " "))]
	if !ok {
		return SpaceGroup{}, fmt.Errorf("Hall symbol %q is not one this program knows", hall)
	}
	return SpaceGroup{&spaceGroupTable[i]}, nil
}

// SpaceGroupByNumber finds space group n (1–230) in its reference setting,
// with the same rules as SpaceGroupByName where the setting is open.
func SpaceGroupByNumber(n int, cell Cell) (SpaceGroup, error) {
	var idx []int
	for i := range spaceGroupTable {
		if spaceGroupTable[i].Number == n {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return SpaceGroup{}, fmt.Errorf("space group number %d: want 1 to 230", n)
	}
	return pickSetting(idx, fmt.Sprintf("number %d", n), cell)
}

func pickSetting(idx []int, what string, cell Cell) (SpaceGroup, error) {
	if len(idx) == 1 {
		return SpaceGroup{&spaceGroupTable[idx[0]]}, nil
	}
	// Hexagonal or rhombohedral axes, from the cell.
	var axes, origin, other []int
	for _, i := range idx {
		switch spaceGroupTable[i].Ext {
		case "H", "R":
			axes = append(axes, i)
		case "1", "2":
			origin = append(origin, i)
		default:
			other = append(other, i)
		}
	}
	if len(axes) > 0 {
		want := ""
		switch {
		case cell.IsHexagonal():
			want = "H"
		case cell.System() == "rhombohedral":
			want = "R"
		default:
			return SpaceGroup{}, fmt.Errorf("space group %s: the cell is neither hexagonal (a = b, γ = 120°) nor rhombohedral (a = b = c, α = β = γ), so its axes are unknown", what)
		}
		for _, i := range axes {
			if spaceGroupTable[i].Ext == want {
				return SpaceGroup{&spaceGroupTable[i]}, nil
			}
		}
	}
	if len(origin) > 0 {
		s := spaceGroupTable[origin[0]]
		return SpaceGroup{}, fmt.Errorf("space group %s has two origin choices (International Tables Vol. A); name one, %q or %q, or list the operators", what, s.HM+":1", s.HM+":2")
	}
	for _, i := range other {
		if spaceGroupTable[i].Reference {
			return SpaceGroup{&spaceGroupTable[i]}, nil
		}
	}
	return SpaceGroup{&spaceGroupTable[other[0]]}, nil
}
