package crystal

import (
	"encoding/json"
	"testing"

	"faultline/internal/pyref"
)

// requireGemmi skips the test without python3-gemmi, or fails it under CI.
func requireGemmi(t *testing.T) { pyref.Require(t, "python3-gemmi", "gemmi") }

// runGemmi runs a Python script under Debian's interpreter, which sees
// python3-gemmi, with input as JSON on stdin and decodes its JSON stdout
// into out.
func runGemmi(t *testing.T, script string, input, out any) {
	t.Helper()
	requireGemmi(t)
	in, err := json.Marshal(input)
	if err != nil {
		t.Fatal(err)
	}
	res := pyref.Run(t, in, script)
	if err := json.Unmarshal(res, out); err != nil {
		t.Fatalf("reference script output: %v\n%s", err, res)
	}
}
