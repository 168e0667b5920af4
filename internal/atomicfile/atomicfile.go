// Package atomicfile writes files so that a failure part way never
// destroys what was there before: the content goes to a temporary file in
// the same directory, which is synced and then renamed over the target.
// WriteSet does the same for several files that belong together (the
// files of one render): all are written first and renamed only when every
// one is complete, so the directory holds the old set or the new one.
//
// Temporary files are named ".NAME.tmp-PID-RANDOM" (PID of the writing
// process). A process killed while writing leaves them behind; the next
// write into that directory removes those of processes that are gone (and
// any older than a day).
package atomicfile

import (
	"bufio"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
)

// Test hooks, for this project's tests only: CreateTemp makes the
// temporary file; WrapWriter may wrap the writer the content goes into (to
// inject a failure part way).
var (
	CreateTemp = os.CreateTemp
	WrapWriter = func(w io.Writer) io.Writer { return w }
)

// Error is a failure to write a file, naming the file that was to be
// written (never a temporary name) and the cause from the system, without
// the path the system put into it.
type Error struct {
	Op   string // "write", "create the directory"
	Path string // the target file or directory
	Err  error
}

func (e *Error) Error() string { return e.Op + " " + e.Path + ": " + e.Err.Error() }
func (e *Error) Unwrap() error { return e.Err }

// fail wraps err for path, stripping the *PathError or *LinkError the
// system wraps around it (their paths are temporary names).
func fail(op, path string, err error) error {
	var pe *fs.PathError
	var le *os.LinkError
	switch {
	case errors.As(err, &pe):
		err = pe.Err
	case errors.As(err, &le):
		err = le.Err
	}
	return &Error{Op: op, Path: path, Err: err}
}

// tempPattern is the os.CreateTemp pattern of a temporary for base.
func tempPattern(base string) string {
	return "." + base + ".tmp-" + strconv.Itoa(os.Getpid()) + "-*"
}

// Write creates or replaces the file at path with what encode writes. On
// any failure the temporary file is removed and the file at path, if any,
// is left untouched.
func Write(path string, encode func(w io.Writer) error) error {
	dir, base := filepath.Split(path)
	if base == "" {
		return &Error{Op: "write", Path: path, Err: errors.New("path names a directory, not a file")}
	}
	if dir == "" {
		dir = "."
	}
	ClearStale(dir)
	tmp, err := writeTemp(dir, base, encode)
	if err != nil {
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fail("write", path, err)
	}
	syncDir(dir)
	return nil
}

// writeTemp writes a complete, synced temporary file for dir/base and
// returns its name; on failure nothing is left.
func writeTemp(dir, base string, encode func(w io.Writer) error) (tmp string, err error) {
	path := filepath.Join(dir, base)
	f, err := CreateTemp(dir, tempPattern(base))
	if err != nil {
		return "", fail("write", path, err)
	}
	name := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(name)
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	if err = encode(WrapWriter(bw)); err != nil {
		return "", fail("write", path, err)
	}
	if err = bw.Flush(); err != nil {
		return "", fail("write", path, err)
	}
	if err = f.Chmod(0o644); err != nil {
		return "", fail("write", path, err)
	}
	if err = f.Sync(); err != nil {
		return "", fail("write", path, err)
	}
	if err = f.Close(); err != nil {
		return "", fail("write", path, err)
	}
	return name, nil
}

// syncDir makes renames in dir durable where the system allows; a failure
// here does not undo a complete write.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// WriteFile is Write for content already in memory.
func WriteFile(path string, data []byte) error {
	return Write(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
