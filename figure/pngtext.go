package figure

import (
	"bufio"
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"faultline/internal/atomicfile"
	"fmt"
	"hash/crc32"
	"image"
	"image/png"
	"io"
	"os"
	"slices"
	"strings"
	"unicode/utf8"
)

// pngSignature opens every PNG file (PNG specification §5.2).
var pngSignature = []byte("\x89PNG\r\n\x1a\n")

// maxTextBytes bounds one text value when reading, compressed or not, so a
// damaged or hostile file cannot exhaust memory.
const maxTextBytes = 64 << 20

// WritePNG writes img as a PNG file at path, atomically, with text stored as
// keyword/value chunks right after IHDR (see EncodePNG).
func WritePNG(path string, img image.Image, text map[string]string) error {
	if err := checkText(text); err != nil {
		return err
	}
	return atomicfile.Write(path, func(w io.Writer) error { return EncodePNG(w, img, text) })
}

// EncodePNG writes img as PNG to w with each text entry as a chunk placed
// right after IHDR, in keyword order: tEXt when the value is Latin-1
// (every rune below U+0100), otherwise an uncompressed iTXt chunk holding
// UTF-8. Keywords must be 1 to 79 printable Latin-1 characters without
// leading, trailing or doubled spaces (PNG specification §11.3.4.2); values
// must be valid UTF-8 without NUL.
func EncodePNG(w io.Writer, img image.Image, text map[string]string) error {
	if err := checkText(text); err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		return fmt.Errorf("figure: encode PNG: %w", err)
	}
	b := buf.Bytes()
	// The encoder writes the signature and then IHDR: 4 bytes length,
	// 4 bytes type, 13 bytes data, 4 bytes CRC.
	const ihdrEnd = 8 + 4 + 4 + 13 + 4
	if len(b) < ihdrEnd || !bytes.Equal(b[:8], pngSignature) || string(b[12:16]) != "IHDR" {
		panic("figure: image/png did not start with IHDR")
	}
	if _, err := w.Write(b[:ihdrEnd]); err != nil {
		return err
	}
	keys := make([]string, 0, len(text))
	for k := range text {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		typ, data := textChunk(k, text[k])
		if err := writeChunk(w, typ, data); err != nil {
			return err
		}
	}
	_, err := w.Write(b[ihdrEnd:])
	return err
}

// checkText validates every keyword and value, naming the offending key.
func checkText(text map[string]string) error {
	keys := make([]string, 0, len(text))
	for k := range text {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		if err := checkKeyword(k); err != nil {
			return fmt.Errorf("figure: PNG text key %q: %w", k, err)
		}
		v := text[k]
		if !utf8.ValidString(v) {
			return fmt.Errorf("figure: PNG text %q: value is not valid UTF-8", k)
		}
		if strings.IndexByte(v, 0) >= 0 {
			return fmt.Errorf("figure: PNG text %q: value holds a NUL character", k)
		}
	}
	return nil
}

// checkKeyword applies the keyword rules of PNG specification §11.3.4.2.
func checkKeyword(k string) error {
	if k == "" {
		return errors.New("keyword is empty")
	}
	if !utf8.ValidString(k) {
		return errors.New("keyword is not valid UTF-8")
	}
	n := 0
	prevSpace := false
	for _, r := range k {
		n++
		if !(r >= 32 && r <= 126 || r >= 161 && r <= 255) {
			return fmt.Errorf("keyword holds %U, not a printable Latin-1 character", r)
		}
		if r == ' ' && prevSpace {
			return errors.New("keyword holds consecutive spaces")
		}
		prevSpace = r == ' '
	}
	if n > 79 {
		return fmt.Errorf("keyword is %d characters long, at most 79 allowed", n)
	}
	if k[0] == ' ' || k[len(k)-1] == ' ' {
		return errors.New("keyword starts or ends with a space")
	}
	return nil
}

// textChunk returns the chunk type and data holding one validated entry.
func textChunk(k, v string) (string, []byte) {
	key := latin1(k)
	if isLatin1(v) {
		data := append(key, 0)
		return "tEXt", append(data, latin1(v)...)
	}
	// iTXt: keyword, NUL, compression flag 0, compression method 0, empty
	// language tag, NUL, empty translated keyword, NUL, UTF-8 text.
	data := append(key, 0, 0, 0, 0, 0)
	return "iTXt", append(data, v...)
}

func isLatin1(s string) bool {
	for _, r := range s {
		if r > 0xFF {
			return false
		}
	}
	return true
}

// latin1 encodes s, whose runes are all below U+0100, one byte per rune.
func latin1(s string) []byte {
	b := make([]byte, 0, len(s))
	for _, r := range s {
		b = append(b, byte(r))
	}
	return b
}

func fromLatin1(b []byte) string {
	var sb strings.Builder
	for _, c := range b {
		sb.WriteRune(rune(c))
	}
	return sb.String()
}

// writeChunk writes length, type, data and the CRC-32 of type and data.
func writeChunk(w io.Writer, typ string, data []byte) error {
	var hdr [8]byte
	binary.BigEndian.PutUint32(hdr[:4], uint32(len(data)))
	copy(hdr[4:], typ)
	crc := crc32.NewIEEE()
	crc.Write(hdr[4:])
	crc.Write(data)
	var tail [4]byte
	binary.BigEndian.PutUint32(tail[:], crc.Sum32())
	for _, p := range [][]byte{hdr[:], data, tail[:]} {
		if _, err := w.Write(p); err != nil {
			return err
		}
	}
	return nil
}

