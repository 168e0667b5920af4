package scene

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"strconv"
	"strings"
)

// Edit is one override: the value at a field path.
type Edit struct {
	Path  string
	Value any
}

// Set sets the field of sc at path to value and validates the result as
// Parse validates a file. path is written as error messages write it:
// "foil.thickness_nm", "diffraction.g", "diffraction.weak_beam.n",
// "defects[0].b", "defects[1].at_nm", "image.pixels", "crystal.material".
//
// value is a Go value that encoding/json can write (float64, int, string,
// bool, []float64, []int, []any, map[string]any, a Defect, ...) or a
// json.RawMessage holding JSON text. nil clears an optional field (and is
// an error on a required one); nil at a list element ("defects[2]")
// removes that element.
//
// The four forms of the deviation (s_per_nm, w, weak_beam and
// deviation_from_kikuchi) exclude each other: setting one of them, or a
// field inside one, clears the other three.
//
// Set is atomic: on any error sc is unchanged. Errors are *FieldError
// naming the path: an unknown field, a value of the wrong type, an index
// out of range, or whatever validation finds wrong with the new scene.
func Set(sc *Scene, path string, value any) error {
	return SetAll(sc, Edit{Path: path, Value: value})
}

// SetJSON is Set with the value written as JSON text: "120", "[1,1,-1]",
// `"1/2[1 0 1]"` (text in double quotes), "null".
func SetJSON(sc *Scene, path, jsonText string) error {
	if !json.Valid([]byte(jsonText)) {
		return fieldErr(path, "%q is not a JSON value (text goes in double quotes, e.g. \"1/2[1 0 1]\"; lists in brackets, e.g. [1,1,-1])", jsonText)
	}
	return Set(sc, path, json.RawMessage(jsonText))
}

// SetAll applies the edits in order and validates once at the end, so
// fields that only make sense together (the pixels and the field of view,
// which must give square pixels) change together. Like Set it is atomic.
func SetAll(sc *Scene, edits ...Edit) error {
	tree, err := sceneTree(sc)
	if err != nil {
		return err
	}
	for _, e := range edits {
		if err := setTree(tree, e.Path, e.Value); err != nil {
			return err
		}
	}
	data, err := json.Marshal(tree)
	if err != nil {
		return fieldErr("", "scene: %v", err)
	}
	// Every key and type was checked edit by edit (setTree), and the tree
	// came from a scene: decode it and validate the result.
	var next Scene
	strict := json.NewDecoder(bytes.NewReader(data))
	strict.DisallowUnknownFields()
	if err := strict.Decode(&next); err != nil {
		return fieldErr("", "scene: %v", err)
	}
	if err := next.Validate(); err != nil {
		return err
	}
	*sc = next
	return nil
}

// sceneTree is sc as generic JSON, numbers kept as written.
func sceneTree(sc *Scene) (map[string]any, error) {
	data, err := json.Marshal(sc)
	if err != nil {
		return nil, fieldErr("", "scene: %v", err)
	}
	var tree map[string]any
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := dec.Decode(&tree); err != nil {
		return nil, fieldErr("", "scene: %v", err)
	}
	return tree, nil
}

// deviationKeys are the mutually exclusive forms of the deviation.
var deviationKeys = []string{"s_per_nm", "w", "weak_beam", "deviation_from_kikuchi"}

// step is one step of a field path: a key, or (key == "") a list index.
type step struct {
	key   string
	index int
}

// parsePath splits "defects[0].at_nm" into its steps.
func parsePath(path string) ([]step, error) {
	bad := func() error {
		return fieldErr(path, "not a field path (write it like foil.thickness_nm or defects[0].b)")
	}
	if path == "" {
		return nil, fieldErr("", "empty field path")
	}
	var steps []step
	for _, part := range strings.Split(path, ".") {
		name, rest, _ := strings.Cut(part, "[")
		if name == "" || strings.Trim(name, "abcdefghijklmnopqrstuvwxyz0123456789_") != "" {
			return nil, bad()
		}
		steps = append(steps, step{key: name})
		if rest == "" && !strings.Contains(part, "[") {
			continue
		}
		rest = "[" + rest
		for rest != "" {
			if rest[0] != '[' {
				return nil, bad()
			}
			end := strings.IndexByte(rest, ']')
			if end < 2 {
				return nil, bad()
			}
			n, err := strconv.Atoi(rest[1:end])
			if err != nil || n < 0 || rest[1] == '+' {
				return nil, bad()
			}
			steps = append(steps, step{index: n})
			rest = rest[end+1:]
		}
	}
	return steps, nil
}

