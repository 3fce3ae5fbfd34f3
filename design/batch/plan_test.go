package batch

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The demo inputs: a row of four tripod sites, two gates.
var (
	demoBase  = filepath.Join("..", "..", "testdata", "batch", "tweezer-base.yaml")
	demoTable = filepath.Join("..", "..", "testdata", "batch", "tweezer-table.csv")
)

// planTable plans the demo base spec with the table text into a new
// folder, without probing, and returns the folder and the error.
func planTable(t *testing.T, table string, gates ...string) (string, error) {
	t.Helper()
	dir := t.TempDir()
	tab := filepath.Join(dir, "device.csv")
	if err := os.WriteFile(tab, []byte(table), 0o644); err != nil {
		t.Fatal(err)
	}
	work := filepath.Join(dir, "work")
	_, err := Plan(context.Background(), PlanOptions{Base: demoBase, Table: tab, Gates: gates, Work: work})
	return work, err
}

// TestPlanBadInput: every kind of bad input is refused at plan time with
// a message naming the row, the column and the spec field, and no file
// is written.
func TestPlanBadInput(t *testing.T) {
	cases := []struct {
		name  string
		table string
		gates []string
		kind  error
		frags []string
	}{
		{"unknown column", "site,hardware.max_rabbi\nt0,16 MHz\n", []string{"H"}, ErrUnknownColumn,
			[]string{"device.csv row 1, column hardware.max_rabbi:", "no field hardware.max_rabbi", "did you mean hardware.max_rabi?"}},
		{"section as column", "site,errors\nt0,1\n", []string{"H"}, ErrUnknownColumn,
			[]string{"column errors:", "is a section", "errors.two_photon_detuning"}},
		{"target column", "site,target.gate\nt0,X\n", []string{"H"}, ErrUnknownColumn,
			[]string{"column target.gate:", "comes from the gate list"}},
		{"wrong unit", "site,hardware.max_rabi\nt0,16 MHz\nt1,16 ms\n", []string{"H"}, ErrBadValue,
			[]string{`device.csv row 3, column hardware.max_rabi = "16 ms": spec field hardware.max_rabi: "16 ms" is not a frequency`}},
		{"wrong unit on a rate", "site,scheme.decay.e\nt0,4 MHz/ns\n", []string{"H"}, ErrBadValue,
			[]string{`row 2, column scheme.decay.e = "4 MHz/ns": spec field scheme.decay.e:`}},
		{"row makes the spec invalid", "site,hardware.full_scale\nt0,25 MHz\nt1,10 MHz\n", []string{"H", "SX"}, ErrBadValue,
			[]string{`device.csv row 3, column hardware.full_scale = "10 MHz": spec field hardware.full_scale: the DAC full scale 10 MHz is below max_rabi 20 MHz`}},
		{"invalid through another field", "site,hardware.max_rabi\nt0,30 MHz\n", []string{"H"}, ErrBadValue,
			[]string{"device.csv row 2: spec field hardware.full_scale:", "the row sets hardware.max_rabi"}},
		{"not a value", "site,hardware.max_rabi\nt0,\"{a: 1}\"\n", []string{"H"}, ErrBadValue,
			[]string{`row 2, column hardware.max_rabi = "{a: 1}": "{a: 1}" is not a single value`}},
		{"duplicate qubit", "site,errors.amplitude\nt0,0.01\nt1,0.01\nT0,0.02\n", []string{"H"}, ErrDuplicateQubit,
			[]string{`device.csv row 4, column site: qubit "T0" is named again (first in row 2)`}},
		{"bad qubit name", "qubit,errors.amplitude\n../x,0.01\n", []string{"H"}, ErrBadTable,
			[]string{`row 2, column qubit: "../x" is not a qubit name`}},
		{"empty table", "", []string{"H"}, ErrEmptyTable, []string{"device.csv: the table is empty"}},
		{"header only", "site,errors.amplitude\n", []string{"H"}, ErrEmptyTable, []string{"device.csv: the table has a header but no qubit rows"}},
		{"no qubit column", "name,errors.amplitude\nt0,0.01\n", []string{"H"}, ErrBadTable, []string{"no qubit column"}},
		{"ragged row", "site,errors.amplitude\nt0,0.01,7\n", []string{"H"}, ErrBadTable, []string{"row 2: the row has a different number of cells"}},
		{"unknown gate", "site,errors.amplitude\nt0,0.01\n", []string{"H", "Q"}, ErrBadGate,
			[]string{`gate list, entry "Q": spec field target.gate: unknown gate "Q"`}},
		{"gate twice", "site,errors.amplitude\nt0,0.01\n", []string{"H", "hadamard"}, ErrBadGate,
			[]string{`gate list, entry "hadamard": is gate H again`}},
		{"no gates", "site,errors.amplitude\nt0,0.01\n", nil, ErrBadGate, []string{"no gates"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			work, err := planTable(t, c.table, c.gates...)
			if err == nil {
				t.Fatal("plan accepted bad input")
			}
			if exitCode(err) != 2 {
				t.Errorf("exit code %d; want 2 (bad input)", exitCode(err))
			}
			if !errors.Is(err, c.kind) {
				t.Errorf("error is not %v: %v", c.kind, err)
			}
			for _, f := range c.frags {
				if !strings.Contains(err.Error(), f) {
					t.Errorf("message lacks %q:\n%v", f, err)
				}
			}
			if _, serr := os.Stat(work); !os.IsNotExist(serr) {
				t.Errorf("bad input left %s behind", work)
			}
			if left, _ := filepath.Glob(filepath.Join(filepath.Dir(work), ".work*")); len(left) > 0 {
				t.Errorf("bad input left %v", left)
			}
		})
	}
}

