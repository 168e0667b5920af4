package crystal

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"unicode"
)

// Indices are Miller (three) or Miller–Bravais (four) indices as written,
// with an optional leading factor: "1/3[1 1 -2 0]" is Factor 1/3,
// V = {1, 1, -2, 0}, Bracket '['.
type Indices struct {
	Factor  float64   // 1 when absent
	V       []float64 // 3 or 4 entries
	Bracket rune      // '[' direction, '(' plane, '<' family of directions, '{' family of planes
}

// Scaled returns Factor·V.
func (ix Indices) Scaled() []float64 {
	out := make([]float64, len(ix.V))
	for i, v := range ix.V {
		out[i] = ix.Factor * v
	}
	return out
}

// ErrIndices is wrapped by every error of ParseIndices.
var ErrIndices = errors.New("malformed indices")

var closing = map[rune]rune{'[': ']', '(': ')', '<': '>', '{': '}'}

// ParseIndices reads indices the way the trade writes them:
//
//	"[1 -1 0]", "[1,-1,0]", "(1 1 1)", "[1-10]" (compact: one digit per index,
//	a minus sign belongs to the digit after it), "1/2[1 1 0]", "a/2[1 1 0]",
//	"0.5[1 1 0]", "1/3[1 1 -2 0]", "<1 1 0>", "{1 1 1}".
//
// The unicode minus sign "−" is accepted. Three or four indices; decimals are
// allowed inside spaced or comma-separated brackets.
func ParseIndices(text string) (Indices, error) {
	s := strings.TrimSpace(strings.ReplaceAll(text, "−", "-"))
	fail := func(format string, args ...any) (Indices, error) {
		return Indices{}, fmt.Errorf("%w %s: %s", ErrIndices, abbreviate(text), fmt.Sprintf(format, args...))
	}
	if s == "" {
		return fail("empty")
	}
	open := strings.IndexAny(s, "[(<{")
	if open < 0 {
		return fail("no bracket: write [u v w] for a direction or (h k l) for a plane")
	}
	br := rune(s[open])
	if !strings.HasSuffix(s, string(closing[br])) {
		return fail("expected it to end with %q", string(closing[br]))
	}
	factor, err := parseFactor(strings.TrimSpace(s[:open]))
	if err != nil {
		return fail("%v", err)
	}
	inner := strings.TrimSpace(s[open+1 : len(s)-1])
	if strings.ContainsAny(inner, "[]()<>{}") {
		return fail("nested or extra brackets")
	}
	var v []float64
	if strings.ContainsAny(inner, " \t,") {
		for _, f := range strings.FieldsFunc(inner, func(r rune) bool { return r == ',' || unicode.IsSpace(r) }) {
			x, err := parseDecimal(f)
			if err != nil {
				return fail("index %s is not a number", abbreviate(f))
			}
			if err := checkIndex(x); err != nil {
				return fail("index %s %v", f, err)
			}
			v = append(v, x)
		}
	} else {
		// Compact form: every index is one digit, optionally preceded by '-'.
		neg := false
		for _, r := range inner {
			switch {
			case r == '-' && !neg:
				neg = true
			case r >= '0' && r <= '9':
				x := float64(r - '0')
				if neg {
					x = -x
				}
				v = append(v, x)
				neg = false
			default:
				return fail("unexpected %q in compact indices (use spaces between multi-digit or decimal indices)", string(r))
			}
		}
		if neg {
			return fail("trailing minus sign")
		}
	}
	if len(v) != 3 && len(v) != 4 {
		return fail("%d indices; want 3 (Miller) or 4 (Miller–Bravais)", len(v))
	}
	if allZeroIdx(v) {
		return fail("all indices are zero")
	}
	return Indices{Factor: factor, V: v, Bracket: br}, nil
}

// Limits on indices and factors as written. Indices beyond 1000 or a
// non-zero one below 0.001 in magnitude (or a factor outside that range)
// describe no reflection, direction or displacement a diffraction-contrast
// image can show; they are typing or overflow mistakes.
const (
	MaxIndex = 1000
	MinIndex = 1e-3
)

// checkIndex refuses an index outside the limits.
func checkIndex(x float64) error {
	switch a := math.Abs(x); {
	case a > MaxIndex:
		return fmt.Errorf("is beyond ±%d", MaxIndex)
	case a != 0 && a < MinIndex:
		return fmt.Errorf("is below %g in magnitude (write 0 for zero)", MinIndex)
	}
	return nil
}

