package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"faultline/export"
	"faultline/figure"
	"faultline/internal/atomicfile"
	"faultline/scene"
	"faultline/sim"
)

// errHelp is returned after a command's --help has printed its usage.
var errHelp = errors.New("help shown")

// command usages, printed by COMMAND --help (on stdout, exit 0).
var commandUsage = map[string]string{
	"render": `usage: faultline render SCENE -o DIR [--caption short|long] [--grey fixed|stretch] [--clip PERCENT] [--tolerance CYCLES] [--all-beams]

Simulates SCENE and writes into DIR (created with its missing parents):
bf.png, df.png (8-bit, grey = 255·I), figure.png (the labelled pair),
bf.tiff, df.tiff (32-bit float, fraction of the incident beam; df is the g
beam for every model; the pixel size in nm in the resolution tags and an
ImageJ-style description, the scene in the description). The files are
written as one set: a failure leaves DIR as it was.

On stderr, after any notes, one "reading:" line per defect: what a
microscopist would read from its image under the scene's g and s (fault
kind and outer fringes, side of a dislocation's image, a loop's nature and
inside–outside contrast, a precipitate's misfit sign).

  -o DIR   the output directory (required)
  --caption short|long  short (default): the conditions under the figure;
           long: also the reading of every defect
  --all-beams  also write beam_N.tiff for every other beam N·g of the
               model (beam_-1.tiff, beam_2.tiff, …)
  --grey fixed|stretch  grey scale of figure.png: stretch (default) maps
           each panel's range to black..white and the caption states the
           range; a panel whose range is below 0.001 of the incident beam
           has no contrast and is drawn flat, and the caption says so;
           fixed: grey = 255·I, white = the incident beam
  --clip PERCENT  with stretch, the percentage of pixels clipped at each
           end of the range (default 0.5, from 0 up to but not including 50)
  --format mrc  also write bf.mrc, df.mrc (MRC 2014, voxel size set)
  --figure-width-mm W, --dpi D
           figure.png for print: W mm wide at D dots per inch (default
           85 mm, one journal column, at 600 dpi), resolution stored
  --figure-format pdf|svg
           also figure.pdf or figure.svg at that width: labels, scale bar,
           g arrow and conditions as vectors around the images
  --set PATH=VALUE  override a field of the scene (JSON value; repeatable)
  --tolerance CYCLES  step-control tolerance of the column integrator, in
           cycles of g·R (default 5e-05: every pixel within 1e-4 of the
           incident beam of a converged render; smaller is slower and
           closer to converged, at most 0.01)
`,
	"profile": `usage: faultline profile SCENE [--y-nm Y]
       faultline profile SCENE --from X,Y --to X,Y

CSV on stdout. With --y-nm (default 0, the centre): header x_nm,bf,df, one
row per pixel column of the pixel row nearest y = Y nm. With --from and
--to (nm in the image frame): header distance_nm,x_nm,y_nm,bf,df, about two
samples per pixel along the line, interpolated between pixel centres.

  --y-nm Y        y of the row, nm
  --from X,Y      start of the line, nm
  --to X,Y        end of the line, nm
  --set PATH=VALUE  override a field of the scene (JSON value; repeatable)
`,
	"inspect": `usage: faultline inspect IMG[#N] [--json]

What a micrograph file holds: format, size, pixel size in nm and where it
was found, the range of its values, and what the file records of the
acquisition (voltage, magnification or camera length, date, the image of
a stack). Reads PNG, JPEG, TIFF (8/16-bit, 32-bit float), DM3, DM4 and
MRC 2014; #N after the name picks image N of a stack, counted from 0.

  --json   write JSON: width, height, nm_per_px, format, kind, metadata, ...
`,
	"reflections": `usage: faultline reflections SCENE [--json]

The scene's g, then the reflections of the zone of the beam direction up
to 3|g|: hkl, d_nm, ξ_g, s and w in the scene's orientation. Needs the
crystal and the diffraction conditions only (not the defects).

  --json   write JSON (fields described in the README)
  --set PATH=VALUE  override a field of the scene (JSON value; repeatable)
`,
}

