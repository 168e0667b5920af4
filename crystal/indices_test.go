package crystal

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestParseIndices(t *testing.T) {
	// The notations of the trade (Hirth & Lothe 1982, ch. 1; Williams &
	// Carter 2009, ch. 18): optional factor, brackets, spaced, comma or
	// compact single-digit indices.
	for _, tc := range []struct {
		text    string
		factor  float64
		v       []float64
		bracket rune
	}{
		{"1/2[1 1 0]", 0.5, []float64{1, 1, 0}, '['},
		{"[1 -1 0]", 1, []float64{1, -1, 0}, '['},
		{"[1-10]", 1, []float64{1, -1, 0}, '['},
		{"[-1-1-1]", 1, []float64{-1, -1, -1}, '['},
		{"1/3[1 1 -2 0]", 1.0 / 3, []float64{1, 1, -2, 0}, '['},
		{"1/3[11-20]", 1.0 / 3, []float64{1, 1, -2, 0}, '['},
		{"(1 1 1)", 1, []float64{1, 1, 1}, '('},
		{"(111)", 1, []float64{1, 1, 1}, '('},
		{"[0 0 1]", 1, []float64{0, 0, 1}, '['},
		{"[1,-1,0]", 1, []float64{1, -1, 0}, '['},
		{" 1/2 [1, 1, 0] ", 0.5, []float64{1, 1, 0}, '['},
		{"a/2[1 1 0]", 0.5, []float64{1, 1, 0}, '['},
		{"0.5[1 1 0]", 0.5, []float64{1, 1, 0}, '['},
		{"1/6[1 1 -2]", 1.0 / 6, []float64{1, 1, -2}, '['},
		{"[10 0 1]", 1, []float64{10, 0, 1}, '['},
		{"[0.5 0.5 0]", 1, []float64{0.5, 0.5, 0}, '['},
		{"1/2[1 −1 0]", 0.5, []float64{1, -1, 0}, '['},
		{"<1 1 0>", 1, []float64{1, 1, 0}, '<'},
		{"{111}", 1, []float64{1, 1, 1}, '{'},
	} {
		got, err := ParseIndices(tc.text)
		if err != nil {
			t.Errorf("ParseIndices(%q): %v", tc.text, err)
			continue
		}
		if math.Abs(got.Factor-tc.factor) > 1e-15 || got.Bracket != tc.bracket || !equalSlice(got.V, tc.v) {
			t.Errorf("ParseIndices(%q) = %+v, want factor %g, %v, %q", tc.text, got, tc.factor, tc.v, tc.bracket)
		}
	}
}

func TestParseIndicesMalformed(t *testing.T) {
	for _, text := range []string{
		"", "1 1 0", "[1 1 0", "1 1 0]", "[1 1]", "[1 1 0 0 1]", "[11]", "[1 x 0]",
		"[1-]", "[1--10]", "1/0[1 1 0]", "0[1 1 0]", "q[1 1 0]", "[1 1 0](1 1 1)",
		"[[1 1 0]]", "[1.5 0]", "[1.50]", "[NaN 0 0]", "[1 Inf 0]", "(1 1 1]",
		"[0x1p3 0 0]", "[1_0 0 0]", "0x1p3[1 1 0]", "1_0/2[1 1 0]", "[+Inf 0 0]", "[1e-9 0 0]",
		"[0 0 0]", "(0 0 0)", "[1e400 0 0]",
	} {
		if got, err := ParseIndices(text); err == nil {
			t.Errorf("ParseIndices(%q) = %+v, want an error", text, got)
		} else if !errors.Is(err, ErrIndices) {
			t.Errorf("ParseIndices(%q): error %v does not wrap ErrIndices", text, err)
		}
	}
}

