package export

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"image"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"

	"faultline/crystal"
	"faultline/figure"
	"faultline/internal/atomicfile"
	"faultline/scene"
	"faultline/sim"
)

// Render simulates the setup's problem, applying the scene's blur. A blur
// outside its range is refused before the render starts.
func Render(ctx context.Context, st *scene.Setup, opt sim.Options) (*sim.Image, error) {
	return withBlur(st, func() (*sim.Image, error) { return sim.Render(ctx, st.Problem, opt) })
}

// withBlur runs render, refusing the scene's blur before it starts when
// the blur is outside its range, and applies the blur to its image.
func withBlur(st *scene.Setup, render func() (*sim.Image, error)) (*sim.Image, error) {
	b := st.Scene.Image.BlurNm
	if b != nil {
		if err := sim.CheckBlur(*b, st.Problem.Grid); err != nil {
			return nil, &scene.FieldError{Path: "image.blur_nm", Msg: err.Error()}
		}
	}
	im, err := render()
	if err != nil {
		return nil, err
	}
	if b != nil {
		if err := sim.Blur(im, *b); err != nil {
			return nil, &scene.FieldError{Path: "image.blur_nm", Msg: err.Error()}
		}
	}
	return im, nil
}

// Record is Render that also keeps the field samples of every column for
// Replay (see sim.Record), reaching thickness maxThicknessNm and serving
// the further models also. The samples are nil when they would exceed
// sim.DefaultSamplesBytes.
func Record(ctx context.Context, st *scene.Setup, opt sim.Options, maxThicknessNm float64, also []sim.Model) (*sim.Image, *sim.Samples, error) {
	var s *sim.Samples
	im, err := withBlur(st, func() (*sim.Image, error) {
		im, rec, err := sim.Record(ctx, st.Problem, sim.RecordOptions{Options: opt, MaxThicknessNm: maxThicknessNm, Also: also})
		s = rec
		return im, err
	})
	if err != nil {
		return nil, nil, err
	}
	return im, s, nil
}

// nearbyDeviation is the change of s (1/nm) either way that the samples
// recorded by Record for the window should serve without fresh columns.
const nearbyDeviation = 0.01

// NearbyModels returns the setup's model with s shifted by ±0.01 /nm, for
// Record: slabs that also serve those models let a replay at any s between
// them reuse every column. Models of other types give none (a replay then
// integrates afresh only the columns whose slabs fail with the new s).
func NearbyModels(st *scene.Setup) []sim.Model {
	s, model, ok := SModel(st)
	if !ok {
		return nil
	}
	return []sim.Model{model(s - nearbyDeviation), model(s + nearbyDeviation)}
}

// Replay renders the setup's problem from recorded samples (which must
// serve it, see sim.Samples.Serves), applying the scene's blur: the same
// image as Render within 1e-4 of the incident beam, without evaluating
// the displacement field.
func Replay(ctx context.Context, s *sim.Samples, st *scene.Setup, opt sim.Options) (*sim.Image, error) {
	if !s.Serves(st.Problem) {
		return nil, fmt.Errorf("replay: the samples do not serve this setup (%w)", sim.ErrReplayRange)
	}
	return replay(ctx, s, st, opt)
}

// ReplaySameGeometry is Replay for a setup built by another scene.Builder
// from a scene whose crystal, g, beam, frame, defects and image grid are
// those the samples were recorded with (its field is an equal value, not
// the same one; see sim.Samples.ServesGeometry). The caller vouches for
// that; the rest is checked.
func ReplaySameGeometry(ctx context.Context, s *sim.Samples, st *scene.Setup, opt sim.Options) (*sim.Image, error) {
	if !s.ServesGeometry(st.Problem) {
		return nil, fmt.Errorf("replay: the samples do not serve this setup (%w)", sim.ErrReplayRange)
	}
	return replay(ctx, s, st, opt)
}

