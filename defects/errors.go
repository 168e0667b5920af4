package defects

import "errors"

// ErrInvalid is matched (errors.Is) by every error this package returns for
// bad input.
var ErrInvalid = errors.New("invalid defect parameter")

// InputError reports a bad input value: Field names it the way a scene file
// spells it (b, line, at_nm, radius_nm, ...), Problem says what is wrong.
type InputError struct {
	Field   string
	Problem string
}

func (e *InputError) Error() string { return e.Field + ": " + e.Problem }

// Is makes every InputError match ErrInvalid.
func (e *InputError) Is(target error) bool { return target == ErrInvalid }

func inputErr(field, problem string) error { return &InputError{Field: field, Problem: problem} }
