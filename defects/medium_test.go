package defects

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// rotation returns the matrix rot with v' = rot·v whose rows are the new
// axes expressed in the old frame.
func rotation(x, y, z r3.Vec) [3][3]float64 {
	x, y, z = r3.Unit(x), r3.Unit(y), r3.Unit(z)
	return [3][3]float64{{x.X, x.Y, x.Z}, {y.X, y.Y, y.Z}, {z.X, z.Y, z.Z}}
}

// Bond's matrix must reproduce the tensor rule C'_ijkl = a_ip a_jq a_kr a_ls C_pqrs
// (Ting 1996, §2.8), evaluated here index by index.
func TestRotateStiffnessTensorRule(t *testing.T) {
	// A triclinic-looking but positive definite stiffness (invented numbers).
	c := [6][6]float64{
		{200, 90, 80, 5, -3, 7},
		{90, 180, 70, 2, 4, -6},
		{80, 70, 220, -1, 3, 2},
		{5, 2, -1, 60, 1, -2},
		{-3, 4, 3, 1, 55, 3},
		{7, -6, 2, -2, 3, 65},
	}
	a := rotation(r3.Vec{X: 1, Y: 2, Z: 2}, r3.Vec{X: 2, Y: 1, Z: -2}, r3.Vec{X: 2, Y: -2, Z: 1})
	got := RotateStiffness(c, a)
	t4 := tensor4(c)
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				for l := range 3 {
					var w float64
					for p := range 3 {
						for q := range 3 {
							for r := range 3 {
								for s := range 3 {
									w += a[i][p] * a[j][q] * a[k][r] * a[l][s] * t4[p][q][r][s]
								}
							}
						}
					}
					if g := got[voigt(i, j)][voigt(k, l)]; math.Abs(g-w) > 1e-9*220 {
						t.Fatalf("C'%d%d%d%d = %g, tensor rule %g", i+1, j+1, k+1, l+1, g, w)
					}
				}
			}
		}
	}
}

// Cubic crystal in the frame x' = [110], y' = [-110], z' = [001]: the
// textbook results C'11 = (C11 + C12)/2 + C44, C'12 = (C11 + C12)/2 − C44,
// C'66 = (C11 − C12)/2, C'33 = C11, C'44 = C44 (e.g. Nye 1957, Physical
// Properties of Crystals; from memory). Copper constants C11 = 168.4,
// C12 = 121.4, C44 = 75.4 GPa (Simmons & Wang 1971, from memory).
func TestRotateStiffnessCubic110(t *testing.T) {
	c11, c12, c44 := 168.4, 121.4, 75.4
	got := RotateStiffness(cubicVoigt(c11, c12, c44), rotation(r3.Vec{X: 1, Y: 1}, r3.Vec{X: -1, Y: 1}, r3.Vec{Z: 1}))
	for _, tc := range []struct {
		i, j int
		want float64
	}{
		{0, 0, (c11+c12)/2 + c44}, {0, 1, (c11+c12)/2 - c44}, {5, 5, (c11 - c12) / 2},
		{2, 2, c11}, {3, 3, c44}, {4, 4, c44}, {0, 2, c12}, {0, 5, 0}, {3, 4, 0},
	} {
		if math.Abs(got[tc.i][tc.j]-tc.want) > 1e-9 {
			t.Errorf("C'%d%d = %g, want %g", tc.i+1, tc.j+1, got[tc.i][tc.j], tc.want)
		}
	}
}

// An isotropic stiffness is the same in every frame.
func TestRotateStiffnessIsotropicInvariant(t *testing.T) {
	c := isoVoigt(48, 0.34)
	got := RotateStiffness(c, rotation(r3.Vec{X: 1, Y: 2, Z: 3}, r3.Cross(r3.Vec{X: 1, Y: 2, Z: 3}, r3.Vec{Z: 1}), r3.Cross(r3.Vec{X: 1, Y: 2, Z: 3}, r3.Cross(r3.Vec{X: 1, Y: 2, Z: 3}, r3.Vec{Z: 1}))))
	for i := range 6 {
		for j := range 6 {
			if math.Abs(got[i][j]-c[i][j]) > 1e-9 {
				t.Fatalf("C'%d%d = %g, isotropic %g", i+1, j+1, got[i][j], c[i][j])
			}
		}
	}
}

func TestCheckStiffness(t *testing.T) {
	good := cubicVoigt(168.4, 121.4, 75.4)
	if err := checkStiffness(&good); err != nil {
		t.Fatalf("copper stiffness rejected: %v", err)
	}
	// Cubic stability needs C11 > |C12|, C11 + 2C12 > 0, C44 > 0 (Born
	// criteria, from memory): each broken once.
	for _, c := range [][6][6]float64{
		cubicVoigt(100, 120, 50), cubicVoigt(100, -60, 50), cubicVoigt(100, 50, -1),
	} {
		if err := checkStiffness(&c); !errors.Is(err, ErrInvalid) {
			t.Errorf("unstable cubic %v %v %v accepted (err %v)", c[0][0], c[0][1], c[3][3], err)
		}
	}
	asym := good
	asym[0][1] += 5
	if err := checkStiffness(&asym); !errors.Is(err, ErrInvalid) {
		t.Errorf("asymmetric stiffness accepted")
	}
	if err := checkStiffness(nil); !errors.Is(err, ErrInvalid) {
		t.Errorf("nil stiffness accepted")
	}
}
