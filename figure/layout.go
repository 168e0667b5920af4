package figure

import (
	"fmt"
	"image"
	"math"

	"golang.org/x/image/font"
)

// Caption is the text that makes a figure reproducible.
type Caption struct {
	// G labels the g arrow, e.g. "g = 2 0 0"; empty means "g".
	G string
	// Lines are the conditions, one line each, e.g.
	// "B = [0 0 1]   s = 0.000 /nm (w = 0.00)   t = 120 nm   200 kV   two-beam".
	// Lines wider than the figure wrap at spaces.
	Lines []string
}

// Layout sets the geometry of a figure.
type Layout struct {
	// NmPerPx is the size of one (square) pixel of the simulated images.
	NmPerPx float64
	// GAngleDeg is the direction of g in the picture, counter-clockwise from
	// pointing right (0, the convention of every simulated image; 90 points
	// up).
	GAngleDeg float64
	// Scale is the integer upscaling of the image pixels; 0 chooses the
	// smallest that makes the figure at least MinWidthPx wide.
	Scale int
	// Caption draws Caption.Lines under the panels.
	Caption bool
}

// MinWidthPx is the width an automatically scaled figure reaches at least.
const MinWidthPx = 800

// maxFigurePx bounds either side of a figure.
const maxFigurePx = 16384

// Validate reports whether the layout can be used, naming the wrong field.
func (l Layout) Validate() error {
	if !(l.NmPerPx > 0) || math.IsInf(l.NmPerPx, 0) {
		return fmt.Errorf("figure: Layout.NmPerPx: want a positive pixel size in nm, got %v", l.NmPerPx)
	}
	if math.IsNaN(l.GAngleDeg) || math.IsInf(l.GAngleDeg, 0) {
		return fmt.Errorf("figure: Layout.GAngleDeg: want a finite angle in degrees, got %v", l.GAngleDeg)
	}
	if l.Scale < 0 {
		return fmt.Errorf("figure: Layout.Scale: want 0 (automatic) or a positive integer, got %d", l.Scale)
	}
	return nil
}

// geometry is where everything of a figure goes, in figure pixels.
type geometry struct {
	size   image.Point
	scale  int
	panels []image.Rectangle // the upscaled images
	frame  int               // frame line width, drawn outside each panel

	labelFace, textFace, boldFace font.Face
	labels                        []string
	labelDots                     []image.Point // baseline origins

	barNm       float64
	bar         image.Rectangle
	barLabel    string
	barLabelDot image.Point

	arrowBox    image.Rectangle // the arrow is centred in it
	arrowLenPx  float64
	shaftPx     float64
	gAngleDeg   float64
	gLabel      string
	gLabelDot   image.Point
	caption     []string
	captionDots []image.Point
}

// layout places n panels of w × h image pixels side by side with their
// labels, the scale bar and g arrow strip and the caption.
func layout(w, h int, labels []string, c Caption, l Layout) (*geometry, error) {
	if err := l.Validate(); err != nil {
		return nil, err
	}
	n := len(labels)
	s := l.Scale
	if s == 0 {
		s = AutoScale(n, w)
	}
	pw, ph := w*s, h*s
	if n*pw > maxFigurePx || ph > maxFigurePx {
		return nil, fmt.Errorf("figure: Layout.Scale: %d makes panels of %d×%d px, over the %d px limit", s, pw, ph, maxFigurePx)
	}

	// Sizes follow the width of the panels so the text keeps its size
	// relative to the picture however large it is drawn.
	fs := max(13.0, math.Round(float64(n*pw)/42))
	g := &geometry{scale: s, labels: labels, gAngleDeg: l.GAngleDeg}
	g.textFace = newFace(regularFont(), fs)
	g.boldFace = newFace(boldFont(), fs)
	g.labelFace = newFace(boldFont(), math.Round(1.3*fs))
	unit := int(fs)
	margin := unit
	gap := unit
	g.frame = max(1, int(math.Round(fs/14)))

	contentW := n*pw + (n-1)*gap
	la, ld := lineMetrics(g.labelFace)
	ta, td := lineMetrics(g.textFace)

	y := margin
	if hasText(labels) {
		y += la
		for k := range labels {
			g.labelDots = append(g.labelDots, image.Pt(margin+k*(pw+gap), y))
		}
		y += ld + unit/3
	}
	y += g.frame
	for k := range n {
		x := margin + k*(pw+gap)
		g.panels = append(g.panels, image.Rect(x, y, x+pw, y+ph))
	}
	y += ph + g.frame + unit*2/3

	// Strip under the panels: scale bar at the left, g arrow at the right.
	box := int(math.Round(2.6 * fs))
	stripH := max(box, ta+td)
	mid := y + stripH/2
	g.barNm = ScaleBarNm(float64(w) * l.NmPerPx)
	barPx := int(math.Round(g.barNm / l.NmPerPx * float64(s)))
	barT := max(3, int(math.Round(fs/3.5)))
	g.bar = image.Rect(margin, mid-barT/2, margin+barPx, mid-barT/2+barT)
	g.barLabel = LengthLabel(g.barNm)
	// Text baseline so the digits sit centred on the bar.
	capH := capHeight(g.textFace)
	g.barLabelDot = image.Pt(g.bar.Max.X+unit/2, mid+capH/2)

	g.gLabel = c.G
	if g.gLabel == "" {
		g.gLabel = "g"
	}
	right := margin + contentW
	bold, rest := gLabelParts(g.gLabel)
	g.gLabelDot = image.Pt(right-textWidth(g.boldFace, bold)-textWidth(g.textFace, rest), mid+capH/2)
	bx := g.gLabelDot.X - unit/3 - box
	g.arrowBox = image.Rect(bx, mid-box/2, bx+box, mid-box/2+box)
	g.arrowLenPx = 0.85 * float64(box)
	g.shaftPx = math.Max(2, math.Round(fs/7))
	y += stripH

	if l.Caption && len(c.Lines) > 0 {
		y += unit * 2 / 3
		lh := int(math.Round(1.3 * fs))
		for _, line := range c.Lines {
			// Continuation lines are indented by one em so a wrapped
			// line does not read as a new one.
			for k, part := range wrap(g.textFace, line, contentW-unit) {
				x := margin
				if k > 0 {
					x += unit
				}
				g.caption = append(g.caption, part)
				g.captionDots = append(g.captionDots, image.Pt(x, y+ta))
				y += lh
			}
		}
		y += ta + td - lh // the last line ends at its descent
	}
	y += margin
	g.size = image.Pt(margin+contentW+margin, y)
	if g.size.Y > maxFigurePx {
		return nil, fmt.Errorf("figure: Layout.Scale: %d makes the figure %d px high, over the %d px limit", s, g.size.Y, maxFigurePx)
	}
	// The strip must hold both marks without overlap; with a bar at most a
	// third of the field this fails only for panels a few pixels wide.
	if barEnd := g.barLabelDot.X + textWidth(g.textFace, g.barLabel); barEnd+unit > g.arrowBox.Min.X {
		return nil, fmt.Errorf("figure: Layout.Scale: panels %d px wide leave no room for the scale bar and g arrow; use a larger scale", pw)
	}
	return g, nil
}

func hasText(ss []string) bool {
	for _, s := range ss {
		if s != "" {
			return true
		}
	}
	return false
}

// capHeight is the height of a capital/digit above the baseline, from the
// glyph bounds of "0".
func capHeight(face font.Face) int {
	b, _, ok := face.GlyphBounds('0')
	if !ok {
		a, _ := lineMetrics(face)
		return a * 7 / 10
	}
	return (-b.Min.Y).Round()
}
