package sim

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// benchProblem is the scene of the speed comparison: an inclined mixed
// dislocation through a 150 nm foil and a small coherent inclusion,
// two-beam with absorption, on an n × n grid over 200 nm.
func benchProblem(n int) *Problem {
	f := sum{
		newLineField(r3.Vec{Z: 75}, r3.Vec{X: 0.3, Y: 1, Z: 0.6}, 0.2, 0.15),
		sphereStrain{at: r3.Vec{X: 40, Y: 30, Z: 70}, r0: 8, ep: 0.01},
	}
	return &Problem{Model: TwoBeam{SPerNm: 0.0, XiGNm: 42, XiGAbsNm: 420, Xi0AbsNm: 420},
		GPerNm: 4.9, Field: f, ThicknessNm: 150, Grid: Grid{NX: n, NY: n, WidthNm: 200, HeightNm: 200}}
}

func benchmarkRender(b *testing.B, n int) {
	p := benchProblem(n)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Render(context.Background(), p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n*n)*float64(b.N)/b.Elapsed().Seconds(), "columns/s")
}

func BenchmarkRender64(b *testing.B)  { benchmarkRender(b, 64) }
func BenchmarkRender128(b *testing.B) { benchmarkRender(b, 128) }
func BenchmarkRender256(b *testing.B) { benchmarkRender(b, 256) }

// benchRowProblem is benchProblem with the 7-beam systematic row in place
// of the two-beam model: the same scene, g at the Bragg position.
func benchRowProblem(n int) *Problem {
	p := benchProblem(n)
	m := SystematicRow{SPerNm: RowExcitation(3, 0, 0.002508, p.GPerNm), LambdaU: make([]complex128, 13), LambdaUAbs: make([]complex128, 13), Xi0AbsNm: 420}
	for h := -6; h <= 6; h++ {
		if h != 0 {
			xi := 42 * math.Pow(float64(h*h), 0.6)
			m.LambdaU[h+6] = complex(1/xi, 0)
			m.LambdaUAbs[h+6] = complex(0.1/xi, 0)
		}
	}
	p.Model = m
	return p
}

func benchmarkRowRender(b *testing.B, n int) {
	p := benchRowProblem(n)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Render(context.Background(), p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n*n)*float64(b.N)/b.Elapsed().Seconds(), "columns/s")
}

// BenchmarkRowRender64 and 256: the 7-beam row on the scene of
// BenchmarkRender64 and 256, for the per-column cost ratio.
func BenchmarkRowRender64(b *testing.B)  { benchmarkRowRender(b, 64) }
func BenchmarkRowRender256(b *testing.B) { benchmarkRowRender(b, 256) }
