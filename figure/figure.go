package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"

	"golang.org/x/image/draw"
	"golang.org/x/image/vector"
)

// Pair draws the bright-field and dark-field images side by side, labelled
// "BF" and "DF", with a scale bar, the g arrow and, if l.Caption, the
// conditions below. The two images must have the same size.
func Pair(bf, df *image.Gray, c Caption, l Layout) (*image.RGBA, error) {
	if err := checkPanel("bf", bf); err != nil {
		return nil, err
	}
	if err := checkPanel("df", df); err != nil {
		return nil, err
	}
	if bf.Bounds().Size() != df.Bounds().Size() {
		return nil, fmt.Errorf("figure: Pair: bf is %v px and df %v px; want the same size", bf.Bounds().Size(), df.Bounds().Size())
	}
	return compose([]*image.Gray{bf, df}, []string{"BF", "DF"}, c, l)
}

// CheckPair reports whether Pair can lay out two panels of w × h image
// pixels with caption c and layout l, without drawing anything.
func CheckPair(w, h int, c Caption, l Layout) error {
	if w <= 0 || h <= 0 {
		return fmt.Errorf("figure: CheckPair: panels of %d×%d px", w, h)
	}
	_, err := layout(w, h, []string{"BF", "DF"}, c, l)
	return err
}

// AutoScale is the upscaling Layout.Scale 0 chooses for n panels w pixels
// wide: the smallest that makes the figure at least MinWidthPx wide.
func AutoScale(n, w int) int { return max(1, (MinWidthPx+n*w-1)/(n*w)) }

// MaxFigurePx bounds either side of a figure, in pixels.
const MaxFigurePx = maxFigurePx

// Single draws one image with its label (none if empty), a scale bar, the
// g arrow and, if l.Caption, the conditions below.
func Single(img *image.Gray, label string, c Caption, l Layout) (*image.RGBA, error) {
	if err := checkPanel("img", img); err != nil {
		return nil, err
	}
	return compose([]*image.Gray{img}, []string{label}, c, l)
}

func checkPanel(name string, img *image.Gray) error {
	if img == nil {
		return fmt.Errorf("figure: %s: no image", name)
	}
	if img.Bounds().Empty() {
		return fmt.Errorf("figure: %s: empty image", name)
	}
	return nil
}

func compose(imgs []*image.Gray, labels []string, c Caption, l Layout) (*image.RGBA, error) {
	sz := imgs[0].Bounds().Size()
	g, err := layout(sz.X, sz.Y, labels, c, l)
	if err != nil {
		return nil, err
	}
	dst := image.NewRGBA(image.Rectangle{Max: g.size})
	draw.Draw(dst, dst.Bounds(), image.White, image.Point{}, draw.Src)
	for k, img := range imgs {
		p := g.panels[k]
		draw.Draw(dst, p.Inset(-g.frame), image.Black, image.Point{}, draw.Src)
		// Nearest neighbour: each simulated pixel becomes a scale × scale
		// block, nothing is smoothed or invented.
		draw.NearestNeighbor.Scale(dst, p, img, img.Bounds(), draw.Src, nil)
		if k < len(g.labelDots) && labels[k] != "" {
			drawText(dst, g.labelFace, g.labelDots[k], labels[k])
		}
	}
	draw.Draw(dst, g.bar, image.Black, image.Point{}, draw.Src)
	drawText(dst, g.textFace, g.barLabelDot, g.barLabel)
	drawArrow(dst, g.arrowBox, g.gAngleDeg, g.arrowLenPx, g.shaftPx, color.Black)
	drawGLabel(dst, g)
	for k, line := range g.caption {
		drawText(dst, g.textFace, g.captionDots[k], line)
	}
	return dst, nil
}

// drawGLabel sets a leading "g" of the arrow label in bold, as a vector,
// and the rest (the indices) in the text face.
func drawGLabel(dst *image.RGBA, g *geometry) {
	bold, rest := gLabelParts(g.gLabel)
	drawText(dst, g.boldFace, g.gLabelDot, bold)
	x := g.gLabelDot.X + textWidth(g.boldFace, bold)
	drawText(dst, g.textFace, image.Pt(x, g.gLabelDot.Y), rest)
}

// gLabelParts splits a label such as "g = 2 0 0" into "g" and " = 2 0 0";
// a label not starting with the word g is all "rest".
func gLabelParts(s string) (bold, rest string) {
	if s == "g" || strings.HasPrefix(s, "g ") || strings.HasPrefix(s, "g=") {
		return s[:1], s[1:]
	}
	return "", s
}

// drawArrow draws an anti-aliased arrow of total length lenPx, centred in
// box, pointing angleDeg counter-clockwise from the right as seen in the
// picture (the picture's y axis runs down).
func drawArrow(dst *image.RGBA, box image.Rectangle, angleDeg, lenPx, shaftPx float64, col color.Color) {
	if box.Empty() {
		panic(errors.New("figure: empty arrow box"))
	}
	a := angleDeg * math.Pi / 180
	ux, uy := math.Cos(a), -math.Sin(a) // along the arrow
	nx, ny := -uy, ux                   // across it
	cx, cy := float64(box.Dx())/2, float64(box.Dy())/2
	headLen := 0.36 * lenPx
	headHalf := 0.2 * lenPx
	tail := [2]float64{cx - ux*lenPx/2, cy - uy*lenPx/2}
	tip := [2]float64{cx + ux*lenPx/2, cy + uy*lenPx/2}
	// The shaft stops inside the head so their joint leaves no seam.
	neck := [2]float64{tip[0] - ux*headLen*0.9, tip[1] - uy*headLen*0.9}
	base := [2]float64{tip[0] - ux*headLen, tip[1] - uy*headLen}
	hw := shaftPx / 2

	z := vector.NewRasterizer(box.Dx(), box.Dy())
	z.DrawOp = draw.Over
	pt := func(x, y float64) (float32, float32) { return float32(x), float32(y) }
	z.MoveTo(pt(tail[0]+nx*hw, tail[1]+ny*hw))
	z.LineTo(pt(neck[0]+nx*hw, neck[1]+ny*hw))
	z.LineTo(pt(neck[0]-nx*hw, neck[1]-ny*hw))
	z.LineTo(pt(tail[0]-nx*hw, tail[1]-ny*hw))
	z.ClosePath()
	// Same winding as the shaft, so where they overlap the coverage adds
	// (and clamps) instead of cancelling.
	z.MoveTo(pt(tip[0], tip[1]))
	z.LineTo(pt(base[0]-nx*headHalf, base[1]-ny*headHalf))
	z.LineTo(pt(base[0]+nx*headHalf, base[1]+ny*headHalf))
	z.ClosePath()
	z.Draw(dst, box, image.NewUniform(col), image.Point{})
}
