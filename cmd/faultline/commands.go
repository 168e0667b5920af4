package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

func cmdRender(ctx context.Context, args []string, stderr io.Writer) error {
	fs := flag.NewFlagSet("render", flag.ContinueOnError)
	out := fs.String("o", "", "output directory")
	set := setFlag(fs)
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"render: give the output directory with -o DIR"}
	}
	st, data, err := load(path, *set...)
	if err != nil {
		return err
	}
	start := time.Now()
	im, err := export.Render(ctx, st, sim.Options{Progress: progress(stderr, "render")})
	if err != nil {
		return err
	}
	if err := export.WriteAll(*out, st, im, data, export.DefaultOptions()); err != nil {
		return fmt.Errorf("-o %s: %w", *out, err)
	}
	// Notes (defaults applied, values derived) only once all went well, so
	// a failure is the one line on stderr.
	for _, n := range st.Notes {
		fmt.Fprintln(stderr, "note: "+n)
	}
	if isTerminal(stderr) {
		g := st.Problem.Grid
		fmt.Fprintf(stderr, "\rrendered %d×%d columns in %.2f s into %s\n", g.NX, g.NY, time.Since(start).Seconds(), *out)
	}
	return nil
}

func cmdProfile(ctx context.Context, args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("profile", flag.ContinueOnError)
	y := fs.Float64("y-nm", 0, "y of the row, nm (0: the centre)")
	set := setFlag(fs)
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	st, _, err := load(path, *set...)
	if err != nil {
		return err
	}
	g := st.Problem.Grid
	j, err := export.Row(g, *y)
	if err != nil {
		return usageError{"--y-nm: " + err.Error()}
	}
	if b := st.Scene.Image.BlurNm; b != nil && *b > 0 {
		// The blur needs the neighbouring rows: render the whole image.
		im, err := export.Render(ctx, st, sim.Options{})
		if err != nil {
			return err
		}
		return export.WriteProfile(stdout, im, *y)
	}
	// Only the one row is needed.
	im, err := sim.RenderRows(ctx, st.Problem, j, j+1, sim.Options{})
	if err != nil {
		return err
	}
	return export.WriteProfile(stdout, im, *y)
}

func cmdReflections(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("reflections", flag.ContinueOnError)
	asJSON := fs.Bool("json", false, "write JSON")
	path, err := parse(fs, args)
	if err != nil {
		return err
	}
	st, _, err := load(path)
	if err != nil {
		return err
	}
	refl, err := st.Reflections(scene.ZoneLimitFactor)
	if err != nil {
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(struct {
			WavelengthNm float64            `json:"wavelength_nm"`
			VoltageKV    float64            `json:"voltage_kv"`
			Reflections  []scene.Reflection `json:"reflections"`
		}{st.WavelengthNm, st.VoltageKV, refl})
	}
	fmt.Fprintf(stdout, "%s at %g kV, λ = %.5f nm, beam [%s]\n", st.Crystal.Name, st.VoltageKV, st.WavelengthNm, export.Indices(st.Scene.Diffraction.Beam))
	fmt.Fprintf(stdout, "%-14s %9s %12s %10s %9s\n", "hkl", "d_nm", "ξ_g (nm)", "s (/nm)", "w")
	for i, r := range refl {
		mark := ""
		if i == 0 {
			mark = "  <- g of the scene"
		}
		if r.Forbidden {
			fmt.Fprintf(stdout, "%-14s %9.4f %12s %10.4f %9s%s\n", export.Indices(r.HKL), r.DNm, "forbidden", r.SPerNm, "-", mark)
			continue
		}
		fmt.Fprintf(stdout, "%-14s %9.4f %12.2f %10.4f %9.2f%s\n", export.Indices(r.HKL), r.DNm, *r.ExtinctionNm, r.SPerNm, *r.W, mark)
	}
	return nil
}

// progress returns a progress callback: on a terminal it redraws one
// status line; otherwise, once the work has run for two seconds, it writes
// a line at every tenth, so long work shows it is moving without filling
// logs for short work.
func progress(w io.Writer, what string) func(done, total int) {
	start := time.Now()
	tty := isTerminal(w)
	last := -1
	return func(done, total int) {
		pct := 100 * done / total
		switch {
		case tty && pct != last:
			fmt.Fprintf(w, "\r%s: %3d%%", what, pct)
		case !tty && pct/10 != last/10 && time.Since(start) > 2*time.Second:
			fmt.Fprintf(w, "%s: %d%%\n", what, pct/10*10)
		default:
			return
		}
		last = pct
	}
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}
