package figure

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"regexp"
	"strings"
	"sync"

	xdraw "golang.org/x/image/draw"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Print is the physical size of a figure for a journal page.
type Print struct {
	// WidthMm is the width of the whole figure; the height follows.
	WidthMm float64
	// DPI is the resolution of the PNG (dots per inch), stored in its
	// pHYs chunk; PDF and SVG are vectors around the embedded images.
	DPI float64
}

// One journal column at the resolution journals ask of halftone figures
// (common practice: single-column figures 80–90 mm wide, 300–600 dpi for
// greyscale images, 600 dpi and more for images with text).
const (
	DefaultWidthMm = 85
	DefaultDPI     = 600
)

// Print figure type sizes in points at the final size (common practice:
// 6 to 8 pt at print size); margins in mm.
const (
	paperTextPt   = 7
	paperLabelPt  = 8
	paperMarginMm = 1.5
	paperGapMm    = 1.5
)

// Validate names the field that is out of range.
func (p Print) Validate() error {
	if !(p.WidthMm >= 20 && p.WidthMm <= 500) {
		return fmt.Errorf("figure: print width %g mm: want 20 to 500 mm", p.WidthMm)
	}
	if !(p.DPI >= 72 && p.DPI <= 2400) {
		return fmt.Errorf("figure: print resolution %g dpi: want 72 to 2400", p.DPI)
	}
	if px := p.WidthMm / 25.4 * p.DPI; px > maxFigurePx {
		return fmt.Errorf("figure: %g mm at %g dpi is %.0f px wide, over the %d px limit", p.WidthMm, p.DPI, px, maxFigurePx)
	}
	return nil
}

// paperFonts are the Go fonts (the figures' fonts) for gonum/plot's
// vector back ends. The bold face is its own typeface of normal weight:
// vgpdf registers a font under its name alone but selects it by name and
// weight, so a bold weight would not be found.
var paperFonts = sync.OnceValue(func() *font.Cache {
	return font.NewCache(font.Collection{
		{Font: font.Font{Typeface: "Go"}, Face: regularFont()},
		{Font: font.Font{Typeface: "GoBold"}, Face: boldFont()},
	})
})

func paperFace(bold bool, pt float64) font.Face {
	f := font.Font{Typeface: "Go"}
	if bold {
		f.Typeface = "GoBold"
	}
	return paperFonts().Lookup(f, vg.Length(pt))
}

// paperLayout is where everything of a print figure goes, in vg lengths
// measured from the top-left corner (y down); drawing turns y over.
type paperLayout struct {
	w, h          vg.Length
	panels        []vg.Rectangle // y down
	labels        []string
	labelY        vg.Length // baseline of the panel labels
	bar           vg.Rectangle
	barLabel      string
	barLabelPt    vg.Point
	arrowC        vg.Point
	arrowLen      vg.Length
	gLabel        string
	gLabelPt      vg.Point
	caption       []string
	captionPts    []vg.Point
	text, bold    font.Face
	label         font.Face
	gAngleDeg     float64
	shaft, margin vg.Length
}

