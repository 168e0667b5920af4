package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"
	"sync"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Series is one named curve of a [Plot]. A NaN in Y breaks the curve (a
// stretch where there is nothing to plot, such as a line running off a
// micrograph); the name appears once in the legend.
type Series struct {
	Name string
	X, Y []float64
	// Colour of the line; nil takes the next colour of [PlotColours].
	Colour color.Color
	// Dashed draws the line dashed (a measured curve beside simulated ones).
	Dashed bool
}

// YScale chooses the y-axis of a [Plot].
type YScale int

const (
	// YData scales the axis to the data, never narrower than
	// [Plot.YMinSpan].
	YData YScale = iota
	// YUnit fixes the axis at 0–1: fractions of the incident beam.
	YUnit
)

// Plot is a line plot: titled axes, several named series, one style for
// every plot the program draws (the window's profile, the command line's
// and the planner's curves), in the figures' font.
type Plot struct {
	Title, XLabel, YLabel string
	Series                []Series
	Y                     YScale
	// YMinSpan is the narrowest y range YData shows: data flatter than
	// this is drawn in a range this wide about its middle, so that
	// rounding noise is not blown up to fill the axis. Zero means
	// [ContrastFloor].
	YMinSpan float64
}

// PlotColours are the line colours taken in turn: near-black, blue,
// orange, green (distinct in print and for the common colour-vision
// deficiencies).
var PlotColours = []color.Color{
	color.NRGBA{0x20, 0x20, 0x20, 0xff},
	color.NRGBA{0x1f, 0x6f, 0xc0, 0xff},
	color.NRGBA{0xd0, 0x70, 0x10, 0xff},
	color.NRGBA{0x20, 0x90, 0x50, 0xff},
}

// plotFonts holds the Go fonts the figures use, for gonum/plot's text.
var plotFonts = sync.OnceValue(func() *font.Cache {
	return font.NewCache(font.Collection{
		{Font: font.Font{Typeface: "Go"}, Face: regularFont()},
		{Font: font.Font{Typeface: "Go", Weight: xfont.WeightBold}, Face: boldFont()},
	})
})

// plotStyle sets a text style to the figures' font at size points.
func plotStyle(s *text.Style, pt float64) {
	s.Handler = text.Plain{Fonts: plotFonts()}
	s.Font = font.Font{Typeface: "Go", Size: font.Length(pt)}
	if s.Color == nil {
		s.Color = color.Black
	}
}

// YRange returns the y range the plot's axis shows: 0–1 for YUnit; for
// YData the data's range widened to YMinSpan if narrower, then by 5 % at
// each end.
func (p Plot) YRange() (lo, hi float64) {
	if p.Y == YUnit {
		return 0, 1
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, s := range p.Series {
		for _, y := range s.Y {
			if !math.IsNaN(y) && !math.IsInf(y, 0) {
				lo, hi = math.Min(lo, y), math.Max(hi, y)
			}
		}
	}
	if lo > hi {
		return 0, 1
	}
	span := p.YMinSpan
	if span <= 0 {
		span = ContrastFloor
	}
	if hi-lo < span {
		mid := (lo + hi) / 2
		lo, hi = mid-span/2, mid+span/2
	}
	pad := 0.05 * (hi - lo)
	return lo - pad, hi + pad
}

// PlotFrame says where a drawn plot's data area lies in its image, in
// pixels from the image's top-left corner, and the axis ranges it spans:
// what a window needs to turn a click on the plot into a data value.
type PlotFrame struct {
	Left, Right, Top, Bottom float64 // the data area's edges, pixels
	XMin, XMax, YMin, YMax   float64 // the axes' ranges at those edges
}

// XAt returns the x value at pixel column px of the image (px measured
// from the image's left edge, fractions allowed), and whether px lies
// within the data area.
func (f PlotFrame) XAt(px float64) (float64, bool) {
	if !(f.Right > f.Left) {
		return math.NaN(), false
	}
	u := (px - f.Left) / (f.Right - f.Left)
	return f.XMin + u*(f.XMax-f.XMin), u >= 0 && u <= 1
}

// PixelX returns the pixel column of x value v (the inverse of XAt).
func (f PlotFrame) PixelX(v float64) float64 {
	return f.Left + (v-f.XMin)/(f.XMax-f.XMin)*(f.Right-f.Left)
}

// Image draws the plot into a w × h pixel image at dpi (96 for a screen
// at scale 1). The legend stands in a column right of the axes, so it
// never covers a curve.
func (p Plot) Image(w, h int, dpi float64) (*image.RGBA, error) {
	img, _, err := p.Framed(w, h, dpi)
	return img, err
}

// Framed draws the plot as [Plot.Image] does and also returns where its
// data area lies in the image.
func (p Plot) Framed(w, h int, dpi float64) (*image.RGBA, PlotFrame, error) {
	if w <= 0 || h <= 0 || !(dpi > 0) {
		return nil, PlotFrame{}, fmt.Errorf("figure: plot of %d×%d px at %g dpi: sizes must be positive", w, h, dpi)
	}
	pts := func(px int) vg.Length { return vg.Length(float64(px) * 72 / dpi) }
	c := vgimg.NewWith(vgimg.UseWH(pts(w), pts(h)), vgimg.UseDPI(int(math.Round(dpi))))
	da, err := p.drawOn(c)
	if err != nil {
		return nil, PlotFrame{}, err
	}
	// The data area as gonum/plot lays it out (points from the bottom
	// left), in pixels from the top left.
	px := float64(c.DPI()) / 72
	img := c.Image().(*image.RGBA)
	hpx := float64(img.Bounds().Dy())
	f := PlotFrame{
		Left: float64(da.r.Min.X) * px, Right: float64(da.r.Max.X) * px,
		Top: hpx - float64(da.r.Max.Y)*px, Bottom: hpx - float64(da.r.Min.Y)*px,
		XMin: da.xmin, XMax: da.xmax, YMin: da.ymin, YMax: da.ymax,
	}
	return img, f, nil
}

// dataArea is where a drawn plot's data lie on its canvas (points from
// the bottom left) and the axes' ranges there.
type dataArea struct {
	r                      vg.Rectangle
	xmin, xmax, ymin, ymax float64
}

// drawOn draws the plot on a canvas of any of gonum/plot's back ends and
// returns its data area.
func (p Plot) drawOn(c vg.CanvasSizer) (dataArea, error) {
	if len(p.Series) == 0 {
		return dataArea{}, errors.New("figure: plot has no series")
	}
	pl := plot.New()
	pl.TextHandler = text.Plain{Fonts: plotFonts()}
	pl.Title.Text = p.Title
	plotStyle(&pl.Title.TextStyle, 11)
	pl.X.Label.Text, pl.Y.Label.Text = p.XLabel, p.YLabel
	for _, ax := range []*plot.Axis{&pl.X, &pl.Y} {
		plotStyle(&ax.Label.TextStyle, 10)
		plotStyle(&ax.Tick.Label, 9)
		ax.Tick.Marker = niceTicks{}
	}
	pl.Add(plotter.NewGrid())
	leg := plot.NewLegend()
	plotStyle(&leg.TextStyle, 10)
	leg.Top, leg.Left = true, true
	for k, s := range p.Series {
		if len(s.X) != len(s.Y) {
			return dataArea{}, fmt.Errorf("figure: series %q has %d x and %d y values", s.Name, len(s.X), len(s.Y))
		}
		col := s.Colour
		if col == nil {
			col = PlotColours[k%len(PlotColours)]
		}
		var first *plotter.Line
		for _, seg := range segments(s.X, s.Y) {
			l, err := plotter.NewLine(seg)
			if err != nil {
				return dataArea{}, fmt.Errorf("figure: series %q: %w", s.Name, err)
			}
			l.Color, l.Width = col, vg.Points(1.5)
			if s.Dashed {
				l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
			}
			pl.Add(l)
			if first == nil {
				first = l
			}
		}
		if first != nil && s.Name != "" {
			leg.Add(s.Name, first)
		}
	}
	pl.Y.Min, pl.Y.Max = p.YRange()

	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	pad := vg.Points(6)
	lr := leg.Rectangle(dc)
	legW := lr.Max.X - lr.Min.X
	if legW > 0 {
		legW += 3 * pad
	}
	area := draw.Crop(dc, 0, -legW, 0, 0)
	pl.Draw(area)
	if legW > 0 {
		leg.Draw(draw.Crop(dc, dc.Max.X-dc.Min.X-legW+pad, 0, 0, -pad))
	}
	return dataArea{pl.DataCanvas(area).Rectangle, pl.X.Min, pl.X.Max, pl.Y.Min, pl.Y.Max}, nil
}

// segments splits (x, y) at NaN or infinite values into runs of at least
// two points.
func segments(x, y []float64) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	flush := func() {
		if len(cur) >= 2 {
			out = append(out, cur)
		}
		cur = nil
	}
	for k := range x {
		if math.IsNaN(x[k]) || math.IsNaN(y[k]) || math.IsInf(x[k], 0) || math.IsInf(y[k], 0) {
			flush()
			continue
		}
		cur = append(cur, plotter.XY{X: x[k], Y: y[k]})
	}
	flush()
	return out
}

// niceTicks labels an axis at steps of 1, 2 or 5 × 10^n, five to ten of
// them, with unlabelled ticks between.
type niceTicks struct{}

func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return []plot.Tick{{Value: lo, Label: strconv.FormatFloat(lo, 'g', 6, 64)}}
	}
	step := NiceStep((hi - lo) / 6)
	var out []plot.Tick
	minor := step / 2
	for v := math.Ceil(lo/minor) * minor; v <= hi+minor*1e-9; v += minor {
		t := plot.Tick{Value: v}
		if k := v / step; math.Abs(k-math.Round(k)) < 1e-6 {
			// + 0 turns a −0 from rounding into 0.
			t.Label = strconv.FormatFloat(math.Round(k)*step+0, 'g', 6, 64)
		}
		out = append(out, t)
	}
	return out
}

// NiceStep returns the smallest 1, 2 or 5 × 10^n not less than raw
// (raw > 0): the step of an axis' labelled ticks.
func NiceStep(raw float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw*(1-1e-12) {
			return m * p
		}
	}
	return 10 * p
}
