// Package pyref runs the outside references the tests compare with:
// Debian's Python with its packages python3-gemmi, python3-numpy and
// python3-pil. The first python3 on PATH may be another interpreter that
// cannot see them, so the Debian one is named. It is for tests only.
package pyref

import (
	"bytes"
	"os/exec"
	"strings"
	"testing"
)

// Python is Debian's interpreter, which sees the Debian Python packages.
const Python = "/usr/bin/python3"

// Require fails the test, saying what to install, unless Python can
// import every module: a check against an outside reference never passes
// by being skipped (`make test` installs them). install names the Debian
// packages to install.
func Require(t testing.TB, install string, modules ...string) {
	t.Helper()
	script := "import " + strings.Join(modules, ", ")
	out, err := exec.Command(Python, "-c", script).CombinedOutput()
	if err == nil {
		return
	}
	msg := "outside reference unavailable: " + Python + " -c '" + script + "': " + err.Error() + ": " +
		strings.TrimSpace(string(out)) + " (install " + install + " from Debian)"
	t.Fatal(msg)
}

// Run runs script under Python with args and stdin (nil for none) and
// returns its standard output; a failure fails the test with the script's
// standard error.
func Run(t testing.TB, stdin []byte, script string, args ...string) []byte {
	t.Helper()
	cmd := exec.Command(Python, append([]string{"-c", script}, args...)...)
	if stdin != nil {
		cmd.Stdin = bytes.NewReader(stdin)
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s: %v\n%s", Python, err, stderr.String())
	}
	return out
}