func newPaperLayout(n, w, h int, labels []string, c Caption, l Layout, p Print) (*paperLayout, error) {
	if err := l.Validate(); err != nil {
		return nil, err
	}
	if err := p.Validate(); err != nil {
		return nil, err
	}
	g := &paperLayout{labels: labels, gAngleDeg: l.GAngleDeg}
	g.text, g.bold, g.label = paperFace(false, paperTextPt), paperFace(true, paperTextPt), paperFace(true, paperLabelPt)
	mm := vg.Millimeter
	g.w = vg.Length(p.WidthMm) * mm
	g.margin = paperMarginMm * mm
	gap := paperGapMm * mm
	contentW := g.w - 2*g.margin
	pw := (contentW - vg.Length(n-1)*gap) / vg.Length(n)
	ph := pw * vg.Length(h) / vg.Length(w)
	te := g.text.Extents()
	le := g.label.Extents()
	y := g.margin
	if hasText(labels) {
		y += le.Ascent
		g.labelY = y
		y += le.Descent + 0.5*mm
	}
	for k := range n {
		x := g.margin + vg.Length(k)*(pw+gap)
		g.panels = append(g.panels, vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + pw, Y: y + ph}})
	}
	y += ph + 1.5*mm

	// Strip: scale bar at the left, g arrow at the right.
	box := 2.6 * vg.Length(paperTextPt)
	stripH := max(box, te.Ascent+te.Descent)
	mid := y + stripH/2
	barNm := ScaleBarNm(float64(w) * l.NmPerPx)
	barLen := pw * vg.Length(barNm/(float64(w)*l.NmPerPx))
	barT := 0.5 * mm
	g.bar = vg.Rectangle{Min: vg.Point{X: g.margin, Y: mid - barT/2}, Max: vg.Point{X: g.margin + barLen, Y: mid + barT/2}}
	g.barLabel = LengthLabel(barNm)
	capH := te.Ascent * 0.7
	g.barLabelPt = vg.Point{X: g.bar.Max.X + 1*mm, Y: mid + capH/2}
	g.gLabel = c.G
	if g.gLabel == "" {
		g.gLabel = "g"
	}
	b, rest := gLabelParts(g.gLabel)
	gw := g.bold.Width(b) + g.text.Width(rest)
	g.gLabelPt = vg.Point{X: g.margin + contentW - gw, Y: mid + capH/2}
	g.arrowC = vg.Point{X: g.gLabelPt.X - 1*mm - box/2, Y: mid}
	g.arrowLen = 0.85 * box
	g.shaft = vg.Length(paperTextPt) / 7
	if g.barLabelPt.X+g.text.Width(g.barLabel)+1*mm > g.arrowC.X-box/2 {
		return nil, fmt.Errorf("figure: %g mm leaves no room for the scale bar and the g arrow; make the figure wider", p.WidthMm)
	}
	y += stripH

	if l.Caption && len(c.Lines) > 0 {
		y += 1 * mm
		lh := 1.3 * vg.Length(paperTextPt)
		for _, line := range c.Lines {
			for k, part := range wrapVG(g.text, line, contentW-vg.Length(paperTextPt)) {
				x := g.margin
				if k > 0 {
					x += vg.Length(paperTextPt)
				}
				g.caption = append(g.caption, part)
				g.captionPts = append(g.captionPts, vg.Point{X: x, Y: y + te.Ascent})
				y += lh
			}
		}
		y += te.Ascent + te.Descent - lh
	}
	g.h = y + g.margin
	if px := float64(g.h) / 72 * p.DPI; px > maxFigurePx {
		return nil, fmt.Errorf("figure: the figure is %.0f px high at %g dpi, over the %d px limit", px, p.DPI, maxFigurePx)
	}
	return g, nil
}

// wrapVG breaks s at runs of spaces into lines no wider than width,
// keeping the spacing inside a line as written (the caption separates its
// fields by three spaces).
func wrapVG(f font.Face, s string, width vg.Length) []string {
	var out []string
	line, sep := "", ""
	for _, tok := range spaceRuns.FindAllString(strings.TrimSpace(s), -1) {
		if strings.TrimSpace(tok) == "" {
			sep = tok
			continue
		}
		if line != "" && f.Width(line+sep+tok) > width {
			out = append(out, line)
			line, sep = tok, ""
			continue
		}
		if line == "" {
			line = tok
		} else {
			line += sep + tok
		}
		sep = ""
	}
	return append(out, line)
}

var spaceRuns = regexp.MustCompile(`\s+|\S+`)

