package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"faultline/figure"
	"faultline/match"
	"faultline/micrograph"
)

// sheetRows is the number of best candidates on the identification's
// contact sheet.
const sheetRows = 6

func cmdIdentify(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("identify", flag.ContinueOnError)
	asJSON := fs.Bool("json", false, "print the ranking as JSON")
	out := fs.String("o", "", "directory for the contact sheet identify.png")
	path, err := parseArg(fs, args, stdout, "set file")
	if err != nil {
		return err
	}
	s, notes, err := match.LoadSeries(path)
	if err != nil {
		return err
	}
	for _, n := range notes {
		fmt.Fprintln(stderr, "note: "+n)
	}
	p := newProgress(stderr, "identify")
	ranked, err := match.Identify(ctx, s, match.Options{Progress: p.update})
	p.finish()
	if err != nil {
		return err
	}
	if *out != "" {
		if err := writeSheet(*out, s, ranked); err != nil {
			return fmt.Errorf("-o %s: %w", *out, err)
		}
	}
	if *asJSON {
		return json.NewEncoder(stdout).Encode(rankingJSON(ranked))
	}
	fmt.Fprintf(stdout, "%-4s %-16s %-16s", "rank", "candidate", "score")
	for _, m := range s.Micrographs {
		fmt.Fprintf(stdout, "  %-22s", filepath.Base(m.Name))
	}
	fmt.Fprintln(stdout)
	for _, r := range ranked {
		rank := fmt.Sprint(r.Rank)
		if r.Tied {
			rank += "="
		}
		fmt.Fprintf(stdout, "%-4s %-16s %-16s", rank, r.Candidate.Label, fmt.Sprintf("%.3f ± %.3f", r.Score, r.Error))
		for _, c := range r.Cells {
			cell := fmt.Sprintf("%.3f", c.Score)
			if !math.IsNaN(c.GDotB) {
				cell += fmt.Sprintf(" g·b=%s", num(c.GDotB))
			}
			if c.Flat {
				cell += " (none)"
			}
			fmt.Fprintf(stdout, "  %-22s", cell)
		}
		fmt.Fprintln(stdout)
	}
	fmt.Fprintln(stdout, "score: normalised correlation with each micrograph (−1 to 1; see README); = marks a candidate the micrographs cannot tell apart from the one above; (none): the simulation shows no contrast and the score is the micrograph's noise fraction")
	return nil
}

// num prints a g·b value compactly: 0, 1, -0.5, 0.333.
func num(x float64) string {
	if x == math.Trunc(x) {
		return fmt.Sprintf("%.0f", x)
	}
	return fmt.Sprintf("%.3g", x)
}

type jsonCell struct {
	Image       string     `json:"image"`
	Score       float64    `json:"score"`
	Error       float64    `json:"error"`
	GDotB       *float64   `json:"g_dot_b,omitempty"`
	GDotBCrossU *float64   `json:"g_dot_b_cross_u,omitempty"`
	NoContrast  bool       `json:"no_contrast,omitempty"`
	ShiftPx     [2]float64 `json:"shift_px"`
	RotationDeg float64    `json:"rotation_deg"`
}

type jsonRanked struct {
	Candidate   string     `json:"candidate"`
	B           string     `json:"b,omitempty"`
	Score       float64    `json:"score"`
	Error       float64    `json:"error"`
	Rank        int        `json:"rank"`
	Tied        bool       `json:"tied"`
	Micrographs []jsonCell `json:"micrographs"`
}

func finitePtr(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

func round4(x float64) float64 { return math.Round(x*1e4) / 1e4 }

func rankingJSON(ranked []match.Ranked) any {
	out := make([]jsonRanked, len(ranked))
	for i, r := range ranked {
		j := jsonRanked{Candidate: r.Candidate.Label, Score: round4(r.Score), Error: round4(r.Error), Rank: r.Rank, Tied: r.Tied}
		if r.Candidate.B != nil {
			j.B = r.Candidate.Label
		}
		for _, c := range r.Cells {
			j.Micrographs = append(j.Micrographs, jsonCell{Image: c.Micrograph, Score: round4(c.Score), Error: round4(c.Error),
				GDotB: finitePtr(c.GDotB), GDotBCrossU: finitePtr(round4(c.GDotBxU)), NoContrast: c.Flat,
				ShiftPx: [2]float64{round4(c.Shift.DX), round4(c.Shift.DY)}, RotationDeg: round4(c.RotationDeg)})
		}
		out[i] = j
	}
	return map[string]any{"ranking": out}
}

// writeSheet writes DIR/identify.png: the micrographs on top, then one row
// per best candidate with its simulations, each labelled with its score
// and g·b.
func writeSheet(dir string, s *match.Series, ranked []match.Ranked) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	var rows [][]figure.SheetCell
	var labels, titles []string
	var top []figure.SheetCell
	for _, m := range s.Micrographs {
		top = append(top, figure.SheetCell{Image: match.Picture(m.Raster, false), Lines: []string{fmt.Sprintf("%s, g at %.0f°", m.Kind, m.GAngleDeg)}})
		titles = append(titles, filepath.Base(m.Name))
	}
	rows = append(rows, top)
	labels = append(labels, "micrograph")
	for i, r := range ranked {
		if i == sheetRows {
			break
		}
		var row []figure.SheetCell
		for _, c := range r.Cells {
			l := fmt.Sprintf("r = %.3f", c.Score)
			if !math.IsNaN(c.GDotB) {
				l += "  g·b = " + num(c.GDotB)
			}
			if c.Flat {
				l += " (no contrast)"
			}
			row = append(row, figure.SheetCell{Image: match.Picture(c.Simulated, true), Lines: []string{l}})
		}
		rows = append(rows, row)
		label := fmt.Sprintf("%d. %s", r.Rank, r.Candidate.Label)
		if r.Tied {
			label = fmt.Sprintf("%d= %s", r.Rank, r.Candidate.Label)
		}
		labels = append(labels, label)
	}
	img, err := figure.Sheet(rows, titles, labels, 160)
	if err != nil {
		return err
	}
	return figure.WritePNG(filepath.Join(dir, "identify.png"), img, nil)
}

