package scene

import (
	"fmt"
	"strings"

	"faultline/crystal"
)

// Materials lists the names of the built-in materials crystal.material
// accepts.
func Materials() []string { return crystal.PresetNames() }

// ParseIndexText reads three or four indices as a person types them:
// "2 0 0", "2,0,0", "[1 -1 0]", "(1 1 1)" or the compact "[1-10]". A
// leading factor is refused (it belongs to Burgers vectors, which a scene
// keeps as text).
func ParseIndexText(text string) ([]float64, error) {
	s := strings.TrimSpace(text)
	if s == "" {
		return nil, fmt.Errorf("empty: type three indices, e.g. 2 0 0")
	}
	if !strings.ContainsAny(s, "[(<{") {
		s = "[" + s + "]"
	}
	ix, err := crystal.ParseIndices(s)
	if err != nil {
		return nil, err
	}
	if ix.Factor != 1 {
		return nil, fmt.Errorf("%q: no factor here; type the indices only", text)
	}
	return ix.V, nil
}

// CheckCrystal builds the crystal section c alone (relative paths from
// dir), so a front can refuse a CIF file that does not read before it
// becomes the scene's crystal.
func CheckCrystal(c Crystal, dir string) error {
	var b Builder
	_, err := b.material(&c, dir)
	return err
}
