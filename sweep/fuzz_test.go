package sweep

import (
	"testing"

	"faultline/scene"
)

// FuzzNew: any sweep file text is either refused with an error or gives a
// sweep whose every job has overrides for every axis; nothing panics.
func FuzzNew(f *testing.F) {
	for _, s := range []string{
		gridSweep, randomSweep,
		`{"version": 1, "scene": "b", "axes": [{"path": "foil.thickness_nm", "range": [1, 5, 0]}], "combine": "grid", "outputs": ["png"]}`,
		`{"version": 1, "scene": "b", "axes": [{"path": "defects[0].at_nm", "values": [[0,0,10],[0,0,20]]}, {"path": "foil.thickness_nm", "values": [50, 60]}], "combine": "zip", "outputs": ["tiff"]}`,
		`{"version": 1, "scene": "b", "axes": [{"path": "x", "distribution": "normal", "mean": 1, "sd": 0}], "combine": "random", "count": 3, "seed": 1, "outputs": ["png"]}`,
		`{"version": 1, "scene": "b", "axes": [{"path": "foil.thickness_nm", "range": [0, 1e300, 1e-300]}], "combine": "grid", "outputs": ["png"]}`,
	} {
		f.Add([]byte(s))
	}
	base, err := scene.Parse([]byte(testScene))
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		file, err := parseFile(data)
		if err != nil {
			return
		}
		sw, err := New(file, cloneScene(base), ".", false)
		if err != nil {
			return
		}
		if sw.Jobs < 1 || sw.Jobs > MaxJobs {
			t.Fatalf("%d jobs", sw.Jobs)
		}
		for _, k := range []int{0, sw.Jobs / 2, sw.Jobs - 1} {
			if ov := sw.Job(k); len(ov) != len(sw.File.Axes) {
				t.Fatalf("job %d: %d overrides for %d axes", k, len(ov), len(sw.File.Axes))
			}
		}
	})
}
