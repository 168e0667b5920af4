package crystal

import (
	"fmt"
	"math"
	"strings"
)

// Atom is one atomic site: fractional coordinates, occupancy in (0, 1] and
// isotropic Debye–Waller factor B = 8π²⟨u²⟩ in nm² (1 Å² = 0.01 nm²).
type Atom struct {
	Element   string
	XYZ       [3]float64
	Occupancy float64
	BIsoNm2   float64
}

// Crystal is a cell with every atom in it (already expanded by symmetry)
// and, when HasElastic, its elastic constants. Build one with New, Preset
// or ParseCIF, which check the atoms; a Crystal assembled by hand with an
// element missing from the scattering-factor table makes the structure
// factor methods panic (a programmer error).
type Crystal struct {
	Name       string
	Structure  string // e.g. "fcc (Fm-3m)"; informative only
	Source     string // where the numbers came from; informative only
	Cell       Cell
	Atoms      []Atom
	Elastic    Elastic
	HasElastic bool
}

// mergeNm is the distance below which two symmetry images of one atom are
// taken to be one site. CIF coordinates are commonly rounded to
// four decimals (≈ 1e-4 nm in a 1 nm cell); no two atoms of one element sit
// closer than about 0.1 nm in a real structure.
const mergeNm = 0.01

// New builds a crystal from the asymmetric unit: every atom is mapped by
// each symmetry operator ("x,y,z"-style, see ParseSymOp) and then by each
// lattice translation of the centring letter (P, I, F, A, B, C, R; see
// Centring), wrapped into [0, 1), and images closer than 0.01 nm merged
// into one site at their mean position (which puts a coordinate given as
// 0.3333 on its special position 1/3). Only images of one input atom merge:
// two input atoms on one site (a mixed or split site with partial
// occupancies) stay two. With neither operators nor centring the atoms are
// taken as the full cell (P1). Operators and a centring letter may be given
// together; the centring translations then follow each operator. Elements are checked against the
// scattering-factor table; occupancies must lie in (0, 1] and B be finite
// and non-negative.
func New(name string, cell Cell, atoms []Atom, symmetry []string, centering string) (*Crystal, error) {
	if _, err := NewCell(cell.A, cell.B, cell.C, cell.Alpha, cell.Beta, cell.Gamma); err != nil {
		return nil, fmt.Errorf("crystal %q: %w", name, err)
	}
	if len(atoms) == 0 {
		return nil, fmt.Errorf("crystal %q: no atoms", name)
	}
	ops := []SymOp{identityOp}
	if len(symmetry) > 0 {
		ops = ops[:0]
		for i, s := range symmetry {
			op, err := ParseSymOp(s)
			if err != nil {
				return nil, fmt.Errorf("crystal %q: symmetry[%d]: %w", name, i, err)
			}
			if !hasOp(ops, op) {
				ops = append(ops, op)
			}
		}
	}
	trans, err := Centring(centering, cell)
	if err != nil {
		return nil, fmt.Errorf("crystal %q: %w", name, err)
	}
	return expand(name, cell, atoms, ops, trans)
}

// expand maps every atom by each operation of ops and then each lattice
// translation of trans, merging images as New describes.
func expand(name string, cell Cell, atoms []Atom, ops []SymOp, trans [][3]float64) (*Crystal, error) {
	if n := len(ops) * len(trans); n > maxOpsPerAtom {
		return nil, fmt.Errorf("crystal %q: %d distinct operators × %d centring translations exceed %d (a space group has at most 192 operations)", name, len(ops), len(trans), maxOpsPerAtom)
	}
	if n := len(atoms) * len(ops) * len(trans); n > maxImages {
		return nil, fmt.Errorf("crystal %q: %d atoms × %d operators × %d centring translations exceed %d images", name, len(atoms), len(ops), len(trans), maxImages)
	}
	var out []Atom
	grid := newSiteGrid(cell)
	for i, at := range atoms {
		at, err := checkAtom(at)
		if err != nil {
			return nil, fmt.Errorf("crystal %q: atoms[%d]: %w", name, i, err)
		}
		// Images of this atom, merged: each site keeps the mean of the
		// images that fell on it, which moves a position given to a few
		// decimals (0.3333) onto its special position (1/3).
		var sites []Atom
		var sum [][3]float64
		var count []int
		grid.reset()
		for _, op := range ops {
			x := op.Apply(at.XYZ)
			for _, t := range trans {
				img := wrap([3]float64{x[0] + t[0], x[1] + t[1], x[2] + t[2]})
				if k, d := grid.near(img); k >= 0 {
					for j := range d {
						sum[k][j] += d[j]
					}
					count[k]++
					continue
				}
				a := at
				a.XYZ = img
				grid.add(img)
				sites = append(sites, a)
				sum = append(sum, [3]float64{})
				count = append(count, 1)
			}
		}
		if len(out)+len(sites) > MaxAtoms {
			return nil, fmt.Errorf("crystal %q: the symmetry expansion reaches more than %d atoms in the cell (at atoms[%d]); that is beyond what this program handles", name, MaxAtoms, i)
		}
		for k := range sites {
			var x [3]float64
			for j := range x {
				x[j] = sites[k].XYZ[j] + sum[k][j]/float64(count[k])
			}
			sites[k].XYZ = wrap(x)
			out = append(out, sites[k])
		}
	}
	if err := checkSiteOccupancy(cell, out); err != nil {
		return nil, fmt.Errorf("crystal %q: %w", name, err)
	}
	return &Crystal{Name: name, Cell: cell, Atoms: out}, nil
}

