package batch

import (
	"bytes"
	"context"
	"errors"
	"github.com/loopgate/loopgate/design/batch/batchtest"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// planDemo plans the demo table with gates into a new folder.
func planDemo(t *testing.T, gates ...string) string {
	t.Helper()
	work := filepath.Join(t.TempDir(), "work")
	if _, err := Plan(context.Background(), PlanOptions{Base: demoBase, Table: demoTable, Gates: gates, Work: work}); err != nil {
		t.Fatal(err)
	}
	return work
}

var tree = batchtest.ReadTree

func sameTrees(t *testing.T, what string, a, b map[string][]byte) {
	t.Helper()
	if len(a) != len(b) {
		t.Errorf("%s: %d files vs %d", what, len(a), len(b))
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || !bytes.Equal(v, w) {
			t.Errorf("%s: %s differs", what, k)
		}
	}
}

// TestRunSameBytesAndIdempotent: the tasks run four at a time, one at a
// time each alone (by ID), or by array index give byte-identical files
// and summaries; a second run skips every finished task and touches no
// file.
func TestRunSameBytesAndIdempotent(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	ctx := context.Background()
	par, alone, arr := planDemo(t, "SX"), planDemo(t, "SX"), planDemo(t, "SX")
	if _, err := Run(ctx, RunOptions{Work: par, Jobs: 4, ArrayIndex: -1}); err != nil {
		t.Fatal(err)
	}
	m, err := readManifest(alone)
	if err != nil {
		t.Fatal(err)
	}
	for i := len(m.Tasks) - 1; i >= 0; i-- {
		runs, err := Run(ctx, RunOptions{Work: alone, IDs: []string{m.Tasks[i].ID}, ArrayIndex: -1})
		if err != nil || len(runs) != 1 || runs[0].State != StateDone {
			t.Fatalf("task %s alone: %+v %v", m.Tasks[i].ID, runs, err)
		}
	}
	for idx := 0; idx < 2; idx++ { // 3 tasks per index: 3 and 1
		runs, err := Run(ctx, RunOptions{Work: arr, ArrayIndex: idx, PerElement: 3})
		if err != nil || len(runs) != min(3, 4-3*idx) {
			t.Fatalf("array index %d: %+v %v", idx, runs, err)
		}
	}
	if _, err := Run(ctx, RunOptions{Work: arr, ArrayIndex: 2, PerElement: 3}); err == nil {
		t.Error("array index past the tasks accepted")
	}
	for _, w := range []string{par, alone, arr} {
		if _, err := Collect(w); err != nil {
			t.Fatal(err)
		}
	}
	want := tree(t, par, tasksDir)
	if len(want) != 4*6 {
		t.Errorf("%d task files; want 4 tasks × 6", len(want))
	}
	for _, name := range []string{SummaryCSV, SummaryJSON, IndexFile} {
		want[name], _ = os.ReadFile(filepath.Join(par, name))
	}
	for w, what := range map[string]string{alone: "alone", arr: "array"} {
		got := tree(t, w, tasksDir)
		for _, name := range []string{SummaryCSV, SummaryJSON, IndexFile} {
			got[name], _ = os.ReadFile(filepath.Join(w, name))
		}
		sameTrees(t, what, want, got)
	}

	before := map[string]time.Time{}
	filepath.WalkDir(filepath.Join(par, tasksDir), func(p string, d fs.DirEntry, err error) error {
		if info, e := d.Info(); e == nil {
			before[p] = info.ModTime()
		}
		return nil
	})
	runs, err := Run(ctx, RunOptions{Work: par, Jobs: 2, ArrayIndex: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range runs {
		if r.State != StateSkipped {
			t.Errorf("rerun: %s %s; want skipped", r.ID, r.State)
		}
	}
	for p, mt := range before {
		if info, err := os.Stat(p); err != nil || !info.ModTime().Equal(mt) {
			t.Errorf("rerun touched %s", p)
		}
	}
	if left, _ := os.ReadDir(filepath.Join(par, scratchDir)); len(left) > 0 {
		t.Errorf("scratch folder not empty: %v", left)
	}
}

// TestRunCancelLeavesNothing: a task stopped mid-run (as by Slurm's
// SIGTERM) leaves no output, no scratch and no failure record, and the
// next run finishes it.
func TestRunCancelLeavesNothing(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	// One site whose 41×41 robustness map takes seconds.
	dir := t.TempDir()
	big, err := os.ReadFile(demoBase)
	if err != nil {
		t.Fatal(err)
	}
	src := strings.Replace(string(big), "map: {amplitude_points: 11, detuning_points: 11}", "map: {amplitude_points: 41, detuning_points: 41}", 1)
	if src == string(big) {
		t.Fatal("base spec has no 11×11 map to enlarge")
	}
	base, tab, work := filepath.Join(dir, "big.yaml"), filepath.Join(dir, "one.csv"), filepath.Join(dir, "work")
	os.WriteFile(base, []byte(src), 0o644)
	os.WriteFile(tab, []byte("site,errors.amplitude\nt0,0.01\n"), 0o644)
	if _, err := Plan(context.Background(), PlanOptions{Base: base, Table: tab, Gates: []string{"H"}, Work: work}); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	time.AfterFunc(300*time.Millisecond, cancel)
	_, err = Run(ctx, RunOptions{Work: work, ArrayIndex: -1})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled run: %v", err)
	}
	for _, sub := range []string{tasksDir, scratchDir, failuresDir} {
		if left, _ := os.ReadDir(filepath.Join(work, sub)); len(left) > 0 {
			t.Errorf("cancelled task left %s/%s", sub, left[0].Name())
		}
	}
	runs, err := Run(context.Background(), RunOptions{Work: work, ArrayIndex: -1})
	if err != nil || runs[0].State != StateDone || !finished(filepath.Join(work, tasksDir, "t0-H")) {
		t.Errorf("rerun after cancel: %+v %v", runs, err)
	}
}

// TestRunFailureRecorded: a task that cannot be made (its slew limit is
// below what one DAC step needs) is recorded with its message and exit
// code; the other tasks still finish, and the summary shows all three.
func TestRunFailureRecorded(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	work, err := planTable(t, "site,hardware.max_slew\nt0,\nt1,1 kHz/ns\nt2,\n", "H")
	if err != nil {
		t.Fatal(err)
	}
	runs, err := Run(context.Background(), RunOptions{Work: work, Jobs: 2, ArrayIndex: -1})
	var tf *TasksFailedError
	if !errors.As(err, &tf) || len(tf.Failed) != 1 || tf.Failed[0].ID != "t1-H" || !errors.Is(err, ErrTaskFailed) {
		t.Fatalf("run: %v", err)
	}
	if exitCode(err) != 4 || tf.Failed[0].ExitCode != 4 || !strings.Contains(tf.Failed[0].Message, "slew rate") {
		t.Errorf("failure: exit %d, record %+v", exitCode(err), tf.Failed[0])
	}
	if runs[0].State != StateDone || runs[1].State != StateFailed || runs[2].State != StateDone {
		t.Errorf("states: %+v", runs)
	}
	rec, err := os.ReadFile(filepath.Join(work, failuresDir, "t1-H.json"))
	if err != nil || !strings.Contains(string(rec), `"exit_code": 4`) {
		t.Errorf("failure record: %s %v", rec, err)
	}
	s, err := Collect(work)
	var np *NotPassedError
	if !errors.As(err, &np) || exitCode(err) != 3 || np.Of != 3 || len(np.Tasks) != 1 {
		t.Fatalf("collect: %v", err)
	}
	if s.Counts != (Counts{Tasks: 3, Passed: 2, Failed: 1}) || s.Tasks[1].Status != StatusFailed || s.Tasks[1].ExitCode != 4 || s.Tasks[1].ErrorModelFidelity != nil {
		t.Errorf("summary: %+v %+v", s.Counts, s.Tasks[1])
	}
	// A second run tries the failed task again (and fails again), leaving
	// the finished ones alone.
	runs, err = Run(context.Background(), RunOptions{Work: work, ArrayIndex: -1})
	if !errors.As(err, &tf) || runs[0].State != StateSkipped || runs[1].State != StateFailed {
		t.Errorf("second run: %+v %v", runs, err)
	}
}

// TestRunBusy: a task whose scratch folder another run holds is left to
// that run, and is run once the lock is released.
func TestRunBusy(t *testing.T) {
	if testing.Short() {
		t.Skip("runs designs; skipped with -short")
	}
	work, err := planTable(t, "site,errors.amplitude\nt0,0.01\n", "X")
	if err != nil {
		t.Fatal(err)
	}
	unlock, busy, err := lockScratch(filepath.Join(work, scratchDir, "t0-X"))
	if err != nil || busy {
		t.Fatalf("lock: busy %v, %v", busy, err)
	}
	runs, err := Run(context.Background(), RunOptions{Work: work, ArrayIndex: -1})
	if err != nil || runs[0].State != StateBusy || finished(filepath.Join(work, tasksDir, "t0-X")) {
		t.Errorf("run while locked: %+v %v", runs, err)
	}
	unlock()
	runs, err = Run(context.Background(), RunOptions{Work: work, ArrayIndex: -1})
	if err != nil || runs[0].State != StateDone {
		t.Errorf("run after unlock: %+v %v", runs, err)
	}
}
