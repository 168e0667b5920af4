package crystal

import (
	"bytes"
	"fmt"
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
