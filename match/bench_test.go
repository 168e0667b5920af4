package match

import (
	"context"
	"testing"
)

// BenchmarkIdentify12x3 identifies a 1/2<110> dislocation (12 candidates)
// from three micrographs of 160 × 160 px: the size the README's speed
// figure is quoted for.
func BenchmarkIdentify12x3(b *testing.B) {
	t := &testing.T{}
	base := []byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5},
	  "foil": {"thickness_nm": 90},
	  "defects": [{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, -1, 0], "at_nm": [0, 0, 45]}],
	  "image": {"width_nm": 100, "height_nm": 100, "pixels": [50, 50]}}`)
	conds := rawList(`{"g": [2, 0, 0], "beam": [0, 1, 1], "w": 0.5}`, `{"g": [1, 1, -1], "beam": [0, 1, 1], "w": 0.5}`, `{"g": [0, 2, -2], "beam": [0, 1, 1], "w": 0.5}`)
	mics := synthetic(t, base, conds, []float64{0, 35, 90}, BrightField, 160, 1, 1, 40, 1)
	s := &Series{Base: base, Dir: ".", Micrographs: mics, Candidates: burgersCandidates(t, base, "1/2<110>", 0), BlurNm: 1}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Identify(context.Background(), s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
