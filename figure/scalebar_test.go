package figure

import (
	"math"
	"testing"
)

// The rule (largest 1, 2 or 5 × 10^n nm not over a third of the field) is
// common practice for a bar of about a fifth to a quarter of the field; the
// 200 nm → 50 nm case is the usual choice for such a field.
func TestScaleBarNmTable(t *testing.T) {
	cases := []struct{ width, want float64 }{
		{200, 50},
		{256, 50},
		{100, 20},
		{60, 20}, // exactly a third
		{59.9, 10},
		{1000, 200},
		{1500, 500}, // exactly a third
		{30, 10},
		{12, 2},
		{3, 1},
		{2.9, 0.5},
		{0.5, 0.1},
		{6000, 2000},
		{0, 0},
		{-5, 0},
		{math.NaN(), 0},
		{math.Inf(1), 0},
	}
	for _, c := range cases {
		if got := ScaleBarNm(c.width); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("ScaleBarNm(%v) = %v, want %v", c.width, got, c.want)
		}
	}
}

// TestScaleBarNmRule checks the rule itself over many widths: the bar is a
// round length, fits in a third of the field, and the next round length
// would not, so it covers more than 2/15 of the field.
func TestScaleBarNmRule(t *testing.T) {
	next := map[float64]float64{1: 2, 2: 5, 5: 10}
	for w := 0.37; w < 1e5; w *= 1.0137 {
		b := ScaleBarNm(w)
		e := math.Floor(math.Log10(b) + 1e-9)
		mant := math.Round(b / math.Pow(10, e))
		nb, ok := next[mant]
		if !ok || math.Abs(b-mant*math.Pow(10, e)) > 1e-9*b {
			t.Fatalf("width %v: bar %v is not 1, 2 or 5 × 10^n", w, b)
		}
		if b > w/3*(1+1e-12) || nb*math.Pow(10, e) <= w/3 {
			t.Fatalf("width %v: bar %v is not the largest round length within a third", w, b)
		}
		if f := b / w; f <= 2.0/15-1e-12 || f > 1.0/3+1e-12 {
			t.Fatalf("width %v: bar covers %v of the field", w, f)
		}
	}
}

func TestLengthLabel(t *testing.T) {
	cases := map[float64]string{
		50:   "50 nm",
		500:  "500 nm",
		0.5:  "0.5 nm",
		0.02: "0.02 nm",
		1000: "1 µm",
		2000: "2 µm",
		5e4:  "50 µm",
	}
	for nm, want := range cases {
		if got := LengthLabel(nm); got != want {
			t.Errorf("LengthLabel(%v) = %q, want %q", nm, got, want)
		}
	}
}
