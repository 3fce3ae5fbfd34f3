package batch

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors: a *PlanError's problems are of these kinds, and
// errors.Is(err, ErrEmptyTable) and so on report whether one is present.
var (
	// ErrEmptyTable: the table has no header or no qubit rows.
	ErrEmptyTable = errors.New("empty table")
	// ErrBadTable: the CSV or its header is malformed, or a qubit name
	// is not usable.
	ErrBadTable = errors.New("malformed table")
	// ErrDuplicateQubit: two rows name the same qubit.
	ErrDuplicateQubit = errors.New("duplicate qubit")
	// ErrUnknownColumn: a column names no field of the base spec.
	ErrUnknownColumn = errors.New("unknown column")
	// ErrBadValue: a cell or a gate makes a spec that the spec parser
	// refuses (wrong unit, out of range, inconsistent with other fields).
	ErrBadValue = errors.New("bad value")
	// ErrBadGate: the gate list is empty, repeats a gate or names an
	// unknown gate.
	ErrBadGate = errors.New("bad gate list")
	// ErrTaskFailed: a task ended without outputs.
	ErrTaskFailed = errors.New("task failed")
	// ErrNotPassed: a collected task did not pass, failed or has not run.
	ErrNotPassed = errors.New("not every task passed")
)

var (
	_ error = (*PlanError)(nil)
	_ error = (*TasksFailedError)(nil)
	_ error = (*NotPassedError)(nil)
)

// Problem is one thing wrong with the inputs of a plan.
type Problem struct {
	// Row is the table row (spreadsheet numbering, header = 1), or 0 when
	// the problem is not about one row.
	Row int
	// Column is the table column the problem is about, if any.
	Column string
	// Value is the cell's text, if the problem is about a cell.
	Value string
	// Field is the spec field the spec parser named, if any.
	Field string
	// Msg says what is wrong.
	Msg string
	// Kind is one of the sentinel errors.
	Kind error
}

// PlanError reports every problem found while checking a plan's inputs.
// No file is written when Plan returns it.
type PlanError struct {
	// Table is the table's name; Problems are in table order.
	Table    string
	Problems []Problem
}

// maxShown bounds the problems listed by Error.
const maxShown = 40

// Error returns one line per problem, as
//
//	table.csv row 7, column hardware.max_rabi = "20 ms": spec field hardware.max_rabi: "20 ms" is not a frequency ...
func (e *PlanError) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i == maxShown {
			fmt.Fprintf(&b, "\n... and %d more problems", len(e.Problems)-maxShown)
			break
		}
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(p.format(e.Table))
	}
	return b.String()
}

func (p Problem) format(table string) string {
	var b strings.Builder
	b.WriteString(table)
	if p.Kind == ErrBadGate {
		b.Reset()
		b.WriteString("gate list")
		if p.Value != "" {
			fmt.Fprintf(&b, ", entry %q", p.Value)
		}
	}
	if p.Row > 0 {
		fmt.Fprintf(&b, " row %d", p.Row)
	}
	if p.Column != "" && p.Kind != ErrBadGate {
		fmt.Fprintf(&b, ", column %s", p.Column)
		if p.Value != "" {
			fmt.Fprintf(&b, " = %q", p.Value)
		}
	}
	b.WriteString(": ")
	if p.Field != "" {
		fmt.Fprintf(&b, "spec field %s: ", p.Field)
	}
	b.WriteString(p.Msg)
	return b.String()
}

// Unwrap returns the kinds of the problems, for errors.Is.
func (e *PlanError) Unwrap() []error {
	var kinds []error
	for _, p := range e.Problems {
		if !containsErr(kinds, p.Kind) {
			kinds = append(kinds, p.Kind)
		}
	}
	return kinds
}

func containsErr(list []error, x error) bool {
	for _, e := range list {
		if e == x {
			return true
		}
	}
	return false
}

// TaskFailure records a task that ended without outputs: its message and
// the exit code the loopgate command gives for it.
type TaskFailure struct {
	ID       string `json:"id"`
	Qubit    string `json:"qubit"`
	Gate     string `json:"gate"`
	ExitCode int    `json:"exit_code"`
	Message  string `json:"message"`
	err      error
}

// TasksFailedError reports the tasks of a run that failed; the others
// ran. Unwrap gives ErrTaskFailed and each failure's own error, so the
// exit code follows the first failure's kind.
type TasksFailedError struct {
	Failed []TaskFailure
}

// Error names every failed task with its message.
func (e *TasksFailedError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d task(s) failed", len(e.Failed))
	for i, f := range e.Failed {
		if i == maxShown {
			fmt.Fprintf(&b, "\n  ... and %d more (see the failures folder)", len(e.Failed)-maxShown)
			break
		}
		fmt.Fprintf(&b, "\n  %s (exit code %d): %s", f.ID, f.ExitCode, f.Message)
	}
	return b.String()
}

// Unwrap returns ErrTaskFailed followed by the failures' errors.
func (e *TasksFailedError) Unwrap() []error {
	errs := []error{ErrTaskFailed}
	for _, f := range e.Failed {
		if f.err != nil {
			errs = append(errs, f.err)
		}
	}
	return errs
}

// NotPassedError reports, after a collect, the tasks that did not pass:
// a check failed, the task failed, or it has not run. The summary was
// written. Its exit code is that of a failed check (3).
type NotPassedError struct {
	// Tasks lists each such task as "ID (status)".
	Tasks []string
	// Of is the number of tasks in the plan.
	Of    int
	cause error
}

// Error names the tasks that did not pass.
func (e *NotPassedError) Error() string {
	list := e.Tasks
	more := ""
	if len(list) > maxShown {
		list, more = list[:maxShown], fmt.Sprintf(", ... and %d more", len(e.Tasks)-maxShown)
	}
	return fmt.Sprintf("%d of %d tasks did not pass: %s%s", len(e.Tasks), e.Of, strings.Join(list, ", "), more)
}

// Unwrap returns ErrNotPassed and the pipeline's failed-check error.
func (e *NotPassedError) Unwrap() []error { return []error{ErrNotPassed, e.cause} }
