package figure

import (
	"image"
	"image/draw"
	"strings"
	"sync"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// parsed fonts, shared; faces are made per figure because an opentype face
// keeps scratch buffers and is not safe for concurrent use.
var (
	regularFont = sync.OnceValue(func() *opentype.Font { return mustParse(goregular.TTF) })
	boldFont    = sync.OnceValue(func() *opentype.Font { return mustParse(gobold.TTF) })
)

func mustParse(ttf []byte) *opentype.Font {
	f, err := opentype.Parse(ttf)
	if err != nil {
		panic("figure: bundled Go font does not parse: " + err.Error())
	}
	return f
}

// newFace returns a face whose em is px pixels (72 DPI, so points = pixels).
func newFace(f *opentype.Font, px float64) font.Face {
	face, err := opentype.NewFace(f, &opentype.FaceOptions{Size: px, DPI: 72, Hinting: font.HintingFull})
	if err != nil {
		panic("figure: face of the bundled Go font: " + err.Error())
	}
	return face
}

// textWidth is the advance width of s in whole pixels, rounded up.
func textWidth(face font.Face, s string) int {
	return font.MeasureString(face, s).Ceil()
}

// lineMetrics returns the ascent and descent of face in whole pixels.
func lineMetrics(face font.Face) (ascent, descent int) {
	m := face.Metrics()
	return m.Ascent.Ceil(), m.Descent.Ceil()
}

// drawText draws s with its baseline starting at dot.
func drawText(dst draw.Image, face font.Face, dot image.Point, s string) {
	d := font.Drawer{Dst: dst, Src: image.Black, Face: face, Dot: fixed.P(dot.X, dot.Y)}
	d.DrawString(s)
}

// wrap breaks s at runs of spaces into lines no wider than width pixels,
// keeping the spacing inside a line as written. A word wider than width
// stands alone on its line.
func wrap(face font.Face, s string, width int) []string {
	if textWidth(face, s) <= width {
		return []string{s}
	}
	type token struct{ space, word string }
	var toks []token
	rest := s
	for rest != "" {
		word := strings.TrimLeft(rest, " ")
		space := rest[:len(rest)-len(word)]
		end := strings.IndexByte(word, ' ')
		if end < 0 {
			end = len(word)
		}
		toks = append(toks, token{space, word[:end]})
		rest = word[end:]
	}
	var lines []string
	line := ""
	for _, t := range toks {
		if t.word == "" {
			continue // trailing spaces
		}
		if line == "" {
			line = t.word
			continue
		}
		if cand := line + t.space + t.word; textWidth(face, cand) <= width {
			line = cand
			continue
		}
		lines = append(lines, line)
		line = t.word
	}
	if line != "" || len(lines) == 0 {
		lines = append(lines, line)
	}
	return lines
}
