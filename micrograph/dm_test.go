package micrograph

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// dmCases are the test images: every numeric data type DM images take,
// RGB, and each unit of length.
func dmCases() []dmImageSpec {
	var cs []dmImageSpec
	for _, t := range []struct {
		dt   int
		elem uint64
	}{{9, dmInt8}, {6, dmUint8}, {1, dmInt16}, {10, dmUint16}, {7, dmInt32}, {11, dmUint32}, {2, dmFloat32}, {12, dmFloat64}, {14, dmUint8}, {23, dmUint32}} {
		cs = append(cs, dmImageSpec{dataType: t.dt, elem: t.elem, nx: 7, ny: 5, scale: 0.52, unit: "nm", origin: 3})
	}
	cs = append(cs,
		dmImageSpec{dataType: 2, elem: dmFloat32, nx: 6, ny: 4, scale: 0.00052, unit: "µm", origin: -2},
		dmImageSpec{dataType: 2, elem: dmFloat32, nx: 6, ny: 4, scale: 5.2, unit: "Å"},
		dmImageSpec{dataType: 10, elem: dmUint16, nx: 4, ny: 6, scale: 1, unit: ""},
	)
	return cs
}

// nmPerUnitTest is the test's own table of the units used (ISO 80000-3:
// 1 Å = 0.1 nm, 1 µm = 1000 nm).
var nmPerUnitTest = map[string]float64{"nm": 1, "µm": 1000, "Å": 0.1, "": 0}

// The test writer's DM3 and DM4 files are read by hyperspy (Debian's
// python3-hyperspy, which reads both formats) with the pixels and the
// scale they were written with: so they are valid files. Then this
// package reads them to the same pixels and the scale in nm.
func TestDMAgainstHyperSpy(t *testing.T) {
	pyref.Require(t, "python3-hyperspy", "hyperspy.api")
	dir := t.TempDir()
	type file struct {
		path string
		spec dmImageSpec
		v4   bool
	}
	var files []file
	for _, v4 := range []bool{false, true} {
		for k, c := range dmCases() {
			ext := "dm3"
			if v4 {
				ext = "dm4"
			}
			p := filepath.Join(dir, fmt.Sprintf("case%02d_type%d.%s", k, c.dataType, ext))
			if err := os.WriteFile(p, dmTestFile(v4, c), 0o644); err != nil {
				t.Fatal(err)
			}
			files = append(files, file{p, c, v4})
		}
	}
	// One Python run for every file: importing hyperspy takes seconds.
	script := `
import sys, json, numpy as np
import hyperspy.api as hs
out = []
for p in sys.argv[1:]:
    s = hs.load(p)
    if isinstance(s, list):
        out.append({"error": "%d signals" % len(s)}); continue
    d = s.data
    if d.dtype.names:
        vals = [[int(v["R"]), int(v["G"]), int(v["B"])] for v in d.ravel()]
    else:
        vals = [float(v) for v in d.ravel()]
    ax = s.axes_manager.signal_axes
    md = s.metadata
    out.append({"shape": list(d.shape), "dtype": str(d.dtype), "values": vals,
                "scale": [float(a.scale) for a in ax], "units": [str(a.units) for a in ax],
                "offset": [float(a.offset) for a in ax],
                "kv": float(md.get_item("Acquisition_instrument.TEM.beam_energy", 0))})
print(json.dumps(out))
`
	args := make([]string, len(files))
	for k, f := range files {
		args[k] = f.path
	}
	var got []struct {
		Error  string
		Shape  []int
		Dtype  string
		Values []json.RawMessage
		Scale  []float64
		Units  []string
		Offset []float64
		KV     float64
	}
	if err := json.Unmarshal(pyref.Run(t, nil, script, args...), &got); err != nil {
		t.Fatal(err)
	}
	for k, f := range files {
		name := filepath.Base(f.path)
		h, c := got[k], f.spec
		n := c.nx * c.ny
		want := func(i int) float64 {
			if c.dataType == 23 {
				p := dmTestRGB(i)
				return 0.299*float64(p[2]) + 0.587*float64(p[1]) + 0.114*float64(p[0])
			}
			return dmTestValue(c.dataType, i)
		}
		// hyperspy: the file is valid.
		if h.Error != "" || len(h.Shape) != 2 || h.Shape[0] != c.ny || h.Shape[1] != c.nx || len(h.Values) != n {
			t.Errorf("%s: hyperspy read %s shape %v (%d values), want %d × %d", name, h.Error, h.Shape, len(h.Values), c.ny, c.nx)
			continue
		}
		for i := range n {
			if c.dataType == 23 {
				var rgb [3]float64
				json.Unmarshal(h.Values[i], &rgb)
				p := dmTestRGB(i)
				if rgb != [3]float64{float64(p[2]), float64(p[1]), float64(p[0])} {
					t.Errorf("%s: hyperspy pixel %d = %v, written (R, G, B) %v", name, i, rgb, [3]byte{p[2], p[1], p[0]})
					break
				}
				continue
			}
			var v float64
			json.Unmarshal(h.Values[i], &v)
			if v != dmTestValue(c.dataType, i) {
				t.Errorf("%s: hyperspy pixel %d = %v, written %v", name, i, v, dmTestValue(c.dataType, i))
				break
			}
		}
		if c.unit != "" {
			for a := range 2 {
				// The scale is stored as float32.
				if math.Abs(h.Scale[a]-c.scale) > 1e-7*c.scale || h.Units[a] != c.unit {
					t.Errorf("%s: hyperspy axis %d: %g %s, written %g %s", name, a, h.Scale[a], h.Units[a], c.scale, c.unit)
				}
			}
			if math.Abs(h.Offset[0]+c.origin*c.scale) > 1e-6*c.scale {
				t.Errorf("%s: hyperspy offset %g, want −origin·scale = %g", name, h.Offset[0], -c.origin*c.scale)
			}
		}
		if h.KV != 200 {
			t.Errorf("%s: hyperspy beam energy %g kV, written 200 kV", name, h.KV)
		}

		// This package.
		m, err := Read(f.path)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if m.Width != c.nx || m.Height != c.ny || len(m.Pix) != n {
			t.Errorf("%s: read %d × %d, want %d × %d (the larger image, not the thumbnail)", name, m.Width, m.Height, c.nx, c.ny)
			continue
		}
		for i := range n {
			w := want(i)
			// float32 holds 24 bits: exact for the 8- and 16-bit types,
			// rounded to 2^-24 relative for the others.
			if math.Abs(float64(m.Pix[i])-w) > math.Abs(w)*6e-8 {
				t.Errorf("%s: pixel %d = %v, want %v", name, i, m.Pix[i], w)
				break
			}
		}
		wantNm := c.scale * nmPerUnitTest[c.unit]
		if math.Abs(m.NmPerPx-wantNm) > 1e-6*wantNm || (wantNm == 0) != (m.NmPerPx == 0) {
			t.Errorf("%s: %g nm/px, want %g", name, m.NmPerPx, wantNm)
		}
		if c.unit != "" && math.Abs(m.Meta.OriginNm[0]+c.origin*wantNm) > 1e-6*wantNm {
			t.Errorf("%s: origin %v nm, want %g", name, m.Meta.OriginNm, -c.origin*wantNm)
		}
		wantFormat := map[bool]string{false: "dm3", true: "dm4"}[f.v4]
		if m.Format != wantFormat || m.Meta.VoltageKV != 200 || m.Meta.Magnification != 50000 || m.Meta.CameraLengthMm != 80 || m.Meta.Date != "2/3/2025 10:11:12 AM" {
			t.Errorf("%s: format %s, metadata %+v", name, m.Format, m.Meta)
		}
		if c.dataType == 23 && len(m.Notices) == 0 {
			t.Errorf("%s: RGB converted without a notice", name)
		}
	}
}

