package match

import (
	"math"
	"math/rand/v2"
	"testing"
)

// blob is a smooth test picture: two Gaussian spots of opposite sign and a
// line, so that no shift but the true one matches.
func blob(w, h int, cx, cy float64) *Raster {
	r := NewRaster(w, h, 1)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			x, y := float64(i)-cx, float64(j)-cy
			v := math.Exp(-(x*x+y*y)/18) - 0.7*math.Exp(-((x-9)*(x-9)+(y+4)*(y+4))/8)
			v += 0.3 * math.Exp(-(x-0.4*y)*(x-0.4*y)/4)
			r.Pix[j*w+i] = v
		}
	}
	return r
}

func addNoise(r *Raster, sigma float64, seed uint64) {
	rng := rand.New(rand.NewPCG(seed, 1))
	for k := range r.Pix {
		r.Pix[k] += sigma * rng.NormFloat64()
	}
}

func TestScoreGainOffsetInvariant(t *testing.T) {
	a := blob(40, 30, 20, 15)
	b := NewRaster(40, 30, 1)
	for k, x := range a.Pix {
		b.Pix[k] = 3.7*x - 12
	}
	if r, _ := Score(a, b, nil); math.Abs(r-1) > 1e-12 {
		t.Fatalf("score under gain and offset = %v, want 1", r)
	}
	for k, x := range a.Pix {
		b.Pix[k] = -x
	}
	if r, _ := Score(a, b, nil); math.Abs(r+1) > 1e-12 {
		t.Fatalf("score of the negative = %v, want −1", r)
	}
	// A flat image correlates with nothing.
	for k := range b.Pix {
		b.Pix[k] = 0.5
	}
	if r, _ := Score(a, b, nil); r != 0 {
		t.Fatalf("score against a flat image = %v, want 0", r)
	}
}

func TestRegisterFindsKnownShift(t *testing.T) {
	// The moving picture is the fixed one's content centred elsewhere:
	// feature at (31.3, 22.6) in fixed, at (24, 20) in mov, so mov's pixel
	// (0, 0) lies at (7.3, 2.6) in fixed.
	fixed := blob(64, 48, 31.3, 22.6)
	mov := blob(48, 40, 24, 20)
	for _, noise := range []float64{0, 0.05, 0.5} {
		f := &Raster{W: fixed.W, H: fixed.H, Pix: append([]float64(nil), fixed.Pix...), NmPerPx: 1}
		addNoise(f, noise, 7)
		s, err := Register(f, mov, RegisterOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if s.IX != 7 || s.IY != 3 && s.IY != 2 {
			t.Errorf("noise %g: integer shift (%d, %d), want (7, 2 or 3)", noise, s.IX, s.IY)
		}
		// Sub-pixel: within 0.25 px without noise (bilinear-free smooth
		// content), within a pixel with noise ten times the signal's
		// spread of a weak feature.
		tol := 0.25
		if noise > 0.1 {
			tol = 1
		}
		if math.Abs(s.DX-7.3) > tol || math.Abs(s.DY-2.6) > tol {
			t.Errorf("noise %g: shift (%.2f, %.2f), want (7.3, 2.6) within %g", noise, s.DX, s.DY, tol)
		}
	}
}

func TestRegisterMatchesDirectScore(t *testing.T) {
	fixed := blob(30, 26, 14, 12)
	mov := blob(22, 20, 10, 11)
	addNoise(fixed, 0.1, 3)
	s, err := Register(fixed, mov, RegisterOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// The score at the found shift equals the direct sum over the overlap.
	a := fixed.Crop(s.IX, s.IY, mov.W, mov.H)
	r, n := Score(a, mov, nil)
	if math.Abs(r-s.Score) > 1e-9 || n != s.Overlap {
		t.Fatalf("FFT score %v over %d px, direct %v over %d px", s.Score, s.Overlap, r, n)
	}
}

func TestPlaceRotation(t *testing.T) {
	// A picture with g along +x holding a spot 10 px to the right of the
	// centre; seen in a view with g at 90° (pointing up the screen), the
	// spot is 10 px above the centre.
	sim := NewRaster(64, 64, 0.5)
	for j := 0; j < 64; j++ {
		for i := 0; i < 64; i++ {
			x, y := float64(i)+0.5-32-10, float64(j)+0.5-32
			sim.Pix[j*64+i] = math.Exp(-(x*x + y*y) / 4)
		}
	}
	v := View{W: 40, H: 40, NmPerPx: 0.5, GAngleDeg: 90}
	out := Place(sim, 0, v)
	bi, bj, bv := 0, 0, -1.0
	for j := 0; j < v.H; j++ {
		for i := 0; i < v.W; i++ {
			if x := out.Pix[j*v.W+i]; x > bv {
				bi, bj, bv = i, j, x
			}
		}
	}
	// Centre of the view is between pixels 19 and 20; 10 px up → row 9 or 10.
	if bi < 19 || bi > 20 || bj < 9 || bj > 10 {
		t.Fatalf("spot at (%d, %d), want near (19.5, 9.5)", bi, bj)
	}
	dx, dy := SpecimenOffset(0, -10, 0, v)
	if math.Abs(dx-5) > 1e-12 || math.Abs(dy) > 1e-12 {
		t.Fatalf("offset of 10 px up with g up = (%g, %g) nm, want (5, 0)", dx, dy)
	}
}

// The optional rotation refinement finds a simulation turned by a couple
// of degrees against the micrograph (an error in the measured g angle).
func TestRotationRefinement(t *testing.T) {
	sim := NewRaster(48, 48, 1)
	for j := 0; j < 48; j++ {
		for i := 0; i < 48; i++ {
			x, y := float64(i)+0.5-24, float64(j)+0.5-24
			// A long line through the centre and an off-centre spot.
			sim.Pix[j*48+i] = math.Exp(-y*y/3) + 0.8*math.Exp(-((x-10)*(x-10)+(y-8)*(y-8))/6)
		}
	}
	mic := Place(sim, 0, View{W: 48, H: 48, NmPerPx: 1, GAngleDeg: 2})
	for k, v := range mic.Pix {
		if math.IsNaN(v) {
			mic.Pix[k] = 0
		}
	}
	m := &Micrograph{Name: "turned", Raster: mic}
	plain, err := compare(m, sim, Options{MaxShiftPx: 6})
	if err != nil {
		t.Fatal(err)
	}
	refined, err := compare(m, sim, Options{MaxShiftPx: 6, RefineRotationDeg: 3})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(refined.RotationDeg-2) > 0.5 || refined.Score <= plain.Score {
		t.Errorf("refined turn %.2f° (score %.4f against %.4f unturned), want about 2°", refined.RotationDeg, refined.Score, plain.Score)
	}
}
