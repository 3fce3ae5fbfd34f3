// Command loopgate designs holonomic (geometric) single-qubit gates and
// writes the control waveforms that realise them.
//
// It is a thin layer over package design: it parses flags, calls the
// pipeline and prints the outcome in words or, with --json, as JSON.
// Exit codes are listed by `loopgate --help` and in the README.
package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/loopgate/loopgate/design"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	err := newRoot().ExecuteContext(ctx)
	stop()
	if err != nil {
		if !errors.Is(err, errPrinted) {
			fmt.Fprintln(os.Stderr, "loopgate:", err)
		}
		code := design.ExitCode(err)
		if code == design.ExitInternal && strings.HasPrefix(err.Error(), "unknown command") {
			code = design.ExitBadInput // cobra's own usage error
		}
		os.Exit(code)
	}
}
