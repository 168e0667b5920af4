package match

import (
	"context"
	"fmt"
	"math"

	"faultline/scene"
	"faultline/sim"
)

// Kind says which beam a micrograph shows.
type Kind string

const (
	BrightField Kind = "bf"
	DarkField   Kind = "df"
)

// ParseKind reads "bf" or "df" (empty means bright field).
func ParseKind(s string) (Kind, error) {
	switch s {
	case "", "bf":
		return BrightField, nil
	case "df":
		return DarkField, nil
	}
	return "", fmt.Errorf("%q: want bf or df", s)
}

// Simulate renders the setup on the raster of the view v: the view's pixel
// size, g at the view's angle, the scene's origin at the view's centre,
// blurred by a Gaussian of σ = blurNm (0: none). The scene's own image
// field and blur are not used; the view decides. Only the columns of the
// view are computed (the raster is turned, not resampled: sim.Turn).
func Simulate(ctx context.Context, st *scene.Setup, v View, kind Kind, blurNm float64, workers int) (*Raster, error) {
	if v.W <= 0 || v.H <= 0 || !(v.NmPerPx > 0) || math.IsInf(v.NmPerPx, 0) {
		return nil, fmt.Errorf("view of %d × %d px at %g nm/px: sizes must be positive", v.W, v.H, v.NmPerPx)
	}
	grid := sim.Grid{NX: v.W, NY: v.H, WidthNm: float64(v.W) * v.NmPerPx, HeightNm: float64(v.H) * v.NmPerPx}
	p := sim.Turn(st.Problem, rotation(SceneGAngleDeg(st), v.GAngleDeg), grid)
	im, err := sim.Render(ctx, p, sim.Options{Workers: workers})
	if err != nil {
		return nil, err
	}
	if blurNm > 0 {
		sim.Blur(im, blurNm)
	}
	plane := im.BF()
	if kind == DarkField {
		plane = im.DF()
	}
	return &Raster{W: v.W, H: v.H, Pix: plane, NmPerPx: v.NmPerPx}, nil
}

// SceneGAngleDeg is the direction of g in the scene's own picture,
// counter-clockwise from +x as displayed: 0 in the default frame, where g
// points right, and the angle image.x_axis gives it otherwise.
func SceneGAngleDeg(st *scene.Setup) float64 { return st.GAngleDeg }
