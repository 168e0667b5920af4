package scene_test

import (
	"context"
	"fmt"
	"log"

	"faultline/scene"
	"faultline/sim"
)

// Load a scene, change it by path, build it and render it. A Builder
// keeps the crystal and the defects between builds, so the second build
// (only the thickness changed) re-runs the last stage alone.
func Example() {
	sc, err := scene.Load("../assets/demo.json")
	if err != nil {
		log.Fatal(err)
	}
	// A coarse image, a thinner foil and the g(3g) weak-beam condition.
	if err := scene.Set(sc, "image.pixels", []int{16, 16}); err != nil {
		log.Fatal(err)
	}
	if err := scene.SetJSON(sc, "diffraction.weak_beam", `{"n": 3}`); err != nil {
		log.Fatal(err)
	}
	var b scene.Builder
	st, err := b.Build(sc, "../assets")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("g = %v, ξg = %.1f nm, s = %.4f /nm, w = %.2f\n", sc.Diffraction.G, st.XiGNm, st.SPerNm, st.W)

	if err := scene.Set(sc, "foil.thickness_nm", 80.0); err != nil {
		log.Fatal(err)
	}
	if st, err = b.Build(sc, "../assets"); err != nil {
		log.Fatal(err)
	}
	c := b.Counts()
	fmt.Printf("builds: material %d, geometry %d, conditions %d\n", c.Material, c.Geometry, c.Conditions)

	im, err := sim.Render(context.Background(), st.Problem, sim.Options{})
	if err != nil {
		log.Fatal(err)
	}
	bf := im.Beam(0)
	mean := 0.0
	for _, v := range bf {
		mean += v / float64(len(bf))
	}
	fmt.Printf("%d×%d columns, mean bright field %.3f\n", im.Grid.NX, im.Grid.NY, mean)
	// Bad input is an error naming the field, and the scene stays as it was.
	fmt.Println(scene.Set(sc, "foil.thickness_nm", -5.0))
	// Output:
	// g = [2 0 0], ξg = 39.0 nm, s = 0.0808 /nm, w = 3.15
	// builds: material 1, geometry 1, conditions 2
	// 16×16 columns, mean bright field 0.390
	// foil.thickness_nm: -5 nm: must be ≥ 0.1 and ≤ 10000 nm (from one atomic plane to 10 µm, far beyond electron transparency)
}