// draw draws the figure on cv, whose size is g.w × g.h. Each panel's
// image is enlarged by whole pixels (nearest neighbour, so pixels stay
// pixels) to at least minPx across before the back end places it.
func (g *paperLayout) draw(cv vg.Canvas, imgs []*image.Gray, minPx int, text func(string) string) {
	flip := func(p vg.Point) vg.Point { return vg.Point{X: p.X, Y: g.h - p.Y} }
	rect := func(r vg.Rectangle) vg.Rectangle {
		return vg.Rectangle{Min: vg.Point{X: r.Min.X, Y: g.h - r.Max.Y}, Max: vg.Point{X: r.Max.X, Y: g.h - r.Min.Y}}
	}
	fill := func(r vg.Rectangle) {
		var p vg.Path
		p.Move(r.Min)
		p.Line(vg.Point{X: r.Max.X, Y: r.Min.Y})
		p.Line(r.Max)
		p.Line(vg.Point{X: r.Min.X, Y: r.Max.Y})
		p.Close()
		cv.Fill(p)
	}
	cv.SetColor(color.White)
	fill(vg.Rectangle{Max: vg.Point{X: g.w, Y: g.h}})
	cv.SetColor(color.Black)
	frame := 0.15 * vg.Millimeter
	for k, img := range imgs {
		r := rect(g.panels[k])
		fill(vg.Rectangle{Min: vg.Point{X: r.Min.X - frame, Y: r.Min.Y - frame}, Max: vg.Point{X: r.Max.X + frame, Y: r.Max.Y + frame}})
		cv.DrawImage(r, enlarge(img, minPx))
		if g.labels[k] != "" {
			cv.FillString(g.label, flip(vg.Point{X: g.panels[k].Min.X, Y: g.labelY}), text(g.labels[k]))
		}
	}
	fill(rect(g.bar))
	cv.FillString(g.text, flip(g.barLabelPt), text(g.barLabel))
	b, rest := gLabelParts(g.gLabel)
	cv.FillString(g.bold, flip(g.gLabelPt), b)
	cv.FillString(g.text, flip(vg.Point{X: g.gLabelPt.X + g.bold.Width(b), Y: g.gLabelPt.Y}), text(rest))
	g.drawArrow(cv, flip(g.arrowC))
	for k, line := range g.caption {
		cv.FillString(g.text, flip(g.captionPts[k]), text(line))
	}
}

// drawArrow draws the g arrow centred at c (y up), pointing gAngleDeg
// counter-clockwise from the right, as the raster figures draw it.
func (g *paperLayout) drawArrow(cv vg.Canvas, c vg.Point) {
	a := g.gAngleDeg * math.Pi / 180
	ux, uy := vg.Length(math.Cos(a)), vg.Length(math.Sin(a))
	nx, ny := -uy, ux
	L := g.arrowLen
	headLen, headHalf := 0.36*L, 0.2*L
	at := func(s, t vg.Length) vg.Point { return vg.Point{X: c.X + ux*s + nx*t, Y: c.Y + uy*s + ny*t} }
	hw := g.shaft / 2
	var p vg.Path
	p.Move(at(-L/2, hw))
	p.Line(at(L/2-0.9*headLen, hw))
	p.Line(at(L/2-0.9*headLen, -hw))
	p.Line(at(-L/2, -hw))
	p.Close()
	cv.Fill(p)
	var h vg.Path
	h.Move(at(L/2, 0))
	h.Line(at(L/2-headLen, headHalf))
	h.Line(at(L/2-headLen, -headHalf))
	h.Close()
	cv.Fill(h)
}

// enlarge returns img scaled by the smallest whole factor that makes it
// at least minPx wide, by nearest neighbour.
func enlarge(img *image.Gray, minPx int) image.Image {
	b := img.Bounds()
	k := max(1, (minPx+b.Dx()-1)/b.Dx())
	if k == 1 {
		return img
	}
	out := image.NewGray(image.Rect(0, 0, k*b.Dx(), k*b.Dy()))
	xdraw.NearestNeighbor.Scale(out, out.Bounds(), img, b, xdraw.Src, nil)
	return out
}

// Paper formats.
const (
	PaperPNG = "png"
	PaperPDF = "pdf"
	PaperSVG = "svg"
)

