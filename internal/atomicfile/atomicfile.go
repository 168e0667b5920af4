// Package atomicfile writes files so that a failure part way never
// destroys what was there before: the content goes to a temporary file in
// the same directory, which is synced and then renamed over the target.
package atomicfile

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Test hooks, for this project's tests only: CreateTemp makes the
// temporary file; WrapWriter may wrap the writer the content goes into (to
// inject a failure part way).
var (
	CreateTemp = os.CreateTemp
	WrapWriter = func(w io.Writer) io.Writer { return w }
)

// Write creates or replaces the file at path with what encode writes. On
// any failure the temporary file is removed and the file at path, if any,
// is left untouched.
func Write(path string, encode func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if base == "" {
		return fmt.Errorf("write %q: path names a directory, not a file", path)
	}
	if dir == "" {
		dir = "."
	}
	f, err := CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	if err = encode(WrapWriter(bw)); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Chmod(0o644); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	// Make the rename durable where the system allows; a failure here does
	// not undo a complete write.
	if d, derr := os.Open(dir); derr == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// WriteFile is Write for content already in memory.
func WriteFile(path string, data []byte) error {
	return Write(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
