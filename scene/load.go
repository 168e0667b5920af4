package scene

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"reflect"
	"sort"
	"strings"

	"faultline/internal/atomicfile"
)

// MaxFileBytes is the largest scene file Load reads (a scene is a few
// kilobytes; anything far larger is not a scene).
const MaxFileBytes = 16 << 20

// Load reads and validates the scene file at path.
func Load(path string) (*Scene, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &FieldError{Msg: fmt.Sprintf("scene file %s: %v", path, unwrapPathErr(err)), Err: err}
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxFileBytes+1))
	if err != nil {
		return nil, &FieldError{Msg: fmt.Sprintf("scene file %s: %v", path, err), Err: err}
	}
	if len(data) > MaxFileBytes {
		return nil, fieldErr("", "scene file %s: larger than %d bytes", path, MaxFileBytes)
	}
	sc, err := Parse(data)
	var fe *FieldError
	if errors.As(err, &fe) && fe.Path == "" && strings.HasPrefix(fe.Msg, "scene file:") {
		// Say which file: "scene file x.json: empty".
		e := *fe
		e.Msg = "scene file " + path + strings.TrimPrefix(fe.Msg, "scene file")
		return nil, &e
	}
	return sc, err
}

func unwrapPathErr(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Parse decodes and validates a scene. Unknown fields, values of the wrong
// type, trailing data and every invalid value are errors that name the
// field.
func Parse(data []byte) (*Scene, error) {
	var generic any
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := dec.Decode(&generic); err != nil {
		return nil, syntaxErr(data, err)
	}
	if dec.More() {
		return nil, fieldErr("", "scene file: unexpected data after the closing brace (line %d)", lineOf(data, int(dec.InputOffset())))
	}
	if _, ok := generic.(map[string]any); !ok {
		return nil, fieldErr("", "scene file: must be a JSON object")
	}
	if err := checkDuplicates(data); err != nil {
		return nil, err
	}
	if err := checkKeys(generic, reflect.TypeOf(Scene{}), ""); err != nil {
		return nil, err
	}
	var sc Scene
	strict := json.NewDecoder(bytes.NewReader(data))
	strict.DisallowUnknownFields()
	if err := strict.Decode(&sc); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) {
			path := te.Field
			if path == "" {
				path = "(top level)"
			}
			return nil, fieldErr(path, "is %s, want %s", te.Value, typeName(te.Type))
		}
		return nil, fieldErr("", "scene file: %v", err)
	}
	if err := sc.Validate(); err != nil {
		return nil, err
	}
	return &sc, nil
}

func syntaxErr(data []byte, err error) error {
	var se *json.SyntaxError
	switch {
	case errors.Is(err, io.EOF) && len(bytes.TrimSpace(data)) == 0:
		return fieldErr("", "scene file: empty")
	case errors.Is(err, io.ErrUnexpectedEOF):
		return fieldErr("", "scene file: ends early at line %d (truncated?)", lineOf(data, len(data)))
	case errors.As(err, &se):
		return fieldErr("", "scene file: line %d: %v", lineOf(data, int(se.Offset)), se)
	}
	return fieldErr("", "scene file: %v", err)
}

func lineOf(data []byte, off int) int {
	if off > len(data) {
		off = len(data)
	}
	return bytes.Count(data[:off], []byte("\n")) + 1
}

func typeName(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Float64, reflect.Float32:
		return "a number"
	case reflect.Int, reflect.Int64:
		return "a whole number"
	case reflect.String:
		return "a string"
	case reflect.Slice, reflect.Array:
		return "a list"
	case reflect.Struct, reflect.Map:
		return "an object"
	case reflect.Pointer:
		return typeName(t.Elem())
	}
	return t.String()
}

// checkDuplicates reports a key given twice in one object: JSON decoders
// keep the last one silently, which would turn a slip into a setting.
func checkDuplicates(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	type frame struct {
		object bool
		path   string
		keys   map[string]bool
		index  int
		key    string // the key whose value comes next, in an object
	}
	var stack []*frame
	// child returns the path of the value about to be read.
	child := func() string {
		if len(stack) == 0 {
			return ""
		}
		f := stack[len(stack)-1]
		if f.object {
			return join(f.path, f.key)
		}
		return fmt.Sprintf("%s[%d]", f.path, f.index)
	}
	// done marks the value just read in the enclosing container.
	done := func() {
		if len(stack) == 0 {
			return
		}
		f := stack[len(stack)-1]
		if f.object {
			f.key = ""
		} else {
			f.index++
		}
	}
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return nil // syntax errors were reported by the decoder already
		}
		if len(stack) > 0 {
			if f := stack[len(stack)-1]; f.object && f.key == "" {
				if k, ok := tok.(string); ok {
					if f.keys[k] {
						return fieldErr(join(f.path, k), "given twice")
					}
					f.keys[k] = true
					f.key = k
					continue
				}
			}
		}
		switch tok {
		case json.Delim('{'):
			stack = append(stack, &frame{object: true, path: child(), keys: map[string]bool{}})
		case json.Delim('['):
			stack = append(stack, &frame{path: child()})
		case json.Delim('}'), json.Delim(']'):
			stack = stack[:len(stack)-1]
			done()
		default:
			done()
		}
	}
}

// checkKeys walks the generic JSON value v alongside the Go type t and
// reports the first object key that t has no field for, with its path.
func checkKeys(v any, t reflect.Type, path string) error {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	switch t.Kind() {
	case reflect.Struct:
		obj, ok := v.(map[string]any)
		if !ok {
			return nil // a type mismatch; the strict decoder reports it
		}
		fields := map[string]reflect.Type{}
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name == "" || name == "-" {
				continue
			}
			fields[name] = f.Type
		}
		keys := make([]string, 0, len(obj))
		for k := range obj {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			sub := join(path, k)
			ft, ok := fields[k]
			if !ok {
				return fieldErr(sub, "unknown field (known here: %s)", known(fields))
			}
			if err := checkKeys(obj[k], ft, sub); err != nil {
				return err
			}
		}
	case reflect.Slice, reflect.Array:
		arr, ok := v.([]any)
		if !ok {
			return nil
		}
		for i, e := range arr {
			if err := checkKeys(e, t.Elem(), fmt.Sprintf("%s[%d]", path, i)); err != nil {
				return err
			}
		}
	}
	return nil
}

func join(path, k string) string {
	if path == "" {
		return k
	}
	return path + "." + k
}

func known(fields map[string]reflect.Type) string {
	names := make([]string, 0, len(fields))
	for k := range fields {
		names = append(names, k)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

// Marshal returns the scene as JSON in the form Save writes: the fields in
// the order of the file format, two-space indents, every vector on one
// line, short sections on one line, and a final newline (see formatJSON).
func Marshal(sc *Scene) ([]byte, error) {
	data, err := json.Marshal(sc)
	if err != nil {
		return nil, err
	}
	return formatJSON(data)
}

// Save writes the scene to path: to a temporary file in the same directory
// first, then renamed over path, so a failure part way leaves the previous
// file as it was.
func Save(path string, sc *Scene) error {
	if err := sc.Validate(); err != nil {
		return err
	}
	data, err := Marshal(sc)
	if err != nil {
		return err
	}
	return atomicfile.WriteFile(path, data)
}
