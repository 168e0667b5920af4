package sim

// Grid is the raster of columns: NX × NY pixels over WidthNm × HeightNm,
// centred on the optical axis. Pixel (i, j) is the column at
// x = (i + 0.5 − NX/2)·WidthNm/NX, y = (j + 0.5 − NY/2)·HeightNm/NY, with x
// along g and y = z × x running down the picture.
type Grid struct {
	NX, NY            int
	WidthNm, HeightNm float64
}

// X returns the x coordinate (nm) of pixel column i.
func (g Grid) X(i int) float64 {
	return (float64(i) + 0.5 - float64(g.NX)/2) * g.WidthNm / float64(g.NX)
}

// Y returns the y coordinate (nm) of pixel row j.
func (g Grid) Y(j int) float64 {
	return (float64(j) + 0.5 - float64(g.NY)/2) * g.HeightNm / float64(g.NY)
}

// Image holds the exit-surface intensities of every beam of every column,
// as fractions of the incident beam intensity.
type Image struct {
	Grid Grid
	// Beams lists the beam of each plane of Intensity as a multiple n of g:
	// 0 is the transmitted beam, 1 the diffracted beam g.
	Beams []int
	// Intensity[k][j*NX+i] is the intensity of beam Beams[k] at pixel (i, j).
	Intensity [][]float64
}

// Beam returns the intensity plane of beam n·g, or nil if it was not
// computed.
func (im *Image) Beam(n int) []float64 {
	for k, b := range im.Beams {
		if b == n {
			return im.Intensity[k]
		}
	}
	return nil
}

// BF returns the bright-field image: the transmitted beam's intensity.
func (im *Image) BF() []float64 { return im.Beam(0) }

// DF returns the dark-field image: the intensity of the diffracted beam g.
func (im *Image) DF() []float64 { return im.Beam(1) }

// At returns the intensity of beam plane k at pixel (i, j).
func (im *Image) At(k, i, j int) float64 { return im.Intensity[k][j*im.Grid.NX+i] }
