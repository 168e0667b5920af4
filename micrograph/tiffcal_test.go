package micrograph

import (
	"encoding/json"
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// TIFFs calibrated the way image tools write them, written by tifffile
// (Debian's python3-tifffile): ImageJ-style (unit in the description,
// XResolution in pixels per unit) in nm, µm and Å, 32-bit float and 16-bit,
// and plain resolution tags in pixels per centimetre. Each reads with its
// pixel size in nm; a unit that is not a length is an error naming it.
func TestTIFFCalibrationFromTifffile(t *testing.T) {
	pyref.Require(t, "python3-tifffile", "tifffile", "numpy")
	dir := t.TempDir()
	script := `
import sys, json, numpy as np, tifffile
d = sys.argv[1]
f = (np.arange(20).reshape(4, 5) / 3).astype(np.float32)
u = (np.arange(20).reshape(4, 5) * 3000).astype(np.uint16)
# ImageJ: resolution in pixels per unit.
tifffile.imwrite(d + "/ij_nm.tif", f, imagej=True, resolution=(1 / 0.52, 1 / 0.52), metadata={"unit": "nm"})
tifffile.imwrite(d + "/ij_um.tif", u, imagej=True, resolution=(1 / 0.00052, 1 / 0.00052), metadata={"unit": "\\u00B5m"})  # escaped as ImageJ writes it
tifffile.imwrite(d + "/ij_micron.tif", f, imagej=True, resolution=(1 / 0.00052, 1 / 0.00052), metadata={"unit": "micron"})
tifffile.imwrite(d + "/ij_A.tif", f, imagej=True, resolution=(1 / 5.2, 1 / 5.2), metadata={"unit": "\\u00C5"})
tifffile.imwrite(d + "/ij_bad.tif", f, imagej=True, resolution=(10, 10), metadata={"unit": "1/nm"})
# Plain TIFF: pixels per centimetre, 0.5 nm = 5e-8 cm (2e7 per cm, a
# whole number: tifffile's rationals of large values keep fewer digits).
tifffile.imwrite(d + "/cm.tif", f, resolution=(2e7, 2e7), resolutionunit="CENTIMETER")
print(json.dumps({"f": [float(x) for x in f.ravel()], "u": [float(x) for x in u.ravel()]}))
`
	var vals struct{ F, U []float64 }
	if err := json.Unmarshal(pyref.Run(t, nil, script, dir), &vals); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		file string
		nm   float64
		want []float64
	}{
		{"ij_nm.tif", 0.52, vals.F}, {"ij_um.tif", 0.52, nil}, {"ij_micron.tif", 0.52, vals.F}, {"ij_A.tif", 0.52, vals.F}, {"cm.tif", 0.5, vals.F},
	} {
		m, err := Read(filepath.Join(dir, c.file))
		if err != nil {
			t.Errorf("%s: %v", c.file, err)
			continue
		}
		// The resolution is a RATIONAL of two 32-bit integers: tifffile
		// keeps about 7 significant digits.
		if math.Abs(m.NmPerPx-c.nm) > 1e-6 {
			t.Errorf("%s: %g nm/px (from %s), want %g", c.file, m.NmPerPx, m.PixelSizeFrom, c.nm)
		}
		if m.Width != 5 || m.Height != 4 {
			t.Errorf("%s: %d × %d, want 5 × 4", c.file, m.Width, m.Height)
		}
		for k, w := range c.want {
			if float64(m.Pix[k]) != w {
				t.Errorf("%s: value %d = %v, want %v", c.file, k, m.Pix[k], w)
				break
			}
		}
	}
	_, err := Read(filepath.Join(dir, "ij_bad.tif"))
	if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), `unit "1/nm"`) {
		t.Errorf("unit 1/nm: %v, want an error naming the unit", err)
	}
}
