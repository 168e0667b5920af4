package plan

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"faultline/figure"
	"faultline/internal/atomicfile"
)

// Plot size of the planner's PNGs, pixels and dots per inch.
const (
	plotW, plotH = 900, 600
	plotDPI      = 150
)

// Files lists the names Write writes for p.
func (p *Plan) Files() []string {
	var n []string
	for _, f := range p.files() {
		n = append(n, f.Name)
	}
	return n
}

func csvFile(name string, write func(w io.Writer)) atomicfile.File {
	return atomicfile.File{Name: name, Encode: func(w io.Writer) error {
		bw := bufio.NewWriter(w)
		write(bw)
		return bw.Flush()
	}}
}

func pngPlotFile(name string, pl figure.Plot) atomicfile.File {
	return atomicfile.File{Name: name, Encode: func(w io.Writer) error {
		img, err := pl.Image(plotW, plotH, plotDPI)
		if err != nil {
			return err
		}
		return figure.EncodePNG(w, img, nil)
	}}
}

func num(x float64) string {
	if math.IsNaN(x) {
		return ""
	}
	return fmt.Sprintf("%.6g", x)
}

func (p *Plan) files() []atomicfile.File {
	var fs, vector []atomicfile.File
	// Each plot as a PNG and, with p.PlotFormat, as a vector file of the
	// same size (plotW × plotH at plotDPI, in points).
	plotFile := func(name string, pl figure.Plot) atomicfile.File {
		if p.PlotFormat != "" {
			vname := strings.TrimSuffix(name, ".png") + "." + p.PlotFormat
			vector = append(vector, atomicfile.File{Name: vname, Encode: func(w io.Writer) error {
				return pl.EncodeVector(w, p.PlotFormat, plotW*72/plotDPI, plotH*72/plotDPI)
			}})
		}
		return pngPlotFile(name, pl)
	}
	fs = append(fs, csvFile("thickness.csv", func(w io.Writer) {
		fmt.Fprintln(w, "thickness_nm,bf,df")
		for i, t := range p.Thickness.X {
			fmt.Fprintf(w, "%s,%s,%s\n", num(t), num(p.Thickness.BF[i]), num(p.Thickness.DF[i]))
		}
	}), plotFile("thickness.png", p.ThicknessPlot()))
	fs = append(fs, csvFile("rocking.csv", func(w io.Writer) {
		fmt.Fprintln(w, "s_per_nm,bf,df")
		for i, s := range p.Rocking.X {
			fmt.Fprintf(w, "%s,%s,%s\n", num(s), num(p.Rocking.BF[i]), num(p.Rocking.DF[i]))
		}
	}), plotFile("rocking.png", p.RockingPlot()))
	if v := p.Visibility; v != nil {
		fs = append(fs, csvFile("visibility.csv", func(w io.Writer) {
			fmt.Fprintln(w, "thickness_nm,s_per_nm,visibility")
			for i, t := range v.ThicknessNm {
				for k, s := range v.SPerNm {
					fmt.Fprintf(w, "%s,%s,%s\n", num(t), num(s), num(v.V[i][k]))
				}
			}
		}))
		vis, _ := p.VisibilityPlot()
		fs = append(fs, plotFile("visibility.png", vis))
	}
	if len(p.WeakBeam) > 0 {
		fs = append(fs, csvFile("weakbeam.csv", func(w io.Writer) {
			fmt.Fprintln(w, "n,s_per_nm,w,beams,peak_nm,width_nm,peak_df,background_df,measured_separation_nm,projected_separation_nm,separation_nm")
			for _, x := range p.WeakBeam {
				fmt.Fprintf(w, "%d,%s,%s,%d,%s,%s,%s,%s,%s,%s,%s\n", x.N, num(x.SPerNm), num(x.W), x.Beams, num(x.PeakNm), num(x.WidthNm), num(x.PeakIntensity), num(x.BG),
					num(x.MeasuredSepNm), num(x.ProjectedSepNm), num(x.SeparationNm))
			}
		}))
		wb, _ := p.WeakBeamPlot()
		fs = append(fs, plotFile("weakbeam.png", wb))
	}
	if t := p.GB; t != nil {
		fs = append(fs, csvFile("gb.csv", func(w io.Writer) { t.writeCSV(w) }))
	}
	return append(fs, vector...)
}

func coarseIdx(n, k int) []int {
	if n <= k {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	out := make([]int, k)
	for i := range out {
		out[i] = int(math.Round(float64(i) * float64(n-1) / float64(k-1)))
	}
	return out
}

// Write writes the plan's CSV files and plots into dir as one set (a
// failure leaves dir as it was).
func (p *Plan) Write(ctx context.Context, dir string) error {
	return atomicfile.WriteSet(ctx, dir, p.files())
}

func (t *GBTable) writeCSV(w io.Writer) {
	fmt.Fprintln(w, "b,g,g_dot_b,g_dot_b_cross_u")
	for i, c := range t.Candidates {
		for k, g := range t.G {
			x := ""
			if t.GBxU != nil {
				x = num(t.GBxU[i][k])
			}
			fmt.Fprintf(w, "%q,%q,%s,%s\n", c, g, num(t.GB[i][k]), x)
		}
	}
}

// WriteText writes the suggestions, the g·b table and the measured reuse
// of the field samples, for stdout.
func (p *Plan) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "plan for %s\n", p.Setup.Describe())
	fmt.Fprintln(bw, "suggested conditions:")
	for _, s := range p.Suggestions {
		fmt.Fprintf(bw, "  - %s\n    because %s\n", s.What, s.Why)
	}
	if t := p.GB; t != nil {
		t.writeText(bw)
	}
	if r := p.Reuse; r.Points > 0 {
		fmt.Fprintf(bw, "field samples: recorded once (%.2f s) and replayed at %d (t, s) points × %d columns in %.2f s (%d columns integrated afresh); one point: %.3f s fresh, %.3f s replayed, largest difference %.1e\n",
			r.RecordSeconds, r.Points, r.Columns/max(r.Points, 1), r.ReplaySeconds, r.FreshColumns, r.FreshPointSeconds, r.ReplayPointSeconds, r.MaxReplayDifference)
	}
	for _, s := range p.Skipped {
		fmt.Fprintf(bw, "not computed: %s\n", s)
	}
	return bw.Flush()
}

func orNone(s string) string {
	if strings.TrimSpace(s) == "" {
		return "none in the scene, so no g·(b×u)"
	}
	return s
}

// WriteText writes the table as the command line prints it: one row per
// candidate, g·(b×u) in brackets.
func (t *GBTable) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	t.writeText(bw)
	return bw.Flush()
}

func (t *GBTable) writeText(bw *bufio.Writer) {
	fmt.Fprintf(bw, "g·b table (g·(b×u) in brackets, u = %s):\n", orNone(t.Line))
	fmt.Fprintf(bw, "  %-16s", "b \\ g")
	for _, g := range t.G {
		fmt.Fprintf(bw, " %12s", g)
	}
	fmt.Fprintln(bw)
	for i, c := range t.Candidates {
		fmt.Fprintf(bw, "  %-16s", c)
		for k := range t.G {
			cell := num(t.GB[i][k])
			if t.GBxU != nil {
				cell += " [" + fmt.Sprintf("%.2f", t.GBxU[i][k]) + "]"
			}
			fmt.Fprintf(bw, " %12s", cell)
		}
		fmt.Fprintln(bw)
	}
}
