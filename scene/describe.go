package scene

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
)

// Each defect type is described once, here: its fields, which are
// required, their kinds, units and physical ranges, the value each starts
// at when a defect is added, and how its form reads. Validation, the
// template of a new defect, the list line of a defect and the window's
// form are all driven by these descriptions; only the physics of a type
// (buildDefect) reads its fields by name. A new field of a defect is the
// struct field in Defect, its FieldSpec below, and its use in
// buildDefect.

// FieldKind is what a defect field holds.
type FieldKind int

const (
	// Position is a point [x, y, z] in nm in the image frame.
	Position FieldKind = iota
	// Direction is a crystal direction [uvw] (four indices [uvtw] in a
	// hexagonal cell).
	Direction
	// Plane is a crystal plane (hkl) (four indices (hkil) in a hexagonal
	// cell).
	Plane
	// Burgers is a Burgers vector (or a fault's shift) written as text:
	// 1/2[1 1 0].
	Burgers
	// BurgersList is a fixed number (Count) of Burgers vectors as text.
	BurgersList
	// Number is one number in Unit.
	Number
	// Choice is one of Options (left out: the default, described by Help).
	Choice
	// Interval is [from, to] in Unit with from < to.
	Interval
)

// Range is the physical range of a number: Min to Max, each end inclusive
// or not.
type Range struct {
	Min, Max         float64
	MinOpen, MaxOpen bool // the end itself is excluded
	Unit             string
	Reason           string // why the range, for the error message; may be empty
}

// Contains reports whether v lies in the range.
func (r Range) Contains(v float64) bool {
	if math.IsNaN(v) {
		return false
	}
	lo := v > r.Min || (!r.MinOpen && v == r.Min)
	hi := v < r.Max || (!r.MaxOpen && v == r.Max)
	return lo && hi
}

