package figure

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// The expected grey levels below follow from the linear map of the package
// doc, grey = floor(255·clamp(q, 0, 1) + 0.5), worked by hand.
func TestGrayTable(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name string
		m    Mapping
		in   []float64
		want []uint8
	}{
		{"zero value is fixed 0..1", Mapping{},
			[]float64{0, 0.25, 0.5, 1, -0.1, 1.5}, []uint8{0, 64, 128, 255, 0, 255}},
		// 0.25·255 = 63.75 -> 64; 0.5·255 = 127.5 -> 128 (half rounds up).
		{"fixed Max 0.5", Mapping{Mode: "fixed", Max: 0.5},
			[]float64{0, 0.1, 0.25, 0.5, 0.7}, []uint8{0, 51, 128, 255, 255}},
		{"fixed inverted", Mapping{Mode: "fixed", Invert: true},
			[]float64{0, 0.2, 1}, []uint8{255, 204, 0}},
		// min 0.2, max 0.6: q = (v − 0.2)/0.4.
		{"auto min..max", Mapping{Mode: "auto"},
			[]float64{0.2, 0.3, 0.4, 0.6}, []uint8{0, 64, 128, 255}},
		{"auto inverted", Mapping{Mode: "auto", Invert: true},
			[]float64{0.2, 0.3, 0.4, 0.6}, []uint8{255, 191, 127, 0}},
		// No contrast: drawn flat at the fixed grey of the middle value,
		// 0.7·255 = 178.5 -> 179, 0.3·255 = 76.5 -> 77.
		{"auto constant image is flat", Mapping{Mode: "auto"},
			[]float64{0.7, 0.7, 0.7}, []uint8{179, 179, 179}},
		{"auto constant, clipped", Mapping{Mode: "auto", ClipPercent: 5},
			[]float64{0.3, 0.3}, []uint8{77, 77}},
		// Rounding noise far below ContrastFloor is not stretched.
		{"auto rounding noise is flat", Mapping{Mode: "auto"},
			[]float64{0.7, 0.7 + 2e-16, 0.7 - 1e-16}, []uint8{179, 179, 179}},
		{"auto flat inverted", Mapping{Mode: "auto", Invert: true},
			[]float64{0.3, 0.3 + 1e-12}, []uint8{178, 178}},
		// A weak but real contrast of 0.01 (ten times the floor) is
		// stretched: q = (v − 0.5)/0.01.
		{"auto weak contrast stretched", Mapping{Mode: "auto"},
			[]float64{0.5, 0.5025, 0.505, 0.51}, []uint8{0, 64, 128, 255}},
		// A clipped range below the floor is widened to 1e-3 about its
		// middle: 11 values, ten at 0.5 + k·1e-5 and one at 0.6; the 10th
		// and 90th percentiles are 0.50001 and 0.50009, middle 0.50005,
		// range 0.49955..0.50055: q(0.5) = 0.45, q(0.6) = 1.
		{"auto clipped range widened to the floor", Mapping{Mode: "auto", ClipPercent: 10},
			[]float64{0.5, 0.50001, 0.50002, 0.50003, 0.50004, 0.50005, 0.50006, 0.50007, 0.50008, 0.50009, 0.6},
			[]uint8{115, 117, 120, 122, 125, 128, 130, 133, 135, 138, 255}},
		{"non-finite values", Mapping{Mode: "auto"},
			[]float64{math.NaN(), 0, 1, inf, -inf}, []uint8{0, 0, 255, 255, 0}},
		{"all NaN", Mapping{Mode: "auto"},
			[]float64{math.NaN(), math.NaN()}, []uint8{0, 0}},
		// 11 values 0..10: the 10th percentile is at rank 1.0 -> 1, the
		// 90th at rank 9 -> 9; q = (v − 1)/8.
		{"auto clipped 10 %", Mapping{Mode: "auto", ClipPercent: 10},
			[]float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, []uint8{0, 0, 32, 64, 96, 128, 159, 191, 223, 255, 255}},
	}
	for _, c := range cases {
		img := Gray(c.in, len(c.in), 1, c.m)
		got := img.Pix[:len(c.in)]
		if fmt.Sprint(got) != fmt.Sprint(c.want) {
			t.Errorf("%s: got %v, want %v", c.name, got, c.want)
		}
	}
}

