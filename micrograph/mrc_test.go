package micrograph

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

// MRC files of every mode this package reads, written by mrcfile
// (Debian's python3-mrcfile, the CCP-EM reference library for MRC 2014)
// with a voxel size, read with the right values and scale; a stack gives
// the image #N picks.
func TestMRCFromMrcfile(t *testing.T) {
	pyref.Require(t, "python3-mrcfile", "mrcfile", "numpy")
	dir := t.TempDir()
	script := `
import sys, json, numpy as np, mrcfile
d = sys.argv[1]
out = {}
vals = (np.arange(35).reshape(5, 7) * 37 % 101 - 50).astype(np.float64)
for mode, dt in [(0, np.int8), (1, np.int16), (2, np.float32), (6, np.uint16), (12, np.float16)]:
    v = vals.copy()
    if mode == 6: v = v + 60
    if mode == 1: v = v * 300
    if mode == 2: v = v / 7
    if mode == 12: v = v / 8
    a = v.astype(dt)
    p = "%s/mode%d.mrc" % (d, mode)
    with mrcfile.new(p, overwrite=True) as m:
        m.set_data(a)
        m.voxel_size = 5.2  # Angstrom
    with mrcfile.open(p) as m:
        assert m.header.mode == mode, (m.header.mode, mode)
    out[str(mode)] = [float(x) for x in a.ravel()]
stack = (np.arange(3 * 4 * 6).reshape(3, 4, 6)).astype(np.float32)
with mrcfile.new(d + "/stack.mrc", overwrite=True) as m:
    m.set_data(stack)
    m.set_image_stack()
    m.voxel_size = (12.5, 12.5, 1)
out["stack"] = [float(x) for x in stack[2].ravel()]
print(json.dumps(out))
`
	var want map[string][]float64
	if err := json.Unmarshal(pyref.Run(t, nil, script, dir), &want); err != nil {
		t.Fatal(err)
	}
	for _, mode := range []string{"0", "1", "2", "6", "12"} {
		m, err := Read(filepath.Join(dir, "mode"+mode+".mrc"))
		if err != nil {
			t.Errorf("mode %s: %v", mode, err)
			continue
		}
		if m.Width != 7 || m.Height != 5 || m.Format != "mrc" {
			t.Errorf("mode %s: %d × %d %s, want 7 × 5 mrc", mode, m.Width, m.Height, m.Format)
		}
		// 5.2 Å written by mrcfile as float32 CELLA = 7·5.2.
		if math.Abs(m.NmPerPx-0.52) > 1e-7 {
			t.Errorf("mode %s: %g nm/px, want 0.52", mode, m.NmPerPx)
		}
		for k, w := range want[mode] {
			// Exact: every mode's values are float32 exactly.
			if float64(m.Pix[k]) != w {
				t.Errorf("mode %s: value %d = %v, want %v", mode, k, m.Pix[k], w)
				break
			}
		}
	}
	m, err := Read(filepath.Join(dir, "stack.mrc") + "#2")
	if err != nil {
		t.Fatal(err)
	}
	if m.Meta.StackIndex != 2 || m.Meta.StackSize != 3 || math.Abs(m.NmPerPx-1.25) > 1e-7 || len(m.Notices) == 0 {
		t.Errorf("stack #2: %+v, %g nm/px, notices %v", m.Meta, m.NmPerPx, m.Notices)
	}
	for k, w := range want["stack"] {
		if float64(m.Pix[k]) != w {
			t.Errorf("stack #2 value %d = %v, want %v", k, m.Pix[k], w)
			break
		}
	}
	if _, err := Read(filepath.Join(dir, "stack.mrc") + "#3"); err == nil || !strings.Contains(err.Error(), "the stack has 3") {
		t.Errorf("#3 of 3: %v", err)
	}

	// Bad files: an unknown mode, a cut file, a header claiming 1e9 × 1e9.
	good, err := os.ReadFile(filepath.Join(dir, "mode2.mrc"))
	if err != nil {
		t.Fatal(err)
	}
	patch := func(off int, v int32) []byte {
		b := append([]byte(nil), good...)
		binary.LittleEndian.PutUint32(b[off:], uint32(v))
		return b
	}
	huge := patch(0, 1e9)
	binary.LittleEndian.PutUint32(huge[4:], 1e9)
	for _, c := range []struct {
		name string
		data []byte
		want string
	}{
		{"mode 5", patch(12, 5), "mode 5 is not supported"},
		{"mode 4 (complex)", patch(12, 4), "mode 4 is not supported"},
		{"truncated", good[:len(good)-10], "truncated"},
		{"header only, cut", good[:600], "truncated"},
		{"1e9 × 1e9", huge, "over the limit of 16384"},
		{"negative NSYMBT", patch(92, -5), "must not be negative"},
	} {
		_, err := DecodeBytes(c.data, Options{})
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}

// IEEE 754 binary16: the values of the standard's examples (IEEE
// 754-2008, binary16 format: 1 sign, 5 exponent bits with bias 15, 10
// fraction bits).
func TestHalfToFloat32(t *testing.T) {
	for _, c := range []struct {
		h    uint16
		want float32
	}{
		{0x3c00, 1}, {0xc000, -2}, {0x7bff, 65504}, {0x0400, 1.0 / 16384},
		{0x0001, 1.0 / (1 << 24)}, {0x3555, 0.333251953125}, {0x8000, 0},
	} {
		if got := halfToFloat32(c.h); got != c.want {
			t.Errorf("%#04x: %v, want %v", c.h, got, c.want)
		}
	}
	if v := halfToFloat32(0x7c00); !math.IsInf(float64(v), 1) {
		t.Errorf("0x7c00: %v, want +Inf", v)
	}
	if v := halfToFloat32(0x7e00); !math.IsNaN(float64(v)) {
		t.Errorf("0x7e00: %v, want NaN", v)
	}
}
