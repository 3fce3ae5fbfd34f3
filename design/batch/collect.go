package batch

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Task statuses in a summary.
const (
	StatusPassed       = "passed"        // finished; every check passed
	StatusChecksFailed = "checks failed" // finished; a check failed (see failed_checks)
	StatusFailed       = "failed"        // ended without outputs (see message, exit_code)
	StatusNotRun       = "not run"       // not run yet, or interrupted
)

// Summary is the content of summary.json: one entry per qubit × gate in
// plan order.
type Summary struct {
	Kind        string       `json:"kind"`
	ToolVersion string       `json:"tool_version"`
	Base        string       `json:"base_spec"`
	BaseSHA256  string       `json:"base_spec_sha256"`
	Table       string       `json:"table"`
	TableSHA256 string       `json:"table_sha256"`
	Gates       []string     `json:"gates"`
	Qubits      []string     `json:"qubits"`
	Counts      Counts       `json:"counts"`
	Tasks       []SummaryRow `json:"tasks"`
}

// Counts counts the tasks of a summary by status.
type Counts struct {
	Tasks        int `json:"tasks"`
	Passed       int `json:"passed"`
	ChecksFailed int `json:"checks_failed"`
	Failed       int `json:"failed"`
	NotRun       int `json:"not_run"`
}

// SummaryRow is one task in a summary. Figures are null for a task
// without outputs. ErrorModelInfidelity is 1 − ErrorModelFidelity.
type SummaryRow struct {
	ID                   string   `json:"id"`
	Qubit                string   `json:"qubit"`
	Gate                 string   `json:"gate"`
	Row                  int      `json:"row"`
	Status               string   `json:"status"`
	Pass                 bool     `json:"pass"`
	IdealFidelity        *float64 `json:"ideal_fidelity"`
	ErrorModelFidelity   *float64 `json:"error_model_fidelity"`
	ErrorModelInfidelity *float64 `json:"error_model_infidelity"`
	Duration             *float64 `json:"duration_s"`
	Samples              int      `json:"samples"`
	FailedChecks         []string `json:"failed_checks"`
	Checks               []Check  `json:"checks"`
	ExitCode             int      `json:"exit_code,omitempty"`
	Message              string   `json:"message,omitempty"`
	// Report is the task's HTML report, relative to the work folder.
	Report string `json:"report,omitempty"`
}

// Collect reads every task of a work folder and writes summary.csv,
// summary.json and index.html into it (replacing earlier ones). It
// returns the summary, and an error (exit code 3) when a task did not
// pass, failed or has not run.
func Collect(work string) (*Summary, error) {
	m, err := readManifest(work)
	if err != nil {
		return nil, err
	}
	s := &Summary{Kind: manifestKind + " summary", ToolVersion: ToolVersion, Base: m.Base, BaseSHA256: m.BaseSHA256,
		Table: m.Table, TableSHA256: m.TableSHA256, Gates: m.Gates, Qubits: m.Qubits}
	var bad []string
	for i := range m.Tasks {
		row, err := collectTask(work, &m.Tasks[i])
		if err != nil {
			return nil, err
		}
		s.Tasks = append(s.Tasks, row)
		switch row.Status {
		case StatusPassed:
			s.Counts.Passed++
		case StatusChecksFailed:
			s.Counts.ChecksFailed++
		case StatusFailed:
			s.Counts.Failed++
		default:
			s.Counts.NotRun++
		}
		if row.Status != StatusPassed {
			bad = append(bad, row.ID+" ("+row.Status+")")
		}
	}
	s.Counts.Tasks = len(s.Tasks)
	js, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return nil, err
	}
	html, err := indexPage(s)
	if err != nil {
		return nil, err
	}
	for name, data := range map[string][]byte{SummaryJSON: append(js, '\n'), SummaryCSV: summaryCSV(s), IndexFile: html} {
		if err := writeFileAtomic(filepath.Join(work, name), data); err != nil {
			return nil, outputError(err)
		}
	}
	if len(bad) > 0 {
		return s, &NotPassedError{Tasks: bad, Of: len(s.Tasks), cause: unfinishedError(bad)}
	}
	return s, nil
}