// typeAt is the Go type of the field at steps, or an error naming the
// first step that is not a field.
func typeAt(path string, steps []step) (reflect.Type, error) {
	t := reflect.TypeOf(Scene{})
	done := ""
	for _, s := range steps {
		for t.Kind() == reflect.Pointer {
			t = t.Elem()
		}
		if s.key == "" {
			if t.Kind() != reflect.Slice && t.Kind() != reflect.Array {
				return nil, fieldErr(path, "%s is not a list", done)
			}
			t = t.Elem()
			done = fmt.Sprintf("%s[%d]", done, s.index)
			continue
		}
		sub := join(done, s.key)
		if t.Kind() != reflect.Struct {
			return nil, fieldErr(sub, "unknown field: %s holds no fields", done)
		}
		fields := jsonFields(t)
		ft, ok := fields[s.key]
		if !ok {
			return nil, fieldErr(sub, "unknown field (known here: %s)", known(fields))
		}
		t = ft
		done = sub
	}
	return t, nil
}

func jsonFields(t reflect.Type) map[string]reflect.Type {
	fields := map[string]reflect.Type{}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if name == "" || name == "-" {
			continue
		}
		fields[name] = f.Type
	}
	return fields
}

// valueJSON is value as JSON text (nil for a Go nil or JSON null).
func valueJSON(path string, value any) ([]byte, error) {
	var data []byte
	switch v := value.(type) {
	case nil:
		return nil, nil
	case json.RawMessage:
		if !json.Valid(v) {
			return nil, fieldErr(path, "%q is not a JSON value", string(v))
		}
		data = v
	default:
		var err error
		if data, err = json.Marshal(v); err != nil {
			var ue *json.UnsupportedValueError
			if errors.As(err, &ue) {
				return nil, fieldErr(path, "%s: must be a finite number", ue.Str)
			}
			return nil, fieldErr(path, "%T is not a value a scene holds: %v", value, err)
		}
	}
	if string(bytes.TrimSpace(data)) == "null" {
		return nil, nil
	}
	return data, nil
}

// setTree puts value at path in the generic scene tree, after checking
// that path is a field and value has its type.
func setTree(tree map[string]any, path string, value any) error {
	steps, err := parsePath(path)
	if err != nil {
		return err
	}
	t, err := typeAt(path, steps)
	if err != nil {
		return err
	}
	data, err := valueJSON(path, value)
	if err != nil {
		return err
	}
	var generic any
	if data != nil {
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.UseNumber()
		if err := dec.Decode(&generic); err != nil {
			return fieldErr(path, "%v", err)
		}
		if err := checkKeys(generic, t, path); err != nil {
			return err
		}
		if err := json.Unmarshal(data, reflect.New(t).Interface()); err != nil {
			var te *json.UnmarshalTypeError
			if errors.As(err, &te) {
				p := path
				if te.Field != "" {
					p = join(path, te.Field)
				}
				return fieldErr(p, "is %s, want %s", te.Value, typeName(te.Type))
			}
			return fieldErr(path, "%v", err)
		}
	}
	// Walk to the container of the last step, creating objects on the way.
	var cur any = tree
	done := ""
	for i, s := range steps {
		last := i == len(steps)-1
		switch c := cur.(type) {
		case map[string]any:
			done = join(done, s.key)
			if last {
				if generic == nil {
					delete(c, s.key)
				} else {
					c[s.key] = generic
				}
				break
			}
			next, ok := c[s.key]
			if !ok || next == nil {
				if steps[i+1].key == "" {
					return fieldErr(fmt.Sprintf("%s[%d]", done, steps[i+1].index), "index out of range: %s has no entries", done)
				}
				next = map[string]any{}
				c[s.key] = next
			}
			cur = next
		case []any:
			if s.index >= len(c) {
				return fieldErr(fmt.Sprintf("%s[%d]", done, s.index), "index out of range: %s has %d %s", done, len(c), plural(len(c), "entry", "entries"))
			}
			if last {
				if generic == nil {
					// Removing an element: rebuild the parent's list.
					return removeAt(tree, steps[:i], s.index)
				}
				c[s.index] = generic
				break
			}
			done = fmt.Sprintf("%s[%d]", done, s.index)
			cur = c[s.index]
		default:
			return fieldErr(done, "holds no fields")
		}
	}
	// One deviation form replaces the others.
	if len(steps) >= 2 && steps[0].key == "diffraction" && (generic != nil || len(steps) > 2) {
		if d, ok := tree["diffraction"].(map[string]any); ok && isDeviationKey(steps[1].key) {
			for _, other := range deviationKeys {
				if other != steps[1].key {
					delete(d, other)
				}
			}
		}
	}
	return nil
}

// removeAt deletes element i of the list at steps in tree.
func removeAt(tree map[string]any, steps []step, i int) error {
	var parent any = tree
	for _, s := range steps[:len(steps)-1] {
		if s.key != "" {
			parent = parent.(map[string]any)[s.key]
		} else {
			parent = parent.([]any)[s.index]
		}
	}
	lastStep := steps[len(steps)-1]
	switch p := parent.(type) {
	case map[string]any:
		list := p[lastStep.key].([]any)
		p[lastStep.key] = append(list[:i:i], list[i+1:]...)
	case []any:
		list := p[lastStep.index].([]any)
		p[lastStep.index] = append(list[:i:i], list[i+1:]...)
	}
	return nil
}

func isDeviationKey(k string) bool {
	for _, d := range deviationKeys {
		if d == k {
			return true
		}
	}
	return false
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
