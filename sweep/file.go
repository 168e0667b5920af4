package sweep

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"faultline/scene"
)

// FileVersion is the sweep-file version this package reads.
const FileVersion = 1

// MaxJobs is the largest sweep run without Options.Force: a larger one is
// more often a slip (a step one tenth of what was meant) than a plan.
const MaxJobs = 10000

// HardMaxJobs bounds a sweep even with Force.
const HardMaxJobs = 10_000_000

// File is a sweep file as written.
type File struct {
	Version int    `json:"version"`
	Scene   string `json:"scene"`
	Axes    []Axis `json:"axes"`
	// Combine is "grid" (the Cartesian product, first axis slowest),
	// "zip" (the i-th value of every axis together) or "random".
	Combine string `json:"combine"`
	// Count is the number of jobs of a random sweep.
	Count int `json:"count,omitempty"`
	// Seed seeds the random axes and the noise of every job.
	Seed    *uint64  `json:"seed,omitempty"`
	Outputs []string `json:"outputs"`
	Labels  bool     `json:"labels"`
	// LabelWidthPx is the half-width, in pixels, of a line's label.
	LabelWidthPx *float64 `json:"label_width_px,omitempty"`
	Noise        *Noise   `json:"noise,omitempty"`
}

// Axis is one varied field: a list of values, a numeric range
// [from, to, step] (to included), or for a random sweep a distribution.
type Axis struct {
	Path   string            `json:"path"`
	Values []json.RawMessage `json:"values,omitempty"`
	Range  []float64         `json:"range,omitempty"`
	// Distribution is "uniform" (min, max), "normal" (mean, sd) or
	// "choice" (values); random sweeps only.
	Distribution string   `json:"distribution,omitempty"`
	Min          *float64 `json:"min,omitempty"`
	Max          *float64 `json:"max,omitempty"`
	Mean         *float64 `json:"mean,omitempty"`
	SD           *float64 `json:"sd,omitempty"`
}

// Noise is what a detector adds to the simulated intensities: a Gaussian
// blur (standard deviation in nm) and shot noise at a dose in electrons
// per pixel.
type Noise struct {
	DoseEPerPx *float64 `json:"dose_e_per_px,omitempty"`
	BlurNm     *float64 `json:"blur_nm,omitempty"`
}

// Outputs a job can write.
var knownOutputs = map[string][]string{
	"png":    {"bf.png", "df.png"},
	"tiff":   {"bf.tiff", "df.tiff"},
	"figure": {"figure.png"},
}

// Sweep is a parsed, checked sweep: the file, its base scene, and the
// expanded axes.
type Sweep struct {
	File File
	// Base is the base scene; SceneDir is where its relative paths start.
	Base     *scene.Scene
	SceneDir string
	// Axes holds the values of every grid or zip axis, as JSON.
	Axes [][]json.RawMessage
	// Jobs is the number of jobs.
	Jobs int
	// Hash is the sha256 of the sweep file's content and the base scene:
	// what an output directory belongs to.
	Hash string
}

// Error is bad input in a sweep file, named by its path in the file.
type Error struct {
	Path string
	Msg  string
	Err  error
}

func (e *Error) Error() string {
	if e.Path == "" {
		return e.Msg
	}
	return e.Path + ": " + e.Msg
}

// Unwrap returns ErrInvalid and the cause.
func (e *Error) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrInvalid, e.Err}
	}
	return []error{ErrInvalid}
}

// ErrInvalid is wrapped by every error about the content of a sweep file
// or the use of an output directory; the command line maps it to exit
// status 2.
var ErrInvalid = errors.New("invalid sweep")

func errf(path, format string, args ...any) *Error {
	return &Error{Path: path, Msg: fmt.Sprintf(format, args...)}
}

// Load reads the sweep file at path and the scene it names (relative to
// the sweep file), and checks both. force lifts MaxJobs.
func Load(path string, force bool) (*Sweep, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, &Error{Msg: fmt.Sprintf("sweep file %s: %v", path, err), Err: err}
	}
	f, err := parseFile(data)
	if err != nil {
		return nil, err
	}
	if f.Scene == "" {
		return nil, errf("scene", "missing: give the base scene file, relative to the sweep file")
	}
	scenePath := f.Scene
	if !filepath.IsAbs(scenePath) {
		scenePath = filepath.Join(filepath.Dir(path), scenePath)
	}
	base, err := scene.Load(scenePath)
	if err != nil {
		return nil, &Error{Path: "scene", Msg: fmt.Sprintf("%s: %v", f.Scene, err), Err: err}
	}
	return New(f, base, filepath.Dir(scenePath), force)
}