// collectTask reads one task's record: task.json, or its failure record.
func collectTask(work string, t *Task) (SummaryRow, error) {
	row := SummaryRow{ID: t.ID, Qubit: t.Qubit, Gate: t.Gate, Row: t.Row, Status: StatusNotRun}
	data, err := os.ReadFile(filepath.Join(work, tasksDir, t.ID, taskFile))
	if err == nil {
		var r TaskResult
		if err := json.Unmarshal(data, &r); err != nil || r.ID != t.ID || r.SpecSHA256 != t.SpecSHA256 {
			return row, inputError(fmt.Errorf("task %s: %s/%s/%s is not this plan's result for the task", t.ID, tasksDir, t.ID, taskFile))
		}
		row.Status, row.Pass = StatusChecksFailed, r.Pass
		if r.Pass {
			row.Status = StatusPassed
		}
		inf := 1 - r.ErrorModelFidelity
		row.IdealFidelity, row.ErrorModelFidelity, row.ErrorModelInfidelity = finite(r.IdealFidelity), finite(r.ErrorModelFidelity), finite(inf)
		row.Duration, row.Samples, row.Checks = finite(r.Duration), r.Samples, r.Checks
		row.FailedChecks = []string{}
		for _, c := range r.Checks {
			if !c.Pass {
				row.FailedChecks = append(row.FailedChecks, c.Name)
			}
		}
		for _, f := range r.Files {
			if f == reportFile {
				row.Report = tasksDir + "/" + t.ID + "/" + f
			}
		}
		return row, nil
	}
	if !errors.Is(err, os.ErrNotExist) {
		return row, inputError(err)
	}
	data, err = os.ReadFile(filepath.Join(work, failuresDir, t.ID+".json"))
	if err == nil {
		var f TaskFailure
		if err := json.Unmarshal(data, &f); err != nil || f.ID != t.ID {
			return row, inputError(fmt.Errorf("task %s: %s/%s.json is not a failure record of the task", t.ID, failuresDir, t.ID))
		}
		row.Status, row.ExitCode, row.Message = StatusFailed, f.ExitCode, f.Message
	}
	return row, nil
}

// csvHeader is the header of summary.csv.
var csvHeader = []string{"qubit", "gate", "row", "status", "pass", "ideal_fidelity", "error_model_fidelity",
	"error_model_infidelity", "duration_s", "samples", "failed_checks", "limits", "exit_code", "message", "report"}

// summaryCSV writes one line per task. limits lists every check as
// "name value ≤ limit unit" (≥ for a lower bound), separated by "; ".
func summaryCSV(s *Summary) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	w.Write(csvHeader)
	for _, r := range s.Tasks {
		var limits []string
		for _, c := range r.Checks {
			op := "≤"
			if c.Bound == "min" {
				op = "≥"
			}
			limits = append(limits, strings.TrimSpace(fmt.Sprintf("%s %s %s %s %s", c.Name, num(c.Value), op, num(c.Limit), c.Unit)))
		}
		code := ""
		if r.ExitCode != 0 {
			code = strconv.Itoa(r.ExitCode)
		}
		w.Write([]string{r.Qubit, r.Gate, strconv.Itoa(r.Row), r.Status, strconv.FormatBool(r.Pass),
			num(r.IdealFidelity), num(r.ErrorModelFidelity), num(r.ErrorModelInfidelity), num(r.Duration),
			strconv.Itoa(r.Samples), strings.Join(r.FailedChecks, "; "), strings.Join(limits, "; "), code, r.Message, r.Report})
	}
	w.Flush()
	return buf.Bytes()
}

// num formats a figure exactly (shortest round-trip form), or "" for null.
func num(x *float64) string {
	if x == nil {
		return ""
	}
	return strconv.FormatFloat(*x, 'g', -1, 64)
}
