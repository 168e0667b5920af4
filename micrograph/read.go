package micrograph

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Options choose what to read from a file that holds several images.
type Options struct {
	// Stack is the image of an MRC stack to read, counted from 0.
	Stack int
}

// maxWholeRead bounds the files read whole into memory (PNG, JPEG, TIFF):
// a 16384² float32 TIFF and its directory.
const maxWholeRead = 4*MaxSide*MaxSide + 64<<20

// SplitStack splits a trailing "#N" (N a whole number, counted from 0)
// off a path: "tilt.mrc#3" is image 3 of tilt.mrc. A path whose file
// exists as written is taken whole; without a suffix the index is 0.
func SplitStack(path string) (file string, index int, err error) {
	k := strings.LastIndexByte(path, '#')
	if k < 0 {
		return path, 0, nil
	}
	if _, err := os.Stat(path); err == nil {
		return path, 0, nil
	}
	n, err := strconv.Atoi(path[k+1:])
	if err != nil || n < 0 {
		return "", 0, errorf("%s: the suffix after # must pick an image of the stack, counted from 0 (#0, #1, ...)", filepath.Base(path))
	}
	return path[:k], n, nil
}

// Read reads the micrograph at path: PNG, JPEG, TIFF, DM3, DM4 or MRC,
// told apart by their content. A "#N" suffix picks image N of a stack
// (counted from 0). Errors about the content match ErrInvalid and name the
// file.
func Read(path string) (*Image, error) {
	file, stack, err := SplitStack(path)
	if err != nil {
		return nil, err
	}
	f, err := os.Open(file)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, err
	}
	if fi.IsDir() {
		return nil, errorf("%s: is a directory, not an image file", filepath.Base(file))
	}
	m, err := Decode(f, fi.Size(), Options{Stack: stack})
	if err != nil {
		var fe *fileError
		if errors.As(err, &fe) {
			return nil, errorf("%s: %s", filepath.Base(file), fe.msg)
		}
		return nil, fmt.Errorf("%s: %w", filepath.Base(file), err)
	}
	return m, nil
}

// DecodeBytes reads a micrograph held in memory (see Decode).
func DecodeBytes(b []byte, o Options) (*Image, error) {
	return Decode(bytes.NewReader(b), int64(len(b)), o)
}

// Decode reads a micrograph of size bytes from r, telling the format from
// the content: PNG and JPEG by their signatures, TIFF by its byte-order
// mark and 42, DM3 and DM4 by their version word (3 or 4, big-endian) and
// byte-order flag, MRC by "MAP " at byte 208 (MRC 2014).
func Decode(r io.ReaderAt, size int64, o Options) (*Image, error) {
	if o.Stack < 0 {
		return nil, errorf("stack index %d: must be 0 or more", o.Stack)
	}
	var head [256]byte
	n, err := r.ReadAt(head[:], 0)
	if err != nil && err != io.EOF {
		return nil, err
	}
	h := head[:n]
	switch {
	case bytes.HasPrefix(h, []byte("\x89PNG\r\n\x1a\n")), bytes.HasPrefix(h, []byte("\xff\xd8\xff")):
		b, err := readWhole(r, size, "PNG")
		if err != nil {
			return nil, err
		}
		return decodeStd(b)
	case bytes.HasPrefix(h, []byte("II*\x00")), bytes.HasPrefix(h, []byte("MM\x00*")):
		b, err := readWhole(r, size, "TIFF")
		if err != nil {
			return nil, err
		}
		return decodeTIFF(b)
	case n >= 212 && string(h[208:212]) == "MAP ":
		return decodeMRC(r, size, o.Stack)
	case n >= 16 && (binary.BigEndian.Uint32(h) == 3 || binary.BigEndian.Uint32(h) == 4):
		return decodeDM(r, size)
	}
	if n < 16 {
		return nil, errorf("the file is too short (%d bytes) to be an image", n)
	}
	return nil, errorf("not a format this program reads (PNG, JPEG, TIFF, DM3, DM4, MRC 2014)")
}

func readWhole(r io.ReaderAt, size int64, format string) ([]byte, error) {
	if size > maxWholeRead {
		return nil, errorf("%s: file of %d MiB is larger than an image of %d² pixels needs", format, size>>20, MaxSide)
	}
	b := make([]byte, size)
	n, err := r.ReadAt(b, 0)
	if err != nil && err != io.EOF {
		return nil, err
	}
	return b[:n], nil
}
