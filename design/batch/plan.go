package batch

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Names inside a work folder.
const (
	ManifestFile = "plan.json"      // the manifest
	ScriptFile   = "array.sbatch"   // the Slurm batch script
	CostFile     = "cost.json"      // the measured cost of one task
	SummaryCSV   = "summary.csv"    // written by Collect
	SummaryJSON  = "summary.json"   // written by Collect
	IndexFile    = "index.html"     // written by Collect
	inputsDir    = "inputs"         // copies of the base spec and the table
	specsDir     = "specs"          // one spec per task
	tasksDir     = "tasks"          // one folder per finished task
	failuresDir  = "failures"       // one record per failed task
	scratchDir   = "scratch"        // tasks at work; locks
	logsDir      = "logs"           // Slurm's output files
	taskFile     = "task.json"      // a finished task's figures
	manifestKind = "loopgate batch" // Manifest.Kind
)

// Manifest is the plan of a work folder (plan.json): the inputs, by name
// and SHA-256, and one task per qubit and gate.
type Manifest struct {
	Kind        string   `json:"kind"`
	ToolVersion string   `json:"tool_version"`
	Base        string   `json:"base_spec"`
	BaseSHA256  string   `json:"base_spec_sha256"`
	Table       string   `json:"table"`
	TableSHA256 string   `json:"table_sha256"`
	Gates       []string `json:"gates"`
	Qubits      []string `json:"qubits"`
	Tasks       []Task   `json:"tasks"`
}

// Task is one qubit × gate design.
type Task struct {
	// Index is the task's position, from 0 (qubit-major, gates in the
	// order given).
	Index int `json:"index"`
	// ID names the task's folders: qubit-gate.
	ID    string `json:"id"`
	Qubit string `json:"qubit"`
	Gate  string `json:"gate"`
	Row   int    `json:"row"`
	// Spec is the task's spec file, relative to the work folder, and
	// SpecName the name it is parsed under (it names the table row in
	// messages and in the outputs).
	Spec       string `json:"spec"`
	SpecName   string `json:"spec_name"`
	SpecSHA256 string `json:"spec_sha256"`
}

// checkInputs validates the base spec, the table and the gate list and
// returns the manifest and the task specs. It runs the spec parser on
// every qubit × gate and reports every problem; it writes nothing.
func checkInputs(base []byte, baseName string, table []byte, tableName string, gates []string) (*Manifest, [][]byte, error) {
	if _, probs, err := parseSpec(base, baseName); err != nil || len(probs) > 0 {
		if err == nil {
			err = specProblemsError(baseName, probs)
		}
		return nil, nil, inputError(err)
	}
	b, err := readBase(base, baseName)
	if err != nil {
		return nil, nil, inputError(err)
	}
	t, probs := readTable(table, tableName)
	if t == nil {
		return nil, nil, inputError(&PlanError{Table: tableName, Problems: probs})
	}
	// Columns and gates first: with one of them wrong, every row would
	// repeat the problem.
	nrow := len(probs)
	for _, c := range t.Columns {
		if err := b.checkColumn(c); err != nil {
			probs = append(probs, Problem{Row: 1, Column: c, Msg: err.Error(), Kind: ErrUnknownColumn})
		}
	}
	canon, gprobs := b.checkGates(gates)
	probs = append(probs, gprobs...)
	if len(probs) > nrow {
		return nil, nil, inputError(&PlanError{Table: tableName, Problems: probs})
	}
	m := &Manifest{Kind: manifestKind, ToolVersion: ToolVersion, Base: baseName, BaseSHA256: sha256Hex(base),
		Table: tableName, TableSHA256: sha256Hex(table), Gates: canon}
	var specs [][]byte
	for i := range t.Rows {
		row := &t.Rows[i]
		m.Qubits = append(m.Qubits, row.Qubit)
		seen := map[string]bool{}
		for _, g := range canon {
			name := fmt.Sprintf("%s row %d, gate %s", tableName, row.Line, g)
			data, rp := b.rowSpec(t, row, g, name)
			for _, p := range rp {
				if k := p.Field + "\x00" + p.Column + "\x00" + p.Msg; !seen[k] {
					seen[k] = true
					probs = append(probs, p)
				}
			}
			id := row.Qubit + "-" + g
			m.Tasks = append(m.Tasks, Task{Index: len(m.Tasks), ID: id, Qubit: row.Qubit, Gate: g, Row: row.Line,
				Spec: specsDir + "/" + id + ".yaml", SpecName: name, SpecSHA256: sha256Hex(data)})
			specs = append(specs, data)
		}
	}
	if len(probs) > 0 {
		sort.SliceStable(probs, func(i, j int) bool { return probs[i].Row < probs[j].Row })
		return nil, nil, inputError(&PlanError{Table: tableName, Problems: probs})
	}
	return m, specs, nil
}

