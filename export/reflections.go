package export

import (
	"encoding/json"
	"fmt"
	"io"
	"math"

	"faultline/scene"
)

// Decimals of the reflections listing, the same in the text table and in
// JSON, so the two say the same (JSON then holds 0.4, not
// 0.3999999999999999, and never −0).
const (
	decD   = 4 // d_nm
	decXi  = 2 // extinction_nm
	decS   = 4 // s_per_nm
	decW   = 2 // w
	sigFg  = 6 // fg_nm, significant digits
	sigLam = 6 // wavelength_nm, significant digits
)

// roundTo rounds x to d decimals; −0 becomes 0. A non-finite x gives nil
// (JSON null).
func roundTo(x float64, d int) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	p := math.Pow(10, float64(d))
	r := math.Round(x*p) / p
	if math.IsInf(x*p, 0) || math.IsNaN(r) { // x too large to round: as it is
		r = x
	}
	if r == 0 {
		r = 0 // −0 → +0
	}
	return &r
}

// roundSig rounds x to n significant digits; −0 becomes 0; non-finite nil.
func roundSig(x float64, n int) *float64 {
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return roundTo(x, 0)
	}
	return roundTo(x, n-1-int(math.Floor(math.Log10(math.Abs(x)))))
}

// ReflectionJSON is one reflection as `faultline reflections --json`
// writes it (the fields are described in the README).
type ReflectionJSON struct {
	HKL          []float64 `json:"hkl"`
	DNm          *float64  `json:"d_nm"`
	FgNm         *float64  `json:"fg_nm"`
	ExtinctionNm *float64  `json:"extinction_nm"`
	SPerNm       *float64  `json:"s_per_nm"`
	W            *float64  `json:"w"`
	Forbidden    bool      `json:"forbidden"`
	SceneG       bool      `json:"scene_g"`
	// Systematic marks the multiples of g; Row is n for the beams n·g the
	// systematic-row model follows.
	Systematic bool `json:"systematic"`
	Row        *int `json:"row,omitempty"`
}

// ReflectionsJSON is the whole listing.
type ReflectionsJSON struct {
	Crystal      string    `json:"crystal"`
	VoltageKV    float64   `json:"voltage_kv"`
	WavelengthNm *float64  `json:"wavelength_nm"`
	Beam         []float64 `json:"beam"`
	Model        string    `json:"model"`
	Beams        int       `json:"beams,omitempty"` // of the systematic row
	// TiltOffZoneDeg is the beam's rotation about g off the zone axis.
	TiltOffZoneDeg float64          `json:"tilt_off_zone_deg"`
	Reflections    []ReflectionJSON `json:"reflections"`
	Warnings       []string         `json:"warnings"`
}

// Reflections rounds a listing of st to the decimals the text shows.
func Reflections(st *scene.Setup, refl []scene.Reflection) ReflectionsJSON {
	out := ReflectionsJSON{Crystal: st.Crystal.Name, VoltageKV: st.VoltageKV, WavelengthNm: roundSig(st.WavelengthNm, sigLam), Beam: st.Scene.Diffraction.Beam,
		Model: st.Model, Beams: len(st.Row), TiltOffZoneDeg: st.TiltOffZoneDeg, Warnings: append([]string{}, st.Warnings...)}
	for i, r := range refl {
		j := ReflectionJSON{HKL: zeroSigns(r.HKL), DNm: roundTo(r.DNm, decD), FgNm: roundSig(r.FgNm, sigFg), SPerNm: roundTo(r.SPerNm, decS), Forbidden: r.Forbidden, SceneG: i == 0,
			Systematic: r.Systematic, Row: r.Row}
		if r.ExtinctionNm != nil {
			j.ExtinctionNm = roundTo(*r.ExtinctionNm, decXi)
		}
		if r.W != nil {
			j.W = roundTo(*r.W, decW)
		}
		out.Reflections = append(out.Reflections, j)
	}
	return out
}

func zeroSigns(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x + 0 // −0 + 0 = +0
	}
	return out
}

// WriteReflectionsJSON writes the listing as indented JSON.
func WriteReflectionsJSON(w io.Writer, st *scene.Setup, refl []scene.Reflection) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(Reflections(st, refl))
}

// WriteReflectionsText writes the listing as a table, with the same
// rounding as the JSON.
func WriteReflectionsText(w io.Writer, st *scene.Setup, refl []scene.Reflection) error {
	r := Reflections(st, refl)
	lam := "?"
	if r.WavelengthNm != nil {
		lam = fmt.Sprintf("%.5f", *r.WavelengthNm)
	}
	fmt.Fprintf(w, "%s at %g kV, λ = %s nm, beam [%s]", r.Crystal, r.VoltageKV, lam, Indices(r.Beam))
	if r.TiltOffZoneDeg != 0 {
		fmt.Fprintf(w, " tilted %g° about g off the zone", r.TiltOffZoneDeg)
	}
	fmt.Fprintln(w)
	if r.Beams > 0 {
		fmt.Fprintf(w, "model %s: %d beams; the lines marked n are the beams n·g it follows (s_n, w_n)\n", r.Model, r.Beams)
	}
	fmt.Fprintf(w, "%-14s %9s %12s %10s %9s\n", "hkl", "d_nm", "ξ_g (nm)", "s (/nm)", "w")
	num := func(p *float64, d int) string {
		if p == nil {
			return "-"
		}
		return fmt.Sprintf("%.*f", d, *p)
	}
	for _, x := range r.Reflections {
		mark := ""
		if x.Row != nil {
			mark = fmt.Sprintf("  n = %d", *x.Row)
		}
		if x.SceneG {
			mark += "  <- g of the scene"
		}
		xi := num(x.ExtinctionNm, decXi)
		if x.Forbidden && x.ExtinctionNm == nil {
			xi = "forbidden"
		}
		if _, err := fmt.Fprintf(w, "%-14s %9s %12s %10s %9s%s\n", Indices(x.HKL), num(x.DNm, decD), xi, num(x.SPerNm, decS), num(x.W, decW), mark); err != nil {
			return err
		}
	}
	for _, m := range r.Warnings {
		if _, err := fmt.Fprintln(w, "warning: "+m); err != nil {
			return err
		}
	}
	return nil
}
