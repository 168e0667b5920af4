package defects

import (
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// fakeVoid reports fixed void intervals.
type fakeVoid [][2]float64

func (fakeVoid) R(r3.Vec) r3.Vec { return r3.Vec{} }
func (v fakeVoid) Voids(x, y, z0, z1 float64, dst [][2]float64) [][2]float64 {
	return append(dst, v...)
}

func TestSumSuperposesAndMerges(t *testing.T) {
	s1 := r3.Vec{X: 0.1}
	s2 := r3.Vec{Y: -0.05}
	f1, _ := NewFault(r3.Vec{Z: 70}, r3.Vec{Z: 1}, s1)
	f2, _ := NewFault(r3.Vec{Z: 20}, r3.Vec{Z: 1}, s2)
	f3, _ := NewFault(r3.Vec{Z: 70}, r3.Vec{Z: 1}, s2) // same depth as f1
	inc, _ := NewInclusion(r3.Vec{Z: 50}, 5, 0.01)
	s := Sum{f1, inc, f2, f3}
	p := r3.Vec{X: 3, Z: 80}
	want := r3.Add(r3.Add(r3.Add(f1.R(p), f2.R(p)), f3.R(p)), inc.R(p))
	if got := s.R(p); got != want {
		t.Fatalf("Sum.R = %v, want %v", got, want)
	}
	pre := []float64{-1}
	got := s.Jumps(3, 0, 0, 100, pre)
	if !slices.Equal(got, []float64{-1, 20, 70}) {
		t.Fatalf("Sum.Jumps = %v, want [-1 20 70] (prefix kept, sorted, duplicate dropped)", got)
	}
	v := Sum{fakeVoid{{40, 50}, {10, 12}}, f1, fakeVoid{{45, 60}, {12, 13}, {80, 90}}}
	gv := v.Voids(0, 0, 0, 100, nil)
	wantV := [][2]float64{{10, 13}, {40, 60}, {80, 90}}
	if !slices.Equal(gv, wantV) {
		t.Fatalf("Sum.Voids = %v, want %v", gv, wantV)
	}
	// Nested sums pass reports through.
	if got := (Sum{s, Sum{f2}}).Jumps(0, 0, 0, 100, nil); !slices.Equal(got, []float64{20, 70}) {
		t.Fatalf("nested Sum.Jumps = %v", got)
	}
}
