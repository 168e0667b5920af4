package sweep

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"io"
	"os"
	"path/filepath"

	"golang.org/x/image/font"
	"golang.org/x/image/font/basicfont"
	"golang.org/x/image/math/fixed"

	"faultline/figure"
	"faultline/internal/atomicfile"
)

// MaxContactTiles bounds the contact sheet: beyond it the images are too
// small to see and the sheet too large to open.
const MaxContactTiles = 2500

// writeContactSheet writes the bright-field images of a grid of one or two
// varied axes as one PNG: the first varied axis down, the second across,
// each image at the grey scale of bf.png (linear in intensity, white = the
// incident beam), scaled up by a whole number to at least 64 pixels. A job
// that is not done is an empty tile marked with its status. It returns the
// path written, or a note saying why there is none.
func writeContactSheet(dir string, sw *Sweep, status []string) (string, string, error) {
	varied := sw.Varied()
	switch {
	case sw.File.Combine != "grid":
		return "", "no contact sheet: the sweep is not a grid", nil
	case len(varied) == 0 || len(varied) > 2:
		return "", fmt.Sprintf("no contact sheet: %d axes vary (a sheet shows one or two)", len(varied)), nil
	case sw.Jobs > MaxContactTiles:
		return "", fmt.Sprintf("no contact sheet: %d jobs, more than %d tiles", sw.Jobs, MaxContactTiles), nil
	}
	src := ""
	for _, o := range sw.File.Outputs {
		if o == "png" || (o == "tiff" && src == "") {
			src = o
		}
	}
	if src == "" {
		return "", "no contact sheet: the sweep writes neither png nor tiff", nil
	}
	rowAxis, colAxis := varied[0], -1
	rows, cols := len(sw.Axes[rowAxis]), 1
	if len(varied) == 2 {
		colAxis = varied[1]
		cols = len(sw.Axes[colAxis])
	}
	tiles := make([]*image.Gray, sw.Jobs)
	tw, th := 0, 0
	for k := range tiles {
		if status[k] != StatusOK {
			continue
		}
		img, err := readBF(filepath.Join(dir, JobDir(k)), src)
		if err != nil {
			return "", "", fmt.Errorf("contact sheet: job %d: %w", k, err)
		}
		tiles[k] = img
		tw, th = max(tw, img.Rect.Dx()), max(th, img.Rect.Dy())
	}
	if tw == 0 {
		tw, th = 64, 64
	}
	scale := max(1, (64+max(tw, th)-1)/max(tw, th))
	tw, th = tw*scale, th*scale

	face := basicfont.Face7x13
	const gap, lineH = 4, 14
	label := func(k int, axis int) string { return compact(sw.Axes[axis][sw.axisIndex(k, axis)]) }
	// Left margin wide enough for the row labels.
	left := 0
	for r := 0; r < rows; r++ {
		left = max(left, font.MeasureString(face, label(jobAt(sw, rowAxis, r, colAxis, 0), rowAxis)).Ceil())
	}
	left += 2 * gap
	top := 2*lineH + gap
	W := left + cols*(tw+gap)
	H := top + rows*(th+gap) + lineH + gap
	foot := fmt.Sprintf("bright field, grey linear in intensity (white = incident beam), %d×%d jobs", rows, cols)
	W = max(W, font.MeasureString(face, titleText(sw, rowAxis, colAxis)).Ceil()+2*gap, font.MeasureString(face, foot).Ceil()+2*gap)
	sheet := image.NewRGBA(image.Rect(0, 0, W, H))
	draw.Draw(sheet, sheet.Bounds(), image.White, image.Point{}, draw.Src)
	text := func(x, y int, s string) {
		d := font.Drawer{Dst: sheet, Src: image.Black, Face: face, Dot: fixed.P(x, y)}
		d.DrawString(s)
	}
	text(gap, lineH, titleText(sw, rowAxis, colAxis))
	for c := 0; c < cols && colAxis >= 0; c++ {
		text(left+c*(tw+gap), 2*lineH, label(jobAt(sw, rowAxis, 0, colAxis, c), colAxis))
	}
	for r := 0; r < rows; r++ {
		y0 := top + r*(th+gap)
		text(gap, y0+th/2+4, label(jobAt(sw, rowAxis, r, colAxis, 0), rowAxis))
		for c := 0; c < cols; c++ {
			k := jobAt(sw, rowAxis, r, colAxis, c)
			x0 := left + c*(tw+gap)
			cell := image.Rect(x0, y0, x0+tw, y0+th)
			if img := tiles[k]; img != nil {
				for y := 0; y < th; y++ {
					for x := 0; x < tw; x++ {
						sx, sy := x/scale, y/scale
						if sx < img.Rect.Dx() && sy < img.Rect.Dy() {
							sheet.Set(x0+x, y0+y, img.GrayAt(img.Rect.Min.X+sx, img.Rect.Min.Y+sy))
						}
					}
				}
				continue
			}
			draw.Draw(sheet, cell, image.NewUniform(color.RGBA{230, 200, 200, 255}), image.Point{}, draw.Src)
			text(x0+gap, y0+th/2+4, fmt.Sprintf("%d %s", k, status[k]))
		}
	}
	text(gap, H-gap, foot)
	var buf bytes.Buffer
	if err := png.Encode(&buf, sheet); err != nil {
		return "", "", err
	}
	path := filepath.Join(dir, ContactSheetName)
	if err := atomicfile.WriteFile(path, buf.Bytes()); err != nil {
		return "", "", err
	}
	return path, "", nil
}

func titleText(sw *Sweep, rowAxis, colAxis int) string {
	t := "down: " + sw.File.Axes[rowAxis].Path
	if colAxis >= 0 {
		t += "   across: " + sw.File.Axes[colAxis].Path
	}
	return t
}

// jobAt is the k of the grid job whose varied axes take value r (row
// axis) and c (column axis) and every other axis its only value.
func jobAt(sw *Sweep, rowAxis, r, colAxis, c int) int {
	k := 0
	for i, vals := range sw.Axes {
		idx := 0
		switch i {
		case rowAxis:
			idx = r
		case colAxis:
			idx = c
		}
		k = k*len(vals) + idx
	}
	return k
}

// readBF reads a job's bright-field image as 8-bit grey: bf.png as
// written, or bf.tiff at the same fixed mapping as bf.png.
func readBF(jobDir, src string) (*image.Gray, error) {
	if src == "png" {
		f, err := os.Open(filepath.Join(jobDir, "bf.png"))
		if err != nil {
			return nil, err
		}
		defer f.Close()
		img, err := png.Decode(f)
		if err != nil {
			return nil, err
		}
		g, ok := img.(*image.Gray)
		if !ok {
			g = image.NewGray(img.Bounds())
			draw.Draw(g, g.Bounds(), img, img.Bounds().Min, draw.Src)
		}
		return g, nil
	}
	f, err := os.Open(filepath.Join(jobDir, "bf.tiff"))
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, nx, ny, err := figure.ReadFloatTIFF(io.Reader(f))
	if err != nil {
		return nil, err
	}
	v := make([]float64, len(data))
	for i, x := range data {
		v[i] = float64(x)
	}
	return figure.Gray(v, nx, ny, figure.Mapping{}), nil
}
