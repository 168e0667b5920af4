package scene

import (
	"bytes"
	"context"
	"errors"
	"os"
	"testing"
	"time"

	"faultline/sim"
)

// FuzzParse: no input panics, and every scene that parses saves to a
// fixed point of Parse∘Marshal.
func FuzzParse(f *testing.F) {
	f.Add([]byte(base))
	if demo, err := os.ReadFile("../assets/demo.json"); err == nil {
		f.Add(demo)
	}
	f.Add([]byte(`{"version": 1}`))
	f.Add([]byte(`{"version": 1, "defects": [{"type": "inclusion"}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		sc, err := Parse(data)
		if err != nil {
			return
		}
		a, err := Marshal(sc)
		if err != nil {
			t.Fatal(err)
		}
		sc2, err := Parse(a)
		if err != nil {
			t.Fatalf("saved scene does not parse: %v\n%s", err, a)
		}
		b, _ := Marshal(sc2)
		if !bytes.Equal(a, b) {
			t.Fatalf("not a fixed point:\n%s\n%s", a, b)
		}
		// Building may fail (bad indices for the crystal), but must not
		// panic; what builds must render (a few columns) without panicking
		// or hanging.
		st, err := Build(sc, ".")
		if err != nil {
			return
		}
		p := *st.Problem
		p.Grid.NX, p.Grid.NY = 2, 2
		p.Grid.HeightNm = p.Grid.WidthNm
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		if _, err := sim.Render(ctx, &p, sim.Options{Workers: 1}); errors.Is(err, context.DeadlineExceeded) {
			t.Fatalf("render of 4 columns took more than 5 s:\n%s", a)
		}
	})
}

// FuzzSet: no path or value panics; a failed Set leaves the scene as it
// was, and a successful one leaves a scene that validates and saves to a
// fixed point.
func FuzzSet(f *testing.F) {
	for _, seed := range [][2]string{
		{"foil.thickness_nm", "80"},
		{"diffraction.g", "[1,1,-1]"},
		{"diffraction.g[2]", "1"},
		{"defects[0].b", `"1/2[1 0 1]"`},
		{"defects[0].at_nm", "[0, 0, 30]"},
		{"defects[0]", "null"},
		{"defects[1].at_nm", "[0, 0, 30]"},
		{"diffraction.weak_beam.n", "3"},
		{"diffraction.deviation_from_kikuchi", `{"offset": 0.1, "spacing": 1}`},
		{"image.pixels", "[16, 16]"},
		{"crystal.material", `"Ni"`},
		{"crystal.elastic.cij[0][0]", "100"},
		{"version", "2"},
		{"foil..x", "1"},
		{"defects[99999999999999999999].b", `"x"`},
		{"image.pixels", "[1e400, 2]"},
	} {
		f.Add(seed[0], seed[1])
	}
	f.Fuzz(func(t *testing.T, path, value string) {
		sc, err := Parse([]byte(base))
		if err != nil {
			t.Fatal(err)
		}
		before, _ := Marshal(sc)
		if err := SetJSON(sc, path, value); err != nil {
			var fe *FieldError
			if !errors.As(err, &fe) || !errors.Is(err, ErrInvalid) {
				t.Fatalf("SetJSON(%q, %q): error %v is not a *FieldError", path, value, err)
			}
			if after, _ := Marshal(sc); !bytes.Equal(before, after) {
				t.Fatalf("SetJSON(%q, %q) failed (%v) but changed the scene", path, value, err)
			}
			return
		}
		if err := sc.Validate(); err != nil {
			t.Fatalf("SetJSON(%q, %q) left an invalid scene: %v", path, value, err)
		}
		a, _ := Marshal(sc)
		sc2, err := Parse(a)
		if err != nil {
			t.Fatalf("scene after SetJSON(%q, %q) does not parse: %v", path, value, err)
		}
		if b, _ := Marshal(sc2); !bytes.Equal(a, b) {
			t.Fatalf("not a fixed point after SetJSON(%q, %q)", path, value)
		}
	})
}