// CheckIndices checks indices given as numbers (g, a beam direction, a
// plane normal): three or four, finite, each zero or within [MinIndex,
// MaxIndex] in magnitude, not all zero, and whole numbers when whole is
// set (the indices of a reflection). The error says what is wrong with
// which index, for the caller to prefix with the field's path.
func CheckIndices(v []float64, whole bool) error {
	if len(v) != 3 && len(v) != 4 {
		return fmt.Errorf("%d indices; want 3 (Miller) or 4 (Miller–Bravais)", len(v))
	}
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("index %d is not a finite number", i)
		}
		if err := checkIndex(x); err != nil {
			return fmt.Errorf("index %d (%g) %v", i, x, err)
		}
		if whole && x != math.Trunc(x) {
			return fmt.Errorf("index %d (%g) is not a whole number", i, x)
		}
	}
	if allZeroIdx(v) {
		return errors.New("all indices are zero")
	}
	return nil
}

func allZeroIdx(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return false
		}
	}
	return true
}

var decimalRE = regexp.MustCompile(`^[-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?$`)

// parseDecimal reads a plain decimal number ("2", "-0.5", "1e-3"); unlike
// strconv.ParseFloat it refuses Go's other spellings ("0x1p3", "1_0",
// "Inf", "NaN"), which no one writes for an index.
func parseDecimal(s string) (float64, error) {
	if !decimalRE.MatchString(s) {
		return 0, fmt.Errorf("%s is not a decimal number", abbreviate(s))
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%s is out of range", abbreviate(s))
	}
	return x, nil
}

// parseFactor reads "", "a", "1/2", "a/2", "0.5", "2/3", "a/3".
func parseFactor(f string) (float64, error) {
	if f == "" || f == "a" {
		return 1, nil
	}
	num, den, hasSlash := strings.Cut(f, "/")
	if num == "a" {
		num = "1"
	}
	p, err := parseDecimal(strings.TrimSpace(num))
	if err != nil {
		return 0, fmt.Errorf("factor %s is not a number or fraction", abbreviate(f))
	}
	q := 1.0
	if hasSlash {
		q, err = parseDecimal(strings.TrimSpace(den))
		if err != nil {
			return 0, fmt.Errorf("factor %s is not a number or fraction", abbreviate(f))
		}
	}
	r := p / q
	if r == 0 || math.IsNaN(r) || math.IsInf(r, 0) {
		return 0, fmt.Errorf("factor %s must be finite and non-zero", abbreviate(f))
	}
	if a := math.Abs(r); a < MinIndex || a > MaxIndex {
		return 0, fmt.Errorf("factor %s is outside ±[%g, %d]", abbreviate(f), MinIndex, MaxIndex)
	}
	return r, nil
}

// fourIndexTol is the tolerance on the redundant third index.
const fourIndexTol = 1e-9

// PlaneIndices converts (hkl) or Miller–Bravais (hkil) to (hkl). Four indices
// need a hexagonal cell and i = −(h+k); the conversion drops i.
func (c Cell) PlaneIndices(v []float64) ([3]float64, error) {
	switch len(v) {
	case 3:
		return [3]float64{v[0], v[1], v[2]}, nil
	case 4:
		if !c.IsHexagonal() {
			return [3]float64{}, fmt.Errorf("four-index plane (%s) needs a hexagonal cell (a = b, γ = 120°)", FormatIndices(v))
		}
		if math.Abs(v[2]+v[0]+v[1]) > fourIndexTol {
			return [3]float64{}, fmt.Errorf("four-index plane (%s): third index i = %g must equal −(h+k) = %g", FormatIndices(v), v[2], -(v[0]+v[1])+0)
		}
		return [3]float64{v[0], v[1], v[3]}, nil
	}
	return [3]float64{}, fmt.Errorf("plane indices: %d given, want 3 or 4", len(v))
}

// DirectionIndices converts [uvw] or Miller–Bravais [uvtw] to three-index
// [UVW]: U = u − t, V = v − t, W = w, which needs a hexagonal cell and
// t = −(u+v).
func (c Cell) DirectionIndices(v []float64) ([3]float64, error) {
	switch len(v) {
	case 3:
		return [3]float64{v[0], v[1], v[2]}, nil
	case 4:
		if !c.IsHexagonal() {
			return [3]float64{}, fmt.Errorf("four-index direction [%s] needs a hexagonal cell (a = b, γ = 120°)", FormatIndices(v))
		}
		if math.Abs(v[2]+v[0]+v[1]) > fourIndexTol {
			return [3]float64{}, fmt.Errorf("four-index direction [%s]: third index t = %g must equal −(u+v) = %g", FormatIndices(v), v[2], -(v[0]+v[1])+0)
		}
		return [3]float64{v[0] - v[2], v[1] - v[2], v[3]}, nil
	}
	return [3]float64{}, fmt.Errorf("direction indices: %d given, want 3 or 4", len(v))
}

