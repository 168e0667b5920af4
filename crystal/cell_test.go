package crystal

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestCubicGeometry: d = a/√(h²+k²+l²), V = a³, and the interplanar angles
// of the cubic system (Cullity, Elements of X-ray Diffraction, 1978,
// appendix 3): (100)^(111) = 54.7356°, (110)^(111) = 35.2644°,
// (100)^(110) = 45°.
func TestCubicGeometry(t *testing.T) {
	c := Cubic(0.36149)
	for _, g := range [][3]float64{{1, 1, 1}, {2, 0, 0}, {2, 2, 0}, {3, 1, 1}, {1, -2, 3}} {
		want := 0.36149 / math.Sqrt(g[0]*g[0]+g[1]*g[1]+g[2]*g[2])
		if d := c.DSpacing(g); math.Abs(d-want) > 1e-14 {
			t.Errorf("d%v = %g, want %g", g, d, want)
		}
	}
	if v := c.Volume(); math.Abs(v-math.Pow(0.36149, 3)) > 1e-15 {
		t.Errorf("V = %g", v)
	}
	for _, tc := range []struct {
		h1, h2 [3]float64
		deg    float64
	}{
		{[3]float64{1, 0, 0}, [3]float64{1, 1, 1}, 54.7356},
		{[3]float64{1, 1, 0}, [3]float64{1, 1, 1}, 35.2644},
		{[3]float64{1, 0, 0}, [3]float64{1, 1, 0}, 45},
		{[3]float64{1, 1, 1}, [3]float64{1, 1, -1}, 70.5288},
	} {
		if got := c.AngleBetweenPlanes(tc.h1, tc.h2); math.Abs(got-tc.deg) > 1e-4 {
			t.Errorf("angle %v^%v = %.5f°, want %.4f°", tc.h1, tc.h2, got, tc.deg)
		}
		if got := c.AngleBetweenDirections(tc.h1, tc.h2); math.Abs(got-tc.deg) > 1e-4 {
			t.Errorf("angle [%v]^[%v] = %.5f°, want %.4f° (cubic: [hkl] ∥ (hkl))", tc.h1, tc.h2, got, tc.deg)
		}
	}
}

// TestHexagonalDSpacing: 1/d² = 4(h² + hk + k²)/(3a²) + l²/c² for a
// hexagonal cell (Cullity 1978, appendix 3), and the [0001]/(11-20) and
// [0001]/(10-10) geometry.
func TestHexagonalDSpacing(t *testing.T) {
	a, cc := 0.29508, 0.46855
	c := Hexagonal(a, cc)
	for _, g := range [][3]float64{{1, 0, 0}, {0, 0, 2}, {1, 0, 1}, {1, 1, 0}, {1, 0, 2}, {2, -1, 3}, {1, 1, 2}} {
		h, k, l := g[0], g[1], g[2]
		want := 1 / math.Sqrt(4*(h*h+h*k+k*k)/(3*a*a)+l*l/(cc*cc))
		if d := c.DSpacing(g); math.Abs(d-want) > 1e-14 {
			t.Errorf("hexagonal d%v = %.15g, want %.15g", g, d, want)
		}
	}
	// V = (√3/2) a² c.
	if v := c.Volume(); math.Abs(v-math.Sqrt(3)/2*a*a*cc) > 1e-15 {
		t.Errorf("hexagonal V = %g", v)
	}
	if ang := c.AngleBetweenDirections([3]float64{0, 0, 1}, [3]float64{1, 1, 0}); math.Abs(ang-90) > 1e-12 {
		t.Errorf("[0001]^[11-20] = %g°", ang)
	}
	// Angle between a1 and a2 is γ = 120°, and between (10-10) and (01-10) 60°.
	if ang := c.AngleBetweenDirections([3]float64{1, 0, 0}, [3]float64{0, 1, 0}); math.Abs(ang-120) > 1e-12 {
		t.Errorf("[100]^[010] = %g°", ang)
	}
	if ang := c.AngleBetweenPlanes([3]float64{1, 0, 0}, [3]float64{0, 1, 0}); math.Abs(ang-60) > 1e-12 {
		t.Errorf("(100)^(010) = %g°", ang)
	}
}

