package defects

import "math"

// logCells is the number of cells of the mantissa in lnPos.
const logCells = 512

// logTable holds, for cell i of the mantissa m ∈ [1, 2) in lnPos, 1/c,
// ln c and c at its centre c = 1 + (i + 1/2)/logCells (padded to 32 bytes,
// two cells to a cache line).
var logTable = func() (t [logCells][4]float64) {
	for i := range t {
		c := 1 + (float64(i)+0.5)/logCells
		t[i] = [4]float64{1 / c, math.Log(c), c}
	}
	return t
}()

// lnPos is the natural logarithm of a positive, normal, finite x, to
// within 1e-15 relative (absolute where |ln x| < 1; TestLnPos), about
// 4e-16 for 1e-6 < x < 1e7: x = m·2^e
// with m ∈ [1, 2) in one of logCells cells of centre c,
//
//	ln x = e ln 2 + ln c + ln(1 + r),  r = (m − c)/c,  |r| ≤ 1/(2·logCells),
//
// ln(1 + r) by its series to r⁴ (the first term left out, r⁵/5, is below
// 1.8e-16). m − c is exact (both lie in [1, 2) and c has 10 significant
// bits), so r carries one rounding of a product. The mantissa's top bits
// give the cell. The body is kept small enough for the compiler to
// inline it (go build -gcflags=-m): lineTable.phase has no call.
//
// It replaces math.Log where a straight dislocation's table is evaluated;
// callers keep x at or above the core radius squared (1e-6), far inside
// the normal range. Outside it the result is wrong and not detected: zero,
// subnormal or negative x give ln of a nearby normal number's mantissa
// with a false exponent, +Inf gives 1024 ln 2, NaN a finite value.
func lnPos(x float64) float64 {
	bits := math.Float64bits(x)
	t := &logTable[bits>>43&(logCells-1)]
	r := (math.Float64frombits(bits&(1<<52-1)|1023<<52) - t[2]) * t[0]
	return float64(int(bits>>52)-1023)*math.Ln2 + t[1] + r*(1-r*(0.5-r*(1.0/3-r*0.25)))
}
