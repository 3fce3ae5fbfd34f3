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
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	err := newRoot().ExecuteContext(ctx)
	stop()
	if err != nil {
		if !errors.Is(err, errPrinted) {
			fmt.Fprintln(os.Stderr, "loopgate:", err)
		}
		code := exitCode(err)
		if code == exitInternal && strings.HasPrefix(err.Error(), "unknown command") {
			code = exitBadInput // cobra's own usage error
		}
		os.Exit(code)
	}
}
