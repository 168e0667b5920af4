package sim

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func replayProblem() *Problem {
	f := sum{
		newLineField(r3.Vec{Z: 50}, r3.Vec{X: 0.3, Y: 1, Z: 0.6}, 0.2, 0.15),
		stepFault{at: r3.Vec{X: 10, Z: 40}, n: r3.Vec{X: 0.5, Z: 1}, shift: r3.Vec{X: 1.0 / 3 / 4.9}},
	}
	return &Problem{Model: TwoBeam{SPerNm: 0.005, XiGNm: 42, XiGAbsNm: 420, Xi0AbsNm: 420},
		GPerNm: 4.9, Field: f, ThicknessNm: 100, Grid: Grid{NX: 24, NY: 20, WidthNm: 120, HeightNm: 100}}
}

// Replays are the same to the bit for any number of workers, like renders.
func TestReplayReproducible(t *testing.T) {
	p := replayProblem()
	ctx := context.Background()
	_, s, err := Record(ctx, p, RecordOptions{MaxThicknessNm: 150})
	if err != nil || s == nil {
		t.Fatalf("record: %v, samples %v", err, s)
	}
	m := TwoBeam{SPerNm: 0.002, XiGNm: 42, XiGAbsNm: 420, Xi0AbsNm: 420}
	a, _, err := s.Replay(ctx, m, 130, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, _, err := s.Replay(ctx, m, 130, Options{Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.Intensity {
		for n := range a.Intensity[k] {
			if a.Intensity[k][n] != b.Intensity[k][n] {
				t.Fatalf("beam %d pixel %d: %v with one worker, %v with three", k, n, a.Intensity[k][n], b.Intensity[k][n])
			}
		}
	}
	if _, _, err := s.Replay(ctx, m, 151, Options{}); !errors.Is(err, ErrReplayRange) {
		t.Errorf("thickness beyond the record: %v, want ErrReplayRange", err)
	}
}

// Above the memory cap Record falls back to a plain render: the image,
// no samples.
func TestRecordCap(t *testing.T) {
	p := replayProblem()
	im, s, err := Record(context.Background(), p, RecordOptions{MaxBytes: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if s != nil {
		t.Errorf("samples of %d bytes kept over a cap of 1000", s.Bytes())
	}
	want, err := Render(context.Background(), p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for k := range im.Intensity {
		for n := range im.Intensity[k] {
			if im.Intensity[k][n] != want.Intensity[k][n] {
				t.Fatalf("fallback image differs from a render at beam %d pixel %d", k, n)
			}
		}
	}
}

// partSlab is exact for a g·R that is a cubic in depth: the part of the
// slab has the rise and the departures at its own Gauss nodes that the
// cubic gives directly.
func TestPartSlabExactForCubic(t *testing.T) {
	gam := func(z float64) float64 { return 0.3 + 0.02*z - 4e-4*z*z + 7e-6*z*z*z }
	samples := func(z0, h float64) (rise, d1, d2 float64) {
		rise = gam(z0+h) - gam(z0)
		d1 = gam(z0+gaussNodes[0]*h) - gam(z0) - gaussNodes[0]*rise
		d2 = gam(z0+gaussNodes[1]*h) - gam(z0) - gaussNodes[1]*rise
		return
	}
	const z0, h = 3.0, 12.0
	rise, d1, d2 := samples(z0, h)
	for _, f := range []float64{0.05, 0.3, 0.5, 0.77, 1} {
		ph, pr, e1, e2 := partSlab(h, rise, d1, d2, f)
		wr, w1, w2 := samples(z0, f*h)
		if math.Abs(ph-f*h) > 1e-12 || math.Abs(pr-wr) > 1e-13 || math.Abs(e1-w1) > 1e-13 || math.Abs(e2-w2) > 1e-13 {
			t.Errorf("f = %g: part (%g, %g, %g, %g), direct (%g, %g, %g, %g)", f, ph, pr, e1, e2, f*h, wr, w1, w2)
		}
	}
}

// beatWithin: a two-beam model between the recorded s with the same ξ_g
// needs no re-check; one outside them, with a shorter ξ_g or of another
// type does. A systematic row needs none after systematic rows (their
// slabs passed the Bloch-wave step's indicator, which no model constant
// enters), and one after anything else.
func TestBeatWithin(t *testing.T) {
	rec := []Model{TwoBeam{SPerNm: 0.004, XiGNm: 40}, TwoBeam{SPerNm: -0.006, XiGNm: 40}, TwoBeam{SPerNm: 0.014, XiGNm: 40}}
	for _, c := range []struct {
		m    Model
		want bool
	}{
		{TwoBeam{SPerNm: 0.004, XiGNm: 40}, true},
		{TwoBeam{SPerNm: 0.013, XiGNm: 40, XiGAbsNm: 300}, true},
		{TwoBeam{SPerNm: 0.0, XiGNm: 45}, true},
		{TwoBeam{SPerNm: 0.015, XiGNm: 40}, false},
		{TwoBeam{SPerNm: 0.004, XiGNm: 39}, false},
		{Kinematical{SPerNm: 0.004, XiGNm: 40}, false},
		{testRow(3, 0.01, 0.1), false},
	} {
		if got := beatWithin(c.m, rec); got != c.want {
			t.Errorf("%+v: beatWithin %v, want %v", c.m, got, c.want)
		}
		// Where beatWithin holds, the beat is nowhere above the recorded
		// ones'.
		if beatWithin(c.m, rec) {
			st := c.m.NewStepper()
			for slope := -0.05; slope <= 0.05; slope += 0.001 {
				top := 0.0
				for _, r := range rec {
					top = math.Max(top, r.NewStepper().Beat(slope))
				}
				if b := st.Beat(slope); b > top*(1+1e-15) {
					t.Errorf("%+v: beat %g at slope %g above the recorded %g", c.m, b, slope, top)
				}
			}
		}
	}
}

func TestBeatWithinRows(t *testing.T) {
	c := testLambdaNm * testGPerNm * testGPerNm / 2
	rows := []Model{testRow(3, 0, 0.1), testRow(3, 2*c, 0.1)}
	for _, tc := range []struct {
		m    Model
		rec  []Model
		want bool
	}{
		{testRow(3, 0.3, 0.05), rows, true},
		{testRow(7, -0.1, 0.1), rows, true},
		{testRow(3, 0, 0.1), append([]Model{TwoBeam{SPerNm: 0, XiGNm: 40}}, rows...), false},
		{TwoBeam{SPerNm: 0, XiGNm: 40}, rows, false},
		{testRow(3, 0, 0.1), nil, false},
	} {
		if got := beatWithin(tc.m, tc.rec); got != tc.want {
			t.Errorf("%s after %d models: beatWithin %v, want %v", tc.m.Name(), len(tc.rec), got, tc.want)
		}
	}
}
