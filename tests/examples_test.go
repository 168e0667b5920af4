package tests

import (
	"os"
	"path/filepath"
	"testing"
)

// Every example scene in assets/examples builds and renders (on a coarse
// grid, to keep the test short) without a non-finite pixel.
func TestExampleScenesRender(t *testing.T) {
	files, err := filepath.Glob("../assets/examples/*.json")
	if err != nil || len(files) == 0 {
		t.Fatalf("no example scenes: %v", err)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		st := setup(t, string(data))
		p := *st.Problem
		p.Grid.NX, p.Grid.NY = 24, 24*st.Problem.Grid.NY/st.Problem.Grid.NX
		st.Problem = &p
		render(t, st)
	}
}
