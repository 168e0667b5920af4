package figure

import (
	"errors"
	"faultline/internal/atomicfile"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// failAfter is a writer that accepts n bytes and then fails.
type failAfter struct {
	w io.Writer
	n int
}

var errInjected = errors.New("injected write failure")

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		k, _ := f.w.Write(p[:f.n])
		f.n = 0
		return k, errInjected
	}
	f.n -= len(p)
	return f.w.Write(p)
}

// writers are the file writers of the package, each writing path.
var writers = map[string]func(path string) error{
	"png":  func(p string) error { return WritePNG(p, testGray(), testText) },
	"tiff": func(p string) error { return WriteFloatTIFF(p, tiffData(300, 200), 300, 200) },
}

// oldFile creates path with known contents and returns them.
func oldFile(t *testing.T, path string) []byte {
	t.Helper()
	old := []byte("the previous file, which must survive")
	if err := os.WriteFile(path, old, 0o644); err != nil {
		t.Fatal(err)
	}
	return old
}

// checkUntouched fails unless path still holds old and dir holds nothing
// else (no temporary file left behind).
func checkUntouched(t *testing.T, dir, path string, old []byte) {
	t.Helper()
	got, err := os.ReadFile(path)
	if err != nil || string(got) != string(old) {
		t.Errorf("old file changed: %q, %v", got, err)
	}
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if filepath.Join(dir, e.Name()) != path {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}

func TestAtomicWriteFailingWriter(t *testing.T) {
	for name, write := range writers {
		// The full size, to fail at the start, half way and at the last
		// byte.
		full := filepath.Join(t.TempDir(), "full")
		if err := write(full); err != nil {
			t.Fatal(err)
		}
		fi, err := os.Stat(full)
		if err != nil {
			t.Fatal(err)
		}
		size := int(fi.Size())
		for _, after := range []int{0, size / 2, size - 1} {
			dir := t.TempDir()
			path := filepath.Join(dir, "out")
			old := oldFile(t, path)
			atomicfile.WrapWriter = func(w io.Writer) io.Writer { return &failAfter{w: w, n: after} }
			err := write(path)
			atomicfile.WrapWriter = func(w io.Writer) io.Writer { return w }
			if !errors.Is(err, errInjected) {
				t.Errorf("%s, failing after %d bytes: error %v, want the injected one", name, after, err)
			}
			checkUntouched(t, dir, path, old)
		}
	}
}

func TestAtomicWriteUnwritableDir(t *testing.T) {
	for name, write := range writers {
		dir := t.TempDir()
		path := filepath.Join(dir, "out")
		old := oldFile(t, path)
		if err := os.Chmod(dir, 0o555); err != nil {
			t.Fatal(err)
		}
		probe, perr := os.CreateTemp(dir, "probe")
		if perr == nil {
			// Permissions are not enforced (running as root): make the
			// temporary file fail to appear as it would in a read-only
			// directory.
			probe.Close()
			os.Remove(probe.Name())
			t.Logf("%s: directory permissions not enforced here; injecting the create failure", name)
			atomicfile.CreateTemp = func(string, string) (*os.File, error) { return nil, os.ErrPermission }
		}
		err := write(path)
		atomicfile.CreateTemp = os.CreateTemp
		os.Chmod(dir, 0o755)
		if !errors.Is(err, os.ErrPermission) {
			t.Errorf("%s: error %v, want a permission error", name, err)
		}
		checkUntouched(t, dir, path, old)
	}
}

// TestAtomicWriteRenameFails writes over a non-empty directory: the data is
// written in full, then the rename fails, and the temporary file must go.
func TestAtomicWriteRenameFails(t *testing.T) {
	for name, write := range writers {
		dir := t.TempDir()
		path := filepath.Join(dir, "out")
		if err := os.Mkdir(path, 0o755); err != nil {
			t.Fatal(err)
		}
		keep := filepath.Join(path, "keep")
		if err := os.WriteFile(keep, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := write(path); err == nil {
			t.Errorf("%s: writing over a directory: no error", name)
		}
		if b, err := os.ReadFile(keep); err != nil || string(b) != "x" {
			t.Errorf("%s: directory contents changed", name)
		}
		ents, _ := os.ReadDir(dir)
		if len(ents) != 1 {
			t.Errorf("%s: %d entries in the directory, want only the target", name, len(ents))
		}
	}
}

func TestAtomicWriteReplaces(t *testing.T) {
	for name, write := range writers {
		dir := t.TempDir()
		path := filepath.Join(dir, "out")
		oldFile(t, path)
		if err := os.Chmod(path, 0o600); err != nil {
			t.Fatal(err)
		}
		if err := write(path); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		fi, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != 0o644 {
			t.Errorf("%s: mode %v, want 0644", name, fi.Mode().Perm())
		}
		ents, _ := os.ReadDir(dir)
		if len(ents) != 1 {
			t.Errorf("%s: %d entries, want 1", name, len(ents))
		}
		if name == "png" {
			if m, err := ReadPNGText(path); err != nil || m["scene"] != testText["scene"] {
				t.Errorf("png: new file not readable: %v", err)
			}
		}
	}
}

func TestAtomicWriteMissingDir(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no", "such", "dir", "f.png")
	if err := WritePNG(path, testGray(), nil); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("error %v, want a not-exist error", err)
	}
}
