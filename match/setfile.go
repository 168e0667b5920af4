package match

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"faultline/micrograph"
	"faultline/scene"
)

// SetVersion is the identification-set file version this package reads.
const SetVersion = 1

// SetFile is an identification set as written in JSON:
//
//	{"version": 1, "scene": "base.json", "candidates": ["1/2<110>"],
//	 "vary": "b", "defect": 0, "blur_nm": 1.5,
//	 "micrographs": [{"image": "a.png", "nm_per_px": 0.5, "g_angle_deg": 0,
//	                  "kind": "bf", "diffraction": {...}}]}
//
// "vary" is "b" (the default: candidates are Burgers vectors or families),
// "nature" (a loop: candidates vacancy and interstitial unless listed) or
// "kind" (a fault: intrinsic and extrinsic unless listed). "defect" picks
// the varied defect (default: the first dislocation or loop for b, the
// first loop for nature, the first fault for kind).
type SetFile struct {
	Version    int      `json:"version"`
	Scene      string   `json:"scene"`
	Candidates []string `json:"candidates"`
	Vary       string   `json:"vary,omitempty"`
	Defect     *int     `json:"defect,omitempty"`
	BlurNm     *float64 `json:"blur_nm,omitempty"`
	// RefineRotationDeg turns each simulation by up to this many degrees
	// (at most 3) to absorb an error in the micrographs' g angles.
	RefineRotationDeg *float64     `json:"refine_rotation_deg,omitempty"`
	Micrographs       []SetPicture `json:"micrographs"`
}

// SetPicture is one micrograph of a set. nm_per_px overrides the pixel
// size the file records; a file that records none needs it.
type SetPicture struct {
	Image       string          `json:"image"`
	NmPerPx     *float64        `json:"nm_per_px,omitempty"`
	GAngleDeg   *float64        `json:"g_angle_deg,omitempty"`
	Kind        string          `json:"kind,omitempty"`
	Diffraction json.RawMessage `json:"diffraction,omitempty"`
	// RoiPx restricts the comparison to the pixels x0 ≤ x < x1,
	// y0 ≤ y < y1 of the micrograph; the scene's origin is placed at the
	// region's centre.
	RoiPx []int `json:"roi_px,omitempty"`
}

// setErr is an error about a field of a set file.
func setErr(path, format string, args ...any) error {
	return fmt.Errorf("%w: %s: %s", ErrSeries, path, fmt.Sprintf(format, args...))
}

// LoadSeries reads an identification set and everything it names: the
// base scene, the micrographs (through package micrograph, with the pixel
// size from the file unless the set gives one) and the candidates. Notes
// say where each pixel size came from.
func LoadSeries(path string) (*Series, []string, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	var f SetFile
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		return nil, nil, fmt.Errorf("%w: %s: %v", ErrSeries, filepath.Base(path), err)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return nil, nil, fmt.Errorf("%w: %s: text after the set's closing brace", ErrSeries, filepath.Base(path))
	}
	if f.Version != SetVersion {
		return nil, nil, setErr("version", "%d: this program reads version %d", f.Version, SetVersion)
	}
	if f.Scene == "" {
		return nil, nil, setErr("scene", "give the base scene file")
	}
	dir := filepath.Dir(path)
	rel := func(p string) string {
		if filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(dir, p)
	}
	scenePath := rel(f.Scene)
	base, err := scene.Load(scenePath)
	if err != nil {
		return nil, nil, fmt.Errorf("scene: %w", err)
	}
	baseJSON, err := scene.Marshal(base)
	if err != nil {
		return nil, nil, err
	}
	// One builder for the checks below: the material stage (crystal,
	// elastic constants, Stroh solutions) is built once.
	var builder scene.Builder
	st, err := builder.Build(base, filepath.Dir(scenePath))
	if err != nil {
		return nil, nil, fmt.Errorf("scene: %w", err)
	}
	s := &Series{Base: baseJSON, Dir: filepath.Dir(scenePath)}
	if f.BlurNm != nil {
		if b := *f.BlurNm; !(b >= 0) || b > 100 {
			return nil, nil, setErr("blur_nm", "%g: want 0 to 100 nm", b)
		}
		s.BlurNm = *f.BlurNm
	}
	if r := f.RefineRotationDeg; r != nil {
		if !(*r >= 0 && *r <= 3) {
			return nil, nil, setErr("refine_rotation_deg", "%g: want 0 to 3 degrees", *r)
		}
		s.RefineRotationDeg = *r
	}
	if s.Defect, s.Candidates, err = CandidatesFor(st, f.Vary, f.Candidates, f.Defect); err != nil {
		return nil, nil, err
	}
	if len(f.Micrographs) == 0 {
		return nil, nil, setErr("micrographs", "the list is empty")
	}
	var notes []string
	for i, p := range f.Micrographs {
		at := fmt.Sprintf("micrographs[%d]", i)
		if p.Image == "" {
			return nil, nil, setErr(at+".image", "give the micrograph file")
		}
		img, err := micrograph.Read(rel(p.Image))
		if err != nil {
			return nil, nil, fmt.Errorf("%w: %s.image: %v", ErrSeries, at, err)
		}
		nm := img.NmPerPx
		from := "from the file (" + img.PixelSizeFrom + ")"
		if p.NmPerPx != nil {
			nm, from = *p.NmPerPx, "as given"
		}
		if !(nm > 0) || math.IsInf(nm, 0) || nm > 1e4 {
			if p.NmPerPx == nil {
				return nil, nil, setErr(at+".nm_per_px", "%s records no pixel size; give nm_per_px", p.Image)
			}
			return nil, nil, setErr(at+".nm_per_px", "%g: want a positive pixel size in nm, at most 1e4", nm)
		}
		notes = append(notes, fmt.Sprintf("%s: %d × %d px, %.4g nm/px %s", p.Image, img.Width, img.Height, nm, from))
		notes = append(notes, img.Notices...)
		kind, err := ParseKind(p.Kind)
		if err != nil {
			return nil, nil, setErr(at+".kind", "%v", err)
		}
		angle := 0.0
		if p.GAngleDeg != nil {
			angle = *p.GAngleDeg
			if math.IsNaN(angle) || math.Abs(angle) > 360 {
				return nil, nil, setErr(at+".g_angle_deg", "%g: want an angle from −360 to 360 degrees", angle)
			}
		}
		m := Micrograph{Name: p.Image, Raster: FromFloat32(img.Width, img.Height, img.Pix, nm), GAngleDeg: angle, Kind: kind, Diffraction: p.Diffraction}
		if p.RoiPx != nil {
			r := p.RoiPx
			if len(r) != 4 || r[0] < 0 || r[1] < 0 || r[2] > img.Width || r[3] > img.Height || r[2]-r[0] < 8 || r[3]-r[1] < 8 {
				return nil, nil, setErr(at+".roi_px", "%v: want [x0, y0, x1, y1] inside the %d × %d image, at least 8 px each way", r, img.Width, img.Height)
			}
			m.Raster = m.Raster.Crop(r[0], r[1], r[2]-r[0], r[3]-r[1])
		}
		sc, err := s.SceneFor(&m)
		if err != nil {
			return nil, nil, fmt.Errorf("%s.diffraction: %w", at, err)
		}
		mst, err := builder.Build(sc, s.Dir)
		if err != nil {
			return nil, nil, fmt.Errorf("%s: %w", at, err)
		}
		if err := fitsDefect(mst, sc.Defects[s.Defect], m.Raster, at); err != nil {
			return nil, nil, err
		}
		s.Micrographs = append(s.Micrographs, m)
	}
	return s, notes, nil
}