func replay(ctx context.Context, s *sim.Samples, st *scene.Setup, opt sim.Options) (*sim.Image, error) {
	return withBlur(st, func() (*sim.Image, error) {
		im, _, err := s.Replay(ctx, st.Problem.Model, st.Problem.ThicknessNm, opt)
		return im, err
	})
}

// SModel returns the setup's excitation error s (1/nm) and the setup's
// model at any other s, every other constant kept, for an s table
// (sim.TabulateS); ok is false for a model not tabulated in s (the
// systematic row, whose recorded slabs NearbyModels does not widen).
func SModel(st *scene.Setup) (s float64, model func(s float64) sim.Model, ok bool) {
	switch m := st.Problem.Model.(type) {
	case sim.TwoBeam:
		return m.SPerNm, func(s float64) sim.Model { q := m; q.SPerNm = s; return q }, true
	case sim.Kinematical:
		return m.SPerNm, func(s float64) sim.Model { q := m; q.SPerNm = s; return q }, true
	}
	return 0, nil, false
}

// NearbyRange returns the range of s that samples recorded for st with
// NearbyModels(st) serve with every recorded slab: s ± 0.01 /nm.
func NearbyRange(st *scene.Setup) (lo, hi float64, ok bool) {
	s, _, ok := SModel(st)
	if !ok {
		return 0, 0, false
	}
	return s - nearbyDeviation, s + nearbyDeviation, true
}

// TabulateS builds the table of the setup's exit intensities over s in
// [lo, hi] at the setup's thickness from samples that serve the setup
// (sim.TabulateS; the scene's blur is applied by FromTable).
func TabulateS(ctx context.Context, smp *sim.Samples, st *scene.Setup, lo, hi float64, opt sim.STableOptions) (*sim.STable, error) {
	if smp == nil || !smp.Serves(st.Problem) {
		return nil, fmt.Errorf("s table: the samples do not serve this setup (%w)", sim.ErrReplayRange)
	}
	_, model, ok := SModel(st)
	if !ok {
		return nil, fmt.Errorf("s table: the %s model is not tabulated in s", st.Problem.Model.Name())
	}
	return sim.TabulateS(ctx, smp, model, lo, hi, st.Problem.ThicknessNm, opt)
}

// SOnly reports whether setup b differs from a in s alone, as far as the
// render goes: the same field, g, foil normal, grid, tolerance and
// thickness, and a's model at b's s is b's model.
func SOnly(a, b *scene.Setup) bool {
	_, ma, oka := SModel(a)
	sb, _, okb := SModel(b)
	return oka && okb && sim.SameBesidesModel(a.Problem, b.Problem) && reflect.DeepEqual(ma(sb), b.Problem.Model)
}

// TableServes reports whether FromTable renders the setup from t: only s
// differs from the table's conditions, and it lies in the table's range.
func TableServes(t *sim.STable, st *scene.Setup) bool {
	s, _, ok := SModel(st)
	return ok && t.Serves(st.Problem, s)
}

// FromTable renders the setup's problem from an s table that serves it
// (see TableServes), applying the scene's blur.
func FromTable(ctx context.Context, t *sim.STable, st *scene.Setup, opt sim.Options) (*sim.Image, error) {
	s, _, ok := SModel(st)
	if !ok || !t.Serves(st.Problem, s) {
		return nil, fmt.Errorf("s table: the table does not serve this setup (%w)", sim.ErrSTableRange)
	}
	return withBlur(st, func() (*sim.Image, error) { return t.Image(ctx, s, opt) })
}

// Indices formats indices as the trade writes them: "2 0 0", "1 -1 0"
// (crystal.FormatIndices, for the packages that do not import crystal).
func Indices(v []float64) string { return crystal.FormatIndices(v) }