// maxTolerance is the loosest step-control tolerance render accepts, in
// cycles: ten times the window's preview tolerance, whose error is measured.
const maxTolerance = 0.01

func newFlags(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return fs
}

func cmdRender(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("render")
	out := fs.String("o", "", "output directory")
	caption := fs.String("caption", "short", "figure caption: short (the conditions) or long (also the reading of every defect)")
	allBeams := fs.Bool("all-beams", false, "also write beam_N.tiff for every other beam N·g of the model")
	format := fs.String("format", "", "extra raw image format: mrc")
	widthMm := fs.Float64("figure-width-mm", 0, "figure.png at this printed width, mm")
	dpi := fs.Float64("dpi", 0, "figure.png resolution, dots per inch")
	figFormat := fs.String("figure-format", "", "also figure.pdf or figure.svg: pdf or svg")
	set := setFlag(fs)
	tol := fs.Float64("tolerance", sim.DefaultTolerance, "step-control tolerance, cycles")
	grey := fs.String("grey", "stretch", "grey scale of figure.png: fixed or stretch")
	clip := fs.Float64("clip", 0.5, "percentage of pixels clipped at each end with --grey stretch")
	path, err := parse(fs, args, stdout)
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"render: give the output directory with -o DIR"}
	}
	if *caption != "short" && *caption != "long" {
		return usageError{fmt.Sprintf("render: --caption %q: use short or long", *caption)}
	}
	given := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { given[f.Name] = true })
	if *grey != "fixed" && *grey != "stretch" {
		return usageError{fmt.Sprintf("render: --grey %q: use fixed or stretch", *grey)}
	}
	if !(*clip >= 0 && *clip < 50) {
		return usageError{fmt.Sprintf("render: --clip %g: must be a percentage from 0 up to but not including 50", *clip)}
	}
	if *grey == "fixed" && given["clip"] {
		return usageError{"render: --clip applies to --grey stretch only"}
	}
	if !(*tol > 0 && *tol <= maxTolerance) {
		return usageError{fmt.Sprintf("render: --tolerance %g: must be positive and at most %g cycles", *tol, maxTolerance)}
	}
	o := export.DefaultOptions()
	switch *format {
	case "":
	case "mrc":
		o.MRC = true
	default:
		return usageError{fmt.Sprintf("--format %s: the formats are mrc (bf.mrc, df.mrc beside the TIFFs)", *format)}
	}
	if err := printOptions(fs, &o, *widthMm, *dpi, *figFormat); err != nil {
		return err
	}
	st, data, err := load(path, true, *set...)
	if err != nil {
		return err
	}
	st.Problem.Tolerance = *tol
	o.Readings = *caption == "long"
	o.AllBeams = *allBeams
	o.FigureMapping = figure.Mapping{Mode: figure.ModeAuto, ClipPercent: *clip}
	if *grey == "fixed" {
		o.FigureMapping = figure.Mapping{Mode: figure.ModeFixed}
	}
	// A figure that cannot be drawn is refused before the render.
	if err := export.CheckFigure(st, o); err != nil {
		return err
	}
	// After the scene and the figure (bad input leaves no directory behind), before
	// the render (a bad -o fails at once).
	if err := checkOutputDir(*out); err != nil {
		return err
	}
	start := time.Now()
	p := newProgress(stderr, "render")
	im, err := export.Render(ctx, st, sim.Options{Progress: p.update})
	p.finish()
	if err != nil {
		return err
	}
	removed, err := export.WriteAll(ctx, *out, st, im, data, o)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return err
		}
		return outputError{*out, err}
	}
	// Notes (defaults applied, values derived) only once all went well, so
	// a failure is the one line on stderr.
	printNotes(stderr, st)
	if len(removed) > 0 {
		fmt.Fprintf(stderr, "note: removed %s, left in %s by an earlier render with other options\n", strings.Join(removed, ", "), *out)
	}
	// What a microscopist would read from each defect's image.
	for _, r := range st.ReadingLines() {
		fmt.Fprintln(stderr, "reading: "+r)
	}
	if isTerminal(stderr) {
		g := st.Problem.Grid
		fmt.Fprintf(stderr, "rendered %d×%d columns in %.2f s into %s\n", g.NX, g.NY, time.Since(start).Seconds(), *out)
	}
	return nil
}

