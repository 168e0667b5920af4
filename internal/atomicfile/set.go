package atomicfile

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
)

// File is one file of a set: its name inside the directory and the
// function that writes its content.
type File struct {
	Name   string
	Encode func(w io.Writer) error
}

// WriteSet writes every file of files into dir, creating dir and its
// missing parents. Each file goes to a temporary name first; only when all
// are complete are they renamed over the targets. If a rename fails part
// way, the files already replaced are put back from hard links made
// beforehand (where the file system has them), so dir holds the old set or
// the new one, not a mix. ctx is checked between files: a cancelled write
// removes its temporaries and returns ctx.Err(). Errors are *Error and
// name the target, never a temporary.
func WriteSet(ctx context.Context, dir string, files []File) (err error) {
	if err := makeDir(dir); err != nil {
		return err
	}
	ClearStale(dir)
	var temps []string
	defer func() {
		if err != nil {
			for _, t := range temps {
				os.Remove(t)
			}
		}
	}()
	for _, f := range files {
		if err := ctx.Err(); err != nil {
			return err
		}
		tmp, err := writeTemp(dir, f.Name, f.Encode)
		if err != nil {
			return err
		}
		temps = append(temps, tmp)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	// Keep the old files under temporary names until every rename is done.
	backups := make([]string, len(files))
	for i, f := range files {
		target := filepath.Join(dir, f.Name)
		if _, err := os.Lstat(target); err != nil {
			continue
		}
		b := filepath.Join(dir, "."+f.Name+".tmp-"+pidTag()+"-old")
		os.Remove(b)
		if os.Link(target, b) == nil {
			backups[i] = b
		}
	}
	defer func() {
		for _, b := range backups {
			if b != "" {
				os.Remove(b)
			}
		}
	}()
	for i, f := range files {
		target := filepath.Join(dir, f.Name)
		if rerr := os.Rename(temps[i], target); rerr != nil {
			// Put back the files already replaced.
			for k := 0; k < i; k++ {
				t := filepath.Join(dir, files[k].Name)
				if backups[k] != "" {
					os.Rename(backups[k], t)
					backups[k] = ""
				}
			}
			temps = temps[i:]
			return fail("write", target, rerr)
		}
	}
	temps = nil
	syncDir(dir)
	return nil
}

// makeDir creates dir with its missing parents; a file in the way is an
// *Error saying so.
func makeDir(dir string) error {
	if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
		return &Error{Op: "write into", Path: dir, Err: errors.New("not a directory")}
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fail("create the directory", dir, err)
	}
	return nil
}

// Probe checks, before long work, that files can be written into dir: it
// creates dir with its missing parents, then creates and removes a
// temporary file there. Errors are *Error naming dir.
func Probe(dir string) error {
	if err := makeDir(dir); err != nil {
		return err
	}
	f, err := CreateTemp(dir, tempPattern("probe"))
	if err != nil {
		return fail("write into", dir, err)
	}
	f.Close()
	os.Remove(f.Name())
	return nil
}
