package scene

import (
	"bytes"
	"os"
	"testing"
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
		// Building may fail (bad indices for the crystal), but must not panic.
		Build(sc, ".")
	})
}
