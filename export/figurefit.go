package export

import (
	"fmt"
	"image"

	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// maxFigureDown is the largest box-average reduction a figure applies to
// fit images too large for figure.MaxFigurePx.
const maxFigureDown = 8

// figurePlan is how the figure shows the images: each simulated pixel (or
// down × down block of them, averaged) becomes a scale × scale block.
type figurePlan struct{ scale, down int }

// planFigure chooses the figure's geometry for images of grid g: the
// automatic (or requested) upscaling, reduced until the figure fits within
// figure.MaxFigurePx, and where even one figure pixel per simulated pixel
// is too large, a box-average reduction of up to maxFigureDown. Images
// that no geometry fits (a strip a few pixels across) are an error naming
// image.pixels, found before rendering by CheckFigure.
func planFigure(st *scene.Setup, g sim.Grid, o Options) (figurePlan, error) {
	px, err := figure.PixelSizeNm(g)
	if err != nil {
		return figurePlan{}, &scene.FieldError{Path: "image.pixels", Msg: err.Error()}
	}
	c := captionLines(st, o)
	c.Lines = append(c.Lines, longestGreyNote(o.FigureMapping), "panels reduced 8× (box average); bf.tiff and df.tiff hold every pixel")
	var last error
	for down := 1; down <= maxFigureDown; down++ {
		w, h := (g.NX+down-1)/down, (g.NY+down-1)/down
		if down > 1 && (g.NX < 2*down || g.NY < 2*down) {
			break
		}
		hi := o.Scale
		if hi == 0 {
			hi = figure.AutoScale(2, w)
		}
		hi = min(hi, figure.MaxFigurePx/(2*w), figure.MaxFigurePx/h)
		for s := max(hi, 1); s >= max(1, hi-64); s-- {
			l := figure.Layout{NmPerPx: px * float64(down), Scale: s, Caption: o.Caption}
			if last = figure.CheckPair(w, h, c, l); last == nil {
				return figurePlan{scale: s, down: down}, nil
			}
		}
	}
	why := "a figure pixel per simulated pixel is too large"
	if last != nil {
		why = "the panels would be too narrow for the scale bar and g arrow"
		if g.NX*2 > figure.MaxFigurePx || g.NY > figure.MaxFigurePx {
			why = "the panels would exceed the figure's size limit"
		}
	}
	return figurePlan{}, &scene.FieldError{Path: "image.pixels", Msg: fmt.Sprintf("[%d, %d]: figure.png cannot show images of this shape (%s, %d px at most per side); use a shape nearer square, or the profile command for a strip", g.NX, g.NY, why, figure.MaxFigurePx)}
}

// CheckFigure reports, before anything is rendered, whether the figure of
// st's images can be drawn.
func CheckFigure(st *scene.Setup, o Options) error {
	_, err := planFigure(st, st.Problem.Grid, o)
	return err
}

// reduce averages down × down blocks of img (partial blocks at the right
// and bottom edges average what they hold).
func reduce(img *image.Gray, down int) *image.Gray {
	if down == 1 {
		return img
	}
	b := img.Bounds()
	w, h := (b.Dx()+down-1)/down, (b.Dy()+down-1)/down
	out := image.NewGray(image.Rect(0, 0, w, h))
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			sum, n := 0, 0
			for y := j * down; y < min((j+1)*down, b.Dy()); y++ {
				for x := i * down; x < min((i+1)*down, b.Dx()); x++ {
					sum += int(img.GrayAt(b.Min.X+x, b.Min.Y+y).Y)
					n++
				}
			}
			out.Pix[j*out.Stride+i] = uint8((sum + n/2) / n)
		}
	}
	return out
}