// parseFile decodes a sweep file strictly: unknown fields and values of
// the wrong type are errors naming the field.
func parseFile(data []byte) (File, error) {
	var f File
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		var te *json.UnmarshalTypeError
		var se *json.SyntaxError
		switch {
		case errors.As(err, &te):
			return f, errf(te.Field, "is %s, which is the wrong type here", te.Value)
		case errors.As(err, &se):
			return f, errf("", "sweep file: line %d: %v", bytes.Count(data[:min(int(se.Offset), len(data))], []byte("\n"))+1, se)
		case errors.Is(err, io.EOF):
			return f, errf("", "sweep file: empty")
		case strings.HasPrefix(err.Error(), "json: unknown field "):
			name := strings.Trim(strings.TrimPrefix(err.Error(), "json: unknown field "), `"`)
			return f, errf(name, "unknown field")
		}
		return f, errf("", "sweep file: %v", err)
	}
	if dec.More() {
		return f, errf("", "sweep file: unexpected data after the closing brace")
	}
	return f, nil
}

// New checks a sweep against its base scene and expands its axes.
// sceneDir is the directory the scene's relative paths start from.
func New(f File, base *scene.Scene, sceneDir string, force bool) (*Sweep, error) {
	sw, err := expand(f, base, sceneDir, force)
	if err != nil {
		return nil, err
	}
	if err := sw.checkValues(); err != nil {
		return nil, err
	}
	return sw, nil
}

// expand checks the sweep file on its own and expands its axes, without
// trying its values on the scene.
func expand(f File, base *scene.Scene, sceneDir string, force bool) (*Sweep, error) {
	if f.Version != FileVersion {
		return nil, errf("version", "is %d; this Faultline reads sweep files of version %d", f.Version, FileVersion)
	}
	if len(f.Axes) == 0 {
		return nil, errf("axes", "empty: give at least one axis {\"path\": ..., \"values\": [...]}")
	}
	if len(f.Outputs) == 0 {
		return nil, errf("outputs", "empty: give one or more of png, tiff, figure")
	}
	seen := map[string]bool{}
	for i, o := range f.Outputs {
		if _, ok := knownOutputs[o]; !ok {
			return nil, errf(fmt.Sprintf("outputs[%d]", i), "%q is not an output (known: figure, png, tiff)", o)
		}
		if seen[o] {
			return nil, errf(fmt.Sprintf("outputs[%d]", i), "%q given twice", o)
		}
		seen[o] = true
	}
	if f.LabelWidthPx != nil {
		if !f.Labels {
			return nil, errf("label_width_px", "given, but labels is false")
		}
		if w := *f.LabelWidthPx; !(w > 0) || w > 1000 {
			return nil, errf("label_width_px", "must be positive (pixels), at most 1000")
		}
	}
	if n := f.Noise; n != nil {
		if n.DoseEPerPx == nil && n.BlurNm == nil {
			return nil, errf("noise", "empty: give dose_e_per_px, blur_nm or both")
		}
		if n.DoseEPerPx != nil && !(*n.DoseEPerPx > 0 && *n.DoseEPerPx <= 1e12) {
			return nil, errf("noise.dose_e_per_px", "must be positive (electrons per pixel), at most 1e12")
		}
		if n.BlurNm != nil && !(*n.BlurNm >= 0 && *n.BlurNm <= 1e6) {
			return nil, errf("noise.blur_nm", "must be zero or positive (nm)")
		}
		if n.DoseEPerPx != nil && f.Seed == nil {
			return nil, errf("seed", "missing: shot noise needs a seed, so each job is reproducible")
		}
	}
	sw := &Sweep{File: f, Base: base, SceneDir: sceneDir}
	paths := map[string]int{}
	for i, a := range f.Axes {
		p := fmt.Sprintf("axes[%d]", i)
		if a.Path == "" {
			return nil, errf(p+".path", "missing: the scene field to vary, e.g. foil.thickness_nm")
		}
		if j, ok := paths[a.Path]; ok {
			return nil, errf(p+".path", "%s is varied by axes[%d] already", a.Path, j)
		}
		paths[a.Path] = i
	}
	switch f.Combine {
	case "grid", "zip":
		if f.Count != 0 {
			return nil, errf("count", "only a random sweep takes a count")
		}
		n := 1
		for i, a := range f.Axes {
			vals, err := axisValues(fmt.Sprintf("axes[%d]", i), a, force)
			if err != nil {
				return nil, err
			}
			sw.Axes = append(sw.Axes, vals)
			if f.Combine == "zip" {
				if i > 0 && len(vals) != len(sw.Axes[0]) {
					return nil, errf(fmt.Sprintf("axes[%d]", i), "has %d values and axes[0] has %d: zip needs axes of equal length", len(vals), len(sw.Axes[0]))
				}
				n = len(vals)
				continue
			}
			if n > HardMaxJobs/len(vals) {
				return nil, errf("axes", "the grid has more than %d jobs", HardMaxJobs)
			}
			n *= len(vals)
		}
		sw.Jobs = n
	case "random":
		if f.Seed == nil {
			return nil, errf("seed", "missing: a random sweep needs a seed, so it can be reproduced")
		}
		if f.Count <= 0 || f.Count > HardMaxJobs {
			return nil, errf("count", "must be a positive whole number of jobs (at most %d)", HardMaxJobs)
		}
		for i, a := range f.Axes {
			if err := checkDistribution(fmt.Sprintf("axes[%d]", i), a); err != nil {
				return nil, err
			}
		}
		sw.Jobs = f.Count
	case "":
		return nil, errf("combine", "missing: grid, zip or random")
	default:
		return nil, errf("combine", "%q is not a way to combine axes (grid, zip or random)", f.Combine)
	}
	if sw.Jobs > MaxJobs && !force {
		return nil, errf("axes", "the sweep has %d jobs, more than %d; give --force to run it anyway", sw.Jobs, MaxJobs)
	}
	sw.Hash = sw.hash()
	return sw, nil
}

