package crystal

import (
	"bytes"
	"errors"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// FuzzParseCIF: whatever the bytes, ParseCIF returns a crystal or a
// *CIFError, never panics, and a crystal it returns is sound (atoms wrapped
// into the cell, occupancies in (0, 1], a cell with positive volume, finite
// structure factors). Seeds: the test structures in testdata/ and
// testdata/fuzz/FuzzParseCIF (which also keeps inputs that once failed).
func FuzzParseCIF(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "*.cif"))
	for _, p := range seeds {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add([]byte(cifCu))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ParseCIF(bytes.NewReader(data), "")
		if err != nil {
			var ce *CIFError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v is not a *CIFError", err)
			}
			return
		}
		if len(c.Atoms) == 0 || !(c.Cell.Volume() > 0) {
			t.Fatalf("crystal without atoms or volume: %+v", c)
		}
		for _, a := range c.Atoms {
			for _, x := range a.XYZ {
				if !(x >= 0 && x < 1) {
					t.Fatalf("atom %+v not wrapped into the cell", a)
				}
			}
			if !(a.Occupancy > 0 && a.Occupancy <= 1) || !(a.BIsoNm2 >= 0) {
				t.Fatalf("atom %+v", a)
			}
		}
		if len(c.Atoms) < 10000 {
			if F := c.StructureFactor([3]float64{1, 1, 1}, 200); cmplx.IsNaN(F) || math.IsInf(real(F), 0) {
				t.Fatalf("F(111) = %v", F)
			}
		}
	})
}

// FuzzParseIndices: index and Burgers texts never panic, and what is
// accepted lies within the stated limits (finite, each index zero or
// within [MinIndex, MaxIndex], the factor too, not all zero).
func FuzzParseIndices(f *testing.F) {
	for _, s := range []string{"1/2[1 1 0]", "[1-10]", "(1 1 1)", "1/3[1 1 -2 0]", "0x1p3[1 1 0]", "1_0/2[1 1 0]", "[1e-9 0 0]", "1e-320[1 1 0]", "a/2[1,1,0]", "<1 1 0>", "{111}", "[0.5 0.5 0]"} {
		f.Add(s)
	}
	cu, _ := Preset("Cu")
	ti, _ := Preset("Ti")
	f.Fuzz(func(t *testing.T, s string) {
		ix, err := ParseIndices(s)
		if err == nil {
			if a := math.Abs(ix.Factor); !(a >= MinIndex && a <= MaxIndex) {
				t.Fatalf("%q: factor %g accepted", s, ix.Factor)
			}
			if err := CheckIndices(ix.V, false); err != nil {
				t.Fatalf("%q: indices %v accepted: %v", s, ix.V, err)
			}
		}
		for _, c := range []Cell{cu.Cell, ti.Cell} {
			b, err := c.Burgers(s)
			if err != nil {
				continue
			}
			for _, x := range b {
				if math.IsNaN(x) || math.IsInf(x, 0) || x != 0 && math.Abs(x) < MinIndex {
					t.Fatalf("%q: Burgers vector %v accepted", s, b)
				}
			}
		}
		SpaceGroupByName(s, cu.Cell)
		SpaceGroupByHall(s)
	})
}