// checkGates parses the base spec with each gate as its target and
// returns the gates' canonical names.
func (b *baseSpec) checkGates(gates []string) ([]string, []Problem) {
	var probs []Problem
	if len(gates) == 0 {
		return nil, []Problem{{Msg: "no gates; give the gate list (named gates, as the gates command lists them)", Kind: ErrBadGate}}
	}
	var canon []string
	first := map[string]string{}
	for _, g := range gates {
		data, err := b.taskSpecBytes(&Table{}, &Row{}, g)
		if err != nil {
			probs = append(probs, Problem{Value: g, Msg: err.Error(), Kind: ErrBadGate})
			continue
		}
		ts, sp, err := parseSpec(data, b.name)
		switch {
		case err != nil:
			probs = append(probs, Problem{Value: g, Msg: err.Error(), Kind: ErrBadGate})
		case len(sp) > 0:
			for _, p := range sp {
				probs = append(probs, Problem{Value: g, Field: p.Field, Msg: p.Msg, Kind: ErrBadGate})
			}
		case first[ts.Gate] != "":
			probs = append(probs, Problem{Value: g, Msg: fmt.Sprintf("is gate %s again (given as %q before); each gate once", ts.Gate, first[ts.Gate]), Kind: ErrBadGate})
		default:
			first[ts.Gate] = g
			canon = append(canon, ts.Gate)
		}
	}
	return canon, probs
}

// rowSpec builds and parses the spec of one row and gate. Problems name
// the row, and the column whose cell the spec field comes from.
func (b *baseSpec) rowSpec(t *Table, row *Row, gate, name string) ([]byte, []Problem) {
	for j, c := range t.Columns {
		if row.Cells[j] == "" {
			continue
		}
		if _, err := cellNode(row.Cells[j]); err != nil {
			return nil, []Problem{{Row: row.Line, Column: c, Value: row.Cells[j], Msg: err.Error(), Kind: ErrBadValue}}
		}
	}
	data, err := b.taskSpecBytes(t, row, gate)
	if err != nil {
		return nil, []Problem{{Row: row.Line, Msg: err.Error(), Kind: ErrBadValue}}
	}
	_, sp, err := parseSpec(data, name)
	if err != nil {
		return nil, []Problem{{Row: row.Line, Msg: err.Error(), Kind: ErrBadValue}}
	}
	var probs []Problem
	for _, p := range sp {
		probs = append(probs, b.attribute(t, row, p))
	}
	return data, probs
}

// attribute turns a spec problem into a table problem, naming the column
// that set the field (or, when no column did, the columns of the row).
func (b *baseSpec) attribute(t *Table, row *Row, p specProblem) Problem {
	pr := Problem{Row: row.Line, Field: p.Field, Msg: p.Msg, Kind: ErrBadValue}
	var set []string
	for j, c := range t.Columns {
		cell := row.Cells[j]
		if cell == "" {
			continue
		}
		set = append(set, c)
		if p.Field != "" && (under(p.Field, c) || under(c, p.Field)) {
			pr.Column, pr.Value = c, cell
			return pr
		}
	}
	if len(set) > 0 {
		pr.Msg += fmt.Sprintf(" (no column of the row sets this field; the row sets %s)", strings.Join(set, ", "))
	}
	return pr
}

// under reports whether path is p or lies inside it.
func under(path, p string) bool {
	return path == p || strings.HasPrefix(path, p+".") || strings.HasPrefix(path, p+"[")
}

// specProblemsError formats a spec's problems naming its file.
func specProblemsError(name string, probs []specProblem) error {
	lines := make([]string, len(probs))
	for i, p := range probs {
		if p.Field != "" {
			lines[i] = fmt.Sprintf("spec %s: %s: %s", name, p.Field, p.Msg)
		} else {
			lines[i] = fmt.Sprintf("spec %s: %s", name, p.Msg)
		}
	}
	return errors.New(strings.Join(lines, "\n"))
}

func sha256Hex(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// readManifest reads a work folder's plan.json.
func readManifest(work string) (*Manifest, error) {
	data, err := os.ReadFile(filepath.Join(work, ManifestFile))
	if err != nil {
		return nil, inputError(fmt.Errorf("work folder %s: %w (plan it first)", work, unwrapPathErr(err)))
	}
	var m Manifest
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&m); err != nil || m.Kind != manifestKind {
		return nil, inputError(fmt.Errorf("work folder %s: %s is not a loopgate batch plan", work, ManifestFile))
	}
	return &m, nil
}

func unwrapPathErr(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s: %w", filepath.Base(pe.Path), pe.Err)
	}
	return err
}

// readLimited reads a whole file of at most limit bytes.
func readLimited(path string, limit int64, what string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, inputError(fmt.Errorf("%s %s: %w", what, path, errors.Unwrap(err)))
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return nil, inputError(fmt.Errorf("%s %s: is a folder", what, path))
	}
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, inputError(fmt.Errorf("%s %s: %w", what, path, err))
	}
	if int64(len(data)) > limit {
		return nil, inputError(fmt.Errorf("%s %s: larger than %d bytes", what, path, limit))
	}
	return data, nil
}