// axisValues lists the values of a grid or zip axis.
func axisValues(p string, a Axis, force bool) ([]json.RawMessage, error) {
	if a.Distribution != "" || a.Min != nil || a.Max != nil || a.Mean != nil || a.SD != nil {
		return nil, errf(p, "distributions (distribution, min, max, mean, sd) belong to a random sweep")
	}
	switch {
	case a.Values != nil && a.Range != nil:
		return nil, errf(p, "give values or range, not both")
	case a.Values != nil:
		if len(a.Values) == 0 {
			return nil, errf(p+".values", "empty: an axis needs at least one value")
		}
		return a.Values, nil
	case a.Range != nil:
		return rangeValues(p+".range", a.Range, force)
	}
	return nil, errf(p, "give values [...] or range [from, to, step]")
}

// rangeValues expands [from, to, step] with to included (within a
// millionth of a step), each value rounded to the decimals of from and
// step so 0 is 0 and not 1.7e-18.
func rangeValues(p string, r []float64, force bool) ([]json.RawMessage, error) {
	if len(r) != 3 {
		return nil, errf(p, "has %d numbers; write [from, to, step]", len(r))
	}
	from, to, step := r[0], r[1], r[2]
	for _, v := range r {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, errf(p, "must hold finite numbers")
		}
	}
	if step == 0 {
		return nil, errf(p, "step is zero")
	}
	if (to-from)*step < 0 {
		return nil, errf(p, "step %g goes away from %g to %g", step, from, to)
	}
	steps := math.Floor((to-from)/step + 1e-6)
	if steps+1 > MaxJobs && !force {
		return nil, errf("axes", "the sweep has more than %d jobs (%s alone has %.0f values); give --force to run it anyway", MaxJobs, p, steps+1)
	}
	if steps+1 > HardMaxJobs {
		return nil, errf(p, "has more than %d values", HardMaxJobs)
	}
	dec := max(decimals(from), decimals(step))
	scale := math.Pow(10, float64(dec))
	vals := make([]json.RawMessage, int(steps)+1)
	for i := range vals {
		v := from + float64(i)*step
		if dec < 15 {
			v = math.Round(v*scale) / scale
		}
		if v == 0 {
			v = 0 // no -0
		}
		vals[i] = json.RawMessage(strconv.FormatFloat(v, 'g', -1, 64))
	}
	return vals, nil
}

// decimals is the number of digits after the point in the shortest
// decimal form of v.
func decimals(v float64) int {
	s := strconv.FormatFloat(math.Abs(v), 'f', -1, 64)
	if i := strings.IndexByte(s, '.'); i >= 0 {
		return min(len(s)-i-1, 15)
	}
	return 0
}

func checkDistribution(p string, a Axis) error {
	if a.Range != nil {
		return errf(p+".range", "a random sweep takes a distribution, not a range")
	}
	num := func(field string, v *float64) error {
		if v == nil {
			return errf(p+"."+field, "missing: %s needs %s", a.Distribution, field)
		}
		if math.IsNaN(*v) || math.IsInf(*v, 0) {
			return errf(p+"."+field, "must be a finite number")
		}
		return nil
	}
	only := func(allowed ...string) error {
		given := map[string]bool{"min": a.Min != nil, "max": a.Max != nil, "mean": a.Mean != nil, "sd": a.SD != nil, "values": a.Values != nil}
		for _, k := range allowed {
			delete(given, k)
		}
		for _, k := range []string{"min", "max", "mean", "sd", "values"} {
			if given[k] {
				return errf(p+"."+k, "does not belong to a %s distribution", a.Distribution)
			}
		}
		return nil
	}
	switch a.Distribution {
	case "uniform":
		if err := only("min", "max"); err != nil {
			return err
		}
		if err := num("min", a.Min); err != nil {
			return err
		}
		if err := num("max", a.Max); err != nil {
			return err
		}
		if !(*a.Max > *a.Min) {
			return errf(p+".max", "must be greater than min")
		}
	case "normal":
		if err := only("mean", "sd"); err != nil {
			return err
		}
		if err := num("mean", a.Mean); err != nil {
			return err
		}
		if err := num("sd", a.SD); err != nil {
			return err
		}
		if !(*a.SD > 0) {
			return errf(p+".sd", "must be positive")
		}
	case "choice":
		if err := only("values"); err != nil {
			return err
		}
		if len(a.Values) == 0 {
			return errf(p+".values", "empty: a choice needs at least one value")
		}
	case "":
		return errf(p+".distribution", "missing: uniform, normal or choice")
	default:
		return errf(p+".distribution", "%q is not a distribution (uniform, normal or choice)", a.Distribution)
	}
	return nil
}