// FourIndexPlane returns (hkil), i = −(h+k), for a hexagonal cell.
func (c Cell) FourIndexPlane(hkl [3]float64) ([4]float64, error) {
	if !c.IsHexagonal() {
		return [4]float64{}, errors.New("four-index planes need a hexagonal cell")
	}
	return [4]float64{hkl[0], hkl[1], -(hkl[0] + hkl[1]), hkl[2]}, nil
}

// FourIndexDirection returns [uvtw] for the three-index [UVW] of a hexagonal
// cell: u = (2U − V)/3, v = (2V − U)/3, t = −(u+v), w = W, the inverse of
// DirectionIndices.
func (c Cell) FourIndexDirection(uvw [3]float64) ([4]float64, error) {
	if !c.IsHexagonal() {
		return [4]float64{}, errors.New("four-index directions need a hexagonal cell")
	}
	u := (2*uvw[0] - uvw[1]) / 3
	v := (2*uvw[1] - uvw[0]) / 3
	return [4]float64{u, v, -(u + v), uvw[2]}, nil
}

// Burgers parses a Burgers vector as the trade writes it ("1/2[1 1 0]",
// "1/3[1 1 -2 0]", "[0 0 1]"), converts four indices on a hexagonal cell and
// applies the factor: the result is fractional [uvw], b = u a + v b + w c.
func (c Cell) Burgers(text string) ([3]float64, error) {
	ix, err := ParseIndices(text)
	if err != nil {
		return [3]float64{}, fmt.Errorf("burgers vector: %w", err)
	}
	if ix.Bracket != '[' {
		return [3]float64{}, fmt.Errorf("burgers vector %q: a Burgers vector is one direction [u v w], not %s", text, bracketName(ix.Bracket))
	}
	uvw, err := c.DirectionIndices(ix.V)
	if err != nil {
		return [3]float64{}, fmt.Errorf("burgers vector %q: %w", text, err)
	}
	for i := range uvw {
		uvw[i] *= ix.Factor
		if err := checkIndex(uvw[i]); err != nil {
			return [3]float64{}, fmt.Errorf("burgers vector %s: component %d of the factor times the indices, %g, %v", abbreviate(text), i, uvw[i], err)
		}
	}
	if uvw == [3]float64{} {
		return [3]float64{}, fmt.Errorf("burgers vector %s is zero", abbreviate(text))
	}
	return uvw, nil
}

func bracketName(b rune) string {
	switch b {
	case '(':
		return "a plane (h k l)"
	case '<':
		return "a family <u v w>"
	case '{':
		return "a family of planes {h k l}"
	}
	return "a direction"
}

// FormatIndices writes indices as the trade writes them, separated by
// spaces: "2 0 0", "1 -1 0", "0.5 0.5 0". Each number is the shortest
// text that reads back as the same float64, so text typed into a field and
// shown again is unchanged; −0 is written 0. It is the one index formatter
// of the program: every caption, table and field uses it.
func FormatIndices(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		if x == 0 {
			x = 0 // −0
		}
		parts[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return strings.Join(parts, " ")
}

// FormatDirection writes fractional [uvw] the way the trade does: four-index
// on a hexagonal cell, with the smallest factor 1/n (n ≤ 12) that makes the
// indices integers ("1/3[1 1 -2 0]", "1/2[1 1 0]", "[0 0 1]"); decimals when
// no such n exists.
func (c Cell) FormatDirection(uvw [3]float64) string {
	if c.IsHexagonal() {
		f, _ := c.FourIndexDirection(uvw)
		return formatWithFactor(f[:], '[', ']')
	}
	return formatWithFactor(uvw[:], '[', ']')
}

// FormatPlane writes (hkl), or (hkil) on a hexagonal cell.
func (c Cell) FormatPlane(hkl [3]float64) string {
	if c.IsHexagonal() {
		f, _ := c.FourIndexPlane(hkl)
		return formatWithFactor(f[:], '(', ')')
	}
	return formatWithFactor(hkl[:], '(', ')')
}

func formatWithFactor(v []float64, open, cl rune) string {
	const tol = 1e-6
	for n := 1; n <= 12; n++ {
		ints := make([]int, len(v))
		ok := true
		for i, x := range v {
			y := x * float64(n)
			r := math.Round(y)
			if math.Abs(y-r) > tol {
				ok = false
				break
			}
			ints[i] = int(r)
		}
		if !ok {
			continue
		}
		parts := make([]string, len(ints))
		for i, k := range ints {
			parts[i] = strconv.Itoa(k)
		}
		body := string(open) + strings.Join(parts, " ") + string(cl)
		if n == 1 {
			return body
		}
		return fmt.Sprintf("1/%d%s", n, body)
	}
	return string(open) + FormatIndices(v) + string(cl)
}
