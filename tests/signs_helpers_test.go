package tests

import (
	"fmt"
	"math"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// The checks of the sign rules (fault type, loop nature, image side,
// misfit sign, small-loop depth layers) compute the geometry they expect
// from the Miller indices themselves, in a cubic crystal where a direction
// [uvw] and a plane normal (hkl) are parallel to the vectors of their
// indices. They use only the README's stated conventions (x along g, z
// along the beam into the foil, y = z × x; R on the side a fault's normal
// points to; a loop's line sense right-handed about its normal; b by
// FS/RH), never the program's rotation, so a flipped convention anywhere
// in the chain moves the image away from where the rule puts it.

// vec3 is a vector of indices or its Cartesian image in a cubic crystal.
type vec3 [3]float64

func (a vec3) dot(b vec3) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }
func (a vec3) cross(b vec3) vec3 {
	return vec3{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}
func (a vec3) unit() vec3 {
	n := math.Sqrt(a.dot(a))
	return vec3{a[0] / n, a[1] / n, a[2] / n}
}
func (a vec3) scale(f float64) vec3 { return vec3{f * a[0], f * a[1], f * a[2]} }

// json writes the vector as a JSON array of numbers.
func (a vec3) json() string { return fmt.Sprintf("[%g, %g, %g]", a[0], a[1], a[2]) }

// imageFrame is the README's image frame for g and beam in a cubic
// crystal: x along g, z along the beam, y = z × x.
type imageFrame struct{ x, y, z vec3 }

func newImageFrame(g, beam vec3) imageFrame {
	x, z := g.unit(), beam.unit()
	return imageFrame{x: x, y: z.cross(x), z: z}
}

// in returns the image-frame components of a crystal vector.
func (f imageFrame) in(v vec3) vec3 { return vec3{v.dot(f.x), v.dot(f.y), v.dot(f.z)} }

// extinction returns ξ_g (nm) of the scene text with %[1]g standing for
// the foil thickness, built at a thickness of 100 nm.
func extinction(t *testing.T, text string) float64 {
	t.Helper()
	return setup(t, fmt.Sprintf(text, 100.0)).XiGNm
}

// contrast returns the image of beam n·g (0: bright field, 1: dark field)
// minus the perfect-crystal intensity of that beam.
func contrast(st *scene.Setup, im *sim.Image, n int) []float64 {
	ref := perfect(st)
	k := -1
	for i, b := range im.Beams {
		if b == n {
			k = i
		}
	}
	out := make([]float64, len(im.Intensity[k]))
	for i, v := range im.Intensity[k] {
		out[i] = v - ref[k]
	}
	return out
}

// pixelX and pixelY give the image-frame position of pixel column i and
// row j by the README's formula, x = (i + 0.5 − nx/2)·width/nx, so that a
// picture mirrored or shifted by the program is caught rather than
// followed.
func pixelX(im *sim.Image, i int) float64 {
	g := im.Grid
	return (float64(i) + 0.5 - float64(g.NX)/2) * g.WidthNm / float64(g.NX)
}

func pixelY(im *sim.Image, j int) float64 {
	g := im.Grid
	return (float64(j) + 0.5 - float64(g.NY)/2) * g.HeightNm / float64(g.NY)
}

// sideVec is the direction, in the image frame, on which the rule puts the
// image of the dislocation of c: sign·(u × z).
func sideVec(c dislocationCase, sign float64) vec3 {
	u := newImageFrame(c.g, vec3{0, 0, 1}).in(c.line.unit())
	return u.cross(vec3{0, 0, 1}).scale(sign)
}

// pictureDirectionOf names a direction in the picture (x right, y down) in
// the eight words the program uses.
func pictureDirectionOf(v vec3) string {
	a := math.Atan2(-v[1], v[0]) * 180 / math.Pi
	names := []string{"right", "upper right", "upper", "upper left", "left", "lower left", "lower", "lower right"}
	return names[int(math.Floor((a+22.5)/45+8))%8]
}
