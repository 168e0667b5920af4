package scene

import (
	"errors"
	"fmt"
	"reflect"
	"strings"
	"testing"
)

// Every type's template validates and builds in an fcc crystal; every
// numeric field has a physical range; every field of Defect is described
// by some type; and a value just outside a range is refused naming the
// field and the range.
func TestDefectDescriptions(t *testing.T) {
	described := map[string]bool{"type": true}
	for _, spec := range DefectSpecs() {
		for _, f := range spec.Fields {
			described[f.Name] = true
			if (f.Kind == Number || f.Kind == Position || f.Kind == Interval) && f.Range == nil {
				t.Errorf("%s.%s: a numeric field without a range", spec.Type, f.Name)
			}
			if f.Label == "" {
				t.Errorf("%s.%s: no label", spec.Type, f.Name)
			}
		}
		sc := parseBase(t)
		sc.Crystal = Crystal{Material: "Ni"}
		sc.Diffraction.Beam = []float64{0, 1, 1}
		sc.Defects = []Defect{spec.Template(sc.Foil.ThicknessNm)}
		if _, err := Build(sc, "."); err != nil {
			t.Errorf("template %s does not build: %v", spec.Type, err)
		}
		// Just outside each end of each closed or open range.
		for _, f := range spec.Fields {
			if f.Kind != Number || f.Range == nil {
				continue
			}
			for _, v := range []float64{f.Range.Min, f.Range.Max} {
				if f.Range.Contains(v) {
					v = v + (v-(f.Range.Min+f.Range.Max)/2)*1e-6 + sign(v)*1e-9
				}
				d := spec.Template(sc.Foil.ThicknessNm)
				if g := spec.GroupOf(f.Name); g != nil && g.Rule == OneOf {
					for _, other := range g.Fields {
						setDefectField(&d, other, nil)
					}
				}
				setDefectField(&d, f.Name, v)
				err := d.validate("defects[0]")
				var fe *FieldError
				if !errors.As(err, &fe) || fe.Path != "defects[0]."+f.Name || !strings.Contains(fe.Msg, "must be") {
					t.Errorf("%s.%s = %g: %v, want a range error at the field", spec.Type, f.Name, v, err)
				}
			}
		}
	}
	tt := reflect.TypeOf(Defect{})
	for i := 0; i < tt.NumField(); i++ {
		name, _, _ := strings.Cut(tt.Field(i).Tag.Get("json"), ",")
		if !described[name] {
			t.Errorf("Defect field %s belongs to no type's description", name)
		}
	}
}

func sign(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

func TestRangeString(t *testing.T) {
	for _, c := range []struct {
		r    Range
		want string
	}{
		{Range{Min: 0, Max: 1e6, MinOpen: true, Unit: "nm"}, "> 0 and ≤ 1e+06 nm"},
		{Range{Min: -0.5, Max: 0.5, MinOpen: true, MaxOpen: true}, "> -0.5 and < 0.5"},
	} {
		if got := c.r.String(); got != c.want {
			t.Errorf("%+v: %q, want %q", c.r, got, c.want)
		}
	}
}

// The list line names what tells defects apart.
func TestDefectSummary(t *testing.T) {
	d := Defect{Type: "inclusion", AtNm: []float64{1, 2, 30}, RadiusNm: ptr(9), Misfit: ptr(-0.012)}
	want := "inclusion  radius_nm 9 nm  misfit -0.012  at_nm (1, 2, 30) nm"
	if got := d.Summary(); got != want {
		t.Errorf("summary %q, want %q", got, want)
	}
	_ = fmt.Sprint
}
