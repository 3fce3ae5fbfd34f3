package batch

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"regexp"
	"strings"
)

// QubitColumns are the header names accepted for the column that names
// each qubit (or site); a table has exactly one of them.
var QubitColumns = []string{"qubit", "site"}

// MaxTableBytes is the largest calibration table read.
const MaxTableBytes = 16 << 20

// MaxQubits bounds the rows of a table.
const MaxQubits = 100000

// qubitNameRE is the form of a qubit name: it becomes part of file names.
var qubitNameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9_.+-]{0,39}$`)

// Table is a calibration table: one row per qubit, and columns that name
// spec fields by their path (as "hardware.max_rabi" or
// "scheme.decay.e"), with values written as in a spec ("18.5 MHz").
type Table struct {
	// Name is the table's base name, used in messages and comments.
	Name string
	// QubitColumn is the header of the qubit column ("qubit" or "site").
	QubitColumn string
	// Columns are the spec field paths of the other columns, in order.
	Columns []string
	// Rows are the table's rows in file order.
	Rows []Row
}

// Row is one row of a Table.
type Row struct {
	// Line is the row's number as a spreadsheet shows it: the header is
	// row 1, the first qubit row 2 (a quoted cell with a line break makes
	// it the line where the row starts).
	Line int
	// Qubit is the qubit's name.
	Qubit string
	// Cells holds the row's values, one per Table.Columns; an empty cell
	// keeps the base spec's value.
	Cells []string
}

// readTable reads a CSV calibration table. It checks the header (one
// qubit column, no empty or repeated header), the qubit names (form and
// uniqueness) and that the table has rows; the cells are checked later,
// as specs. Every problem found is returned; the table comes back too
// when only qubit names are wrong, so that the cells can still be checked.
func readTable(data []byte, name string) (*Table, []Problem) {
	t := &Table{Name: name}
	bad := func(row int, col, field, msg string, kind error) []Problem {
		return []Problem{{Row: row, Column: col, Field: field, Msg: msg, Kind: kind}}
	}
	if len(data) > MaxTableBytes {
		return nil, bad(0, "", "", fmt.Sprintf("table is larger than %d bytes", MaxTableBytes), ErrBadTable)
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.TrimLeadingSpace = true
	header, err := r.Read()
	if errors.Is(err, io.EOF) {
		return nil, bad(0, "", "", "the table is empty; expected a header row (qubit and spec field paths) and one row per qubit", ErrEmptyTable)
	}
	if err != nil {
		return nil, bad(csvLine(err), "", "", csvMsg(err), ErrBadTable)
	}
	qcol, probs := readHeader(t, header)
	if len(probs) > 0 {
		return nil, probs
	}
	rows := map[string]int{}
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			probs = append(probs, Problem{Row: csvLine(err), Msg: csvMsg(err), Kind: ErrBadTable})
			break
		}
		line, _ := r.FieldPos(0)
		if len(t.Rows) >= MaxQubits {
			probs = append(probs, Problem{Row: line, Msg: fmt.Sprintf("more than %d rows", MaxQubits), Kind: ErrBadTable})
			break
		}
		row := Row{Line: line, Qubit: strings.TrimSpace(rec[qcol])}
		for j, c := range rec {
			if j != qcol {
				row.Cells = append(row.Cells, strings.TrimSpace(c))
			}
		}
		switch prev, dup := rows[strings.ToLower(row.Qubit)]; {
		case !qubitNameRE.MatchString(row.Qubit):
			probs = append(probs, Problem{Row: line, Column: t.QubitColumn, Msg: fmt.Sprintf("%q is not a qubit name: up to 40 letters, digits and _ . + - (it names the task's folder), starting with a letter or digit", row.Qubit), Kind: ErrBadTable})
		case dup:
			probs = append(probs, Problem{Row: line, Column: t.QubitColumn, Msg: fmt.Sprintf("qubit %q is named again (first in row %d); each qubit has one row, and names differ in more than letter case", row.Qubit, prev), Kind: ErrDuplicateQubit})
		default:
			rows[strings.ToLower(row.Qubit)] = line
		}
		t.Rows = append(t.Rows, row)
	}
	if len(t.Rows) == 0 && len(probs) == 0 {
		return nil, []Problem{{Msg: "the table has a header but no qubit rows", Kind: ErrEmptyTable}}
	}
	for _, p := range probs {
		if p.Kind != ErrDuplicateQubit && p.Column != t.QubitColumn {
			return nil, probs // the rows could not all be read
		}
	}
	return t, probs
}

// readHeader checks the header row and sets t's qubit column and spec
// columns; it returns the qubit column's index.
func readHeader(t *Table, header []string) (int, []Problem) {
	var probs []Problem
	qcol := -1
	seen := map[string]bool{}
	for j, h := range header {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		header[j] = h
		switch {
		case h == "":
			probs = append(probs, Problem{Row: 1, Column: fmt.Sprintf("#%d", j+1), Msg: "empty column header", Kind: ErrBadTable})
		case seen[h]:
			probs = append(probs, Problem{Row: 1, Column: h, Msg: "the column appears twice", Kind: ErrBadTable})
		case contains(QubitColumns, h):
			if qcol >= 0 {
				probs = append(probs, Problem{Row: 1, Column: h, Msg: fmt.Sprintf("a table has one qubit column; found %s and %s", header[qcol], h), Kind: ErrBadTable})
			}
			qcol = j
		}
		seen[h] = true
	}
	if qcol < 0 {
		probs = append(probs, Problem{Row: 1, Msg: fmt.Sprintf("no qubit column; the header names each row's qubit in a column called %s", strings.Join(QubitColumns, " or ")), Kind: ErrBadTable})
	}
	if len(probs) > 0 {
		return qcol, probs
	}
	t.QubitColumn = header[qcol]
	for j, h := range header {
		if j != qcol {
			t.Columns = append(t.Columns, h)
		}
	}
	return qcol, nil
}

func csvLine(err error) int {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return pe.StartLine
	}
	return 0
}

func csvMsg(err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		if errors.Is(pe.Err, csv.ErrFieldCount) {
			return "the row has a different number of cells than the header"
		}
		return pe.Err.Error()
	}
	return err.Error()
}

func contains(s []string, x string) bool {
	for _, v := range s {
		if v == x {
			return true
		}
	}
	return false
}
