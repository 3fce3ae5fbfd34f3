package main

import "github.com/loopgate/loopgate/design"

// Exit codes of the loopgate command; design.ExitStatus owns the mapping.
const (
	exitOK          = design.ExitOK
	exitInternal    = design.ExitInternal
	exitBadInput    = design.ExitBadInput
	exitChecks      = design.ExitChecks
	exitInfeasible  = design.ExitInfeasible
	exitOutput      = design.ExitOutput
	exitInterrupted = design.ExitInterrupted
)

// overwriteFlag is the flag that lets an output replace an existing file;
// messages about existing outputs name it.
const overwriteFlag = "--overwrite"

// exitCode maps an error returned by package design to the exit code.
func exitCode(err error) int { return design.ExitStatus(err) }