// String writes the range as a condition: "> 0 and ≤ 1e+06 nm".
func (r Range) String() string {
	lo, hi := "≥", "≤"
	if r.MinOpen {
		lo = ">"
	}
	if r.MaxOpen {
		hi = "<"
	}
	u := ""
	if r.Unit != "" {
		u = " " + r.Unit
	}
	return fmt.Sprintf("%s %s and %s %s%s", lo, fmtNum(r.Min), hi, fmtNum(r.Max), u)
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// FieldSpec describes one field of a defect type.
type FieldSpec struct {
	Name     string // the field's name in the scene file: "b", "at_nm"
	Label    string // the form's label: "Burgers vector b"
	Kind     FieldKind
	Required bool
	Range    *Range   // Number, and each coordinate of Position and Interval
	Options  []string // Choice
	Count    int      // BurgersList
	Help     string   // one line under the field in the form
	// Default is the value of a new defect's field (nil: left out; a
	// Position is placed at mid-depth by Template instead).
	Default any
}

// Unit is the unit of the field's numbers ("" when none).
func (f *FieldSpec) Unit() string {
	if f.Range != nil {
		return f.Range.Unit
	}
	return ""
}

// GroupRule says how the fields of a group go together.
type GroupRule int

const (
	// OneOf: exactly one of the fields is given.
	OneOf GroupRule = iota
	// Together: all of the fields, or none.
	Together
)

// GroupSpec ties fields of a type together.
type GroupSpec struct {
	Rule   GroupRule
	Fields []string
	Label  string   // the form's label of the choice (OneOf)
	Names  []string // the choice's names of the fields (OneOf)
}

// DefectSpec describes one defect type.
type DefectSpec struct {
	Type   string
	Noun   string // with its article: "a dislocation", "an inclusion"
	Fields []FieldSpec
	Groups []GroupSpec
	// List names the fields shown in a defect's list line.
	List []string
}

// Field returns the description of the field name, or nil.
func (s *DefectSpec) Field(name string) *FieldSpec {
	for i := range s.Fields {
		if s.Fields[i].Name == name {
			return &s.Fields[i]
		}
	}
	return nil
}

// GroupOf returns the group the field name belongs to, or nil.
func (s *DefectSpec) GroupOf(name string) *GroupSpec {
	for i := range s.Groups {
		for _, f := range s.Groups[i].Fields {
			if f == name {
				return &s.Groups[i]
			}
		}
	}
	return nil
}

// Ranges shared by several fields.
var (
	lengthRange   = &Range{Min: 0, Max: MaxLengthNm, MinOpen: true, Unit: "nm", Reason: "1 mm at most"}
	positionRange = &Range{Min: -MaxLengthNm, Max: MaxLengthNm, Unit: "nm", Reason: "within 1 mm of the image centre"}
	// A strain or misfit is a small fraction; beyond ±0.5 the linear
	// elasticity of Ashby & Brown (1963) has no meaning.
	fractionRange = &Range{Min: -0.5, Max: 0.5, MinOpen: true, MaxOpen: true, Reason: "a small fraction"}
)

// Fields several types share.
var (
	atField = FieldSpec{Name: "at_nm", Label: "Position", Kind: Position, Required: true, Range: positionRange,
		Help: "nm; x along g, y down the image, z depth below the entrance surface"}
	elasticityField = FieldSpec{Name: "elasticity", Label: "Elasticity", Kind: Choice, Options: []string{"isotropic", "anisotropic"},
		Help: "default: anisotropic (Stroh) when the crystal has all its elastic constants"}
	radiusField = func(def float64) FieldSpec {
		return FieldSpec{Name: "radius_nm", Label: "Radius", Kind: Number, Required: true, Range: lengthRange, Default: def}
	}
)

// defectSpecs describes every defect type, in the order they are offered.
// The defaults suit a cubic (fcc) cell; they are a start to edit, not a
// recommendation.
var defectSpecs = []DefectSpec{
	{
		Type: "dislocation", Noun: "a dislocation",
		Fields: []FieldSpec{
			{Name: "b", Label: "Burgers vector b", Kind: Burgers, Required: true, Default: "1/2[1 1 0]", Help: "e.g. 1/2[1 -1 0]"},
			{Name: "line", Label: "Line u [uvw]", Kind: Direction, Required: true, Default: []float64{1, -1, 2}},
			atField,
			elasticityField,
		},
		List: []string{"b", "line", "at_nm"},
	},
	{
		// A 60° dislocation on (1 -1 1) splitting into two Shockley
		// partials: 1/2[1 1 0] = 1/6[2 1 -1] + 1/6[1 2 1].
		Type: "dissociated", Noun: "a dissociated dislocation",
		Fields: []FieldSpec{
			{Name: "b", Label: "Total b", Kind: Burgers, Required: true, Default: "1/2[1 1 0]", Help: "e.g. 1/2[1 -1 0]"},
			{Name: "line", Label: "Line u [uvw]", Kind: Direction, Required: true, Default: []float64{0, 1, 1}},
			{Name: "plane", Label: "Glide plane (hkl)", Kind: Plane, Required: true, Default: []float64{1, -1, 1}},
			{Name: "partials", Label: "Partials b₁, b₂", Kind: BurgersList, Count: 2, Required: true, Default: []string{"1/6[2 1 -1]", "1/6[1 2 1]"}, Help: "e.g. 1/6[1 2 1]"},
			{Name: "separation_nm", Label: "Separation", Kind: Number, Range: lengthRange, Default: 8.0},
			// Stacking-fault energies of metals lie between a few and a few
			// hundred mJ/m² (Hirth & Lothe 1982, ch. 10, from memory).
			{Name: "sfe_mj_m2", Label: "Fault energy", Kind: Number, Range: &Range{Min: 0, Max: 2000, MinOpen: true, Unit: "mJ/m²"}, Default: 100.0},
			atField,
			elasticityField,
		},
		Groups: []GroupSpec{{Rule: OneOf, Fields: []string{"separation_nm", "sfe_mj_m2"}, Label: "Width from", Names: []string{"separation", "fault energy"}}},
		List:   []string{"b", "line", "at_nm"},
	},
	{
		Type: "fault", Noun: "a fault",
		Fields: []FieldSpec{
			{Name: "plane", Label: "Fault plane (hkl)", Kind: Plane, Required: true, Default: []float64{1, 1, 1}},
			{Name: "kind", Label: "Kind", Kind: Choice, Options: FaultKinds, Default: "intrinsic",
				Help: "intrinsic or extrinsic on a cubic {111} plane; I1, I2 or E on the basal plane of hcp"},
			{Name: "shift", Label: "Shift R", Kind: Burgers, Default: "1/3[-1 -1 -1]",
				Help: "moves the side the plane normal points to; e.g. 1/3[-1 -1 -1] (intrinsic on (1 1 1))"},
			atField,
			{Name: "edge", Label: "Bounded along [uvw]", Kind: Direction, Help: "optional: the direction of the strip's edges, in the plane"},
			{Name: "bounds_nm", Label: "Strip from, to", Kind: Interval, Range: positionRange,
				Help: "optional: the strip's edges, nm from the position along n × edge"},
		},
		Groups: []GroupSpec{
			{Rule: OneOf, Fields: []string{"kind", "shift"}, Label: "Fault vector from", Names: []string{"kind", "shift R"}},
			{Rule: Together, Fields: []string{"edge", "bounds_nm"}, Label: "a bounded fault"},
		},
		List: []string{"plane", "kind", "shift", "at_nm"},
	},
	{
		Type: "inclusion", Noun: "an inclusion",
		Fields: []FieldSpec{
			radiusField(8),
			{Name: "strain", Label: "Strain ε", Kind: Number, Range: fractionRange, Default: 0.005},
			{Name: "misfit", Label: "Misfit δ", Kind: Number, Range: fractionRange, Default: 0.01},
			atField,
		},
		Groups: []GroupSpec{{Rule: OneOf, Fields: []string{"misfit", "strain"}, Label: "Strength", Names: []string{"misfit δ", "strain ε"}}},
		List:   []string{"radius_nm", "misfit", "strain", "at_nm"},
	},
	{
		Type: "loop", Noun: "a loop",
		Fields: []FieldSpec{
			{Name: "normal", Label: "Loop normal [uvw]", Kind: Direction, Required: true, Default: []float64{1, 1, 1}},
			{Name: "b", Label: "Burgers vector b", Kind: Burgers, Required: true, Default: "1/3[1 1 1]", Help: "e.g. 1/3[1 1 1]"},
			{Name: "nature", Label: "Nature", Kind: Choice, Options: []string{"vacancy", "interstitial"},
				Help: "optional: sets the sign of b (vacancy: b·n > 0); left out, b is taken as written"},
			radiusField(15),
			atField,
		},
		List: []string{"nature", "b", "normal", "radius_nm", "at_nm"},
	},
	{
		Type: "cavity", Noun: "a cavity",
		Fields: []FieldSpec{
			radiusField(10),
			atField,
		},
		List: []string{"radius_nm", "at_nm"},
	},
}

// DefectTypes lists the values of defects[].type.
var DefectTypes = func() []string {
	out := make([]string, len(defectSpecs))
	for i, s := range defectSpecs {
		out[i] = s.Type
	}
	return out
}()

// DefectSpecs returns the descriptions of every defect type, in the order
// they are offered.
func DefectSpecs() []DefectSpec { return defectSpecs }

// DefectSpecOf returns the description of defect type typ.
func DefectSpecOf(typ string) (*DefectSpec, bool) {
	for i := range defectSpecs {
		if defectSpecs[i].Type == typ {
			return &defectSpecs[i], true
		}
	}
	return nil, false
}

// Template returns a new defect of the type with every default filled in,
// at mid-depth of a foil tNm thick (the image centre in x and y). Of a
// OneOf group only the first field listed in the group is set.
func (s *DefectSpec) Template(tNm float64) Defect {
	d := Defect{Type: s.Type}
	skip := map[string]bool{}
	for _, g := range s.Groups {
		if g.Rule == OneOf {
			for _, f := range g.Fields[1:] {
				skip[f] = true
			}
		}
	}
	for _, f := range s.Fields {
		v := f.Default
		if f.Kind == Position && f.Name == "at_nm" {
			v = []float64{0, 0, tNm / 2}
		}
		if v == nil || skip[f.Name] {
			continue
		}
		setDefectField(&d, f.Name, v)
	}
	return d
}

// defectFieldIndex maps the JSON names of Defect's fields to their index.
var defectFieldIndex = func() map[string]int {
	m := map[string]int{}
	t := reflect.TypeOf(Defect{})
	for i := 0; i < t.NumField(); i++ {
		name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		m[name] = i
	}
	return m
}()

// defectField returns the field name of d (a reflect.Value of a string,
// slice or pointer) and whether it is set.
func defectField(d *Defect, name string) (reflect.Value, bool) {
	v := reflect.ValueOf(d).Elem().Field(defectFieldIndex[name])
	return v, !v.IsZero()
}

// Field returns the value of d's field name (its name in the scene file)
// as d holds it — a string, []float64, []string or *float64 — and whether
// it is set.
func (d *Defect) Field(name string) (any, bool) {
	if _, ok := defectFieldIndex[name]; !ok {
		return nil, false
	}
	v, set := defectField(d, name)
	if !set {
		return nil, false
	}
	return v.Interface(), true
}

// setDefectField stores a default value (string, []float64, []string or
// float64; nil clears it) in d's field name.
func setDefectField(d *Defect, name string, value any) {
	v := reflect.ValueOf(d).Elem().Field(defectFieldIndex[name])
	switch x := value.(type) {
	case nil:
		v.SetZero()
	case float64:
		p := reflect.New(v.Type().Elem())
		p.Elem().SetFloat(x)
		v.Set(p)
	case []float64:
		v.Set(reflect.ValueOf(append([]float64(nil), x...)))
	case []string:
		v.Set(reflect.ValueOf(append([]string(nil), x...)))
	default:
		v.Set(reflect.ValueOf(value))
	}
}

// validate checks a defect against the description of its type: the
// type is known, required fields are given, no field of another type is,
// each value has its form and lies in its range, and the groups hold.
func (d *Defect) validate(path string) error {
	spec, ok := DefectSpecOf(d.Type)
	if !ok {
		if d.Type == "" {
			return fieldErr(path+".type", "missing; use one of %s", strings.Join(DefectTypes, ", "))
		}
		return fieldErr(path+".type", "%q is not a defect type; use one of %s", d.Type, strings.Join(DefectTypes, ", "))
	}
	var required []string
	for _, f := range spec.Fields {
		if f.Required {
			required = append(required, f.Name)
		}
	}
	for _, f := range spec.Fields {
		if _, set := defectField(d, f.Name); f.Required && !set {
			return fieldErr(path+"."+f.Name, "missing (%s needs %s)", spec.Noun, strings.Join(required, ", "))
		}
	}
	t := reflect.TypeOf(Defect{})
	for i := 0; i < t.NumField(); i++ {
		name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		if name == "type" {
			continue
		}
		if _, set := defectField(d, name); set && spec.Field(name) == nil {
			return fieldErr(path+"."+name, "does not apply to %s", spec.Noun)
		}
	}
	for i := range spec.Fields {
		f := &spec.Fields[i]
		v, set := defectField(d, f.Name)
		if !set {
			continue
		}
		if err := f.check(path+"."+f.Name, v); err != nil {
			return err
		}
	}
	for _, g := range spec.Groups {
		n := 0
		for _, name := range g.Fields {
			if _, set := defectField(d, name); set {
				n++
			}
		}
		switch {
		case g.Rule == OneOf && n != 1:
			return fieldErr(path, "%s needs exactly one of %s", spec.Noun, strings.Join(g.Fields, " or "))
		case g.Rule == Together && n != 0 && n != len(g.Fields):
			return fieldErr(path, "%s needs both %s", g.Label, strings.Join(g.Fields, " and "))
		}
	}
	return nil
}

// check validates the value v of the field (set) at path.
func (f *FieldSpec) check(path string, v reflect.Value) error {
	inRange := func(x float64, what string) error {
		if f.Range == nil || f.Range.Contains(x) {
			return nil
		}
		msg := fmt.Sprintf("%s: must be %s", what, f.Range)
		if f.Range.Reason != "" {
			msg += " (" + f.Range.Reason + ")"
		}
		return fieldErr(path, "%s", msg)
	}
	switch f.Kind {
	case Position:
		p := v.Interface().([]float64)
		if len(p) != 3 || !allFinite(p) {
			return fieldErr(path, "%v: needs three finite coordinates x, y, z in nm", p)
		}
		for _, x := range p {
			if err := inRange(x, fmt.Sprint(p)); err != nil {
				return err
			}
		}
	case Direction:
		return indices(path, v.Interface().([]float64))
	case Plane:
		return planeIndices(path, v.Interface().([]float64))
	case BurgersList:
		list := v.Interface().([]string)
		if len(list) != f.Count {
			return fieldErr(path, "needs %s Burgers vectors, found %d", countWord(f.Count), len(list))
		}
	case Number:
		x := v.Elem().Float()
		unit := ""
		if f.Unit() != "" {
			unit = " " + f.Unit()
		}
		if err := inRange(x, fmtNum(x)+unit); err != nil {
			return err
		}
	case Choice:
		s := v.String()
		for _, o := range f.Options {
			if s == o {
				return nil
			}
		}
		return fieldErr(path, "%q: use %s", s, strings.Join(f.Options, " or "))
	case Interval:
		p := v.Interface().([]float64)
		if len(p) != 2 || math.IsNaN(p[0]) || math.IsNaN(p[1]) || !(p[0] < p[1]) {
			return fieldErr(path, "%v: needs [from, to] in %s with from < to", p, f.Unit())
		}
		for _, x := range p {
			if err := inRange(x, fmt.Sprint(p)); err != nil {
				return err
			}
		}
	}
	return nil
}

func countWord(n int) string {
	if n == 2 {
		return "two"
	}
	return strconv.Itoa(n)
}

// Summary is the defect's list line: its type and the fields its
// description lists, as written in the scene.
func (d *Defect) Summary() string {
	spec, ok := DefectSpecOf(d.Type)
	if !ok {
		return d.Type
	}
	parts := []string{d.Type}
	for _, name := range spec.List {
		v, set := defectField(d, name)
		if !set {
			continue
		}
		f := spec.Field(name)
		var text string
		switch f.Kind {
		case Burgers:
			text = v.String()
		case Direction:
			text = fmtIdx(v.Interface().([]float64))
		case Plane:
			text = fmtPlane(v.Interface().([]float64))
		case Position:
			p := v.Interface().([]float64)
			if len(p) == 3 {
				text = fmt.Sprintf("(%s, %s, %s) nm", fmtNum(p[0]), fmtNum(p[1]), fmtNum(p[2]))
			}
		case Number:
			text = fmtNum(v.Elem().Float())
			if f.Unit() != "" {
				text += " " + f.Unit()
			}
		default:
			text = fmt.Sprint(v.Interface())
		}
		parts = append(parts, name+" "+text)
	}
	return strings.Join(parts, "  ")
}