// EncodePaper writes the labelled panels (BF and DF side by side, or one
// panel) at the physical size of p, in format png, pdf or svg, drawn by
// gonum/plot's back ends (vgimg, vgpdf, vgsvg): the panels are embedded
// images, the labels, scale bar, g arrow and conditions are vectors (in
// the PNG, rasterised at p.DPI). The PNG is exactly round(WidthMm/25.4·DPI)
// pixels wide and carries its resolution in a pHYs chunk (pixels per
// metre, PNG specification §11.3.5.3) and text as EncodePNG does. PDF text
// is limited to the Windows-1252 characters of gonum/plot's PDF back end:
// others are spelt out (ξ as "xi").
func EncodePaper(w io.Writer, format string, imgs []*image.Gray, labels []string, c Caption, l Layout, p Print, text map[string]string) error {
	if len(imgs) == 0 || len(imgs) != len(labels) {
		return fmt.Errorf("figure: %d images and %d labels", len(imgs), len(labels))
	}
	for k, img := range imgs {
		if err := checkPanel(labels[k], img); err != nil {
			return err
		}
		if img.Bounds().Size() != imgs[0].Bounds().Size() {
			return fmt.Errorf("figure: panels of different sizes")
		}
	}
	sz := imgs[0].Bounds().Size()
	g, err := newPaperLayout(len(imgs), sz.X, sz.Y, labels, c, l, p)
	if err != nil {
		return err
	}
	panelPx := int(math.Ceil(float64(g.panels[0].Size().X) / 72 * p.DPI))
	same := func(s string) string { return s }
	switch format {
	case PaperPNG:
		wpx := int(math.Round(p.WidthMm / 25.4 * p.DPI))
		// The canvas is as wide as the figure in whole pixels.
		cv := vgimg.NewWith(vgimg.UseWH(vg.Length(float64(wpx)/p.DPI)*vg.Inch, g.h), vgimg.UseDPI(int(math.Round(p.DPI))), vgimg.UseBackgroundColor(color.White))
		g.w = vg.Length(float64(wpx)/p.DPI) * vg.Inch
		g.draw(cv, imgs, panelPx, same)
		return EncodePNGDPI(w, cv.Image(), text, p.DPI)
	case PaperPDF:
		cv := vgpdf.New(g.w, g.h)
		g.draw(cv, imgs, min(panelPx, 4096), cp1252)
		_, err := cv.WriteTo(w)
		return err
	case PaperSVG:
		cv := vgsvg.New(g.w, g.h)
		g.draw(cv, imgs, min(panelPx, 4096), same)
		_, err := cv.WriteTo(w)
		return err
	}
	return fmt.Errorf("figure: figure format %q: want png, pdf or svg", format)
}

// cp1252Spelt spells out the characters of figure text that Windows-1252
// lacks.
var cp1252Spelt = strings.NewReplacer("ξ", "xi", "−", "-", "′", "'", "≤", "<=", "≥", ">=", "θ", "theta", "ε", "eps", "ν", "nu", "λ", "lambda", "π", "pi")

func cp1252(s string) string { return cp1252Spelt.Replace(s) }

// EncodePNGDPI writes img as EncodePNG does, with a pHYs chunk right after
// IHDR giving dpi as pixels per metre (unit 1), so programs that place the
// picture know its printed size.
func EncodePNGDPI(w io.Writer, img image.Image, text map[string]string, dpi float64) error {
	var buf bytes.Buffer
	if err := EncodePNG(&buf, img, text); err != nil {
		return err
	}
	b := buf.Bytes()
	const ihdrEnd = 8 + 4 + 4 + 13 + 4
	ppm := uint32(math.Round(dpi / 0.0254))
	var d [9]byte
	binary.BigEndian.PutUint32(d[0:], ppm)
	binary.BigEndian.PutUint32(d[4:], ppm)
	d[8] = 1 // the unit is the metre
	if _, err := w.Write(b[:ihdrEnd]); err != nil {
		return err
	}
	if err := writeChunk(w, "pHYs", d[:]); err != nil {
		return err
	}
	_, err := w.Write(b[ihdrEnd:])
	return err
}
