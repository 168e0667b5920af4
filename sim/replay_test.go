package sim

import (
	"context"
	"errors"
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