// Caption returns the conditions of a render in the words of a figure
// caption: g, B, the deviation, thickness, voltage and model, so a reader
// can reproduce the image.
func Caption(st *scene.Setup) figure.Caption {
	sc := st.Scene
	d := sc.Diffraction
	dev := fmt.Sprintf("s = %.4f /nm (w = %.2f)", st.SPerNm, st.W)
	if d.WeakBeam != nil {
		dev = fmt.Sprintf("g(%sg): s = %.4f /nm (w = %.2f)", Indices([]float64{d.WeakBeam.N}), st.SPerNm, st.W)
	}
	xi := fmt.Sprintf("ξg = %.1f nm", st.XiGNm)
	if !st.XiGComputed {
		xi += " (given)"
	}
	material := sc.Crystal.Material
	if material == "" {
		material = st.Crystal.Name
	}
	model := st.Model
	switch st.Model {
	case "two-beam":
		model = fmt.Sprintf("two-beam, ξg/ξ'g = %g", st.Absorption)
	case "systematic-row":
		model = fmt.Sprintf("systematic row, %d beams, ξg/ξ'g = %g", len(st.Row), st.Absorption)
	}
	if st.TiltOffZoneDeg != 0 {
		model += fmt.Sprintf(", %g° off the zone about g", st.TiltOffZoneDeg)
	}
	lines := []string{
		fmt.Sprintf("%s   B = [%s]   %s   t = %g nm   %g kV", material, Indices(d.Beam), dev, st.Problem.ThicknessNm, st.VoltageKV),
		fmt.Sprintf("%s   %s", xi, model),
	}
	if def := defectsLine(sc.Defects); def != "" {
		lines = append(lines, def)
	}
	return figure.Caption{G: "g = " + Indices(d.G), Lines: lines}
}

// captionDefects is the number of defects a caption lists by name.
const captionDefects = 6

// defectsLine lists the scene's defects for a caption, each as its list
// line in the window (type, b, line or normal, position with its depth):
// "defects: 1 dislocation  b 1/2[1 1 0]  line [1 1 1]  at_nm (0, 0, 60) nm;
// 2 …". Past captionDefects it counts the rest.
func defectsLine(ds []scene.Defect) string {
	if len(ds) == 0 {
		return ""
	}
	var parts []string
	for i := range ds {
		if i == captionDefects {
			parts = append(parts, fmt.Sprintf("and %d more", len(ds)-i))
			break
		}
		parts = append(parts, fmt.Sprintf("%d %s", i+1, ds[i].Summary()))
	}
	return "defects: " + strings.Join(parts, "; ")
}

// Panels of a figure.
const (
	PanelsPair = ""   // bright field and dark field side by side
	PanelsBF   = "bf" // bright field only
	PanelsDF   = "df" // dark field only
)

// Options choose the look of exported images.
type Options struct {
	// Mapping is the grey scale of bf.png and df.png.
	Mapping figure.Mapping
	// FigureMapping is the grey scale of the panels of the figure.
	FigureMapping figure.Mapping
	// Panels is PanelsPair (the default), PanelsBF or PanelsDF.
	Panels string
	// Scale is the integer upscaling of figure pixels (0: automatic).
	Scale int
	// Caption draws the conditions under the figure.
	Caption bool
	// Readings adds to the caption the reading of every defect under the
	// figure's g and s (scene.Setup.Readings): the long caption.
	Readings bool
	// AllBeams also writes every other beam's intensity as a float TIFF,
	// beam_N.tiff for the beam N·g (beam_-1.tiff, beam_2.tiff, …); the
	// transmitted beam and g are bf.tiff and df.tiff.
	AllBeams bool
	// MRC also writes bf.mrc and df.mrc.
	MRC bool
	// Print, when set, makes figure.png the figure at a physical size
	// (PaperFigure), and FigureFormat pdf or svg adds figure.pdf or
	// figure.svg drawn the same way.
	Print        *figure.Print
	FigureFormat string
}

// captionLines returns the caption of a figure: the conditions, and with
// o.Readings the reading of every defect.
func captionLines(st *scene.Setup, o Options) figure.Caption {
	c := Caption(st)
	if o.Readings {
		c.Lines = append(c.Lines, st.ReadingLines()...)
	}
	return c
}

