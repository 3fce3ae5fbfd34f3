package spec

import "errors"

// Sentinel errors: every Problem carries one of them in Err, so that
// callers test the kind of problem with errors.Is (on a Problem or on the
// *SpecError that holds it) instead of matching message text.
var (
	// ErrSyntax: the file is not one well-formed YAML document (empty,
	// malformed, several documents, unsupported tags, too many nodes,
	// non-finite numbers).
	ErrSyntax = errors.New("spec syntax")
	// ErrUnknownKey: a key the schema does not define.
	ErrUnknownKey = errors.New("unknown key")
	// ErrMissing: a required field is absent.
	ErrMissing = errors.New("missing field")
	// ErrWrongType: a value of the wrong type (a number where text with a
	// unit is expected, a list where a mapping is expected, …).
	ErrWrongType = errors.New("wrong type")
	// ErrBadUnit: a quantity whose unit is missing, unknown or of the
	// wrong dimension, or that does not parse.
	ErrBadUnit = errors.New("bad unit")
	// ErrOutOfBounds: a number or list length outside its documented
	// range, or a value that must be positive and is not.
	ErrOutOfBounds = errors.New("out of bounds")
	// ErrNotUnitary: an explicit target matrix that is not unitary.
	ErrNotUnitary = errors.New("not unitary")
	// ErrInvalid: any other value that is not accepted (an unknown name,
	// an inconsistent combination, a scheme without a working subspace).
	ErrInvalid = errors.New("invalid value")
)

// Error formats the problem without the file name (see SpecError.Error
// for the full form).
func (p *Problem) Error() string { return p.format("") }

// Unwrap returns the sentinel error of the problem's kind.
func (p *Problem) Unwrap() error { return p.Err }

// Unwrap returns the problems, so that errors.Is and errors.As look at
// each of them.
func (e *SpecError) Unwrap() []error {
	out := make([]error, len(e.Problems))
	for i := range e.Problems {
		out[i] = &e.Problems[i]
	}
	return out
}
