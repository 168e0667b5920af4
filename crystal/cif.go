package crystal

import (
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// ParseCIF reads a crystal structure from a Crystallographic Information
// File (IUCr CIF 1.1): the data block named block, or the first one when
// block is empty.
//
// It reads the cell (_cell_length_a/b/c in Å, _cell_angle_alpha/beta/gamma
// in degrees; standard uncertainties such as "3.6149(2)" are dropped), the
// symmetry operators (_space_group_symop_operation_xyz, or the older
// _symmetry_equiv_pos_as_xyz; a file with neither must declare space group
// P 1), and the atom sites (_atom_site_fract_x/y/z with
// _atom_site_type_symbol or, failing that, the element at the start of
// _atom_site_label; _atom_site_occupancy, default 1; _atom_site_B_iso_or_equiv
// or _atom_site_U_iso_or_equiv in Å², B = 8π²U, or, failing both, U_eq from
// _atom_site_aniso_U_ij; default B = 0). Charges in type symbols ("O2-",
// "Fe3+") are dropped: the scattering factors are those of neutral atoms.
// Where no operators are listed they come from the space group the block
// names (_space_group_name_Hall, _space_group_name_H-M_alt or
// _space_group_IT_number and their older spellings), expanded from a
// table of International Tables Vol. A generated from python3-gemmi (see
// SpaceGroupByName for a symbol that leaves the setting open).
//
// Every error names the line it was found on (*CIFError).
func ParseCIF(r io.Reader, block string) (*Crystal, error) {
	blocks, err := parseCIFBlocks(r)
	if err != nil {
		return nil, err
	}
	if len(blocks) == 0 {
		return nil, cifErr(0, "no data_ block")
	}
	b := blocks[0]
	if block != "" {
		b = nil
		var names []string
		for _, x := range blocks {
			names = append(names, "data_"+x.name)
			if strings.EqualFold(x.name, block) {
				b = x
			}
		}
		if b == nil {
			return nil, cifErr(0, "no data block data_%s; the file has %s", block, strings.Join(names, ", "))
		}
	}
	return crystalFromBlock(b)
}

// LoadCIF reads the first data block of the CIF file at path.
func LoadCIF(path string) (*Crystal, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	c, err := ParseCIF(f, "")
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return c, nil
}

var cifNumber = regexp.MustCompile(`^([-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)(?:\([0-9]+\))?$`)

// cifFloat reads a CIF number, dropping a standard uncertainty in brackets.
func cifFloat(v cifValue, tag string) (float64, error) {
	m := cifNumber.FindStringSubmatch(v.text)
	if m == nil {
		return 0, cifErr(v.line, "%s: %s is not a number", tag, abbreviate(v.text))
	}
	x, err := strconv.ParseFloat(m[1], 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, cifErr(v.line, "%s: %s is out of range", tag, abbreviate(v.text))
	}
	return x, nil
}

func (b *cifBlock) singleFloat(tag string) (float64, error) {
	col, loop := b.column(tag)
	if col == nil {
		return 0, cifErr(b.line, "data_%s has no %s", b.name, tag)
	}
	if loop != nil && len(col) != 1 {
		return 0, cifErr(loop.line, "%s is looped with %d values; want one", tag, len(col))
	}
	if col[0].missing() {
		return 0, cifErr(col[0].line, "%s is %q (unknown)", tag, col[0].text)
	}
	return cifFloat(col[0], tag)
}

func crystalFromBlock(b *cifBlock) (*Crystal, error) {
	var p [6]float64
	cellTags := [6]string{"_cell_length_a", "_cell_length_b", "_cell_length_c", "_cell_angle_alpha", "_cell_angle_beta", "_cell_angle_gamma"}
	for i, tag := range cellTags {
		x, err := b.singleFloat(tag)
		if err != nil {
			return nil, err
		}
		p[i] = x
	}
	cell, err := NewCell(p[0]/angstromPerNm, p[1]/angstromPerNm, p[2]/angstromPerNm, p[3], p[4], p[5])
	if err != nil {
		// Point at the first bad length, else at the angles.
		line := b.tagAt[cellTags[3]]
		for i := 2; i >= 0; i-- {
			if l := p[i] / angstromPerNm; !(l >= MinCellNm && l <= MaxCellNm) {
				line = b.tagAt[cellTags[i]]
			}
		}
		return nil, cifErr(line, "%v", err)
	}
	ops, group, err := cifSymmetry(b, cell)
	if err != nil {
		return nil, err
	}
	atoms, err := cifAtoms(b, cell)
	if err != nil {
		return nil, err
	}
	c, err := expand(b.name, cell, atoms, ops, [][3]float64{{}})
	if err != nil {
		// Every input checked above carries its line; what is left is
		// about the whole structure.
		return nil, cifErr(b.line, "%v", err)
	}
	c.Structure = group
	return c, nil
}

// cifSymmetry returns the operations of the block: those listed, or those
// of the space group it names (Hall symbol, Hermann–Mauguin symbol or
// number, in that order of preference) from the generated table. The
// second result names the group, when the block does.
func cifSymmetry(b *cifBlock, cell Cell) ([]SymOp, string, error) {
	named := ""
	for _, tag := range []string{"_space_group_name_h-m_alt", "_symmetry_space_group_name_h-m", "_space_group.name_h-m_alt"} {
		if col, _ := b.column(tag); col != nil && !col[0].missing() {
			named = strings.Join(strings.Fields(col[0].text), " ")
			break
		}
	}
	for _, tag := range []string{"_space_group_symop_operation_xyz", "_symmetry_equiv_pos_as_xyz", "_space_group_symop.operation_xyz"} {
		col, _ := b.column(tag)
		if col == nil {
			continue
		}
		var ops []SymOp
		for _, v := range col {
			op, err := ParseSymOp(v.text)
			if err != nil {
				return nil, "", cifErr(v.line, "%s: %v", tag, err)
			}
			if !hasOp(ops, op) {
				ops = append(ops, op)
			}
		}
		if len(ops) > maxOpsPerAtom {
			return nil, "", cifErr(col[0].line, "%s: %d distinct operators; a space group has at most 192", tag, len(ops))
		}
		return ops, named, nil
	}
	for _, tag := range []string{"_space_group_name_hall", "_symmetry_space_group_name_hall", "_space_group.name_hall"} {
		if col, _ := b.column(tag); col != nil && !col[0].missing() {
			g, err := SpaceGroupByHall(col[0].text)
			if err != nil {
				return nil, "", cifErr(col[0].line, "%s: %v; list the operators in a _space_group_symop_operation_xyz loop", tag, err)
			}
			return g.Operations(), spaceGroupLabel(g), nil
		}
	}
	for _, tag := range []string{"_space_group_name_h-m_alt", "_symmetry_space_group_name_h-m", "_space_group.name_h-m_alt"} {
		if col, _ := b.column(tag); col != nil && !col[0].missing() {
			g, err := SpaceGroupByName(col[0].text, cell)
			if err != nil {
				return nil, "", cifErr(col[0].line, "%s: %v", tag, err)
			}
			return g.Operations(), spaceGroupLabel(g), nil
		}
	}
	for _, tag := range []string{"_space_group_it_number", "_symmetry_int_tables_number", "_space_group.it_number"} {
		if col, _ := b.column(tag); col != nil && !col[0].missing() {
			n, err := strconv.Atoi(strings.TrimSpace(col[0].text))
			if err != nil {
				return nil, "", cifErr(col[0].line, "%s: %s is not a whole number", tag, abbreviate(col[0].text))
			}
			g, err := SpaceGroupByNumber(n, cell)
			if err != nil {
				return nil, "", cifErr(col[0].line, "%s: %v", tag, err)
			}
			return g.Operations(), spaceGroupLabel(g), nil
		}
	}
	return nil, "", cifErr(b.line, "data_%s lists no symmetry operators (_space_group_symop_operation_xyz or _symmetry_equiv_pos_as_xyz) and names no space group; for P 1 say so with _space_group_name_H-M_alt 'P 1'", b.name)
}

func spaceGroupLabel(g SpaceGroup) string { return fmt.Sprintf("%s (No. %d)", g.Name(), g.Number()) }

// cifElement finds the element of a type symbol or label: one or two
// letters at its start, "Fe3+" → Fe, "O2-" → O, "CU1" → Cu, "Cl1" → Cl.
func cifElement(s string) (string, bool) {
	n := 0
	for n < len(s) && n < 2 && (s[n] >= 'A' && s[n] <= 'Z' || s[n] >= 'a' && s[n] <= 'z') {
		n++
	}
	if n == 2 {
		if el, err := canonicalElement(s[:2]); err == nil {
			return el, true
		}
	}
	if n >= 1 {
		if el, err := canonicalElement(s[:1]); err == nil {
			return el, true
		}
	}
	return "", false
}

func cifAtoms(b *cifBlock, cell Cell) ([]Atom, error) {
	fx, loop := b.column("_atom_site_fract_x")
	if fx == nil {
		return nil, cifErr(b.line, "data_%s has no atom sites (_atom_site_fract_x, _y, _z)", b.name)
	}
	get := func(tag string) ([]cifValue, error) {
		col, l := b.column(tag)
		if col != nil && l != loop {
			return nil, cifErr(b.tagAt[tag], "%s is not in the loop of _atom_site_fract_x (line %d)", tag, loopLine(loop))
		}
		return col, nil
	}
	cols := map[string][]cifValue{"_atom_site_fract_x": fx}
	for _, tag := range []string{"_atom_site_fract_y", "_atom_site_fract_z", "_atom_site_type_symbol", "_atom_site_label", "_atom_site_occupancy", "_atom_site_b_iso_or_equiv", "_atom_site_u_iso_or_equiv"} {
		col, err := get(tag)
		if err != nil {
			return nil, err
		}
		cols[tag] = col
	}
	if cols["_atom_site_fract_y"] == nil || cols["_atom_site_fract_z"] == nil {
		return nil, cifErr(b.tagAt["_atom_site_fract_x"], "atom sites need _atom_site_fract_y and _atom_site_fract_z as well as _x")
	}
	if cols["_atom_site_type_symbol"] == nil && cols["_atom_site_label"] == nil {
		return nil, cifErr(b.tagAt["_atom_site_fract_x"], "atom sites need _atom_site_type_symbol or _atom_site_label to name the element")
	}
	aniso, err := cifAnisoB(b, cell)
	if err != nil {
		return nil, err
	}
	atoms := make([]Atom, len(fx))
	for i := range fx {
		at := Atom{Occupancy: 1}
		for k, tag := range [...]string{"_atom_site_fract_x", "_atom_site_fract_y", "_atom_site_fract_z"} {
			v := cols[tag][i]
			x, err := cifFloat(v, tag)
			if err != nil {
				return nil, err
			}
			at.XYZ[k] = x
		}
		sym := cols["_atom_site_type_symbol"]
		if sym == nil || sym[i].missing() {
			sym = cols["_atom_site_label"]
		}
		el, ok := cifElement(sym[i].text)
		if !ok {
			return nil, cifErr(sym[i].line, "unknown element %s (the scattering-factor table covers H to %s)", abbreviate(sym[i].text), peng1996[MaxZ].Symbol)
		}
		at.Element = el
		if occ := cols["_atom_site_occupancy"]; occ != nil && !occ[i].missing() {
			x, err := cifFloat(occ[i], "_atom_site_occupancy")
			if err != nil {
				return nil, err
			}
			if !(x > 0 && x <= 1) {
				return nil, cifErr(occ[i].line, "_atom_site_occupancy %s must lie in (0, 1]", occ[i].text)
			}
			at.Occupancy = x
		}
		bAng2, have := 0.0, false
		if bc := cols["_atom_site_b_iso_or_equiv"]; bc != nil && !bc[i].missing() {
			x, err := cifFloat(bc[i], "_atom_site_B_iso_or_equiv")
			if err != nil {
				return nil, err
			}
			bAng2, have = x, true
		} else if uc := cols["_atom_site_u_iso_or_equiv"]; uc != nil && !uc[i].missing() {
			x, err := cifFloat(uc[i], "_atom_site_U_iso_or_equiv")
			if err != nil {
				return nil, err
			}
			bAng2, have = 8*math.Pi*math.Pi*x, true
		}
		if !have {
			if lab := cols["_atom_site_label"]; lab != nil {
				if x, ok := aniso[lab[i].text]; ok {
					bAng2 = x
				}
			}
		}
		if !(bAng2 >= 0) {
			return nil, cifErr(fx[i].line, "atom %d (%s): Debye–Waller factor B = %g Å² is negative", i+1, el, bAng2)
		}
		at.BIsoNm2 = bAng2 / (angstromPerNm * angstromPerNm)
		atoms[i] = at
	}
	return atoms, nil
}

func loopLine(l *cifLoop) int {
	if l == nil {
		return 0
	}
	return l.line
}

// cifAnisoB returns, per atom label, B_eq = 8π² U_eq (Å²) from the
// anisotropic displacement parameters,
//
//	U_eq = (1/3) Σ_ij U^ij a*_i a*_j (a_i · a_j)
//
// (Fischer & Tillmanns 1988, Acta Cryst. C44, 775).
func cifAnisoB(b *cifBlock, cell Cell) (map[string]float64, error) {
	labels, loop := b.column("_atom_site_aniso_label")
	if labels == nil {
		return nil, nil
	}
	tags := [3][3]string{
		{"_atom_site_aniso_u_11", "_atom_site_aniso_u_12", "_atom_site_aniso_u_13"},
		{"_atom_site_aniso_u_12", "_atom_site_aniso_u_22", "_atom_site_aniso_u_23"},
		{"_atom_site_aniso_u_13", "_atom_site_aniso_u_23", "_atom_site_aniso_u_33"},
	}
	g := cell.Metric()
	as, bs, cs := cell.ReciprocalBasis()
	rlen := [3]float64{r3.Norm(as), r3.Norm(bs), r3.Norm(cs)}
	out := map[string]float64{}
	for r := range labels {
		var ueq float64
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				col, l := b.column(tags[i][j])
				if col == nil || l != loop {
					return nil, cifErr(b.tagAt["_atom_site_aniso_label"], "anisotropic displacement loop lacks %s", tags[i][j])
				}
				if col[r].missing() {
					continue
				}
				u, err := cifFloat(col[r], tags[i][j])
				if err != nil {
					return nil, err
				}
				// Metric in nm², a* in 1/nm: the product is dimensionless.
				ueq += u * rlen[i] * rlen[j] * g.At(i, j)
			}
		}
		out[labels[r].text] = 8 * math.Pi * math.Pi * ueq / 3
	}
	return out, nil
}
