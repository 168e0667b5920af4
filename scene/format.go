package scene

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
)

// lineWidth is the width within which an object or list is written on one
// line when it holds no objects itself.
const lineWidth = 100

// node is a JSON value with the order of its object keys kept.
type node struct {
	scalar string // the value's JSON text, when it is neither object nor list
	keys   []string
	vals   []*node // object values (keys set) or list items
	object bool
	list   bool
}

// readNode reads one value from dec.
func readNode(dec *json.Decoder) (*node, error) {
	tok, err := dec.Token()
	if err != nil {
		return nil, err
	}
	switch t := tok.(type) {
	case json.Delim:
		n := &node{object: t == '{', list: t == '['}
		for dec.More() {
			if n.object {
				k, err := dec.Token()
				if err != nil {
					return nil, err
				}
				n.keys = append(n.keys, k.(string))
			}
			v, err := readNode(dec)
			if err != nil {
				return nil, err
			}
			n.vals = append(n.vals, v)
		}
		if _, err := dec.Token(); err != nil { // the closing delimiter
			return nil, err
		}
		return n, nil
	default:
		b, err := json.Marshal(t)
		if err != nil {
			return nil, err
		}
		return &node{scalar: string(b)}, nil
	}
}

// flat reports whether n holds no object (lists of numbers and strings,
// and objects of those, may go on one line).
func (n *node) flat() bool {
	for _, v := range n.vals {
		if v.object || (v.list && !v.flat()) {
			return false
		}
	}
	return true
}

// scalars reports whether n holds numbers, strings and literals only.
func (n *node) scalars() bool {
	for _, v := range n.vals {
		if v.object || v.list {
			return false
		}
	}
	return true
}

// oneLine writes n on one line: {"a": 1, "b": [1, 2]}.
func (n *node) oneLine() string {
	switch {
	case n.object:
		parts := make([]string, len(n.vals))
		for i, v := range n.vals {
			k, _ := json.Marshal(n.keys[i])
			parts[i] = string(k) + ": " + v.oneLine()
		}
		return "{" + strings.Join(parts, ", ") + "}"
	case n.list:
		parts := make([]string, len(n.vals))
		for i, v := range n.vals {
			parts[i] = v.oneLine()
		}
		return "[" + strings.Join(parts, ", ") + "]"
	}
	return n.scalar
}

// write writes n at the indent, the first line already started at column
// col.
func (n *node) write(buf *bytes.Buffer, indent string, col int) {
	if !n.object && !n.list {
		buf.WriteString(n.scalar)
		return
	}
	// Lists of scalars always on one line; other lists and objects when
	// they hold no object and fit.
	if len(n.vals) == 0 || (n.list && n.scalars()) || (n.flat() && col+len(n.oneLine()) <= lineWidth) {
		buf.WriteString(n.oneLine())
		return
	}
	open, close := "{", "}"
	if n.list {
		open, close = "[", "]"
	}
	inner := indent + "  "
	buf.WriteString(open + "\n")
	for i, v := range n.vals {
		buf.WriteString(inner)
		c := len(inner)
		if n.object {
			k, _ := json.Marshal(n.keys[i])
			buf.Write(k)
			buf.WriteString(": ")
			c += len(k) + 2
		}
		v.write(buf, inner, c)
		if i < len(n.vals)-1 {
			buf.WriteByte(',')
		}
		buf.WriteByte('\n')
	}
	buf.WriteString(indent + close)
}

// formatJSON rewrites JSON text in the layout of a saved scene: keys in
// the order given, two-space indents, lists of numbers or strings on one
// line ("g": [2, 0, 0]), objects and lists that hold no object on one
// line when they fit in lineWidth columns, and a final newline.
func formatJSON(data []byte) ([]byte, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	n, err := readNode(dec)
	if err != nil {
		return nil, fmt.Errorf("formatting the scene: %w", err)
	}
	var buf bytes.Buffer
	n.write(&buf, "", 0)
	buf.WriteByte('\n')
	return buf.Bytes(), nil
}