// checkValues applies every value of every axis to the base scene alone
// (of a range, its first and last: the values between are numbers of the
// same kind), so an unknown path or a value of the wrong type for its
// path is found before any job runs. A combination that is only wrong together (g not
// perpendicular to the beam) fails as a job, with its one-line error.
func (sw *Sweep) checkValues() error {
	for i, a := range sw.File.Axes {
		p := fmt.Sprintf("axes[%d]", i)
		var vals []json.RawMessage
		switch {
		case sw.Axes != nil && a.Range != nil:
			vals = []json.RawMessage{sw.Axes[i][0], sw.Axes[i][len(sw.Axes[i])-1]}
			p += ".range"
		case sw.Axes != nil:
			vals = sw.Axes[i]
			p += ".values"
		case a.Distribution == "choice":
			vals = a.Values
			p += ".values"
		case a.Distribution == "uniform":
			vals = []json.RawMessage{num(*a.Min), num(*a.Max)}
		case a.Distribution == "normal":
			vals = []json.RawMessage{num(*a.Mean)}
		}
		checked := map[string]bool{}
		for j, v := range vals {
			if checked[string(v)] {
				continue
			}
			checked[string(v)] = true
			sc := cloneScene(sw.Base)
			if err := setOverride(sc, a.Path, v); err != nil {
				vp := p
				if a.Values != nil {
					vp = fmt.Sprintf("%s[%d]", p, j)
				}
				return &Error{Path: vp, Msg: fmt.Sprintf("%s = %s: %v", a.Path, compact(v), err), Err: err}
			}
		}
	}
	return nil
}

func num(v float64) json.RawMessage {
	return json.RawMessage(strconv.FormatFloat(v, 'g', -1, 64))
}

// compact writes a JSON value on one line.
func compact(v json.RawMessage) string {
	var b bytes.Buffer
	if err := json.Compact(&b, v); err != nil {
		return string(v)
	}
	return b.String()
}

// cloneScene copies a scene deeply (through its JSON form).
func cloneScene(sc *scene.Scene) *scene.Scene {
	data, err := json.Marshal(sc)
	if err != nil {
		panic(err) // a Scene always marshals
	}
	var out scene.Scene
	if err := json.Unmarshal(data, &out); err != nil {
		panic(err)
	}
	return &out
}

// hash is the sha256 of the sweep file (as decoded, so formatting does not
// count), the base scene, and the bytes of every CIF file they name (the
// base scene's crystal.cif and the values of a crystal.cif axis), so that
// editing a CIF file makes a different sweep. A CIF that cannot be read
// counts by its error; its jobs then fail with it.
func (sw *Sweep) hash() string {
	h := sha256.New()
	f, _ := json.Marshal(sw.File)
	s, _ := json.Marshal(sw.Base)
	fmt.Fprintf(h, "faultline-sweep\x00%d\x00%s\x00%d\x00%s", len(f), f, len(s), s)
	for _, p := range sw.cifPaths() {
		data, err := os.ReadFile(p)
		if err != nil {
			data = []byte("unreadable: " + err.Error())
		}
		sum := sha256.Sum256(data)
		fmt.Fprintf(h, "\x00cif\x00%d\x00%s\x00%x", len(p), p, sum)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// cifPaths lists the CIF files the sweep's scenes name, resolved against
// SceneDir, in a fixed order.
func (sw *Sweep) cifPaths() []string {
	var names []string
	if sw.Base != nil && sw.Base.Crystal.CIF != "" {
		names = append(names, sw.Base.Crystal.CIF)
	}
	for _, a := range sw.File.Axes {
		if a.Path != "crystal.cif" {
			continue
		}
		for _, v := range a.Values {
			var name string
			if json.Unmarshal(v, &name) == nil && name != "" {
				names = append(names, name)
			}
		}
	}
	for i, n := range names {
		if !filepath.IsAbs(n) {
			names[i] = filepath.Join(sw.SceneDir, n)
		}
	}
	return names
}
