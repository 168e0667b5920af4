package scene

import (
	"errors"
	"fmt"
)

// ErrInvalid is wrapped by every error about the content of a scene: bad
// JSON, an unknown field, a value out of range. The command line maps it to
// exit status 2.
var ErrInvalid = errors.New("invalid scene")

// FieldError is a problem with one field of a scene, named by its path in
// the file ("diffraction.g", "defects[1].b").
type FieldError struct {
	Path string
	Msg  string
	Err  error // an underlying cause, or nil
}

func (e *FieldError) Error() string {
	if e.Path == "" {
		return e.Msg
	}
	return e.Path + ": " + e.Msg
}

// Unwrap returns ErrInvalid and the cause, so errors.Is works for both.
func (e *FieldError) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrInvalid, e.Err}
	}
	return []error{ErrInvalid}
}

func fieldErr(path, format string, args ...any) *FieldError {
	return &FieldError{Path: path, Msg: fmt.Sprintf(format, args...)}
}

// wrapErr turns an error of a lower layer (crystal, defects) into a field
// error at path.
func wrapErr(path string, err error) *FieldError {
	return &FieldError{Path: path, Msg: err.Error(), Err: err}
}
