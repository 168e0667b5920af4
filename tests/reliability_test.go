package tests

import (
	"crypto/sha256"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// reliabilityScene renders for a while (nx × nx columns, a dislocation
// across a thick foil); thickness distinguishes two sets of files.
func reliabilityScene(t *testing.T, nx int, thickness float64) string {
	return writeScene(t, fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.005},
  "foil": {"thickness_nm": %g},
  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 1], "at_nm": [0, 0, 100]}],
  "image": {"width_nm": 300, "height_nm": 300, "pixels": [%d, %d]}}`, thickness, nx, nx))
}

// dirState lists the files of dir with a checksum each; temporary files
// are listed as such.
func dirState(t *testing.T, dir string) (files string, temps []string) {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp-") {
			temps = append(temps, e.Name())
			continue
		}
		b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		out = append(out, fmt.Sprintf("%s:%x", e.Name(), sha256.Sum256(b)))
	}
	return strings.Join(out, " "), temps
}

// mountTmpfs mounts a tmpfs of size bytes on a new directory; it needs
// root (CAP_SYS_ADMIN) and fails the test with the reason otherwise.
func mountTmpfs(t *testing.T, size int, opts string) string {
	t.Helper()
	dir := t.TempDir()
	o := fmt.Sprintf("size=%d", size)
	if opts != "" {
		o += "," + opts
	}
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", o, "tmpfs", dir).CombinedOutput(); err != nil {
		t.Fatalf("this test mounts a small tmpfs to fill it and needs root (uid %d): mount: %v: %s", os.Getuid(), err, out)
	}
	t.Cleanup(func() { exec.Command("umount", dir).Run() })
	return dir
}

// TestFullDisk fills a small file system: the render fails with one line
// naming -o and the cause, exit 2, and the directory keeps its old set
// with no temporary file. A read-only one is refused before rendering.
func TestFullDisk(t *testing.T) {
	mnt := mountTmpfs(t, 200<<10, "")
	out := filepath.Join(mnt, "run")
	small := reliabilityScene(t, 32, 150)
	if _, e, code := cli(t, "render", small, "-o", out); code != 0 {
		t.Fatalf("the small render does not fit either: %s", e)
	}
	before, _ := dirState(t, out)
	// 160 × 160: two float TIFFs of 100 KiB each and three PNGs do not fit
	// beside the old set in 200 KiB.
	_, stderr, code := cli(t, "render", reliabilityScene(t, 160, 150), "-o", out)
	lines := strings.Split(strings.TrimSpace(stderr), "\n")
	last := lines[len(lines)-1]
	if code != 2 || !strings.HasPrefix(last, "error: -o "+out+": cannot write ") || !strings.Contains(last, "no space left on device") || strings.Contains(last, ".tmp-") || strings.Count(stderr, "error:") != 1 {
		t.Errorf("full disk: exit %d, stderr %q; want 2 and one line naming -o and the cause", code, stderr)
	}
	after, temps := dirState(t, out)
	if after != before || len(temps) > 0 {
		t.Errorf("full disk: directory changed (%v temporaries)\nbefore %s\nafter  %s", temps, before, after)
	}

	ro := mountTmpfs(t, 64<<10, "ro")
	start := time.Now()
	_, stderr, code = cli(t, "render", reliabilityScene(t, 160, 150), "-o", filepath.Join(ro, "x"))
	if code != 2 || !strings.Contains(stderr, "read-only file system") || strings.Count(stderr, "\n") != 1 {
		t.Errorf("read-only: exit %d, stderr %q", code, stderr)
	}
	t.Logf("read-only refused in %v", time.Since(start))
}

// TestKilledRender kills a render (SIGKILL, and SIGINT) at several
// moments. After SIGKILL the directory holds the old set or the new one,
// never a mix, and the next render clears any temporary the killed one
// left. After SIGINT the program exits 130 with "interrupted" (or 0 if it
// had finished) and leaves no temporary.
func TestKilledRender(t *testing.T) {
	sc := reliabilityScene(t, 112, 300)
	ref := t.TempDir()
	start := time.Now()
	if _, e, code := cli(t, "render", sc, "-o", ref); code != 0 {
		t.Fatal(e)
	}
	full := time.Since(start)
	newSet, _ := dirState(t, ref)
	old := reliabilityScene(t, 24, 100)
	for _, sig := range []syscall.Signal{syscall.SIGKILL, syscall.SIGINT} {
		for _, frac := range []float64{0.1, 0.5, 0.9, 1.0, 1.1} {
			out := t.TempDir()
			if _, e, code := cli(t, "render", old, "-o", out); code != 0 {
				t.Fatal(e)
			}
			oldSet, _ := dirState(t, out)
			cmd := exec.Command(cliPath, "render", sc, "-o", out)
			var stderr strings.Builder
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			time.Sleep(time.Duration(frac * float64(full)))
			cmd.Process.Signal(sig)
			err := cmd.Wait()
			code := 0
			if ee, ok := err.(*exec.ExitError); ok {
				code = ee.ExitCode()
			}
			got, temps := dirState(t, out)
			if got != oldSet && got != newSet {
				t.Errorf("%v at %.0f%%: the directory holds neither set: %s", sig, 100*frac, got)
			}
			if sig == syscall.SIGINT {
				if len(temps) > 0 {
					t.Errorf("SIGINT at %.0f%%: temporaries left: %v", 100*frac, temps)
				}
				if code == -1 && frac < 0.5 {
					// The signal came before the program had started
					// (the Go runtime's start-up, before main installs
					// its handler), and it died of it: the directory
					// check above is what matters then.
					continue
				}
				if code == 130 && !strings.HasSuffix(stderr.String(), "error: interrupted\n") || code != 130 && code != 0 {
					t.Errorf("SIGINT at %.0f%%: exit %d, stderr %q", 100*frac, code, stderr.String())
				}
				continue
			}
			// The next render into the directory clears what was left.
			if _, e, code := cli(t, "render", old, "-o", out); code != 0 {
				t.Fatal(e)
			}
			if _, temps := dirState(t, out); len(temps) > 0 {
				t.Errorf("SIGKILL at %.0f%%: temporaries not cleared by the next render: %v", 100*frac, temps)
			}
		}
	}
}