// DefaultOptions are those of `faultline render`: bf.png and df.png use
// the fixed mapping (grey level 255·I, white = the incident beam), so grey
// levels are intensities and two renders compare by eye; the figure
// stretches each panel's range over the grey scale, clipping 0.5 % of the
// pixels at each end (figure.Mapping "auto"), which is how contrast is shown
// in a paper; the caption says so.
func DefaultOptions() Options {
	return Options{FigureMapping: figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5}, Caption: true}
}

// Figure builds the labelled bright-field/dark-field pair, or one of them
// as o.Panels asks; the window and the command line both draw their
// figures here. Images too
// large for a figure are shown reduced by a box average, and the caption
// says so; images of a shape no figure can show are an error (see
// CheckFigure).
func Figure(st *scene.Setup, im *sim.Image, o Options) (*image.RGBA, error) {
	plan, err := planFigure(st, im.Grid, o)
	if err != nil {
		return nil, err
	}
	var single string
	switch o.Panels {
	case PanelsPair:
	case PanelsBF:
		single = "BF"
	case PanelsDF:
		single = "DF"
	default:
		return nil, fmt.Errorf("export: Options.Panels: unknown %q (want %q, %q or %q)", o.Panels, PanelsPair, PanelsBF, PanelsDF)
	}
	bf, df, err := Grays(im, o.FigureMapping)
	if err != nil {
		return nil, err
	}
	px, err := figure.PixelSizeNm(im.Grid)
	if err != nil {
		return nil, err
	}
	c := captionLines(st, o)
	beams, labels := []int{0, 1}, []string{"BF", "DF"}
	switch single {
	case "BF":
		beams, labels = beams[:1], labels[:1]
	case "DF":
		beams, labels = beams[1:], labels[1:]
	}
	c.Lines = append(c.Lines, GreyNote(im, o.FigureMapping, beams, labels))
	if plan.down > 1 {
		c.Lines = append(c.Lines, fmt.Sprintf("panels reduced %d× (box average); bf.tiff and df.tiff hold every pixel", plan.down))
		bf, df = reduce(bf, plan.down), reduce(df, plan.down)
		px *= float64(plan.down)
	}
	l := figure.Layout{NmPerPx: px, GAngleDeg: st.GAngleDeg, Scale: plan.scale, Caption: o.Caption}
	switch single {
	case "BF":
		return figure.Single(bf, single, c, l)
	case "DF":
		return figure.Single(df, single, c, l)
	}
	return figure.Pair(bf, df, c, l)
}

// MappingNote says in words how grey levels relate to intensity.
func MappingNote(m figure.Mapping) string {
	inv := ""
	if m.Invert {
		inv = ", inverted"
	}
	if m.Mode == figure.ModeAuto {
		if m.ClipPercent > 0 {
			return fmt.Sprintf("grey: each panel stretched to its range, %g %% clipped at each end%s", m.ClipPercent, inv)
		}
		return "grey: each panel stretched to its range" + inv
	}
	max := m.Max
	if max == 0 {
		max = 1
	}
	return fmt.Sprintf("grey: linear in intensity, white = %g of the incident beam%s", max, inv)
}

// Grays maps both beams to grey. In auto mode the dark field gets its own
// range; in fixed mode both share the scale of the incident beam.
func Grays(im *sim.Image, m figure.Mapping) (bf, df *image.Gray, err error) {
	if bf, err = figure.BeamGray(im, 0, m); err != nil {
		return nil, nil, err
	}
	if df, err = figure.BeamGray(im, 1, m); err != nil {
		return nil, nil, err
	}
	return bf, df, nil
}

// TextKeys are the PNG text chunks written with every image.
const (
	KeyScene    = "faultline-scene"
	KeySoftware = "Software"
)

