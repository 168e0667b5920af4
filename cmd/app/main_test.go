package main

import (
	"image"
	_ "image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"faultline/ui"
)

// The screenshot mode end to end: build the program, run it under a
// virtual X server, and check the capture is the window (at least
// 1400 × 900) and not blank. A missing xvfb-run is a failure (make
// test-deps installs it); skipped with -short (it builds the OpenGL
// driver).
func TestScreenshotUnderXvfb(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the desktop program")
	}
	xvfb, err := exec.LookPath("xvfb-run")
	if err != nil {
		t.Fatal("xvfb-run not installed (Debian package xvfb; make test-deps installs it)")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "app")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	shot := filepath.Join(dir, "shot.png")
	cmd := exec.Command(xvfb, "-a", "-s", "-screen 0 1600x1000x24", bin, "--screenshot", shot)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("app --screenshot: %v\n%s", err, out)
	}
	f, err := os.Open(shot)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, _, err := image.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() < 1400 || b.Dy() < 900 {
		t.Errorf("capture %d × %d, want at least 1400 × 900", b.Dx(), b.Dy())
	}
	// A one-colour capture has standard deviation 0; the window with its
	// images measures about 0.3 of full scale.
	if sd := ui.GreyStdDev(img); sd < 0.05 {
		t.Errorf("capture grey standard deviation %.3f: looks blank", sd)
	}

	// No display: one line, exit status 2, no driver panic.
	cmd = exec.Command(bin)
	cmd.Env = append(withoutDisplay(os.Environ()), "DISPLAY=")
	out, err := cmd.CombinedOutput()
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 2 || string(out) != "no display: use the faultline command, or a virtual display\n" {
		t.Errorf("without a display: %v, output %q; want exit status 2 and the one line", err, out)
	}

	// A broken scene: exit status 2 and one error line, no capture.
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"version": 1}`), 0o644)
	cmd = exec.Command(bin, "--scene", bad, "--screenshot", filepath.Join(dir, "no.png"))
	out, err = cmd.CombinedOutput()
	ee, ok := err.(*exec.ExitError)
	if !ok || ee.ExitCode() != 2 {
		t.Errorf("broken scene: %v, want exit status 2", err)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "error: ") {
		t.Errorf("broken scene: output %q, want one line \"error: ...\"", out)
	}
}

// withoutDisplay drops DISPLAY and WAYLAND_DISPLAY from env.
func withoutDisplay(env []string) []string {
	var out []string
	for _, e := range env {
		if !strings.HasPrefix(e, "DISPLAY=") && !strings.HasPrefix(e, "WAYLAND_DISPLAY=") {
			out = append(out, e)
		}
	}
	return out
}