func cmdFit(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("fit", flag.ContinueOnError)
	mic := fs.String("micrograph", "", "the micrograph file (PNG, TIFF, DM3/DM4, MRC; #N picks a stack image)")
	nm := fs.Float64("nm-per-px", 0, "pixel size in nm (default: as the file records it)")
	angle := fs.Float64("g-angle-deg", 0, "direction of g in the micrograph, counter-clockwise from its +x axis, degrees")
	kind := fs.String("kind", "bf", "bf or df")
	defect := fs.Int("defect", 0, "index of the defect whose depth and position are fitted")
	blur := fs.Float64("blur-nm", 0, "σ of a Gaussian blur applied to the simulation, nm")
	asJSON := fs.Bool("json", false, "print the result as JSON")
	set := setFlag(fs)
	path, err := parse(fs, args, stdout)
	if err != nil {
		return err
	}
	if *mic == "" {
		return usageError{"fit: give the micrograph with --micrograph FILE"}
	}
	k, err := match.ParseKind(*kind)
	if err != nil {
		return usageError{"--kind: " + err.Error()}
	}
	if !(*blur >= 0) || *blur > 100 {
		return usageError{fmt.Sprintf("--blur-nm: %g: want 0 to 100 nm", *blur)}
	}
	if math.IsNaN(*angle) || math.Abs(*angle) > 360 {
		return usageError{fmt.Sprintf("--g-angle-deg: %g: want an angle from −360 to 360 degrees", *angle)}
	}
	sc, err := loadScene(path, *set)
	if err != nil {
		return err
	}
	img, err := micrograph.Read(*mic)
	if err != nil {
		return fmt.Errorf("--micrograph: %w", err)
	}
	px := img.NmPerPx
	if *nm != 0 {
		px = *nm
	}
	if !(px > 0) || math.IsInf(px, 0) || px > 1e4 {
		if *nm == 0 {
			return usageError{fmt.Sprintf("--nm-per-px: %s records no pixel size; give it", filepath.Base(*mic))}
		}
		return usageError{fmt.Sprintf("--nm-per-px: %g: want a positive pixel size in nm, at most 1e4", *nm)}
	}
	m := &match.Micrograph{Name: *mic, Raster: match.FromFloat32(img.Width, img.Height, img.Pix, px), GAngleDeg: *angle, Kind: k}
	fr, err := match.Fit(ctx, sc, filepath.Dir(path), m, match.FitOptions{Defect: *defect, BlurNm: *blur,
		Progress: func(msg string) { fmt.Fprintln(stderr, msg) }})
	if err != nil {
		return err
	}
	if *asJSON {
		return json.NewEncoder(stdout).Encode(map[string]any{
			"thickness_nm": round4(fr.ThicknessNm.Value), "thickness_nm_error": finitePtr(round4(fr.ThicknessNm.Error)),
			"s_per_nm": round4(fr.SPerNm.Value), "s_per_nm_error": finitePtr(round4(fr.SPerNm.Error)),
			"at_nm":       []float64{round4(fr.AtNm[0].Value), round4(fr.AtNm[1].Value), round4(fr.AtNm[2].Value)},
			"at_nm_error": []*float64{finitePtr(round4(fr.AtNm[0].Error)), finitePtr(round4(fr.AtNm[1].Error)), finitePtr(round4(fr.AtNm[2].Error))},
			"score":       round4(fr.Score), "renders": fr.Renders, "replays": fr.Replays, "error_method": fr.ErrorMethod,
		})
	}
	fmt.Fprintf(stdout, "thickness_nm  %.2f ± %.2f\n", fr.ThicknessNm.Value, fr.ThicknessNm.Error)
	fmt.Fprintf(stdout, "s_per_nm      %.4f ± %.4f\n", fr.SPerNm.Value, fr.SPerNm.Error)
	fmt.Fprintf(stdout, "at_nm         [%.1f ± %.1f, %.1f ± %.1f, %.1f ± %.1f]\n", fr.AtNm[0].Value, fr.AtNm[0].Error, fr.AtNm[1].Value, fr.AtNm[1].Error, fr.AtNm[2].Value, fr.AtNm[2].Error)
	fmt.Fprintf(stdout, "score         %.4f (%d renders, %d replays of field samples; errors from the %s)\n", fr.Score, fr.Renders, fr.Replays, fr.ErrorMethod)
	return nil
}