// printNotes writes the scene's notes (defaults applied, values derived)
// and warnings (conditions to reconsider) to w, one a line.
func printNotes(w io.Writer, st *scene.Setup) {
	for _, n := range st.Notes {
		fmt.Fprintln(w, "note: "+n)
	}
	for _, n := range st.Warnings {
		fmt.Fprintln(w, "warning: "+n)
	}
}

// checkOutputDir refuses, before any work, an -o that cannot take the
// files: an existing file or device, a path under one, a directory that
// cannot be created or written. It creates the directory (and its missing
// parents) and probes it with a temporary file; a full disk shows only
// when the files are written.
func checkOutputDir(dir string) error {
	if err := atomicfile.Probe(dir); err != nil {
		return outputError{dir, err}
	}
	return nil
}

func cmdProfile(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("profile")
	y := fs.Float64("y-nm", 0, "y of the row, nm (0: the centre)")
	from := fs.String("from", "", "start of a line, X,Y nm")
	to := fs.String("to", "", "end of a line, X,Y nm")
	set := setFlag(fs)
	path, err := parse(fs, args, stdout)
	if err != nil {
		return err
	}
	given := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { given[f.Name] = true })
	line := given["from"] || given["to"]
	if line && given["y-nm"] {
		return usageError{"profile: give --y-nm, or --from and --to, not both"}
	}
	if line && !(given["from"] && given["to"]) {
		return usageError{"profile: a line needs both --from X,Y and --to X,Y"}
	}
	if !finite(*y) {
		return usageError{"--y-nm: must be a finite number"}
	}
	var l export.Line
	if line {
		if l.X0, l.Y0, err = point("--from", *from); err != nil {
			return err
		}
		if l.X1, l.Y1, err = point("--to", *to); err != nil {
			return err
		}
	}
	st, _, err := load(path, true, *set...)
	if err != nil {
		return err
	}
	g := st.Problem.Grid
	// Rows needed: all with a blur (it spreads across rows); else those
	// the row or line touches (and their neighbours, for interpolation).
	j0, j1 := 0, g.NY
	if b := st.Scene.Image.BlurNm; b == nil || *b == 0 {
		if line {
			if l.LengthNm() == 0 {
				return usageError{"profile: --from and --to are the same point"}
			}
			a, b := rowOf(g, math.Min(l.Y0, l.Y1)), rowOf(g, math.Max(l.Y0, l.Y1))
			j0, j1 = max(a-1, 0), min(b+2, g.NY)
		} else {
			j, err := export.Row(g, *y)
			if err != nil {
				return usageError{"--y-nm: " + err.Error()}
			}
			j0, j1 = j, j+1
		}
	}
	if line {
		if !lineMeetsField(g, l) {
			return usageError{fmt.Sprintf("profile: the line from (%g, %g) to (%g, %g) nm does not cross the field (%g × %g nm, centred on 0)", l.X0, l.Y0, l.X1, l.Y1, g.WidthNm, g.HeightNm)}
		}
	} else if _, err := export.Row(g, *y); err != nil {
		return usageError{"--y-nm: " + err.Error()}
	}
	var im *sim.Image
	p := newProgress(stderr, "profile")
	if j0 == 0 && j1 == g.NY {
		im, err = export.Render(ctx, st, sim.Options{Progress: p.update})
	} else {
		im, err = sim.RenderRows(ctx, st.Problem, j0, j1, sim.Options{Progress: p.update})
	}
	p.finish()
	if err != nil {
		return err
	}
	if line {
		return export.WriteLineProfile(stdout, export.SampleLine(im, l))
	}
	return export.WriteProfile(stdout, im, *y)
}

// rowOf is the pixel row holding y, clamped to the image.
func rowOf(g sim.Grid, y float64) int {
	j := int(math.Floor(y/(g.HeightNm/float64(g.NY)) + float64(g.NY)/2))
	return min(max(j, 0), g.NY-1)
}

