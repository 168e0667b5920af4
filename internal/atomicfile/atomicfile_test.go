package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

type failAfter struct {
	w io.Writer
	n int
}

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		k, _ := f.w.Write(p[:f.n])
		f.n = 0
		return k, errors.New("disk full (injected)")
	}
	f.n -= len(p)
	return f.w.Write(p)
}

func TestFailedWriteKeepsOldFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "scene.json")
	if err := WriteFile(path, []byte("old content")); err != nil {
		t.Fatal(err)
	}
	WrapWriter = func(w io.Writer) io.Writer { return &failAfter{w: w, n: 3} }
	defer func() { WrapWriter = func(w io.Writer) io.Writer { return w } }()
	err := Write(path, func(w io.Writer) error {
		for i := 0; i < 100; i++ {
			if _, err := w.Write([]byte("new content that will not fit ")); err != nil {
				return err
			}
		}
		return nil
	})
	if err == nil {
		t.Fatal("no error from a failing writer")
	}
	got, _ := os.ReadFile(path)
	if string(got) != "old content" {
		t.Errorf("old file changed to %q", got)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("temporary file left behind: %v", entries)
	}
}

func TestWriteReplaces(t *testing.T) {
	path := filepath.Join(t.TempDir(), "a.txt")
	for _, s := range []string{"one", "two"} {
		if err := WriteFile(path, []byte(s)); err != nil {
			t.Fatal(err)
		}
		if got, _ := os.ReadFile(path); string(got) != s {
			t.Errorf("got %q want %q", got, s)
		}
	}
	if err := WriteFile(filepath.Join(t.TempDir(), "missing", "x"), nil); err == nil {
		t.Error("no error writing into a missing directory")
	}
}
