package atomicfile

import (
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"syscall"
	"time"
)

// staleName matches this package's temporary names: ".NAME.tmp-PID-RANDOM"
// (or "-old", a kept copy of a replaced file), and ".NAME.tmp-DIGITS" of
// earlier versions.
var staleName = regexp.MustCompile(`^\..+\.tmp-([0-9]+)(?:-([0-9]+|old))?$`)

// staleAge is the age beyond which a temporary is stale whoever made it.
const staleAge = 24 * time.Hour

// legacyAge is the age beyond which a temporary without a process number
// (earlier versions) is stale.
const legacyAge = time.Minute

func pidTag() string { return strconv.Itoa(os.Getpid()) }

// ClearStale removes from dir the temporaries of this package's naming
// that no write in progress can own: those of processes that no longer
// run, those older than a day, and those of earlier versions older than a
// minute. It returns the names removed. Errors are ignored: clearing is a
// courtesy, not part of the write.
func ClearStale(dir string) []string {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var removed []string
	for _, e := range ents {
		m := staleName.FindStringSubmatch(e.Name())
		if m == nil || !e.Type().IsRegular() {
			continue
		}
		info, err := e.Info()
		if err != nil {
			continue
		}
		age := time.Since(info.ModTime())
		stale := age > staleAge
		if m[2] == "" {
			stale = stale || age > legacyAge
		} else if pid, err := strconv.Atoi(m[1]); err == nil && !alive(pid) {
			stale = true
		}
		if stale && os.Remove(filepath.Join(dir, e.Name())) == nil {
			removed = append(removed, e.Name())
		}
	}
	return removed
}

// alive reports whether process pid may still run (when in doubt, yes).
func alive(pid int) bool {
	if pid == os.Getpid() {
		return true
	}
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	if runtime.GOOS == "windows" {
		return true
	}
	err = p.Signal(syscall.Signal(0))
	return err == nil || err == syscall.EPERM
}
