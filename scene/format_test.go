package scene

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
)

// A saved scene is compact and readable: every vector on one line, short
// sections on one line, fields in the order of the file format, a final
// newline; and it holds exactly the scene's values.
func TestMarshalLayout(t *testing.T) {
	sc := demoScene(t)
	cij := [6][6]float64{}
	for i := range 6 {
		cij[i][i] = 100
	}
	sc.Crystal.Elastic = &Elastic{Cij: &cij}
	data, err := Marshal(sc)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	for _, want := range []string{
		"{\n  \"version\": 1,\n  \"crystal\": {",
		`"g": [2, 0, 0],`,
		`"beam": [0, 1, 1],`,
		`"partials": ["1/6[2 -1 -1]", "1/6[1 1 -2]"],`,
		`{"type": "inclusion", "at_nm": [-90, 95, 55], "radius_nm": 9, "misfit": -0.012},`,
		"        [100, 0, 0, 0, 0, 0],\n",
		`"image": {"width_nm": 300, "height_nm": 300, "pixels": [200, 200]}` + "\n}\n",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("saved scene lacks %q:\n%s", want, text)
		}
	}
	for i, line := range strings.Split(text, "\n") {
		if len(line) > lineWidth {
			t.Errorf("line %d longer than %d: %q", i+1, lineWidth, line)
		}
	}
	// The same values as the standard encoder writes.
	var a, b any
	std, _ := json.Marshal(sc)
	json.Unmarshal(std, &a)
	json.Unmarshal(data, &b)
	ja, _ := json.Marshal(a)
	jb, _ := json.Marshal(b)
	if !bytes.Equal(ja, jb) {
		t.Errorf("values differ from encoding/json:\n%s\n%s", ja, jb)
	}
	back, err := Parse(data)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := Marshal(back)
	if !bytes.Equal(again, data) {
		t.Error("not a fixed point")
	}
}