// TestPlanEveryRowReported: problems of several rows come in one error,
// in row order.
func TestPlanEveryRowReported(t *testing.T) {
	_, err := planTable(t, "site,hardware.max_rabi,errors.amplitude\nt0,16 ms,0.01\nt1,16 MHz,0.01\nt0,16 MHz,2 Hz\n", "H", "SX")
	var pe *PlanError
	if !errors.As(err, &pe) {
		t.Fatalf("error %v is not a *PlanError", err)
	}
	var rows []int
	for _, p := range pe.Problems {
		rows = append(rows, p.Row)
	}
	// Row 2: unit; row 4: duplicate and unit (each once, not once per gate).
	if len(rows) != 3 || rows[0] != 2 || rows[1] != 4 || rows[2] != 4 {
		t.Errorf("problem rows %v; want [2 4 4]:\n%v", rows, err)
	}
}

// TestOverrides: each task spec carries its row's values at the columns'
// paths, and nothing else changes. Oracle: the table's text read by the
// unit definitions (1 MHz = 10⁶ Hz; 1 kHz = 10³ Hz), and the base spec
// parsed on its own for the untouched fields.
func TestOverrides(t *testing.T) {
	work := filepath.Join(t.TempDir(), "w")
	res, err := Plan(context.Background(), PlanOptions{Base: demoBase, Table: demoTable, Gates: []string{"H", "sqrtX"}, Work: work})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][4]float64{ // max_rabi, full_scale (Hz), two-photon detuning (Hz), amplitude error
		"t0": {16.2e6, 20.3e6, -15e3, 0.012}, "t1": {18.9e6, 23.6e6, -5e3, 0.009},
		"t2": {19.4e6, 24.3e6, 5e3, 0.008}, "t3": {17.1e6, 21.4e6, 15e3, 0.011},
	}
	baseData, _ := os.ReadFile(demoBase)
	base, _, err := parseSpec(baseData, "base")
	if err != nil || base == nil {
		t.Fatal("base spec does not parse", err)
	}
	m := res.Manifest
	if len(m.Tasks) != 8 || m.Gates[1] != "SX" || m.Tasks[3].ID != "t1-SX" || m.Tasks[3].Row != 3 {
		t.Fatalf("tasks: %+v", m.Tasks)
	}
	for _, task := range m.Tasks {
		data, err := os.ReadFile(filepath.Join(work, task.Spec))
		if err != nil {
			t.Fatal(err)
		}
		ts, probs, err := parseSpec(data, task.SpecName)
		if err != nil || len(probs) > 0 {
			t.Fatalf("%s: %v %v", task.ID, err, probs)
		}
		s, w := ts.parsed, want[task.Qubit]
		for i, ch := range s.Scheme.Channels {
			if s.Hardware.MaxRabi[i] != w[0] || s.Hardware.FullScale[i] != w[1] || s.Errors.Amplitude[i] != w[3] {
				t.Errorf("%s channel %s: max_rabi %g, full_scale %g, amplitude %g; want %v", task.ID, ch.Name, s.Hardware.MaxRabi[i], s.Hardware.FullScale[i], s.Errors.Amplitude[i], w)
			}
		}
		if s.Errors.TwoPhoton != w[2] || ts.Gate != task.Gate {
			t.Errorf("%s: two-photon %g, gate %s", task.ID, s.Errors.TwoPhoton, ts.Gate)
		}
		b := base.parsed
		if s.Hardware.MaxSlew[0] != b.Hardware.MaxSlew[0] || s.Errors.OnePhoton != b.Errors.OnePhoton ||
			s.Search.Seed != b.Search.Seed || s.Sweeps != b.Sweeps || s.Scheme.Levels[3].Decay != b.Scheme.Levels[3].Decay {
			t.Errorf("%s: a field without a column changed", task.ID)
		}
		// Γ/2π = 4 MHz written in the base: Γ = 2π × 4e6 /s.
		if math.Abs(s.Scheme.Levels[3].Decay-2*math.Pi*4e6) > 1e-6 {
			t.Errorf("%s: decay %g /s", task.ID, s.Scheme.Levels[3].Decay)
		}
		if !strings.Contains(string(data), "# "+m.Table+" row ") {
			t.Errorf("%s: spec does not say which row its values came from", task.ID)
		}
	}
	// Planning again with the same inputs keeps the folder; other inputs
	// are refused.
	again, err := Plan(context.Background(), PlanOptions{Base: demoBase, Table: demoTable, Gates: []string{"H", "SX"}, Work: work})
	if err != nil || !again.Reused {
		t.Errorf("plan again: reused %v, %v", again != nil && again.Reused, err)
	}
	_, err = Plan(context.Background(), PlanOptions{Base: demoBase, Table: demoTable, Gates: []string{"H"}, Work: work})
	if err == nil || exitCode(err) != 5 || !strings.Contains(err.Error(), "holds a different plan") {
		t.Errorf("plan with other gates into the same folder: %v", err)
	}
}