// pickDefect returns the index of the varied defect.
func pickDefect(sc *scene.Scene, vary string, given *int) (int, error) {
	want := map[string][]string{
		// A dissociated dislocation is not varied: its b is the sum of
		// its partials, which a trial b alone would contradict.
		"": {"dislocation", "loop"}, "b": {"dislocation", "loop"},
		"nature": {"loop"}, "kind": {"fault"},
	}[vary]
	if given != nil {
		k := *given
		if k < 0 || k >= len(sc.Defects) {
			return 0, setErr("defect", "%d: the base scene has %d defects", k, len(sc.Defects))
		}
		for _, t := range want {
			if sc.Defects[k].Type == t {
				return k, nil
			}
		}
		return 0, setErr("defect", "defects[%d] is a %s; varying %s needs a %v", k, sc.Defects[k].Type, varyName(vary), want)
	}
	for k, d := range sc.Defects {
		for _, t := range want {
			if d.Type == t {
				return k, nil
			}
		}
	}
	return 0, setErr("scene", "no defect to vary %s: the base scene needs a %v", varyName(vary), want)
}

func varyName(vary string) string {
	if vary == "" {
		return "b"
	}
	return vary
}

// wordCandidates are the trial values of a loop's nature or a fault's kind.
func wordCandidates(vary string, given []string, k int) ([]Candidate, error) {
	allowed := map[string][]string{"nature": {"vacancy", "interstitial"}, "kind": {"intrinsic", "extrinsic"}}[vary]
	if len(given) == 0 {
		given = allowed
	}
	var out []Candidate
	for i, w := range given {
		ok := false
		for _, a := range allowed {
			ok = ok || w == a
		}
		if !ok {
			return nil, setErr(fmt.Sprintf("candidates[%d]", i), "%q: varying %s takes %v", w, vary, allowed)
		}
		out = append(out, Candidate{Label: w, Path: fmt.Sprintf("defects[%d].%s", k, vary), Value: w})
	}
	return out, nil
}

// fitsDefect refuses a micrograph smaller than the defect it is to show:
// a loop, inclusion or cavity must fit in it with its diameter.
func fitsDefect(st *scene.Setup, d scene.Defect, r *Raster, at string) error {
	if d.RadiusNm == nil {
		return nil
	}
	need := 2 * *d.RadiusNm
	w, h := float64(r.W)*r.NmPerPx, float64(r.H)*r.NmPerPx
	if math.Min(w, h) < need {
		return setErr(at, "the micrograph spans %.4g × %.4g nm, smaller than the %s it should show (%.4g nm across)", w, h, d.Type, need)
	}
	return nil
}