// The files of a render, named the same by the window and the command
// line.
const (
	FileBFPNG  = "bf.png"
	FileDFPNG  = "df.png"
	FileFigure = "figure.png"
	FileBFTIFF = "bf.tiff"
	FileDFTIFF = "df.tiff"
)

// WriteAll writes bf.png, df.png, figure.png, bf.tiff and df.tiff (and,
// with o.MRC, bf.mrc and df.mrc; with o.Print, the print figure) into dir
// (created with its missing parents). sceneJSON is stored in a text chunk
// of every PNG and in the TIFFs' description so the image carries what
// made it. Everything is encoded
// before the first file is touched, and the files are written as one set
// (atomicfile.WriteSet): a failure, or a cancelled ctx, leaves the
// directory as it was. A failure to write is an *atomicfile.Error naming
// the directory or file.
//
// Once the set is written, the files an earlier render may have left in
// dir under other options (beam_N.tiff, bf.mrc and df.mrc, figure.pdf and
// figure.svg) that this one did not write are removed, so the directory
// never mixes two renders; their names are returned.
func WriteAll(ctx context.Context, dir string, st *scene.Setup, im *sim.Image, sceneJSON []byte, o Options) ([]string, error) {
	files, err := renderFiles(st, im, sceneJSON, o)
	if err != nil {
		return nil, err
	}
	if err := atomicfile.WriteSet(ctx, dir, files); err != nil {
		return nil, err
	}
	return removeStale(dir, files)
}

