package crystal

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"testing"
)

// referencePython is Debian's interpreter, which sees python3-gemmi; the
// python3 first on PATH may be another one.
const referencePython = "/usr/bin/python3"

// requireGemmi skips the test when python3-gemmi is unavailable on a
// developer machine, and fails it when CI is set (the CI set-up installs
// python3-gemmi, so a missing reference there is a broken set-up, not a
// reason to pass).
func requireGemmi(t *testing.T) {
	t.Helper()
	err := exec.Command(referencePython, "-c", "import gemmi").Run()
	if err == nil {
		return
	}
	msg := "reference library python3-gemmi not importable by " + referencePython + " (" + err.Error() + "); install it with: apt-get install python3-gemmi"
	if os.Getenv("CI") != "" {
		t.Fatal(msg)
	}
	t.Skip(msg)
}

// runGemmi runs a Python script under referencePython with input as JSON on
// stdin and decodes its JSON stdout into out.
func runGemmi(t *testing.T, script string, input, out any) {
	t.Helper()
	requireGemmi(t)
	in, err := json.Marshal(input)
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(referencePython, "-c", script)
	cmd.Stdin = bytes.NewReader(in)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	res, err := cmd.Output()
	if err != nil {
		t.Fatalf("reference script failed: %v\n%s", err, stderr.String())
	}
	if err := json.Unmarshal(res, out); err != nil {
		t.Fatalf("reference script output: %v\n%s", err, res)
	}
}