// ReadPNGText returns the text entries of the PNG file at path (see
// DecodePNGText).
func ReadPNGText(path string) (map[string]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("figure: %w", err)
	}
	defer f.Close()
	m, err := DecodePNGText(bufio.NewReader(f))
	if err != nil {
		return nil, fmt.Errorf("%w (in %s)", err, path)
	}
	return m, nil
}

// DecodePNGText reads a PNG stream up to IEND and returns its tEXt, zTXt
// and iTXt entries, keyed by keyword; a keyword that occurs twice keeps its
// last value. Every chunk's CRC is checked. Pixel data is not decoded.
func DecodePNGText(r io.Reader) (map[string]string, error) {
	var sig [8]byte
	if _, err := io.ReadFull(r, sig[:]); err != nil || !bytes.Equal(sig[:], pngSignature) {
		return nil, errors.New("figure: not a PNG file (bad signature)")
	}
	text := map[string]string{}
	for first := true; ; first = false {
		var hdr [8]byte
		if _, err := io.ReadFull(r, hdr[:]); err != nil {
			return nil, errors.New("figure: PNG truncated before IEND")
		}
		n := binary.BigEndian.Uint32(hdr[:4])
		typ := string(hdr[4:])
		if n > 1<<31-1 {
			return nil, fmt.Errorf("figure: PNG chunk %q: length %d over the limit 2^31−1", typ, n)
		}
		if first && typ != "IHDR" {
			return nil, fmt.Errorf("figure: PNG starts with chunk %q, want IHDR", typ)
		}
		crc := crc32.NewIEEE()
		crc.Write(hdr[4:])
		isText := typ == "tEXt" || typ == "zTXt" || typ == "iTXt"
		var data []byte
		if isText {
			if n > maxTextBytes {
				return nil, fmt.Errorf("figure: PNG chunk %q: %d bytes, over the %d-byte limit for text", typ, n, maxTextBytes)
			}
			var err error
			data, err = io.ReadAll(io.LimitReader(r, int64(n)))
			if err != nil || len(data) != int(n) {
				return nil, fmt.Errorf("figure: PNG chunk %q truncated", typ)
			}
			crc.Write(data)
		} else if m, err := io.CopyN(crc, r, int64(n)); err != nil || m != int64(n) {
			return nil, fmt.Errorf("figure: PNG chunk %q truncated", typ)
		}
		var tail [4]byte
		if _, err := io.ReadFull(r, tail[:]); err != nil {
			return nil, fmt.Errorf("figure: PNG chunk %q truncated", typ)
		}
		if binary.BigEndian.Uint32(tail[:]) != crc.Sum32() {
			return nil, fmt.Errorf("figure: PNG chunk %q: CRC mismatch", typ)
		}
		if isText {
			k, v, err := parseText(typ, data)
			if err != nil {
				return nil, fmt.Errorf("figure: PNG chunk %q: %w", typ, err)
			}
			text[k] = v
		}
		if typ == "IEND" {
			return text, nil
		}
	}
}

// parseText decodes the data of a tEXt, zTXt or iTXt chunk (PNG
// specification §11.3.4.3–5).
func parseText(typ string, data []byte) (key, value string, err error) {
	i := bytes.IndexByte(data, 0)
	if i < 1 || i > 79 {
		return "", "", errors.New("keyword missing, too long or not terminated")
	}
	key = fromLatin1(data[:i])
	rest := data[i+1:]
	switch typ {
	case "tEXt":
		return key, fromLatin1(rest), nil
	case "zTXt":
		if len(rest) < 1 || rest[0] != 0 {
			return "", "", errors.New("unknown compression method")
		}
		b, err := inflate(rest[1:])
		if err != nil {
			return "", "", err
		}
		return key, fromLatin1(b), nil
	}
	// iTXt
	if len(rest) < 2 {
		return "", "", errors.New("truncated")
	}
	compressed, method := rest[0], rest[1]
	rest = rest[2:]
	for range 2 { // language tag, translated keyword
		j := bytes.IndexByte(rest, 0)
		if j < 0 {
			return "", "", errors.New("language tag or translated keyword not terminated")
		}
		rest = rest[j+1:]
	}
	switch {
	case compressed == 0:
	case compressed == 1 && method == 0:
		if rest, err = inflate(rest); err != nil {
			return "", "", err
		}
	default:
		return "", "", errors.New("unknown compression flag or method")
	}
	if !utf8.Valid(rest) {
		return "", "", errors.New("text is not valid UTF-8")
	}
	return key, string(rest), nil
}

// inflate decompresses a zlib stream of at most maxTextBytes.
func inflate(b []byte) ([]byte, error) {
	zr, err := zlib.NewReader(bytes.NewReader(b))
	if err != nil {
		return nil, fmt.Errorf("compressed text: %w", err)
	}
	defer zr.Close()
	out, err := io.ReadAll(io.LimitReader(zr, maxTextBytes+1))
	if err != nil {
		return nil, fmt.Errorf("compressed text: %w", err)
	}
	if len(out) > maxTextBytes {
		return nil, fmt.Errorf("compressed text inflates past %d bytes", maxTextBytes)
	}
	return out, nil
}