func TestGrayRowLayout(t *testing.T) {
	// data[j*nx+i] is pixel (i, j): a 3×2 image with distinct values.
	data := []float64{0, 0.2, 0.4, 0.6, 0.8, 1}
	img := Gray(data, 3, 2, Mapping{})
	for j := range 2 {
		for i := range 3 {
			want := uint8(math.Floor(255*data[j*3+i] + 0.5))
			if got := img.GrayAt(i, j).Y; got != want {
				t.Errorf("pixel (%d, %d) = %d, want %d", i, j, got, want)
			}
		}
	}
}

func TestMappingValidate(t *testing.T) {
	cases := []struct {
		m     Mapping
		field string // "" if valid
	}{
		{Mapping{}, ""},
		{Mapping{Mode: "fixed", Max: 2}, ""},
		{Mapping{Mode: "auto", ClipPercent: 1}, ""},
		{Mapping{Mode: "auto", Max: -1}, ""}, // Max unused in auto mode
		{Mapping{Mode: "log"}, "Mapping.Mode"},
		{Mapping{Mode: "Fixed"}, "Mapping.Mode"},
		{Mapping{Max: -1}, "Mapping.Max"},
		{Mapping{Max: math.NaN()}, "Mapping.Max"},
		{Mapping{Max: math.Inf(1)}, "Mapping.Max"},
		{Mapping{Mode: "auto", ClipPercent: 50}, "Mapping.ClipPercent"},
		{Mapping{Mode: "auto", ClipPercent: -1}, "Mapping.ClipPercent"},
		{Mapping{Mode: "auto", ClipPercent: math.NaN()}, "Mapping.ClipPercent"},
	}
	for _, c := range cases {
		err := c.m.Validate()
		switch {
		case c.field == "" && err != nil:
			t.Errorf("%+v: unexpected error %v", c.m, err)
		case c.field != "" && (err == nil || !strings.Contains(err.Error(), c.field)):
			t.Errorf("%+v: error %v, want one naming %s", c.m, err, c.field)
		}
	}
}

func TestGrayPanicsOnProgrammerError(t *testing.T) {
	for name, f := range map[string]func(){
		"short data":      func() { Gray(make([]float64, 5), 3, 2, Mapping{}) },
		"zero width":      func() { Gray(nil, 0, 2, Mapping{}) },
		"invalid mapping": func() { Gray(make([]float64, 6), 3, 2, Mapping{Mode: "nope"}) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

// TestAutoRangeAgainstNumpy checks the clipped range against numpy.percentile
// (default "linear" method) from Debian's python3-numpy, to 1e-12 relative
// (both compute the same interpolation in float64).
func TestAutoRangeAgainstNumpy(t *testing.T) {
	pyref.Require(t, "python3-pil and python3-numpy", "numpy")
	data := make([]float64, 997)
	for k := range data {
		// A deterministic, irregular sample with a few outliers.
		data[k] = math.Sin(float64(k)*0.731) + 0.01*float64(k%17)
		if k%101 == 0 {
			data[k] += 40
		}
	}
	js, _ := json.Marshal(data)
	for _, p := range []float64{0, 0.5, 1, 2.5, 10, 49} {
		lo, hi := Mapping{Mode: "auto", ClipPercent: p}.Range(data)
		out := pyref.Run(t, nil, "import sys, json, numpy; d = numpy.array(json.loads(sys.argv[1])); p = float(sys.argv[2]); print(json.dumps([numpy.percentile(d, p), numpy.percentile(d, 100 - p)]))",
			string(js), fmt.Sprint(p))
		var ref [2]float64
		if err := json.Unmarshal(out, &ref); err != nil {
			t.Fatal(err)
		}
		for k, v := range []float64{lo, hi} {
			if math.Abs(v-ref[k]) > 1e-12*math.Max(1, math.Abs(ref[k])) {
				t.Errorf("p = %v: bound %d = %.17g, numpy %.17g", p, k, v, ref[k])
			}
		}
	}
}
