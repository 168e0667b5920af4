package micrograph

import "testing"

// A picture whose g points up (90°) is turned a quarter clockwise to put
// g to the right: what lies above its centre appears to the right, what
// lies to its right appears below (the image frame's y runs down the
// picture, y = z × x). A rotation, not a mirror: the two axes keep their
// handedness.
func TestPlacementTurnsGToTheRight(t *testing.T) {
	m := &Image{Width: 41, Height: 41, Pix: make([]float32, 41*41)}
	// Centre at (20.5, 20.5) in pixel coordinates.
	m.Pix[10*41+20] = 200 // 10 px above the centre, on the picture's g
	m.Pix[20*41+30] = 100 // 10 px to the right
	const nmPerPx = 2.0
	p := Placement{NmPerPx: nmPerPx, GAngleDeg: 90}
	cases := []struct {
		x, y float64
		want float32
	}{
		{+10 * nmPerPx, 0, 200}, // along g: right in the image frame
		{0, +10 * nmPerPx, 100}, // picture right: down in the image frame
		{0, -10 * nmPerPx, 0},
		{-10 * nmPerPx, 0, 0},
	}
	for _, c := range cases {
		v, ok := m.ValueAt(p, c.x, c.y)
		if !ok || v != c.want {
			t.Errorf("ValueAt(%g, %g) nm = %g (inside %v), want %g", c.x, c.y, v, ok, c.want)
		}
	}
	// Handedness: the image frame's x and y map to picture vectors whose
	// cross product has the sign of the picture's own x × y.
	px0, py0 := p.Pixel(0, 0, 41, 41)
	pxx, pyx := p.Pixel(1, 0, 41, 41)
	pxy, pyy := p.Pixel(0, 1, 41, 41)
	ux, uy := pxx-px0, pyx-py0
	vx, vy := pxy-px0, pyy-py0
	if cross := ux*vy - uy*vx; !(cross > 0) {
		t.Errorf("x × y maps to %g in the picture; a rotation keeps it positive", cross)
	}
	// At 0° nothing turns: a point is where it is.
	if v, _ := m.ValueAt(Placement{NmPerPx: nmPerPx}, 10*nmPerPx, 0); v != 100 {
		t.Errorf("at 0° the pixel right of the centre reads %g, want 100", v)
	}
	// The offset moves the picture's centre on the specimen.
	if v, _ := m.ValueAt(Placement{NmPerPx: nmPerPx, OffXNm: 6, OffYNm: -4}, 6+10*nmPerPx, -4); v != 100 {
		t.Errorf("offset (6, −4) nm: pixel right of the centre reads %g, want 100", v)
	}
	if _, ok := m.ValueAt(p, 1e6, 0); ok {
		t.Error("a point far outside reads as inside")
	}
}
