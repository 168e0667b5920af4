package sim

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestRenderIsDeterministicAcrossWorkers(t *testing.T) {
	p := benchProblem(24)
	a, err := Render(context.Background(), p, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Render(context.Background(), p, Options{Workers: 5})
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.Intensity {
		for n := range a.Intensity[k] {
			if math.Float64bits(a.Intensity[k][n]) != math.Float64bits(b.Intensity[k][n]) {
				t.Fatalf("beam %d pixel %d differs: %v vs %v", a.Beams[k], n, a.Intensity[k][n], b.Intensity[k][n])
			}
		}
	}
}

func TestRenderCancelAndProgress(t *testing.T) {
	p := benchProblem(64)
	ctx, cancel := context.WithCancel(context.Background())
	var calls []int
	_, err := Render(ctx, p, Options{Workers: 2, Progress: func(done, total int) {
		calls = append(calls, done)
		if total != 64 {
			t.Errorf("total %d, want 64", total)
		}
		if done == 3 {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v, want context.Canceled", err)
	}
	if len(calls) >= 64 {
		t.Errorf("render went on after cancel: %d rows reported", len(calls))
	}
	for i, d := range calls {
		if d != i+1 {
			t.Fatalf("progress calls %v not increasing by one", calls)
		}
	}
}

func TestPixelCentres(t *testing.T) {
	g := Grid{NX: 4, NY: 2, WidthNm: 8, HeightNm: 10}
	// x = (i + 0.5 − nx/2)·Δx, y = (j + 0.5 − ny/2)·Δy (the image frame of
	// the scene file).
	if g.X(0) != -3 || g.X(3) != 3 || g.Y(0) != -2.5 || g.Y(1) != 2.5 {
		t.Errorf("centres %v %v %v %v", g.X(0), g.X(3), g.Y(0), g.Y(1))
	}
}

func TestValidateRejects(t *testing.T) {
	good := *benchProblem(8)
	for name, mod := range map[string]func(p *Problem){
		"thickness": func(p *Problem) { p.ThicknessNm = 0 },
		"pixels":    func(p *Problem) { p.Grid.NX = 0 },
		"too many":  func(p *Problem) { p.Grid.NX, p.Grid.NY = 5000, 5000 },
		"xi":        func(p *Problem) { p.Model = TwoBeam{XiGNm: -1} },
		"normal":    func(p *Problem) { p.Normal.X, p.Normal.Z = 1, -1 },
		"no model":  func(p *Problem) { p.Model = nil },
	} {
		p := good
		mod(&p)
		if err := p.Validate(); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

type nanField struct{}

func (nanField) R(p r3.Vec) r3.Vec {
	if p.X > 0 && p.Y > 0 {
		return r3.Vec{X: math.NaN()}
	}
	return r3.Vec{}
}

func TestNonFiniteFieldIsAnError(t *testing.T) {
	p := benchProblem(8)
	p.Field = nanField{}
	_, err := Render(context.Background(), p, Options{})
	if !errors.Is(err, ErrNonFinite) || !strings.Contains(err.Error(), "column (") {
		t.Fatalf("err = %v", err)
	}
}
