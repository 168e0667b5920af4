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
