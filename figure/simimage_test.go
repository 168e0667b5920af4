package figure

import (
	"math"
	"strings"
	"testing"

	"faultline/sim"
)

func TestBeamGray(t *testing.T) {
	im := &sim.Image{
		Grid:      sim.Grid{NX: 3, NY: 2, WidthNm: 30, HeightNm: 20},
		Beams:     []int{0, 1},
		Intensity: [][]float64{{1, 0.8, 0.6, 0.4, 0.2, 0}, {0, 0.2, 0.4, 0.6, 0.8, 1}},
	}
	bf, err := BeamGray(im, 0, Mapping{})
	if err != nil {
		t.Fatal(err)
	}
	df, err := BeamGray(im, 1, Mapping{})
	if err != nil {
		t.Fatal(err)
	}
	// grey = floor(255·I + 0.5): 0.8 -> 204, 0.2 -> 51.
	if bf.GrayAt(1, 0).Y != 204 || df.GrayAt(1, 0).Y != 51 || bf.GrayAt(2, 1).Y != 0 || df.GrayAt(2, 1).Y != 255 {
		t.Errorf("bf %v df %v", bf.Pix, df.Pix)
	}
	if _, err := BeamGray(im, 2, Mapping{}); err == nil || !strings.Contains(err.Error(), "beam 2") {
		t.Errorf("missing beam: %v", err)
	}
	if _, err := BeamGray(im, 0, Mapping{Mode: "x"}); err == nil || !strings.Contains(err.Error(), "Mapping.Mode") {
		t.Errorf("bad mapping: %v", err)
	}
	short := *im
	short.Intensity = [][]float64{{1, 2}, {3}}
	if _, err := BeamGray(&short, 0, Mapping{}); err == nil {
		t.Error("short plane: no error")
	}
	if _, err := BeamGray(nil, 0, Mapping{}); err == nil {
		t.Error("nil image: no error")
	}
}

func TestPixelSizeNm(t *testing.T) {
	p, err := PixelSizeNm(sim.Grid{NX: 256, NY: 128, WidthNm: 200, HeightNm: 100})
	if err != nil || math.Abs(p-200.0/256) > 1e-15 {
		t.Errorf("got %v, %v; want 0.78125 nm", p, err)
	}
	for _, g := range []sim.Grid{
		{NX: 256, NY: 256, WidthNm: 200, HeightNm: 100}, // 0.78 × 0.39 nm pixels
		{NX: 0, NY: 256, WidthNm: 200, HeightNm: 100},
		{NX: 10, NY: 10, WidthNm: -1, HeightNm: -1},
	} {
		if _, err := PixelSizeNm(g); err == nil {
			t.Errorf("%+v: no error", g)
		}
	}
}
