package batch

// This file is the package's only contact with the design pipeline:
// parsing a spec, running a design into a folder, writing a file
// atomically and mapping errors to exit codes. Everything else in the
// package works on bytes, file names and the types declared here, so a
// change in package design touches this file alone.

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"

	"github.com/loopgate/loopgate/design"
	"github.com/loopgate/loopgate/design/spec"
)

// ToolVersion is the loopgate version recorded in the plan and summary.
const ToolVersion = design.Version

// caution is the safety caution that goes with every waveform.
const caution = design.Caution

// maxSpecBytes bounds the base spec read by Plan.
const maxSpecBytes = spec.MaxSpecBytes

// specProblem is one problem the spec parser found: the spec field (as
// "hardware.max_rabi"; empty for the whole spec) and what is wrong.
type specProblem struct {
	Field string
	Msg   string
}

// taskSpec is a parsed, validated task spec.
type taskSpec struct {
	parsed *spec.Spec
	// Gate is the canonical name of the target gate ("" for a rotation
	// or an explicit unitary).
	Gate string
}

// parseSpec parses and validates spec bytes; name appears in messages
// and in the outputs (as the spec's source). A spec error is returned as
// its problems, each naming the spec field; any other error as err.
func parseSpec(data []byte, name string) (*taskSpec, []specProblem, error) {
	s, err := spec.ParseSpec(data, name)
	if err == nil {
		return &taskSpec{parsed: s, Gate: s.Target.Name}, nil, nil
	}
	var se *spec.SpecError
	if !errors.As(err, &se) {
		return nil, nil, err
	}
	probs := make([]specProblem, len(se.Problems))
	for i, p := range se.Problems {
		probs[i] = specProblem{Field: p.Path, Msg: p.Msg}
	}
	return nil, probs, nil
}

// designInto runs the whole design of ts and writes its files (waveform,
// CSV, NPY, loop file and report) into the existing empty folder dir.
// A design whose checks fail still writes its files: the result comes
// back with Pass false and a nil error. Any other error means no usable
// output.
func designInto(ctx context.Context, ts *taskSpec, dir string) (*TaskResult, error) {
	out, err := design.Design(ctx, ts.parsed, design.Options{OutDir: dir})
	var chk *design.ChecksFailedError
	if err != nil && !(errors.As(err, &chk) && out != nil) {
		return nil, err
	}
	r := &TaskResult{
		SpecSHA256:         out.SpecHash,
		Target:             out.Target,
		Scheme:             out.Scheme,
		Method:             out.Method,
		IdealFidelity:      out.Ideal.Fidelity,
		IdealLeakage:       out.Ideal.Leakage,
		ErrorModelFidelity: out.WithErrors.Fidelity,
		ErrorModelLeakage:  out.WithErrors.Leakage,
		Duration:           out.Duration,
		Samples:            out.Samples,
		Pass:               out.Pass,
	}
	for _, c := range out.Checks {
		r.Checks = append(r.Checks, Check{Name: c.Name, Value: finite(c.Value), Limit: finite(c.Limit), Unit: c.Unit, Bound: c.Bound, Pass: c.Pass})
	}
	for _, f := range out.Files {
		r.Files = append(r.Files, filepath.Base(f))
	}
	if !finiteAll(r.IdealFidelity, r.IdealLeakage, r.ErrorModelFidelity, r.ErrorModelLeakage, r.Duration) {
		return nil, fmt.Errorf("design gave a figure that is not a finite number (ideal fidelity %g, error-model fidelity %g)", r.IdealFidelity, r.ErrorModelFidelity)
	}
	return r, nil
}

// reportFile is the name of the HTML report among a task's files.
const reportFile = design.ReportFile

// exitCode maps an error to the loopgate command's exit code.
func exitCode(err error) int { return design.ExitStatus(err) }

// writeFileAtomic replaces path with data, never leaving a partial file.
func writeFileAtomic(path string, data []byte) error {
	return design.WriteOutput(path, data, true)
}

// inputError marks err as bad input (exit code 2).
func inputError(err error) error { return &design.InputError{Err: err} }

// outputError marks err as an output that cannot be written (exit 5).
func outputError(err error) error { return &design.OutputError{Err: err} }

// unfinishedError marks a finished collect whose tasks did not all pass
// (exit code 3, as a failed check).
func unfinishedError(ids []string) error { return &design.ChecksFailedError{Failed: ids} }

func finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

func finiteAll(xs ...float64) bool {
	for _, x := range xs {
		if finite(x) == nil {
			return false
		}
	}
	return true
}
