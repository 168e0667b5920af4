package crystal

import (
	"bufio"
	"fmt"
	"io"
	"strings"
)

// CIFError is a CIF problem with the line it was found on.
type CIFError struct {
	Line int // 1-based; 0 when the problem has no single line
	Msg  string
}

func (e *CIFError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("cif line %d: %s", e.Line, e.Msg)
	}
	return "cif: " + e.Msg
}

func cifErr(line int, format string, args ...any) error {
	return &CIFError{Line: line, Msg: fmt.Sprintf(format, args...)}
}

// cifValue is one data value as read: its text, where it was, and whether
// it was quoted (a quoted '?' or '.' is text, an unquoted one is unknown or
// inapplicable).
type cifValue struct {
	text   string
	line   int
	quoted bool
}

// missing reports the CIF null values "?" (unknown) and "." (inapplicable).
func (v cifValue) missing() bool { return !v.quoted && (v.text == "?" || v.text == ".") }

type cifLoop struct {
	line int
	tags []string
	rows [][]cifValue
}

// cifBlock is one data block: single items and loops, tags lower-cased.
type cifBlock struct {
	name   string
	line   int
	single map[string]cifValue
	loops  []*cifLoop
	tagAt  map[string]int // tag -> line where it was defined
}

// column returns the values of a tag, looped or single, and the loop it is
// in (nil for a single item).
func (b *cifBlock) column(tag string) ([]cifValue, *cifLoop) {
	if v, ok := b.single[tag]; ok {
		return []cifValue{v}, nil
	}
	for _, l := range b.loops {
		for i, t := range l.tags {
			if t == tag {
				col := make([]cifValue, len(l.rows))
				for r, row := range l.rows {
					col[r] = row[i]
				}
				return col, l
			}
		}
	}
	return nil, nil
}

type cifTokKind int

const (
	tokValue cifTokKind = iota
	tokTag
	tokData
	tokLoop
	tokSave
	tokGlobal
	tokStop
)

type cifToken struct {
	kind cifTokKind
	val  cifValue
}

// MaxCIFBytes bounds what ParseCIF reads: far above any real structure file
// (a large protein-free CIF is a few MB).
const MaxCIFBytes = 64 << 20

// tokenizeCIF splits CIF 1.1 text into tokens (IUCr, CIF version 1.1
// syntax specification, paragraphs 2–20): whitespace-separated values,
// 'single' and "double" quoted strings whose closing quote is followed by
// whitespace, semicolon text fields, # comments, data_/loop_/save_/global_/
// stop_ keywords (case-insensitive) and tags beginning with an underscore.
func tokenizeCIF(r io.Reader) ([]cifToken, error) {
	sc := bufio.NewScanner(io.LimitReader(r, MaxCIFBytes+1))
	sc.Buffer(make([]byte, 0, 64*1024), MaxCIFBytes+1)
	var lines []string
	size := 0
	for sc.Scan() {
		size += len(sc.Bytes()) + 1
		if size > MaxCIFBytes {
			return nil, cifErr(0, "file larger than %d MB", MaxCIFBytes>>20)
		}
		lines = append(lines, strings.TrimSuffix(sc.Text(), "\r"))
	}
	if err := sc.Err(); err != nil {
		return nil, cifErr(len(lines)+1, "reading: %v", err)
	}
	var toks []cifToken
	for i := 0; i < len(lines); i++ {
		line, no := lines[i], i+1
		if strings.HasPrefix(line, ";") {
			// Text field: up to the next line that begins with ';'.
			var body []string
			body = append(body, line[1:])
			j := i + 1
			for ; j < len(lines) && !strings.HasPrefix(lines[j], ";"); j++ {
				body = append(body, lines[j])
			}
			if j == len(lines) {
				return nil, cifErr(no, "text field opened with ';' is never closed (a line beginning with ';' must end it)")
			}
			toks = append(toks, cifToken{tokValue, cifValue{strings.Join(body, "\n"), no, true}})
			i = j
			line, no = lines[j][1:], j+1
		}
		rest := line
		for {
			rest = strings.TrimLeft(rest, " \t")
			if rest == "" || rest[0] == '#' {
				break
			}
			if q := rest[0]; q == '\'' || q == '"' {
				end := -1
				for k := 1; k < len(rest); k++ {
					if rest[k] == q && (k+1 == len(rest) || rest[k+1] == ' ' || rest[k+1] == '\t') {
						end = k
						break
					}
				}
				if end < 0 {
					return nil, cifErr(no, "quoted string %s is not closed on this line", abbreviate(rest))
				}
				toks = append(toks, cifToken{tokValue, cifValue{rest[1:end], no, true}})
				rest = rest[end+1:]
				continue
			}
			n := strings.IndexAny(rest, " \t")
			if n < 0 {
				n = len(rest)
			}
			word := rest[:n]
			rest = rest[n:]
			toks = append(toks, classifyWord(word, no))
		}
	}
	return toks, nil
}

