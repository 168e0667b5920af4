package export

import (
	"context"
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"faultline/internal/pyref"
	"faultline/micrograph"
	"faultline/sim"
)

// The raw images as the Python tools of the trade read them, one Python
// run for all (importing hyperspy takes seconds): tifffile (Debian's
// python3-tifffile) sees the ImageJ calibration, unit nm and resolution
// 1/pixel size, the values as written and the scene in the description;
// mrcfile (python3-mrcfile) validates the MRC files as MRC 2014 and reads
// the voxel size in Å; hyperspy (python3-hyperspy) loads both with their
// axes in nm at the pixel size. This package's micrograph reader reads
// them back too.
func TestRawImagesInOutsideReaders(t *testing.T) {
	pyref.Require(t, "python3-tifffile, python3-mrcfile and python3-hyperspy", "tifffile", "mrcfile", "hyperspy.api")
	// 0.52 nm pixels, 13 × 7, non-square field.
	g := sim.Grid{NX: 13, NY: 7, WidthNm: 13 * 0.52, HeightNm: 7 * 0.52}
	im := &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{make([]float64, 91), make([]float64, 91)}}
	for k := range 91 {
		im.Intensity[0][k] = 0.5 + 0.4*math.Sin(float64(k))
		im.Intensity[1][k] = 1 - im.Intensity[0][k]
	}
	dir := t.TempDir()
	tiffs := [2]string{filepath.Join(dir, FileBFTIFF), filepath.Join(dir, FileDFTIFF)}
	mrcs := [2]string{filepath.Join(dir, "bf.mrc"), filepath.Join(dir, "df.mrc")}
	sceneJSON := []byte("{\n  \"version\": 1,\n  \"note\": \"ξg = 41 nm, Å\"\n}\n")
	if _, err := WriteTIFFs(dir, im, sceneJSON); err != nil {
		t.Fatal(err)
	}
	if err := WriteBeamMRCs(context.Background(), mrcs, im); err != nil {
		t.Fatal(err)
	}
	script := `
import sys, json, io, contextlib
import numpy as np, tifffile, mrcfile
import hyperspy.api as hs
out = {}
for p in sys.argv[1:3]:
    with tifffile.TiffFile(p) as tf:
        page = tf.pages[0]
        ij = tf.imagej_metadata or {}
        xr = page.tags["XResolution"].value
        out[p] = {"values": [float(v) for v in page.asarray().ravel()], "shape": list(page.shape),
                  "unit": ij.get("unit"), "xres": xr[0] / xr[1],
                  "resunit": int(page.tags["ResolutionUnit"].value),
                  "scene": json.loads(ij.get("scene", "null"))}
for p in sys.argv[3:5]:
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        valid = mrcfile.validate(p)
    with mrcfile.open(p) as m:
        out[p] = {"values": [float(v) for v in m.data.ravel()], "shape": list(m.data.shape),
                  "voxel": float(m.voxel_size.x), "valid": bool(valid), "why": buf.getvalue()}
for p in sys.argv[1:5]:
    s = hs.load(p)
    ax = s.axes_manager.signal_axes
    out[p]["hs_scale"] = [float(a.scale) for a in ax]
    out[p]["hs_units"] = [str(a.units) for a in ax]
    out[p]["hs_shape"] = [n for n in s.data.shape if n != 1]
    out[p]["hs_scale"] = out[p]["hs_scale"][-2:]
    out[p]["hs_units"] = out[p]["hs_units"][-2:]
    out[p]["hs_version"] = hs.__version__
print(json.dumps(out))
`
	var got map[string]struct {
		Values  []float64
		Shape   []int
		Unit    *string
		XRes    float64
		ResUnit int
		Scene   map[string]any
		Voxel   float64
		Valid   bool
		Why     string
		HSScale []float64 `json:"hs_scale"`
		HSUnits []string  `json:"hs_units"`
		HSShape []int     `json:"hs_shape"`
		HSVer   string    `json:"hs_version"`
	}
	files := []string{tiffs[0], tiffs[1], mrcs[0], mrcs[1]}
	if err := json.Unmarshal(pyref.Run(t, nil, script, files...), &got); err != nil {
		t.Fatal(err)
	}
	for k, p := range files {
		r := got[p]
		name := filepath.Base(p)
		data := im.Intensity[k%2]
		if len(r.Shape) != 2 || r.Shape[0] != 7 || r.Shape[1] != 13 {
			t.Errorf("%s: shape %v, want [7 13]", name, r.Shape)
			continue
		}
		for i, v := range data {
			if r.Values[i] != float64(float32(v)) {
				t.Errorf("%s: value %d = %v, want float32(%v)", name, i, r.Values[i], v)
				break
			}
		}
		if k < 2 {
			// tifffile: ImageJ unit nm, XResolution in pixels per nm, stored as
			// a rational with nine significant digits.
			if r.Unit == nil || *r.Unit != "nm" || math.Abs(r.XRes-1/0.52) > 1e-8 || r.ResUnit != 1 {
				t.Errorf("%s: tifffile unit %v, XResolution %v per unit %d; want nm, %v, 1 (none)", name, r.Unit, r.XRes, r.ResUnit, 1/0.52)
			}
			if r.Scene["note"] != "ξg = 41 nm, Å" {
				t.Errorf("%s: scene in the description %v", name, r.Scene)
			}
		} else {
			// mrcfile: voxel size in Å, float32 of 5.2 (CELLA / MX).
			if !r.Valid || math.Abs(r.Voxel-5.2) > 1e-5 {
				t.Errorf("%s: mrcfile valid %v (%s), voxel %v Å, want 5.2", name, r.Valid, r.Why, r.Voxel)
			}
		}
		// hyperspy: both axes in nm at 0.52 nm per pixel (float32 in MRC).
		if len(r.HSScale) != 2 || len(r.HSShape) != 2 || r.HSShape[0] != 7 || r.HSShape[1] != 13 {
			t.Errorf("%s: hyperspy axes %v shape %v", name, r.HSScale, r.HSShape)
			continue
		}
		want := 0.52
		if k >= 2 && strings.HasPrefix(r.HSVer, "1.") {
			// hyperspy 1.x's MRC reader (io_plugins/mrc.py: "The scale is
			// in Amstrongs, we convert it to nm") multiplies the voxel size
			// in Å by 10 where it means to divide: it shows 52 "nm" for
			// the file's 5.2 Å, which mrcfile reads above.
			want = 52
		}
		for a := range 2 {
			if r.HSUnits[a] != "nm" || math.Abs(r.HSScale[a]-want) > 1e-6*want {
				t.Errorf("%s: hyperspy %s axis %d: %v %s, want %v nm", name, r.HSVer, a, r.HSScale[a], r.HSUnits[a], want)
			}
		}
		// And this project's reader.
		m, err := micrograph.Read(p)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if math.Abs(m.NmPerPx-0.52) > 1e-6 || m.Width != 13 || m.Height != 7 {
			t.Errorf("%s: read %d × %d at %g nm/px", name, m.Width, m.Height, m.NmPerPx)
		}
	}
}