// lineMeetsField reports whether some sample of the line lies in the field.
func lineMeetsField(g sim.Grid, l export.Line) bool {
	for k := 0; k <= 1000; k++ {
		t := float64(k) / 1000
		if math.Abs(l.X0+t*(l.X1-l.X0)) <= g.WidthNm/2 && math.Abs(l.Y0+t*(l.Y1-l.Y0)) <= g.HeightNm/2 {
			return true
		}
	}
	return false
}

// point reads "X,Y" in nm.
func point(flagName, s string) (x, y float64, err error) {
	a, b, ok := strings.Cut(s, ",")
	if ok {
		x, err = strconv.ParseFloat(strings.TrimSpace(a), 64)
		if err == nil {
			y, err = strconv.ParseFloat(strings.TrimSpace(b), 64)
		}
	}
	if !ok || err != nil || !finite(x) || !finite(y) || math.Abs(x) > 1e6 || math.Abs(y) > 1e6 {
		return 0, 0, usageError{fmt.Sprintf("%s: %s: want X,Y in nm, two finite numbers within ±1e6 (for example 0,-20.5)", flagName, cutQuoted(strconv.Quote(s)))}
	}
	return x, y, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func cmdReflections(args []string, stdout io.Writer) error {
	fs := newFlags("reflections")
	asJSON := fs.Bool("json", false, "write JSON")
	set := setFlag(fs)
	path, err := parse(fs, args, stdout)
	if err != nil {
		return err
	}
	st, _, err := load(path, false, *set...)
	if err != nil {
		return err
	}
	refl, err := st.Reflections(scene.ZoneLimitFactor)
	if err != nil {
		return err
	}
	if *asJSON {
		return export.WriteReflectionsJSON(stdout, st, refl)
	}
	return export.WriteReflectionsText(stdout, st, refl)
}

// parse reads one positional argument (the scene file) and the flags of fs,
// in any order. -h or --help prints the command's usage on stdout and
// returns errHelp.
func parse(fs *flag.FlagSet, args []string, stdout io.Writer) (string, error) {
	return parseArg(fs, args, stdout, "scene file")
}

// parseArg reads one positional argument (what it is: what) and the flags
// of fs, in any order, as parse does.
func parseArg(fs *flag.FlagSet, args []string, stdout io.Writer, what string) (string, error) {
	fs.SetOutput(io.Discard)
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				if u, ok := commandUsage[fs.Name()]; ok {
					fmt.Fprint(stdout, u)
				} else {
					fmt.Fprintf(stdout, "usage: faultline %s (see faultline --help)\n\n", fs.Name())
					fs.SetOutput(stdout)
					fs.PrintDefaults()
					fs.SetOutput(io.Discard)
				}
				return "", errHelp
			}
			return "", usageError{fmt.Sprintf("%s: %s (see faultline %s --help)", fs.Name(), cutQuoted(err.Error()), fs.Name())}
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	if len(pos) != 1 {
		return "", usageError{fmt.Sprintf("%s: give one %s (got %d arguments; see faultline %s --help)", fs.Name(), what, len(pos), fs.Name())}
	}
	return pos[0], nil
}

// loadScene reads a scene file and applies the --set overrides in order.
func loadScene(path string, set []scene.Edit) (*scene.Scene, error) {
	sc, err := scene.Load(path)
	if err != nil {
		return nil, err
	}
	for _, e := range set {
		if err := scene.SetJSON(sc, e.Path, string(e.Value.(json.RawMessage))); err != nil {
			return nil, fmt.Errorf("--set %w", err)
		}
	}
	return sc, nil
}

// load reads a scene file, applies the overrides in order and builds it;
// without defects, only the crystal and the conditions are built (what
// reflections needs).
func load(path string, withDefects bool, set ...scene.Edit) (*scene.Setup, []byte, error) {
	sc, err := loadScene(path, set)
	if err != nil {
		return nil, nil, err
	}
	data, err := scene.Marshal(sc)
	if err != nil {
		return nil, nil, err
	}
	if !withDefects {
		cp := *sc
		cp.Defects = nil
		sc = &cp
	}
	st, err := scene.Build(sc, filepath.Dir(path))
	if err != nil {
		return nil, nil, err
	}
	return st, data, nil
}