// removeStale removes from dir the outputs of a render (see WriteAll)
// that are not among files, and returns their names.
func removeStale(dir string, files []atomicfile.File) ([]string, error) {
	written := map[string]bool{}
	for _, f := range files {
		written[f.Name] = true
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var removed []string
	for _, e := range entries {
		name := e.Name()
		if written[name] || !e.Type().IsRegular() || !renderOutput(name) {
			continue
		}
		if err := os.Remove(filepath.Join(dir, name)); err != nil {
			return removed, fmt.Errorf("removing %s of an earlier render: %w", name, err)
		}
		removed = append(removed, name)
	}
	return removed, nil
}

// renderOutput reports whether name is a file WriteAll writes under some
// options.
func renderOutput(name string) bool {
	switch name {
	case "bf.mrc", "df.mrc", "figure." + figure.PaperPDF, "figure." + figure.PaperSVG:
		return true
	}
	n, ok := strings.CutPrefix(name, "beam_")
	if !ok {
		return false
	}
	n, ok = strings.CutSuffix(n, ".tiff")
	if !ok {
		return false
	}
	_, err := strconv.Atoi(n)
	return err == nil
}

// renderFiles encodes every file of WriteAll.
func renderFiles(st *scene.Setup, im *sim.Image, sceneJSON []byte, o Options) ([]atomicfile.File, error) {
	text := map[string]string{KeyScene: string(sceneJSON), KeySoftware: "Faultline"}
	bf, df, err := Grays(im, o.Mapping)
	if err != nil {
		return nil, err
	}
	tiffs, err := BeamTIFFs(im, sceneJSON)
	if err != nil {
		return nil, err
	}
	files := []atomicfile.File{
		{Name: FileBFPNG, Encode: func(w io.Writer) error { return figure.EncodePNG(w, bf, text) }},
		{Name: FileDFPNG, Encode: func(w io.Writer) error { return figure.EncodePNG(w, df, text) }},
		{Name: FileBFTIFF, Encode: tiffs[0]},
		{Name: FileDFTIFF, Encode: tiffs[1]},
	}
	if o.Print == nil {
		fig, err := Figure(st, im, o)
		if err != nil {
			return nil, err
		}
		files = append(files, atomicfile.File{Name: FileFigure, Encode: func(w io.Writer) error { return figure.EncodePNG(w, fig, text) }})
	} else {
		// The print figure in PNG and, if asked, in a vector format,
		// drawn before any file is touched.
		formats := []string{figure.PaperPNG}
		if o.FigureFormat != "" && o.FigureFormat != figure.PaperPNG {
			formats = append(formats, o.FigureFormat)
		}
		for _, f := range formats {
			var buf bytes.Buffer
			if err := PaperFigure(&buf, f, st, im, o, *o.Print, text); err != nil {
				return nil, err
			}
			b := buf.Bytes()
			files = append(files, atomicfile.File{Name: "figure." + f, Encode: func(w io.Writer) error { _, err := w.Write(b); return err }})
		}
	}
	if o.AllBeams {
		g := im.Grid
		px, err := figure.PixelSizeNm(g)
		if err != nil {
			return nil, err
		}
		meta := figure.TIFFMeta{NmPerPx: px, Scene: string(sceneJSON)}
		for k, n := range im.Beams {
			if n == 0 || n == 1 {
				continue
			}
			plane := im.Intensity[k]
			files = append(files, atomicfile.File{Name: fmt.Sprintf("beam_%d.tiff", n),
				Encode: func(w io.Writer) error { return figure.EncodeCalibratedTIFF(w, plane, g.NX, g.NY, meta) }})
		}
	}
	if o.MRC {
		mrcs, err := BeamMRCs(im)
		if err != nil {
			return nil, err
		}
		files = append(files, atomicfile.File{Name: "bf.mrc", Encode: mrcs[0]}, atomicfile.File{Name: "df.mrc", Encode: mrcs[1]})
	}
	return files, nil
}

// TIFFNames are the paths WriteTIFFs writes in dir.
func TIFFNames(dir string) []string {
	return []string{filepath.Join(dir, FileBFTIFF), filepath.Join(dir, FileDFTIFF)}
}

// WriteTIFFs writes the bright and dark field into dir as calibrated
// 32-bit float TIFFs (BeamTIFFs: fractions of the incident beam, the pixel
// size and the scene sceneJSON, nil for none), under the names the command
// line gives them (bf.tiff, df.tiff), as one set like WriteAll, and
// returns their paths.
func WriteTIFFs(dir string, im *sim.Image, sceneJSON []byte) ([]string, error) {
	if im.BF() == nil || im.DF() == nil {
		return nil, fmt.Errorf("export: beams %v hold no bright and dark field", im.Beams)
	}
	tiffs, err := BeamTIFFs(im, sceneJSON)
	if err != nil {
		return nil, err
	}
	files := []atomicfile.File{{Name: FileBFTIFF, Encode: tiffs[0]}, {Name: FileDFTIFF, Encode: tiffs[1]}}
	if err := atomicfile.WriteSet(context.Background(), dir, files); err != nil {
		return nil, err
	}
	return TIFFNames(dir), nil
}

// Row returns the index of the pixel row whose centre is nearest y (nm).
func Row(g sim.Grid, yNm float64) (int, error) {
	_, fj := g.Index(0, yNm)
	j := int(math.Floor(fj + 0.5))
	if yNm < -g.HeightNm/2 || yNm > g.HeightNm/2 || math.IsNaN(yNm) {
		return 0, fmt.Errorf("y = %g nm is outside the image (%g nm high, centred on 0)", yNm, g.HeightNm)
	}
	if j >= g.NY {
		j = g.NY - 1
	}
	if j < 0 {
		j = 0
	}
	return j, nil
}

// WriteProfile writes the row of pixels nearest y as CSV: header
// x_nm,bf,df, one line per pixel column.
func WriteProfile(w io.Writer, im *sim.Image, yNm float64) error {
	g := im.Grid
	j, err := Row(g, yNm)
	if err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintln(bw, "x_nm,bf,df")
	bf, df := im.BF(), im.DF()
	for i := 0; i < g.NX; i++ {
		fmt.Fprintf(bw, "%.6g,%.8g,%.8g\n", g.X(i), bf[j*g.NX+i], df[j*g.NX+i])
	}
	return bw.Flush()
}
