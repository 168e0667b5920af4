package crystal

import (
	"fmt"
	"math"
	"strings"
)

// SymOp is a space-group operation on fractional coordinates,
// x' = R x + T.
type SymOp struct {
	R [3][3]float64
	T [3]float64
}

// identityOp is the operation x, y, z.
var identityOp = SymOp{R: [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}}

// Apply returns R x + T.
func (op SymOp) Apply(x [3]float64) [3]float64 {
	var y [3]float64
	for i := 0; i < 3; i++ {
		y[i] = op.R[i][0]*x[0] + op.R[i][1]*x[1] + op.R[i][2]*x[2] + op.T[i]
	}
	return y
}

// ParseSymOp reads an operator in the "x,y,z" notation of International
// Tables Vol. A and CIF (_space_group_symop_operation_xyz): three
// comma-separated components, each a sum of ±x, ±y, ±z terms (optionally
// with a numeric coefficient, "2x" or "2*x") and constants ("1/2", "0.5"),
// case-insensitive, in any order: "-x+1/2, y, -z", "x-y,x,1/2+z".
func ParseSymOp(text string) (SymOp, error) {
	parts := strings.Split(text, ",")
	if len(parts) != 3 {
		return SymOp{}, fmt.Errorf("symmetry operator %q: %d components, want 3 separated by commas", text, len(parts))
	}
	var op SymOp
	for i, p := range parts {
		row, t, err := parseSymComponent(p)
		if err != nil {
			return SymOp{}, fmt.Errorf("symmetry operator %q, component %d: %w", text, i+1, err)
		}
		op.R[i], op.T[i] = row, t
	}
	for i := range op.R {
		for j, r := range op.R[i] {
			if r != math.Round(r) {
				return SymOp{}, fmt.Errorf("symmetry operator %q: coefficient %g of %c in component %d is not an integer", text, r, 'x'+j, i+1)
			}
		}
		if math.IsNaN(op.T[i]) || math.IsInf(op.T[i], 0) || math.Abs(op.T[i]) > 1e6 {
			return SymOp{}, fmt.Errorf("symmetry operator %q: translation %g in component %d is not a sensible fraction", text, op.T[i], i+1)
		}
	}
	det := op.R[0][0]*(op.R[1][1]*op.R[2][2]-op.R[1][2]*op.R[2][1]) -
		op.R[0][1]*(op.R[1][0]*op.R[2][2]-op.R[1][2]*op.R[2][0]) +
		op.R[0][2]*(op.R[1][0]*op.R[2][1]-op.R[1][1]*op.R[2][0])
	if math.Abs(math.Abs(det)-1) > 1e-9 {
		return SymOp{}, fmt.Errorf("symmetry operator %q: determinant %g, a crystallographic operation has ±1", text, det)
	}
	return op, nil
}

func parseSymComponent(s string) (row [3]float64, t float64, err error) {
	s = strings.ToLower(strings.Join(strings.Fields(s), ""))
	if s == "" {
		return row, 0, fmt.Errorf("empty")
	}
	// Split into signed terms.
	var terms []string
	start := 0
	for i := 1; i < len(s); i++ {
		if (s[i] == '+' || s[i] == '-') && s[i-1] != '*' && s[i-1] != '/' && s[i-1] != 'e' {
			terms = append(terms, s[start:i])
			start = i
		}
	}
	terms = append(terms, s[start:])
	seen := false
	for _, term := range terms {
		sign := 1.0
		switch {
		case strings.HasPrefix(term, "+"):
			term = term[1:]
		case strings.HasPrefix(term, "-"):
			sign, term = -1, term[1:]
		}
		if term == "" {
			return row, 0, fmt.Errorf("dangling sign in %q", s)
		}
		axis := -1
		if last := term[len(term)-1]; last >= 'x' && last <= 'z' {
			axis = int(last - 'x')
			term = strings.TrimSuffix(term[:len(term)-1], "*")
		}
		coef := 1.0
		if term != "" {
			coef, err = parseFraction(term)
			if err != nil {
				return row, 0, err
			}
		} else if axis < 0 {
			return row, 0, fmt.Errorf("empty term in %q", s)
		}
		if axis >= 0 {
			row[axis] += sign * coef
			seen = true
		} else {
			t += sign * coef
		}
	}
	if !seen {
		return row, 0, fmt.Errorf("%q names none of x, y, z", s)
	}
	return row, t, nil
}

func parseFraction(s string) (float64, error) {
	num, den, ok := strings.Cut(s, "/")
	p, err := parseDecimal(num)
	if err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	if !ok {
		return p, nil
	}
	q, err := parseDecimal(den)
	if err != nil || q == 0 {
		return 0, fmt.Errorf("%q is not a fraction", s)
	}
	return p / q, nil
}

// Centring returns the lattice translations of a centring letter (P, I, F,
// A, B, C, R), International Tables Vol. A, Table 1.2.1. R is the obverse
// setting on hexagonal axes, (2/3 1/3 1/3) and (1/3 2/3 2/3); on
// rhombohedral axes R is primitive. The zero translation comes first.
func Centring(letter string, cell Cell) ([][3]float64, error) {
	const h = 0.5
	switch strings.ToUpper(strings.TrimSpace(letter)) {
	case "", "P":
		return [][3]float64{{}}, nil
	case "I":
		return [][3]float64{{}, {h, h, h}}, nil
	case "F":
		return [][3]float64{{}, {0, h, h}, {h, 0, h}, {h, h, 0}}, nil
	case "A":
		return [][3]float64{{}, {0, h, h}}, nil
	case "B":
		return [][3]float64{{}, {h, 0, h}}, nil
	case "C":
		return [][3]float64{{}, {h, h, 0}}, nil
	case "R":
		if cell.IsHexagonal() {
			return [][3]float64{{}, {2.0 / 3, 1.0 / 3, 1.0 / 3}, {1.0 / 3, 2.0 / 3, 2.0 / 3}}, nil
		}
		if cell.System() == "rhombohedral" {
			return [][3]float64{{}}, nil
		}
		return nil, fmt.Errorf("centring R needs hexagonal axes (a = b, γ = 120°) or rhombohedral axes (a = b = c, α = β = γ)")
	}
	return nil, fmt.Errorf("centring %q is not one of P, I, F, A, B, C, R", letter)
}
