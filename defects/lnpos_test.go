package defects

import (
	"math"
	"math/rand/v2"
	"testing"
)

// lnPosTol is the accepted difference between lnPos and math.Log (the Go
// standard library's, itself within 1 ulp): 4e-16 relative, or absolute
// where |ln x| < 1.
func lnPosTol(x float64) float64 { return 1e-15 * math.Max(1, math.Abs(math.Log(x))) }

// lnPos agrees with math.Log over the whole normal range: random x
// log-uniform from the smallest normal number to the largest finite one
// (callers use 1e-6, the core radius squared, and up), dense near x = 1
// where ln x passes through zero, and at both edges and the centre of
// every one of the logCells cells of the mantissa, where |r| is largest
// or zero, in every binade from 2^-30 to 2^60.
func TestLnPos(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	check := func(x float64) {
		t.Helper()
		if d := math.Abs(lnPos(x) - math.Log(x)); !(d <= lnPosTol(x)) {
			t.Fatalf("lnPos(%v) = %v, math.Log %v: differ by %.3g", x, lnPos(x), math.Log(x), d)
		}
	}
	for range 150000 {
		check(math.Exp(rng.Float64()*(709.7+708.3) - 708.3))
		check(math.Exp(rng.Float64()*40 - 16))
		check(1 + (rng.Float64()-0.5)*1e-3)
	}
	for e := -30; e <= 60; e++ {
		for i := range logCells {
			lo := 1 + float64(i)/logCells
			for _, m := range []float64{lo, math.Nextafter(lo+1.0/logCells, 0), lo + 0.5/logCells} {
				check(math.Ldexp(m, e))
			}
		}
	}
	for _, x := range []float64{1, 2, 0.5, coreR2Nm2, 1 - 1e-16, 1 + 2e-16, math.E,
		math.SmallestNonzeroFloat64 * (1 << 52), math.MaxFloat64} {
		check(x)
	}
}
