package sweep

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"

	"faultline/scene"
)

// Override is one field of the base scene set for a job.
type Override struct {
	Path  string          `json:"path"`
	Value json.RawMessage `json:"value"`
}

// Job returns the overrides of job k (0 ≤ k < Jobs). It depends on the
// sweep and k alone, so job k means the same on every machine and in
// every shard:
//   - grid: k in mixed radix over the axes, the first axis slowest (the
//     order of nested loops written in the order of the axes);
//   - zip: the k-th value of every axis;
//   - random: each axis drawn in turn from a PCG generator seeded by
//     JobSeed(seed, k, "axes").
func (sw *Sweep) Job(k int) []Override {
	if k < 0 || k >= sw.Jobs {
		panic(fmt.Sprintf("sweep: job %d of %d", k, sw.Jobs))
	}
	axes := sw.File.Axes
	out := make([]Override, len(axes))
	switch sw.File.Combine {
	case "grid":
		rest := k
		for i := len(axes) - 1; i >= 0; i-- {
			n := len(sw.Axes[i])
			out[i] = Override{axes[i].Path, sw.Axes[i][rest%n]}
			rest /= n
		}
	case "zip":
		for i := range axes {
			out[i] = Override{axes[i].Path, sw.Axes[i][k]}
		}
	case "random":
		src := rand.NewPCG(JobSeed(*sw.File.Seed, k, "axes"))
		rng := rand.New(src)
		for i, a := range axes {
			var v json.RawMessage
			switch a.Distribution {
			case "uniform":
				v = num(distuv.Uniform{Min: *a.Min, Max: *a.Max, Src: src}.Rand())
			case "normal":
				v = num(distuv.Normal{Mu: *a.Mean, Sigma: *a.SD, Src: src}.Rand())
			case "choice":
				v = a.Values[rng.IntN(len(a.Values))]
			}
			out[i] = Override{a.Path, v}
		}
	}
	return out
}

// JobSeed derives the two 64-bit words seeding a PCG generator for job k
// and one purpose ("axes", "noise") from the sweep seed, by sha256: a job
// reproduces alone, and the streams of different jobs and purposes do not
// overlap in any way a sweep could notice.
func JobSeed(seed uint64, k int, purpose string) (uint64, uint64) {
	h := sha256.New()
	var b [16]byte
	binary.LittleEndian.PutUint64(b[:8], seed)
	binary.LittleEndian.PutUint64(b[8:], uint64(k))
	h.Write([]byte("faultline-job-seed\x00" + purpose + "\x00"))
	h.Write(b[:])
	sum := h.Sum(nil)
	return binary.LittleEndian.Uint64(sum[:8]), binary.LittleEndian.Uint64(sum[8:16])
}

// Scene returns the base scene with the overrides of job k applied.
func (sw *Sweep) Scene(k int) (*scene.Scene, []Override, error) {
	ov := sw.Job(k)
	sc := cloneScene(sw.Base)
	if err := setOverrides(sc, ov); err != nil {
		return nil, ov, err
	}
	return sc, ov, nil
}

// Varied lists the axes of a grid or zip sweep that take more than one
// value.
func (sw *Sweep) Varied() []int {
	var v []int
	for i, vals := range sw.Axes {
		if len(vals) > 1 {
			v = append(v, i)
		}
	}
	return v
}

// axisIndex returns, for a grid sweep, the index into axis i's values of
// job k.
func (sw *Sweep) axisIndex(k, i int) int {
	rest := k
	for a := len(sw.Axes) - 1; a > i; a-- {
		rest /= len(sw.Axes[a])
	}
	return rest % len(sw.Axes[i])
}
