package design

import (
	"context"
	"errors"
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

// Exit statuses of the loopgate command, one per error class (the README
// and the command's --help document them). They live beside the classes so
// that every caller that records an outcome (the command, the batch runner's
// failure records) maps errors the same way.
const (
	ExitOK          = 0   // success; every check passed
	ExitInternal    = 1   // unexpected failure (a bug; please report it)
	ExitBadInput    = 2   // bad flags, spec, loop file or waveform file
	ExitChecks      = 3   // the work finished but a check failed
	ExitInfeasible  = 4   // the target cannot be reached, or the gate does not fit the hardware
	ExitOutput      = 5   // an output file exists (use --overwrite) or cannot be written
	ExitInterrupted = 130 // interrupted (Ctrl-C); no partial files were left
)

// ExitStatus maps an error returned by this package (or wrapping one of its
// classes) to the command's exit status.
func ExitStatus(err error) int {
	var (
		in  *InputError
		inf *InfeasibleError
		out *OutputError
		chk *ChecksFailedError
	)
	switch {
	case err == nil:
		return ExitOK
	case errors.Is(err, context.Canceled):
		return ExitInterrupted
	case errors.As(err, &in):
		return ExitBadInput
	case errors.As(err, &inf):
		return ExitInfeasible
	case errors.As(err, &out):
		return ExitOutput
	case errors.As(err, &chk):
		return ExitChecks
	}
	return ExitInternal
}