// Bad DM files: one line each, saying what is wrong.
func TestDMBadFiles(t *testing.T) {
	good := dmTestFile(false, dmImageSpec{dataType: 2, elem: dmFloat32, nx: 7, ny: 5, scale: 1, unit: "nm"})
	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"truncated DM3", good[:len(good)/2], "truncated"},
		{"truncated DM4", dmTestFile(true, dmImageSpec{dataType: 2, elem: dmFloat32, nx: 7, ny: 5})[:300], "truncated"},
		{"no 2-D image", encodeDM(false, []dmNode{dmGroupOf("ImageList", dmGroupOf("", dmGroupOf("ImageData",
			dmArrayNode("Data", dmFloat32, 3, make([]byte, 12)),
			dmNum("DataType", dmInt32, 2),
			dmGroupOf("Dimensions", dmNum("", dmUint32, 3)))))}), "no 2-D image in the file (it holds 1-D (3))"},
		{"no image list", encodeDM(true, []dmNode{dmNum("x", dmInt32, 1)}), "holds no image"},
		{"reciprocal unit", dmTestFile(false, dmImageSpec{dataType: 2, elem: dmFloat32, nx: 7, ny: 5, scale: 0.1, unit: "1/nm"}), `unit "1/nm" is not a length`},
		{"complex", dmTestFile(false, dmImageSpec{dataType: 3, elem: dmFloat32, nx: 7, ny: 5}), "complex image data"},
		{"claims 1e9 × 1e9", encodeDM(false, []dmNode{dmGroupOf("ImageList", dmGroupOf("", dmGroupOf("ImageData",
			dmArrayNode("Data", dmFloat32, 3, make([]byte, 12)),
			dmNum("DataType", dmInt32, 2),
			dmGroupOf("Dimensions", dmNum("", dmUint32, 1e9), dmNum("", dmUint32, 1e9)))))}), "over the limit of 16384"},
	}
	for _, c := range cases {
		_, err := DecodeBytes(c.data, Options{})
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want one line with %q", c.name, err, c.want)
		}
	}
}
