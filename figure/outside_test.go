package figure

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// debianPython is the interpreter that sees Debian's python3-pil and
// python3-numpy; the python3 first on PATH may be another one.
const debianPython = "/usr/bin/python3"

// needPython makes sure debianPython can import the given modules. Under CI
// (env CI set) a missing module fails the test; elsewhere it skips with a
// message saying what to install.
func needPython(t *testing.T, modules ...string) {
	t.Helper()
	script := "import " + strings.Join(modules, ", ")
	out, err := exec.Command(debianPython, "-c", script).CombinedOutput()
	if err == nil {
		return
	}
	msg := "outside reference unavailable: " + debianPython + " -c '" + script + "': " + err.Error() + ": " + strings.TrimSpace(string(out)) +
		" (install python3-pil and python3-numpy from Debian)"
	if os.Getenv("CI") != "" {
		t.Fatal(msg)
	}
	t.Skip(msg)
}

// runPython runs script under debianPython with args and returns stdout.
func runPython(t *testing.T, script string, args ...string) []byte {
	t.Helper()
	cmd := exec.Command(debianPython, append([]string{"-c", script}, args...)...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s: %v\n%s", debianPython, err, stderr.String())
	}
	return out
}