func TestBurgers(t *testing.T) {
	cu, _ := Preset("Cu")
	ti, _ := Preset("Ti")
	for _, tc := range []struct {
		cell Cell
		text string
		want [3]float64
	}{
		{cu.Cell, "1/2[1 1 0]", [3]float64{0.5, 0.5, 0}},
		{cu.Cell, "1/2[1-10]", [3]float64{0.5, -0.5, 0}},
		{cu.Cell, "1/6[1 1 -2]", [3]float64{1.0 / 6, 1.0 / 6, -2.0 / 6}},
		{cu.Cell, "[0 0 1]", [3]float64{0, 0, 1}},
		// Four-index to three-index, U = u − t, V = v − t, W = w
		// (Frank 1965, Acta Cryst. 18, 862; Hirth & Lothe 1982, ch. 1):
		// 1/3[1 1 -2 0] = a1 + a2 is [1 1 0] (an a-type vector of length a);
		// 1/3[-1 2 -1 0] = a2; [0 0 0 1] = c; 1/3[1 1 -2 3] = a + c.
		{ti.Cell, "1/3[1 1 -2 0]", [3]float64{1, 1, 0}},
		{ti.Cell, "1/3[-1 2 -1 0]", [3]float64{0, 1, 0}},
		{ti.Cell, "1/3[2 -1 -1 0]", [3]float64{1, 0, 0}},
		{ti.Cell, "[0 0 0 1]", [3]float64{0, 0, 1}},
		{ti.Cell, "1/3[1 1 -2 3]", [3]float64{1, 1, 1}},
		{ti.Cell, "[0 0 1]", [3]float64{0, 0, 1}},
	} {
		got, err := tc.cell.Burgers(tc.text)
		if err != nil {
			t.Errorf("Burgers(%q): %v", tc.text, err)
			continue
		}
		for i := range got {
			if math.Abs(got[i]-tc.want[i]) > 1e-12 {
				t.Errorf("Burgers(%q) = %v, want %v", tc.text, got, tc.want)
				break
			}
		}
	}
	// |1/3<11-20>| = a and |1/2<110>| = a/√2 (Hirth & Lothe 1982, ch. 1).
	b, _ := ti.Cell.Burgers("1/3[1 1 -2 0]")
	if l := ti.Cell.Direction(b); math.Abs(norm(l)-ti.Cell.A) > 1e-12 {
		t.Errorf("|1/3[1 1 -2 0]| = %g nm, want a = %g nm", norm(l), ti.Cell.A)
	}
	b, _ = cu.Cell.Burgers("1/2[1 1 0]")
	if l := cu.Cell.Direction(b); math.Abs(norm(l)-cu.Cell.A/math.Sqrt2) > 1e-12 {
		t.Errorf("|1/2[1 1 0]| = %g nm, want a/√2", norm(l))
	}
}

func TestBurgersMalformed(t *testing.T) {
	cu, _ := Preset("Cu")
	ti, _ := Preset("Ti")
	for _, tc := range []struct {
		cell  Cell
		text  string
		inMsg string
	}{
		{cu.Cell, "1/2[1 1 0", "end with"},
		{cu.Cell, "(1 1 1)", "not a plane"},
		{cu.Cell, "<1 1 0>", "family"},
		{cu.Cell, "1/3[1 1 -2 0]", "hexagonal"}, // four indices on a cubic cell
		{ti.Cell, "1/3[1 1 -1 0]", "−(u+v)"},    // t ≠ −(u+v)
		{ti.Cell, "[0 0 0]", "zero"},
		{cu.Cell, "half [1 1 0]", "factor"},
		// Go's other number spellings are not read as numbers.
		{cu.Cell, "0x1p3[1 1 0]", "not a number"},
		{cu.Cell, "1_0/2[1 1 0]", "not a number"},
		{cu.Cell, "[0x1p3 0 0]", "not a number"},
		{cu.Cell, "[1_0 0 0]", "not a number"},
		{cu.Cell, "Inf[1 1 0]", "not a number"},
		{cu.Cell, "NaN[1 1 0]", "not a number"},
		// Tiny or huge: no displacement an image can show.
		{cu.Cell, "1e-320[1 1 0]", "outside"},
		{cu.Cell, "1e300[1 1 0]", "outside"},
		{cu.Cell, "[1e-9 0 1]", "below 0.001"},
		{cu.Cell, "[1e9 0 1]", "beyond"},
		{cu.Cell, "0.001[0.01 0 1]", "component 0"},
		{cu.Cell, "[0 0 0]", "all indices are zero"},
	} {
		_, err := tc.cell.Burgers(tc.text)
		if err == nil {
			t.Errorf("Burgers(%q): want an error", tc.text)
			continue
		}
		if !strings.Contains(err.Error(), tc.inMsg) {
			t.Errorf("Burgers(%q): error %q does not mention %q", tc.text, err, tc.inMsg)
		}
	}
}

func TestFourIndexPlanes(t *testing.T) {
	ti, _ := Preset("Ti")
	for _, tc := range []struct {
		v    []float64
		want [3]float64
		ok   bool
	}{
		{[]float64{1, 0, -1, 0}, [3]float64{1, 0, 0}, true},
		{[]float64{1, 1, -2, 0}, [3]float64{1, 1, 0}, true},
		{[]float64{0, 0, 0, 2}, [3]float64{0, 0, 2}, true},
		{[]float64{1, 0, -1, 1}, [3]float64{1, 0, 1}, true},
		{[]float64{1, 0, 1, 0}, [3]float64{}, false},
		{[]float64{1, 1, 0}, [3]float64{1, 1, 0}, true},
		{[]float64{1, 1}, [3]float64{}, false},
	} {
		got, err := ti.Cell.PlaneIndices(tc.v)
		if (err == nil) != tc.ok || (tc.ok && got != tc.want) {
			t.Errorf("PlaneIndices(%v) = %v, %v; want %v ok=%v", tc.v, got, err, tc.want, tc.ok)
		}
	}
	cu, _ := Preset("Cu")
	if _, err := cu.Cell.PlaneIndices([]float64{1, 0, -1, 0}); err == nil {
		t.Error("four-index plane on a cubic cell accepted")
	}
}

