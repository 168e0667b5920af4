package export

import (
	"context"
	"fmt"
	"io"
	"path/filepath"

	"faultline/figure"
	"faultline/internal/atomicfile"
	"faultline/sim"
)

// BeamTIFFs returns the encoders of the bright- and dark-field TIFFs:
// 32-bit float intensities (fractions of the incident beam) with the
// pixel size of the grid in the resolution tags and an ImageJ-style
// description (unit=nm), so image tools show them at their true scale,
// and the scene (sceneJSON, nil for none) in the description. The command
// line and the window both write their TIFFs with these.
func BeamTIFFs(im *sim.Image, sceneJSON []byte) ([2]func(io.Writer) error, error) {
	g := im.Grid
	px, err := figure.PixelSizeNm(g)
	if err != nil {
		return [2]func(io.Writer) error{}, err
	}
	meta := figure.TIFFMeta{NmPerPx: px, Scene: string(sceneJSON)}
	enc := func(data []float64) func(io.Writer) error {
		return func(w io.Writer) error { return figure.EncodeCalibratedTIFF(w, data, g.NX, g.NY, meta) }
	}
	return [2]func(io.Writer) error{enc(im.BF()), enc(im.DF())}, nil
}

// BeamMRCs returns the encoders of the bright- and dark-field MRC 2014
// files (32-bit float, mode 2) with the voxel size set to the pixel size
// of the grid, and a label naming the beam.
func BeamMRCs(im *sim.Image) ([2]func(io.Writer) error, error) {
	g := im.Grid
	px, err := figure.PixelSizeNm(g)
	if err != nil {
		return [2]func(io.Writer) error{}, err
	}
	enc := func(data []float64, beam string) func(io.Writer) error {
		label := fmt.Sprintf("Faultline: %s intensity, fraction of the incident beam", beam)
		return func(w io.Writer) error { return figure.EncodeMRC(w, data, g.NX, g.NY, px, label) }
	}
	return [2]func(io.Writer) error{enc(im.BF(), "bright-field"), enc(im.DF(), "dark-field")}, nil
}

// WriteBeamMRCs writes the two MRC files of BeamMRCs to paths, which must
// be in one directory, as one set.
func WriteBeamMRCs(ctx context.Context, paths [2]string, im *sim.Image) error {
	enc, err := BeamMRCs(im)
	if err != nil {
		return err
	}
	return writePair(ctx, paths, enc)
}

func writePair(ctx context.Context, paths [2]string, enc [2]func(io.Writer) error) error {
	dir := filepath.Dir(paths[0])
	if filepath.Dir(paths[1]) != dir {
		return fmt.Errorf("export: %s and %s: want one directory", paths[0], paths[1])
	}
	return atomicfile.WriteSet(ctx, dir, []atomicfile.File{
		{Name: filepath.Base(paths[0]), Encode: enc[0]},
		{Name: filepath.Base(paths[1]), Encode: enc[1]},
	})
}
