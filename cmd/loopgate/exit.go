package main

import (
	"context"
	"errors"

	"github.com/loopgate/loopgate/design"
)

// Exit codes of the loopgate command, documented in the README.
const (
	exitOK          = 0   // success; every check passed
	exitInternal    = 1   // unexpected failure (a bug; please report it)
	exitBadInput    = 2   // bad flags, spec, loop file or waveform file
	exitChecks      = 3   // the work finished but a check failed
	exitInfeasible  = 4   // the target cannot be reached, or the gate does not fit the hardware
	exitOutput      = 5   // an output file exists (use --overwrite) or cannot be written
	exitInterrupted = 130 // interrupted (Ctrl-C); no partial files were left
)

// overwriteFlag is the flag that lets an output replace an existing file;
// messages about existing outputs name it.
const overwriteFlag = "--overwrite"

// exitCode maps an error returned by package design to the exit code.
func exitCode(err error) int {
	var (
		in  *design.InputError
		inf *design.InfeasibleError
		out *design.OutputError
		chk *design.ChecksFailedError
	)
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, context.Canceled):
		return exitInterrupted
	case errors.As(err, &in):
		return exitBadInput
	case errors.As(err, &inf):
		return exitInfeasible
	case errors.As(err, &out):
		return exitOutput
	case errors.As(err, &chk):
		return exitChecks
	}
	return exitInternal
}
