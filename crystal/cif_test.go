package crystal

import (
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

const cifCu = `data_cu
_cell_length_a 3.6149(2)
_cell_length_b 3.6149(2)
_cell_length_c 3.6149(2)
_cell_angle_alpha 90
_cell_angle_beta 90
_cell_angle_gamma 90
_space_group_name_H-M_alt 'F m -3 m'
loop_
_space_group_symop_operation_xyz
x,y,z
x,y+1/2,z+1/2
x+1/2,y,z+1/2
x+1/2,y+1/2,z
loop_
_atom_site_label
_atom_site_type_symbol
_atom_site_fract_x
_atom_site_fract_y
_atom_site_fract_z
_atom_site_occupancy
_atom_site_B_iso_or_equiv
Cu1 Cu 0 0 0 1 0.55
`

// TestParseCIFCopper: a minimal fcc copper file gives the same crystal as
// the preset (same a, B and four atoms), so the same ξ_g.
func TestParseCIFCopper(t *testing.T) {
	c, err := ParseCIF(strings.NewReader(cifCu), "")
	if err != nil {
		t.Fatal(err)
	}
	cu, _ := Preset("Cu")
	if len(c.Atoms) != 4 || c.Cell != cu.Cell || c.Name != "cu" {
		t.Fatalf("parsed %+v", c)
	}
	for _, g := range [][3]float64{{1, 1, 1}, {2, 0, 0}, {2, 2, 0}} {
		a, _ := c.ExtinctionDistance(g, 200)
		b, _ := cu.ExtinctionDistance(g, 200)
		if math.Abs(a-b) > 1e-12*b {
			t.Errorf("%v: ξ from CIF %g, preset %g", g, a, b)
		}
	}
}

// TestParseCIFSyntax exercises CIF 1.1 syntax (IUCr CIF 1.1 specification):
// comments, quoted strings containing quotes and spaces, text fields,
// case-insensitive tags and keywords, global_ and save_ frames, values
// split across lines in a loop, ? and . nulls, and U_eq from anisotropic
// displacement parameters: for an orthogonal cell U_eq = (U11+U22+U33)/3
// (Fischer & Tillmanns 1988).
func TestParseCIFSyntax(t *testing.T) {
	text := `#\#CIF_1.1
global_
_audit_creation_method 'by hand'
data_first
# a comment line
_Cell_Length_A 4.0 # trailing comment
_cell_length_b 5.0
_cell_length_c 6.0
_cell_angle_alpha 90.0
_cell_angle_beta 90.0
_cell_angle_gamma 90.0
_publ_section_title
;
A title over lines; with 'quotes' and "double quotes"
 and a leading space
;
_journal_name_full 'Journal of O'Brien's Structures'
_space_group_name_H-M_alt "P 1"
save_frame1
_frame_item 1
save_
LOOP_
_atom_site_label
_atom_site_fract_x _atom_site_fract_y
_atom_site_fract_z
_atom_site_occupancy
_atom_site_U_iso_or_equiv
Fe1 0.1 0.2
0.3 ? ?
O1 .5 0.5 0.5(12) 0.5 0.01
Ow 0.25 0.25 0.75 1 .
loop_
_atom_site_aniso_label
_atom_site_aniso_U_11
_atom_site_aniso_U_22
_atom_site_aniso_U_33
_atom_site_aniso_U_12
_atom_site_aniso_U_13
_atom_site_aniso_U_23
Fe1 0.010 0.020 0.030 0 0 0
data_second
_cell_length_a 1
`
	c, err := ParseCIF(strings.NewReader(text), "")
	if err != nil {
		t.Fatal(err)
	}
	if c.Name != "first" || len(c.Atoms) != 3 {
		t.Fatalf("parsed %q with %d atoms", c.Name, len(c.Atoms))
	}
	fe, o, ow := c.Atoms[0], c.Atoms[1], c.Atoms[2]
	if fe.Element != "Fe" || fe.XYZ != [3]float64{0.1, 0.2, 0.3} || fe.Occupancy != 1 {
		t.Errorf("Fe1 = %+v", fe)
	}
	// B = 8π² U_eq, U_eq = 0.02 Å², in nm².
	if want := 8 * math.Pi * math.Pi * 0.02 / 100; math.Abs(fe.BIsoNm2-want) > 1e-15 {
		t.Errorf("Fe1 B = %g nm², want %g from U_eq", fe.BIsoNm2, want)
	}
	if o.Element != "O" || o.Occupancy != 0.5 || math.Abs(o.BIsoNm2-8*math.Pi*math.Pi*0.0001) > 1e-15 {
		t.Errorf("O1 = %+v", o)
	}
	if ow.Element != "O" || ow.BIsoNm2 != 0 {
		t.Errorf("Ow = %+v", ow)
	}
	if _, err := ParseCIF(strings.NewReader(text), "SECOND"); err == nil || !strings.Contains(err.Error(), "_cell_length_b") {
		t.Errorf("second block (no full cell): %v", err)
	}
	if _, err := ParseCIF(strings.NewReader(text), "third"); err == nil || !strings.Contains(err.Error(), "data_first, data_second") {
		t.Errorf("missing block: %v", err)
	}
}

// TestParseCIFBadInput: each malformed file is refused with the line of the
// problem.
func TestParseCIFBadInput(t *testing.T) {
	replace := func(old, new string) string {
		if !strings.Contains(cifCu, old) {
			t.Fatalf("test set-up: %q not in the file", old)
		}
		return strings.Replace(cifCu, old, new, 1)
	}
	for _, tc := range []struct {
		name, text string
		line       int
		inMsg      string
	}{
		{"no cell", "data_x\nloop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nCu 0 0 0\n", 1, "_cell_length_a"},
		{"missing angle", replace("_cell_angle_gamma 90\n", ""), 1, "_cell_angle_gamma"},
		{"unknown element", replace("Cu1 Cu 0 0 0", "Xx1 Xx 0 0 0"), 23, "unknown element"},
		{"occupancy 0", replace("0 0 0 1 0.55", "0 0 0 0 0.55"), 23, "occupancy"},
		{"occupancy 1.5", replace("0 0 0 1 0.55", "0 0 0 1.5 0.55"), 23, "occupancy"},
		{"impossible angles", strings.Replace(replace("_cell_angle_alpha 90", "_cell_angle_alpha 30"), "_cell_angle_beta 90", "_cell_angle_beta 30", 1), 5, "impossible"},
		{"negative length", replace("_cell_length_b 3.6149(2)", "_cell_length_b -3.6"), 3, "length b"},
		{"huge length", replace("_cell_length_b 3.6149(2)", "_cell_length_b 1e300"), 3, "length b = 1e+299 nm must lie from 0.1 to 20 nm"},
		{"tiny length", replace("_cell_length_c 3.6149(2)", "_cell_length_c 5e-324"), 4, "length c"},
		{"text for number", replace("_cell_length_c 3.6149(2)", "_cell_length_c big"), 4, "not a number"},
		{"unknown length", replace("_cell_length_c 3.6149(2)", "_cell_length_c ?"), 4, "unknown"},
		{"bad operator", replace("x+1/2,y,z+1/2", "x+1/2,y"), 13, "symmetry operator"},
		{"no operators, unknown group", strings.Replace(noOps(t), "'F m -3 m'", "'F m -3 q'", 1), 8, "not a Hermann–Mauguin symbol"},
		{"no operators, origin choice open", strings.Replace(noOps(t), "'F m -3 m'", "'F d -3 m'", 1), 8, `name one, "F d -3 m:1" or "F d -3 m:2"`},
		{"no operators, number out of range", strings.Replace(noOps(t), "_space_group_name_H-M_alt 'F m -3 m'", "_space_group_IT_number 231", 1), 8, "want 1 to 230"},
		{"no operators, number not whole", strings.Replace(noOps(t), "_space_group_name_H-M_alt 'F m -3 m'", "_space_group_IT_number 22.5", 1), 8, "not a whole number"},
		{"no atoms", cifCu[:strings.Index(cifCu, "loop_\n_atom_site_label")], 1, "no atom sites"},
		{"short loop", replace("Cu1 Cu 0 0 0 1 0.55", "Cu1 Cu 0 0 0 1"), 15, "6 values for 7 tags"},
		{"unclosed quote", replace("'F m -3 m'", "'F m -3 m"), 8, "not closed"},
		{"unclosed text field", cifCu + ";\nnever closed\n", 24, "never closed"},
		{"duplicate tag", cifCu + "_cell_length_a 4\n", 24, "defined twice"},
		{"value without tag", replace("_cell_angle_beta 90", "_cell_angle_beta 90 91"), 6, "has no tag"},
		{"tag without value", replace("_cell_angle_beta 90", "_cell_angle_beta"), 6, "has no value"},
		{"item before block", "_cell_length_a 4\n" + cifCu, 1, "before any data_"},
		{"empty", "", 0, "no data_ block"},
		{"stop_", cifCu + "stop_\n", 24, "stop_"},
		{"unnamed block", "data_\n", 1, "without a name"},
		{"unclosed save", replace("_cell_angle_beta 90", "save_a\n_x 1"), 0, "not closed"},
	} {
		_, err := ParseCIF(strings.NewReader(tc.text), "")
		if err == nil {
			t.Errorf("%s: accepted", tc.name)
			continue
		}
		var ce *CIFError
		if !errors.As(err, &ce) {
			t.Errorf("%s: %v is not a *CIFError", tc.name, err)
			continue
		}
		if ce.Line != tc.line || !strings.Contains(err.Error(), tc.inMsg) {
			t.Errorf("%s: got %q (line %d), want line %d mentioning %q", tc.name, err, ce.Line, tc.line, tc.inMsg)
		}
	}
}

func TestLoadCIF(t *testing.T) {
	c, err := LoadCIF("testdata/rutile.cif")
	if err != nil {
		t.Fatal(err)
	}
	// Rutile: 2 Ti + 4 O per cell (Z = 2, Abrahams & Bernstein 1971).
	n := map[string]int{}
	for _, a := range c.Atoms {
		n[a.Element]++
	}
	if n["Ti"] != 2 || n["O"] != 4 {
		t.Errorf("rutile cell holds %v", n)
	}
	if _, err := LoadCIF("testdata/no-such-file.cif"); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	// The first block of mg.cif holds no structure.
	if _, err := LoadCIF("testdata/mg.cif"); err == nil || !strings.Contains(err.Error(), "mg.cif") || !strings.Contains(err.Error(), "_cell_length_a") {
		t.Errorf("mg.cif first block: %v", err)
	}
}

// noOps is cifCu without its operator loop: the space group is named only.
func noOps(t *testing.T) string {
	ops := "loop_\n_space_group_symop_operation_xyz\nx,y,z\nx,y+1/2,z+1/2\nx+1/2,y,z+1/2\nx+1/2,y+1/2,z\n"
	if !strings.Contains(cifCu, ops) {
		t.Fatal("test set-up: operator loop not in cifCu")
	}
	return strings.Replace(cifCu, ops, "", 1)
}

// TestParseCIFNamedSpaceGroup: a file that names its space group but lists
// no operators is expanded from the table. Multiplicities from
// International Tables Vol. A: Fm-3m 4a has 4 sites; Fd-3m 8a has 8
// (diamond Si at 1/8 1/8 1/8 in origin choice 2, at 0 0 0 in choice 1).
func TestParseCIFNamedSpaceGroup(t *testing.T) {
	si := func(group, xyz string) string {
		return strings.Replace(strings.Replace(strings.ReplaceAll(noOps(t), "Cu", "Si"), "'F m -3 m'", group, 1), "Si1 Si 0 0 0", "Si1 Si "+xyz, 1)
	}
	for _, c := range []struct {
		name, text, group string
		n                 int
	}{
		{"Fm-3m by symbol", noOps(t), "F m -3 m (No. 225)", 4},
		{"Fm-3m by number", strings.Replace(noOps(t), "_space_group_name_H-M_alt 'F m -3 m'", "_space_group_IT_number 225", 1), "F m -3 m (No. 225)", 4},
		{"Fm-3m by Hall symbol", strings.Replace(noOps(t), "_space_group_name_H-M_alt 'F m -3 m'", "_space_group_name_Hall '-F 4 2 3'", 1), "F m -3 m (No. 225)", 4},
		{"Fd-3m origin 2", si("'Fd-3m:2'", "0.125 0.125 0.125"), "F d -3 m:2 (No. 227)", 8},
		{"Fd-3m origin 1", si("'F d -3 m:1'", "0 0 0"), "F d -3 m:1 (No. 227)", 8},
	} {
		cr, err := ParseCIF(strings.NewReader(c.text), "")
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if len(cr.Atoms) != c.n || cr.Structure != c.group {
			t.Errorf("%s: %d atoms, group %q; want %d, %q", c.name, len(cr.Atoms), cr.Structure, c.n, c.group)
		}
	}
}
