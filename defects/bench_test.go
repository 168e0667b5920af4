package defects

import (
	"syscall"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

var sink r3.Vec

// cpuNs is the CPU time (user and system) of the process in ns, which
// depends far less than wall time on other work sharing the machine.
func cpuNs() float64 {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return float64(ru.Utime.Nano() + ru.Stime.Nano())
}

// reportCPU adds the CPU ns per operation since start (cpu-ns/op).
func reportCPU(b *testing.B, start float64) {
	b.ReportMetric((cpuNs()-start)/float64(b.N), "cpu-ns/op")
}

func benchField(b *testing.B, f Field) {
	p := r3.Vec{X: 3.1, Y: -2.2, Z: 37}
	b.ResetTimer()
	start := cpuNs()
	for i := 0; b.Loop(); i++ {
		p.Z = 37 + float64(i%100)*0.5
		sink = f.R(p)
	}
	reportCPU(b, start)
}

func BenchmarkDislocationIsotropic(b *testing.B) {
	d, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuIso, false)
	benchField(b, d)
}

func BenchmarkDislocationAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuMedium(c), true)
	benchField(b, d)
}

func BenchmarkDissociatedAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDissociated(bFull, bLead, bTrail, lineAt(0.5), r3.Vec{Z: 50}, n111, 3, cuMedium(c), true)
	benchField(b, d)
}

func BenchmarkLoopR10nm(b *testing.B) {
	l, _ := NewLoop(r3.Vec{Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.18, Y: 0.18}, 10, cuIso)
	benchField(b, l)
}

func BenchmarkLoopR50nm(b *testing.B) {
	l, _ := NewLoop(r3.Vec{Z: 50}, r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 0.18, Y: 0.18}, 50, cuIso)
	benchField(b, l)
}

func BenchmarkNewDislocationAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	for b.Loop() {
		_, _ = NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuMedium(c), true)
	}
}

var sinkF float64

// benchPhase times one g·R evaluation through the fast path (Phase).
func benchPhase(b *testing.B, f Field) {
	ph := PhaseOf(f, r3.Vec{X: 4.9, Y: 0.3})
	p := r3.Vec{X: 3.1, Y: -2.2, Z: 37}
	b.ResetTimer()
	start := cpuNs()
	for i := 0; b.Loop(); i++ {
		p.Z = 37 + float64(i%100)*0.5
		sinkF = ph(p)
	}
	reportCPU(b, start)
}

func BenchmarkPhaseDislocationIsotropic(b *testing.B) {
	d, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuIso, false)
	benchPhase(b, d)
}

func BenchmarkPhaseDislocationAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuMedium(c), true)
	benchPhase(b, d)
}

func BenchmarkPhaseDissociatedAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDissociated(bFull, bLead, bTrail, lineAt(0.5), r3.Vec{Z: 50}, n111, 3, cuMedium(c), true)
	benchPhase(b, d)
}

func BenchmarkInclusion(b *testing.B) {
	c, _ := NewInclusion(r3.Vec{Z: 40}, 8, 0.01)
	benchField(b, c)
}

func BenchmarkPhaseInclusion(b *testing.B) {
	c, _ := NewInclusion(r3.Vec{Z: 40}, 8, 0.01)
	benchPhase(b, c)
}

// BenchmarkPhaseTableAnisotropic is the cost of building the angular table
// of one Stroh dislocation for one g (done once per render).
func BenchmarkPhaseTableAnisotropic(b *testing.B) {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{Z: 50}, cuMedium(c), true)
	for b.Loop() {
		if d.table(r3.Vec{X: 4.9}) == nil {
			b.Fatal("no table")
		}
	}
}

// demoLikeSum is a sum of the kinds of the demo scene: a dissociated
// dislocation, an inclusion and a perfect dislocation (Stroh, copper).
func demoLikeSum() Sum {
	c := cubicVoigt(cuC11, cuC12, cuC44)
	d, _ := NewDissociated(bFull, bLead, bTrail, lineAt(0.5), r3.Vec{Z: 50}, n111, 3, cuMedium(c), true)
	inc, _ := NewInclusion(r3.Vec{X: 10, Y: 5, Z: 45}, 6, 0.01)
	l, _ := NewDislocation(r3.Vec{X: 0.18, Y: 0.18}, r3.Vec{X: 1, Y: -1, Z: 0.5}, r3.Vec{X: 20, Z: 50}, cuMedium(c), true)
	return Sum{d, inc, l}
}

// BenchmarkPhaseSum is one g·R evaluation of demoLikeSum through the fast
// path, BenchmarkSumDirect the same through R.
func BenchmarkPhaseSum(b *testing.B) { benchPhase(b, demoLikeSum()) }

func BenchmarkSumDirect(b *testing.B) {
	s := demoLikeSum()
	g := r3.Vec{X: 4.9, Y: 0.3}
	p := r3.Vec{X: 3.1, Y: -2.2, Z: 37}
	start := cpuNs()
	for i := 0; b.Loop(); i++ {
		p.Z = 37 + float64(i%100)*0.5
		sinkF = r3.Dot(g, s.R(p))
	}
	reportCPU(b, start)
}