func classifyWord(w string, line int) cifToken {
	lw := strings.ToLower(w)
	v := cifValue{w, line, false}
	switch {
	case strings.HasPrefix(w, "_"):
		v.text = lw
		return cifToken{tokTag, v}
	case strings.HasPrefix(lw, "data_"):
		v.text = w[5:]
		return cifToken{tokData, v}
	case lw == "loop_":
		return cifToken{tokLoop, v}
	case strings.HasPrefix(lw, "save_"):
		v.text = w[5:]
		return cifToken{tokSave, v}
	case lw == "global_":
		return cifToken{tokGlobal, v}
	case lw == "stop_":
		return cifToken{tokStop, v}
	}
	return cifToken{tokValue, v}
}

func abbreviate(s string) string {
	if len(s) > 24 {
		return fmt.Sprintf("%q…", s[:24])
	}
	return fmt.Sprintf("%q", s)
}

// parseCIFBlocks reads every data block of a CIF. Save frames are read and
// discarded (they hold dictionary definitions, not structures).
func parseCIFBlocks(r io.Reader) ([]*cifBlock, error) {
	toks, err := tokenizeCIF(r)
	if err != nil {
		return nil, err
	}
	var blocks []*cifBlock
	var cur *cifBlock
	inSave := false
	var saved *cifBlock // the block a save frame interrupted
	define := func(tag string, line int) error {
		if cur == nil {
			return cifErr(line, "data item %s before any data_ block", tag)
		}
		if prev, dup := cur.tagAt[tag]; dup {
			return cifErr(line, "tag %s defined twice in data_%s (first on line %d)", tag, cur.name, prev)
		}
		cur.tagAt[tag] = line
		return nil
	}
	for i := 0; i < len(toks); i++ {
		t := toks[i]
		switch t.kind {
		case tokData:
			if inSave {
				return nil, cifErr(t.val.line, "data_%s inside a save frame", t.val.text)
			}
			if t.val.text == "" {
				return nil, cifErr(t.val.line, "data_ block without a name")
			}
			for _, b := range blocks {
				if strings.EqualFold(b.name, t.val.text) {
					return nil, cifErr(t.val.line, "data block data_%s appears twice (first on line %d)", t.val.text, b.line)
				}
			}
			cur = &cifBlock{name: t.val.text, line: t.val.line, single: map[string]cifValue{}, tagAt: map[string]int{}}
			blocks = append(blocks, cur)
		case tokGlobal:
			// A global_ block may precede data blocks; its items are not used.
			cur = &cifBlock{name: "global_", line: t.val.line, single: map[string]cifValue{}, tagAt: map[string]int{}}
		case tokSave:
			if t.val.text != "" {
				if inSave {
					return nil, cifErr(t.val.line, "save frame save_%s opened inside another", t.val.text)
				}
				if cur == nil {
					return nil, cifErr(t.val.line, "save frame before any data_ block")
				}
				inSave, saved = true, cur
				cur = &cifBlock{name: "save_" + t.val.text, line: t.val.line, single: map[string]cifValue{}, tagAt: map[string]int{}}
			} else {
				if !inSave {
					return nil, cifErr(t.val.line, "save_ closes no save frame")
				}
				inSave, cur = false, saved
			}
		case tokStop:
			return nil, cifErr(t.val.line, "stop_ is reserved and not used in CIF 1.1")
		case tokTag:
			if err := define(t.val.text, t.val.line); err != nil {
				return nil, err
			}
			if i+1 >= len(toks) || toks[i+1].kind != tokValue {
				return nil, cifErr(t.val.line, "tag %s has no value", t.val.text)
			}
			i++
			cur.single[t.val.text] = toks[i].val
		case tokLoop:
			if cur == nil {
				return nil, cifErr(t.val.line, "loop_ before any data_ block")
			}
			l := &cifLoop{line: t.val.line}
			for i+1 < len(toks) && toks[i+1].kind == tokTag {
				i++
				if err := define(toks[i].val.text, toks[i].val.line); err != nil {
					return nil, err
				}
				l.tags = append(l.tags, toks[i].val.text)
			}
			if len(l.tags) == 0 {
				return nil, cifErr(t.val.line, "loop_ without tags")
			}
			var vals []cifValue
			for i+1 < len(toks) && toks[i+1].kind == tokValue {
				i++
				vals = append(vals, toks[i].val)
			}
			if len(vals) == 0 {
				return nil, cifErr(t.val.line, "loop_ of %s has no values", l.tags[0])
			}
			if len(vals)%len(l.tags) != 0 {
				return nil, cifErr(t.val.line, "loop_ of %s has %d values for %d tags; the last row (from line %d) is incomplete", l.tags[0], len(vals), len(l.tags), vals[len(vals)/len(l.tags)*len(l.tags)].line)
			}
			for r := 0; r < len(vals); r += len(l.tags) {
				l.rows = append(l.rows, vals[r:r+len(l.tags)])
			}
			cur.loops = append(cur.loops, l)
		case tokValue:
			return nil, cifErr(t.val.line, "value %s has no tag", abbreviate(t.val.text))
		}
	}
	if inSave {
		return nil, cifErr(0, "save frame %s is not closed", cur.name)
	}
	return blocks, nil
}