// checkSiteOccupancy refuses a site whose atoms (of different input
// atoms, within mergeNm of each other) add up to more than full
// occupancy: two copies of an atom on one site would double its scattering.
func checkSiteOccupancy(cell Cell, atoms []Atom) error {
	grid := newSiteGrid(cell)
	var total []float64
	var who [][]int
	for i, at := range atoms {
		if k, _ := grid.near(at.XYZ); k >= 0 {
			total[k] += at.Occupancy
			who[k] = append(who[k], i)
			continue
		}
		grid.add(at.XYZ)
		total = append(total, at.Occupancy)
		who = append(who, []int{i})
	}
	for k, t := range total {
		if t > 1+1e-3 {
			x := grid.xyz[k]
			var names []string
			for _, i := range who[k] {
				names = append(names, fmt.Sprintf("%s %g", atoms[i].Element, atoms[i].Occupancy))
			}
			return fmt.Errorf("the site (%.4g, %.4g, %.4g) holds %s: occupancies add up to %g, more than 1", x[0], x[1], x[2], strings.Join(names, " + "), t)
		}
	}
	return nil
}

func checkAtom(at Atom) (Atom, error) {
	el, err := canonicalElement(at.Element)
	if err != nil {
		return Atom{}, err
	}
	at.Element = el
	for i, x := range at.XYZ {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return Atom{}, fmt.Errorf("%s: xyz[%d] = %g is not finite", el, i, x)
		}
	}
	if !(at.Occupancy > 0 && at.Occupancy <= 1) {
		return Atom{}, fmt.Errorf("%s: occupancy %g must lie in (0, 1]", el, at.Occupancy)
	}
	if !(at.BIsoNm2 >= 0) || math.IsInf(at.BIsoNm2, 0) {
		return Atom{}, fmt.Errorf("%s: Debye–Waller B = %g nm² must be finite and non-negative", el, at.BIsoNm2)
	}
	// B = 1 nm² = 100 Å², a mean-square displacement B/8π² of 1.3 Å²
	// (1.1 Å rms), is far beyond any crystal below its melting point
	// (metals at room temperature have 0.3–1 Å², from memory).
	if at.BIsoNm2 > maxBIsoNm2 {
		return Atom{}, fmt.Errorf("%s: Debye–Waller B = %g nm² is more than %g nm² (%g Å²), beyond any solid", el, at.BIsoNm2, maxBIsoNm2, maxBIsoNm2*100)
	}
	return at, nil
}

// maxBIsoNm2 is the largest Debye–Waller factor accepted, nm².
const maxBIsoNm2 = 1.0

// wrap maps fractional coordinates into [0, 1), snapping values within 1e-9
// of a cell face to 0 so that 0.9999999999 and 0 are one coordinate.
func wrap(x [3]float64) [3]float64 {
	for i := range x {
		x[i] -= math.Floor(x[i])
		if x[i] > 1-1e-9 {
			x[i] = 0
		}
	}
	return x
}

// MaxAtoms bounds the atoms of a crystal's cell after the symmetry
// expansion: 100 000 covers the largest inorganic structures (zeolites and
// intermetallics with a few thousand atoms per cell) with room to spare,
// while every structure factor stays a sum a render computes in a fraction
// of a second.
const MaxAtoms = 100_000

// maxImages bounds the symmetry expansion (atoms × operators × centring
// translations, before merging): 10⁷ is far above any crystal a
// diffraction-contrast simulation needs and keeps a malformed file from
// exhausting memory.
const maxImages = 10_000_000

// maxOpsPerAtom bounds the images of one atom: a space group has at most
// 192 operations in its conventional cell (International Tables Vol. A), so
// 4096 leaves room for redundant input.
const maxOpsPerAtom = 4096

// hasOp reports whether ops holds op up to a lattice translation (a listed
// operator repeated, or given once as x+1,y,z and once as x,y,z).
func hasOp(ops []SymOp, op SymOp) bool {
	for _, o := range ops {
		if o.R != op.R {
			continue
		}
		same := true
		for i := range o.T {
			d := o.T[i] - op.T[i]
			if math.Abs(d-math.Round(d)) > 1e-9 {
				same = false
			}
		}
		if same {
			return true
		}
	}
	return false
}

// WithElastic returns a copy of c carrying the elastic constants e.
func (c *Crystal) WithElastic(e Elastic) (*Crystal, error) {
	if err := e.Validate(); err != nil {
		return nil, fmt.Errorf("crystal %q: elastic: %w", c.Name, err)
	}
	cp := *c
	cp.Atoms = append([]Atom(nil), c.Atoms...)
	cp.Elastic, cp.HasElastic = e, true
	return &cp, nil
}
