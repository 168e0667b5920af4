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