// TestFourIndexRoundTrip: shown back in four-index form, a direction or
// plane reads as the trade writes it.
func TestFourIndexRoundTrip(t *testing.T) {
	ti, _ := Preset("Ti")
	cu, _ := Preset("Cu")
	for _, tc := range []struct {
		cell Cell
		text string
	}{
		{ti.Cell, "1/3[1 1 -2 0]"},
		{ti.Cell, "1/3[-1 2 -1 0]"},
		{ti.Cell, "[0 0 0 1]"},
		{ti.Cell, "1/3[1 1 -2 3]"},
		{ti.Cell, "[1 0 -1 0]"},
		{cu.Cell, "1/2[1 1 0]"},
		{cu.Cell, "1/6[1 1 -2]"},
		{cu.Cell, "[0 0 1]"},
	} {
		b, err := tc.cell.Burgers(tc.text)
		if err != nil {
			t.Fatal(err)
		}
		if got := tc.cell.FormatDirection(b); got != tc.text {
			t.Errorf("FormatDirection(Burgers(%q)) = %q", tc.text, got)
		}
	}
	for _, tc := range []struct {
		hkl  [3]float64
		want string
	}{
		{[3]float64{1, 0, 0}, "(1 0 -1 0)"},
		{[3]float64{1, 1, 0}, "(1 1 -2 0)"},
		{[3]float64{0, 0, 2}, "(0 0 0 2)"},
		{[3]float64{1, 0, 1}, "(1 0 -1 1)"},
	} {
		if got := ti.Cell.FormatPlane(tc.hkl); got != tc.want {
			t.Errorf("FormatPlane(%v) = %q, want %q", tc.hkl, got, tc.want)
		}
	}
}

func equalSlice(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-15 {
			return false
		}
	}
	return true
}

func norm(v r3.Vec) float64 { return r3.Norm(v) }

// TestCheckIndices: numeric indices (g, beam, normals) within the limits,
// whole where a reflection needs it; the error names the index.
func TestCheckIndices(t *testing.T) {
	for _, c := range []struct {
		v     []float64
		whole bool
		inMsg string // "" for accepted
	}{
		{[]float64{2, 0, 0}, true, ""},
		{[]float64{1, 1, -2, 0}, true, ""},
		{[]float64{0.5, 0, 1}, false, ""},
		{[]float64{0.5, 0, 0}, true, "index 0 (0.5) is not a whole number"},
		{[]float64{1e-9, 0, 0}, true, "index 0 (1e-09) is below 0.001"},
		{[]float64{5e-324, 0, 0}, false, "index 0 (5e-324) is below"},
		{[]float64{1, 1e308, 0}, false, "index 1 (1e+308) is beyond ±1000"},
		{[]float64{0, math.NaN(), 0}, false, "index 1 is not a finite number"},
		{[]float64{0, 0, math.Inf(-1)}, false, "index 2 is not a finite number"},
		{[]float64{0, 0, 0}, false, "all indices are zero"},
		{[]float64{1, 0}, false, "2 indices"},
	} {
		err := CheckIndices(c.v, c.whole)
		switch {
		case c.inMsg == "" && err != nil:
			t.Errorf("%v: %v", c.v, err)
		case c.inMsg != "" && (err == nil || !strings.Contains(err.Error(), c.inMsg)):
			t.Errorf("%v: %v, want %q", c.v, err, c.inMsg)
		}
	}
}

// FormatIndices reads back exactly through ParseIndices and writes no −0.
func TestFormatIndicesRoundTrip(t *testing.T) {
	for _, c := range []struct {
		v    []float64
		want string
	}{
		{[]float64{2, 0, 0}, "2 0 0"},
		{[]float64{1, -1, 0}, "1 -1 0"},
		{[]float64{math.Copysign(0, -1), 1, 1}, "0 1 1"},
		{[]float64{0.5, 0.25, -0.125}, "0.5 0.25 -0.125"},
		{[]float64{1, 1, -2, 0}, "1 1 -2 0"},
		{[]float64{1.0 / 3, 0.1, 2}, "0.3333333333333333 0.1 2"},
	} {
		got := FormatIndices(c.v)
		if got != c.want {
			t.Errorf("FormatIndices(%v) = %q, want %q", c.v, got, c.want)
		}
		ix, err := ParseIndices("[" + got + "]")
		if err != nil {
			t.Errorf("%q does not parse: %v", got, err)
			continue
		}
		for i := range c.v {
			if ix.V[i] != c.v[i] {
				t.Errorf("%q reads back as %v, want %v", got, ix.V, c.v)
				break
			}
		}
	}
}
