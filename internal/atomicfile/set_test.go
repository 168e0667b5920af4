package atomicfile

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

func content(s string) func(io.Writer) error {
	return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
}

func set(tag string) []File {
	return []File{{"a.png", content("a " + tag)}, {"b.tiff", content("b " + tag)}, {"c.png", content("c " + tag)}}
}

// listing returns "name=content" for every entry of dir, sorted.
func listing(t *testing.T, dir string) string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range ents {
		b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		out = append(out, e.Name()+"="+string(b))
	}
	sort.Strings(out)
	return strings.Join(out, " ")
}

const oldSet = "a.png=a old b.tiff=b old c.png=c old"

// TestWriteSetAllOrNothing: a set that fails at any file, or whose rename
// fails part way, leaves the old set and no temporary; one that succeeds
// replaces every file.
func TestWriteSetAllOrNothing(t *testing.T) {
	ctx := context.Background()
	for fail := 0; fail < 3; fail++ {
		dir := t.TempDir()
		if err := WriteSet(ctx, dir, set("old")); err != nil {
			t.Fatal(err)
		}
		files := set("new")
		files[fail].Encode = func(w io.Writer) error {
			io.WriteString(w, "partial")
			return errors.New("no space left on device (injected)")
		}
		err := WriteSet(ctx, dir, files)
		var e *Error
		if !errors.As(err, &e) || e.Path != filepath.Join(dir, files[fail].Name) || strings.Contains(err.Error(), ".tmp-") {
			t.Errorf("failing file %d: error %v", fail, err)
		}
		if got := listing(t, dir); got != oldSet {
			t.Errorf("failing file %d: directory holds %s", fail, got)
		}
	}
	// The last rename fails (its target is a directory): the first two
	// are put back.
	dir := t.TempDir()
	if err := WriteSet(ctx, dir, set("old")[:2]); err != nil {
		t.Fatal(err)
	}
	os.MkdirAll(filepath.Join(dir, "c.png", "x"), 0o755)
	err := WriteSet(ctx, dir, set("new"))
	if err == nil || strings.Contains(err.Error(), ".tmp-") {
		t.Errorf("rename over a directory: %v", err)
	}
	if got := listing(t, dir); got != "a.png=a old b.tiff=b old c.png=" {
		t.Errorf("after a failed rename the directory holds %s", got)
	}
	// Success, into a missing parent chain.
	dir = filepath.Join(t.TempDir(), "p", "q")
	if err := WriteSet(ctx, dir, set("new")); err != nil {
		t.Fatal(err)
	}
	if got := listing(t, dir); got != "a.png=a new b.tiff=b new c.png=c new" {
		t.Errorf("new set: %s", got)
	}
	// Cancelled: nothing written, nothing left.
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if err := WriteSet(cctx, dir, set("newer")); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
	if got := listing(t, dir); got != "a.png=a new b.tiff=b new c.png=c new" {
		t.Errorf("after a cancelled write: %s", got)
	}
}

// TestWriteSetNotADirectory: a file, or a device, as the directory is one
// error naming it.
func TestWriteSetNotADirectory(t *testing.T) {
	file := filepath.Join(t.TempDir(), "f")
	os.WriteFile(file, []byte("keep"), 0o644)
	for _, dir := range []string{file, "/dev/null", filepath.Join(file, "sub")} {
		err := WriteSet(context.Background(), dir, set("x"))
		var e *Error
		if !errors.As(err, &e) || strings.Count(err.Error(), dir) != 1 {
			t.Errorf("%s: %v", dir, err)
		}
	}
	if b, _ := os.ReadFile(file); string(b) != "keep" {
		t.Errorf("file changed to %q", b)
	}
}

// TestClearStale: temporaries of a process that is gone, and old ones of
// earlier versions, go on the next write; those of a running process, and
// other files, stay.
func TestClearStale(t *testing.T) {
	dir := t.TempDir()
	cmd := exec.Command("true")
	if err := cmd.Run(); err != nil {
		t.Fatalf("a short-lived process is needed for a dead PID: %v", err)
	}
	dead := cmd.Process.Pid
	old := time.Now().Add(-2 * time.Minute)
	files := map[string]bool{ // name: should be removed
		fmt.Sprintf(".bf.tiff.tmp-%d-123", dead):      true,
		fmt.Sprintf(".bf.tiff.tmp-%d-old", dead):      true,
		".df.tiff.tmp-4567":                           true, // earlier naming, two minutes old
		fmt.Sprintf(".bf.png.tmp-%d-99", os.Getpid()): false,
		"bf.tiff":                                false,
		".hidden":                                false,
		fmt.Sprintf(".notes.txt.tmp-%d-x", dead): false, // not this package's naming
		fmt.Sprintf("bf.tiff.tmp-%d-123", dead):  false, // not hidden: not ours
	}
	for name := range files {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte("x"), 0o644)
		os.Chtimes(p, old, old)
	}
	if err := WriteSet(context.Background(), dir, []File{{"bf.tiff", content("new")}}); err != nil {
		t.Fatal(err)
	}
	for name, gone := range files {
		_, err := os.Stat(filepath.Join(dir, name))
		if gone != os.IsNotExist(err) {
			t.Errorf("%s: removed %v, want %v", name, os.IsNotExist(err), gone)
		}
	}
}
