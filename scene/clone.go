package scene

import (
	"fmt"

	"faultline/defects"
)

// Clone returns a deep copy of sc, through its JSON form.
func Clone(sc *Scene) (*Scene, error) {
	data, err := Marshal(sc)
	if err != nil {
		return nil, err
	}
	return Parse(data)
}

// PartialSeparationNm returns the separation of the partials of the
// dissociated dislocation defects[index] as built (given, or derived from
// the stacking-fault energy).
func (st *Setup) PartialSeparationNm(index int) (float64, error) {
	path := fmt.Sprintf("defects[%d]", index)
	fields, _ := st.Problem.Field.(defects.Sum)
	if index < 0 || index >= len(fields) {
		return 0, fieldErr(path, "no such defect in the built scene")
	}
	d, ok := fields[index].(*defects.Dissociated)
	if !ok {
		return 0, fieldErr(path, "is not a dissociated dislocation")
	}
	return d.SeparationNm(), nil
}
