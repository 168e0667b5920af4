package figure

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"

	xdraw "golang.org/x/image/draw"
)

// SheetCell is one picture of a contact sheet with the lines printed under
// it. A nil Image leaves the cell empty (a failed job, say) with its text.
type SheetCell struct {
	Image *image.Gray
	Lines []string
}

// Sheet lays cells out in rows under an optional title per column and a
// label per row: a contact sheet of a g·b series or of a parameter sweep.
// Every picture is scaled (nearest neighbour, so pixels stay visible) to
// fit a square of cellPx pixels, keeping its aspect ratio.
func Sheet(rows [][]SheetCell, colTitles, rowLabels []string, cellPx int) (*image.RGBA, error) {
	if cellPx < 16 || cellPx > 2048 {
		return nil, fmt.Errorf("figure: Sheet cell size %d px: want 16 to 2048", cellPx)
	}
	ncol := len(colTitles)
	for _, r := range rows {
		ncol = max(ncol, len(r))
	}
	if len(rows) == 0 || ncol == 0 {
		return nil, fmt.Errorf("figure: Sheet: no cells")
	}
	textPx := max(11, float64(cellPx)/14)
	face := newFace(regularFont(), textPx)
	bold := newFace(boldFont(), textPx)
	asc, desc := lineMetrics(face)
	lineH := asc + desc + 2
	pad := max(4, cellPx/32)

	maxLines := 0
	for _, r := range rows {
		for _, c := range r {
			maxLines = max(maxLines, len(c.Lines))
		}
	}
	labelW := 0
	for _, l := range rowLabels {
		labelW = max(labelW, textWidth(bold, l)+2*pad)
	}
	titleH := 0
	if hasText(colTitles) {
		titleH = lineH + pad
	}
	cellW := cellPx + 2*pad
	cellH := cellPx + maxLines*lineH + 2*pad
	W := labelW + ncol*cellW
	H := titleH + len(rows)*cellH
	if W > maxFigurePx || H > maxFigurePx {
		return nil, fmt.Errorf("figure: Sheet of %d × %d px exceeds the %d px limit; use fewer or smaller cells", W, H, maxFigurePx)
	}
	dst := image.NewRGBA(image.Rect(0, 0, W, H))
	draw.Draw(dst, dst.Bounds(), image.White, image.Point{}, draw.Src)
	for c, t := range colTitles {
		drawText(dst, bold, image.Pt(labelW+c*cellW+pad, titleH-pad-desc), t)
	}
	for r, row := range rows {
		y0 := titleH + r*cellH
		if r < len(rowLabels) {
			drawText(dst, bold, image.Pt(pad, y0+pad+cellPx/2), rowLabels[r])
		}
		for c, cell := range row {
			x0 := labelW + c*cellW + pad
			box := image.Rect(x0, y0+pad, x0+cellPx, y0+pad+cellPx)
			if cell.Image != nil {
				b := cell.Image.Bounds()
				sw, sh := b.Dx(), b.Dy()
				if sw > 0 && sh > 0 {
					k := min(float64(cellPx)/float64(sw), float64(cellPx)/float64(sh))
					dw, dh := max(1, int(float64(sw)*k)), max(1, int(float64(sh)*k))
					r := image.Rect(box.Min.X+(cellPx-dw)/2, box.Min.Y+(cellPx-dh)/2, 0, 0)
					r.Max = r.Min.Add(image.Pt(dw, dh))
					xdraw.NearestNeighbor.Scale(dst, r, cell.Image, b, draw.Src, nil)
				}
			} else {
				draw.Draw(dst, box, image.NewUniform(color.Gray{Y: 235}), image.Point{}, draw.Src)
			}
			for k, l := range cell.Lines {
				drawText(dst, face, image.Pt(x0, y0+pad+cellPx+(k+1)*lineH-desc), l)
			}
		}
	}
	return dst, nil
}
