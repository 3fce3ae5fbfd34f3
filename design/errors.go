package design

import (
	"fmt"
	"strings"
)

// InputError reports bad input: a spec, loop file, waveform file or flag.
type InputError struct{ Err error }

// Error returns the message.
func (e *InputError) Error() string { return e.Err.Error() }

// Unwrap returns the underlying error.
func (e *InputError) Unwrap() error { return e.Err }

// InfeasibleError reports a target or hardware limit that cannot be met.
type InfeasibleError struct{ Err error }

// Error returns the message.
func (e *InfeasibleError) Error() string { return e.Err.Error() }

// Unwrap returns the underlying error.
func (e *InfeasibleError) Unwrap() error { return e.Err }

// OutputError reports an output that exists or cannot be written.
type OutputError struct{ Err error }

// Error returns the message.
func (e *OutputError) Error() string { return e.Err.Error() }

// Unwrap returns the underlying error.
func (e *OutputError) Unwrap() error { return e.Err }

// ChecksFailedError reports that the work completed but at least one check
// failed; the outputs that were written carry the failed checks.
type ChecksFailedError struct {
	Failed []string // names of the failed checks
}

// Error returns the message.
func (e *ChecksFailedError) Error() string {
	return fmt.Sprintf("%d check(s) failed: %s", len(e.Failed), strings.Join(e.Failed, "; "))
}
