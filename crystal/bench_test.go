package crystal

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"testing"
)

func BenchmarkParseCIF(b *testing.B) {
	for _, name := range []string{"mg.cif", "nacl.cif"} {
		data, err := os.ReadFile("testdata/" + name)
		if err != nil {
			b.Fatal(err)
		}
		block := map[string]string{"mg.cif": "Mg", "nacl.cif": ""}[name]
		b.Run(name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := ParseCIF(bytes.NewReader(data), block); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkStructureFactor(b *testing.B) {
	for _, name := range []string{"Cu", "Ni3Al"} {
		c, _ := Preset(name)
		b.Run(name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				c.StructureFactor([3]float64{3, 1, 1}, 200)
			}
		})
	}
}

func BenchmarkZone(b *testing.B) {
	cu, _ := Preset("Cu")
	for _, gmax := range []float64{10, 30} {
		b.Run(fmt.Sprintf("gmax=%g", gmax), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := cu.Zone([3]float64{1, 1, 2}, gmax); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkNewManyAtoms builds cells of about 50 000 atoms: a P1 cell
// listing them all (the site check alone), and Fm-3m (192 operations) from
// general positions inside its asymmetric unit (International Tables Vol.
// A: 0 ≤ x ≤ 1/2, 0 ≤ y ≤ min(x, 1/2 − x), 0 ≤ z ≤ y), expanded and merged.
func BenchmarkNewManyAtoms(b *testing.B) {
	cell := Cubic(10)
	var p1 []Atom
	const n = 37 // 37³ = 50 653 atoms, 0.27 nm apart
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := 0; k < n; k++ {
				p1 = append(p1, Atom{Element: "Cu", Occupancy: 1, XYZ: [3]float64{(float64(i) + 0.5) / n, (float64(j) + 0.5) / n, (float64(k) + 0.5) / n}})
			}
		}
	}
	var asu []Atom
	const h, m = 0.025, 0.005
	for x := m; x < 0.5-m; x += h {
		for y := m; y < math.Min(x, 0.5-x)-m; y += h {
			for z := m; z < y-m; z += h {
				asu = append(asu, Atom{Element: "Cu", Occupancy: 1, XYZ: [3]float64{x, y, z}})
			}
		}
	}
	fm3m, err := SpaceGroupByName("Fm-3m", cell)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name  string
		atoms []Atom
		ops   []SymOp
	}{
		{fmt.Sprintf("P1_%d", len(p1)), p1, []SymOp{identityOp}},
		{fmt.Sprintf("Fm-3m_%dx192", len(asu)), asu, fm3m.Operations()},
	} {
		b.Run(c.name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				cr, err := expand("bench", cell, c.atoms, c.ops, [][3]float64{{}})
				if err != nil {
					b.Fatal(err)
				}
				if len(cr.Atoms) != len(c.atoms)*len(c.ops) {
					b.Fatalf("%d atoms, want %d", len(cr.Atoms), len(c.atoms)*len(c.ops))
				}
			}
		})
	}
}