// TestCellFrame: a along x, b in the xy plane, right-handed, a_i·a*_j = δ_ij
// and G G* = 1 (International Tables Vol. B, ch. 1.1), for cells of all
// seven systems.
func TestCellFrame(t *testing.T) {
	for _, tc := range []struct {
		a, b, c, al, be, ga float64
		system              string
	}{
		{0.4, 0.4, 0.4, 90, 90, 90, "cubic"},
		{0.4, 0.4, 0.6, 90, 90, 90, "tetragonal"},
		{0.4, 0.5, 0.6, 90, 90, 90, "orthorhombic"},
		{0.3, 0.3, 0.5, 90, 90, 120, "hexagonal"},
		{0.5, 0.5, 0.5, 70, 70, 70, "rhombohedral"},
		{0.5, 0.6, 0.7, 90, 105, 90, "monoclinic"},
		{0.5, 0.6, 0.7, 80, 95, 110, "triclinic"},
	} {
		cell, err := NewCell(tc.a, tc.b, tc.c, tc.al, tc.be, tc.ga)
		if err != nil {
			t.Fatal(err)
		}
		if s := cell.System(); s != tc.system {
			t.Errorf("System = %s, want %s", s, tc.system)
		}
		a, b, c := cell.Basis()
		if a.Y != 0 || a.Z != 0 || b.Z != 0 || r3.Dot(r3.Cross(a, b), c) <= 0 {
			t.Errorf("%s: frame a=%v b=%v c=%v", tc.system, a, b, c)
		}
		for _, x := range []struct {
			v    r3.Vec
			want float64
		}{{a, tc.a}, {b, tc.b}, {c, tc.c}} {
			if math.Abs(r3.Norm(x.v)-x.want) > 1e-14 {
				t.Errorf("%s: edge length %g, want %g", tc.system, r3.Norm(x.v), x.want)
			}
		}
		if ang := cell.AngleBetweenDirections([3]float64{0, 1, 0}, [3]float64{0, 0, 1}); math.Abs(ang-tc.al) > 1e-10 {
			t.Errorf("%s: alpha = %g", tc.system, ang)
		}
		if ang := cell.AngleBetweenDirections([3]float64{1, 0, 0}, [3]float64{0, 0, 1}); math.Abs(ang-tc.be) > 1e-10 {
			t.Errorf("%s: beta = %g", tc.system, ang)
		}
		var p mat.Dense
		p.Mul(cell.Metric(), cell.ReciprocalMetric())
		if !mat.EqualApprox(&p, mat.NewDiagDense(3, []float64{1, 1, 1}), 1e-12) {
			t.Errorf("%s: G G* = %v", tc.system, mat.Formatted(&p))
		}
		if v := cell.Volume(); math.Abs(v-r3.Dot(a, r3.Cross(b, c))) > 1e-15 {
			t.Errorf("%s: Volume %g, a·(b×c) = %g", tc.system, v, r3.Dot(a, r3.Cross(b, c)))
		}
	}
}

func TestNewCellBadInput(t *testing.T) {
	for _, tc := range [][6]float64{
		{0, 1, 1, 90, 90, 90},
		{-1, 1, 1, 90, 90, 90},
		{1, math.Inf(1), 1, 90, 90, 90},
		{1, 1, math.NaN(), 90, 90, 90},
		{1, 1, 1, 0, 90, 90},
		{1, 1, 1, 90, 180, 90},
		{1, 1, 1, 90, 90, -10},
		{1, 1, 1, 30, 30, 90},    // γ > α + β: cannot close
		{1, 1, 1, 120, 120, 120}, // sum 360: flat
		{1, 1, 1, 150, 150, 100}, // sum > 360
	} {
		if _, err := NewCell(tc[0], tc[1], tc[2], tc[3], tc[4], tc[5]); err == nil {
			t.Errorf("NewCell%v accepted", tc)
		}
	}
}
