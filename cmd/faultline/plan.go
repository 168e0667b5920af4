package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"faultline/figure"
	"faultline/plan"
)

const planUsage = `usage: faultline plan SCENE -o DIR [--thickness-nm A:B:STEP] [--s-per-nm A:B:STEP] [--candidates 1/2<110>,...]

Plans the imaging conditions of SCENE and writes into DIR:
thickness.csv (thickness_nm,bf,df; default 0 to 5 ξ_g) and rocking.csv
(s_per_nm,bf,df; default ±3/ξ_g) for the perfect crystal,
visibility.csv (thickness_nm,s_per_nm,visibility: the defects' dark-field
contrast, defined in the README) and, for a dislocation, weakbeam.csv (the
image peak's position from the core, its width and, for a dissociated
dislocation, the peaks' separation against the partials', for g(2g) to
g(6g)), each beside a PNG plot; with --candidates, gb.csv. On stdout: the
suggested conditions with the reason for each, the g·b table, and the
measured reuse of the field samples.

  -o DIR                  the output directory (required)
  --thickness-nm A:B:STEP thickness range, nm
  --s-per-nm A:B:STEP     excitation-error range, 1/nm
  --figure-format pdf|svg also write every plot in that format beside its PNG
  --candidates LIST       Burgers-vector families, comma-separated
  --set PATH=VALUE        override a field of the scene (JSON value; repeatable)
`

func cmdPlan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("plan")
	out := fs.String("o", "", "output directory")
	tr := fs.String("thickness-nm", "", "thickness range A:B:STEP, nm")
	sr := fs.String("s-per-nm", "", "excitation-error range A:B:STEP, 1/nm")
	cand := fs.String("candidates", "", "Burgers-vector families, comma-separated (1/2<110>)")
	plotFormat := fs.String("figure-format", "", "also every plot as pdf or svg")
	set := setFlag(fs)
	commandUsage["plan"] = planUsage
	path, err := parse(fs, args, stdout)
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"plan: give the output directory with -o DIR"}
	}
	if *plotFormat != "" && *plotFormat != figure.PaperPDF && *plotFormat != figure.PaperSVG {
		return usageError{fmt.Sprintf("--figure-format %s: the formats are pdf and svg (the PNGs are always written)", *plotFormat)}
	}
	var opt plan.Options
	if *tr != "" {
		r, err := plan.ParseRange("--thickness-nm", *tr)
		if err != nil {
			return usageError{err.Error()}
		}
		if !(r.From >= 0) {
			return usageError{fmt.Sprintf("--thickness-nm: start %g must not be negative", r.From)}
		}
		opt.ThicknessNm = &r
	}
	if *sr != "" {
		r, err := plan.ParseRange("--s-per-nm", *sr)
		if err != nil {
			return usageError{err.Error()}
		}
		opt.SPerNm = &r
	}
	if *cand != "" {
		for _, c := range strings.Split(*cand, ",") {
			if c = strings.TrimSpace(c); c != "" {
				opt.Candidates = append(opt.Candidates, c)
			}
		}
	}
	if err := checkOutputDir(*out); err != nil {
		return err
	}
	sc, err := loadScene(path, *set)
	if err != nil {
		return err
	}
	p, err := plan.Make(ctx, sc, filepath.Dir(path), opt)
	if err != nil {
		if strings.HasPrefix(err.Error(), "--candidates") {
			return usageError{err.Error()}
		}
		return err
	}
	p.PlotFormat = *plotFormat
	if err := p.Write(ctx, *out); err != nil {
		if errors.Is(err, context.Canceled) {
			return err
		}
		return outputError{*out, err}
	}
	printNotes(stderr, p.Setup)
	return p.WriteText(stdout)
}
