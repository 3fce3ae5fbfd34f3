package batch

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"
	"time"
)

// TaskResult is the content of a finished task's task.json: the figures
// of its design, in SI units (seconds), with every check and limit.
type TaskResult struct {
	ID    string `json:"id"`
	Qubit string `json:"qubit"`
	Gate  string `json:"gate"`
	// Row is the task's table row (spreadsheet numbering).
	Row        int    `json:"row"`
	SpecSHA256 string `json:"spec_sha256"`
	Target     string `json:"target"`
	Scheme     string `json:"scheme"`
	Method     string `json:"method"`
	// IdealFidelity and IdealLeakage are those of the sampled waveform
	// without errors; its checks decide Pass.
	IdealFidelity float64 `json:"ideal_fidelity"`
	IdealLeakage  float64 `json:"ideal_leakage"`
	// ErrorModelFidelity and ErrorModelLeakage are those of the same
	// waveform under the spec's error model (decay, dephasing, amplitude
	// and detuning errors, filter, quantisation).
	ErrorModelFidelity float64 `json:"error_model_fidelity"`
	ErrorModelLeakage  float64 `json:"error_model_leakage"`
	// Duration is the gate duration in seconds.
	Duration float64 `json:"duration_s"`
	Samples  int     `json:"samples"`
	Pass     bool    `json:"pass"`
	// Checks are the design's checks: value, limit and verdict.
	Checks []Check `json:"checks"`
	// Files are the task's files, by name inside its folder.
	Files []string `json:"files"`
}

// Check is one check of a task: a value against a limit ("max" or "min"
// bound) in Unit. A value or limit that is not a finite number is null.
type Check struct {
	Name  string   `json:"name"`
	Value *float64 `json:"value"`
	Limit *float64 `json:"limit"`
	Unit  string   `json:"unit"`
	Bound string   `json:"bound"`
	Pass  bool     `json:"pass"`
}

// Task states reported by a run.
const (
	StateDone    = "done"    // ran now and finished
	StateSkipped = "skipped" // finished before; left alone
	StateBusy    = "busy"    // another process is running it
	StateFailed  = "failed"  // ended without outputs; see the failures folder
)

// TaskRun is what happened to one task in a run.
type TaskRun struct {
	ID    string
	State string
	// Wall is the task's wall-clock time in this run (zero unless done
	// or failed).
	Wall time.Duration
}

// RunOptions controls Run.
type RunOptions struct {
	// Work is the work folder written by Plan.
	Work string
	// Jobs is the number of tasks run at once (at least 1).
	Jobs int
	// IDs, if not empty, selects tasks by ID.
	IDs []string
	// ArrayIndex, if not negative, selects the share of one Slurm array
	// task: tasks ArrayIndex·PerElement to (ArrayIndex+1)·PerElement − 1.
	ArrayIndex int
	// PerElement is the number of tasks per array index (at least 1).
	PerElement int
	// Log, if not nil, receives one line per task as it ends.
	Log io.Writer
}

// Run runs the selected tasks of a planned work folder (all of them by
// default), Jobs at a time. Finished tasks are skipped; a task another
// process is running is left to it. A task writes into a scratch folder
// that is renamed into tasks/ID only when complete, so an interrupted
// or killed task leaves no partial output. A task that fails is recorded
// in failures/ID.json with its message and exit code, and the others go
// on; Run then returns a *TasksFailedError. When ctx is cancelled, the
// running tasks stop, leave nothing behind, and Run returns ctx.Err().
func Run(ctx context.Context, opt RunOptions) ([]TaskRun, error) {
	m, err := readManifest(opt.Work)
	if err != nil {
		return nil, err
	}
	tasks, err := selectTasks(m, opt)
	if err != nil {
		return nil, inputError(err)
	}
	jobs := max(opt.Jobs, 1)
	runs := make([]TaskRun, len(tasks))
	fails := make([]*TaskFailure, len(tasks))
	var (
		wg   sync.WaitGroup
		mu   sync.Mutex
		next int
		ferr error
	)
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				mu.Lock()
				i := next
				next++
				mu.Unlock()
				if i >= len(tasks) || ctx.Err() != nil {
					return
				}
				run, fail, err := runTask(ctx, opt.Work, &tasks[i])
				runs[i], fails[i] = run, fail
				mu.Lock()
				if err != nil && ferr == nil {
					ferr = err
				}
				if opt.Log != nil && err == nil {
					fmt.Fprintf(opt.Log, "%-8s %s (%.2f s)\n", run.State, run.ID, run.Wall.Seconds())
				}
				mu.Unlock()
			}
		}()
	}
	wg.Wait()
	if ctx.Err() != nil {
		return runs, ctx.Err()
	}
	if ferr != nil {
		return runs, ferr
	}
	var failed []TaskFailure
	for _, f := range fails {
		if f != nil {
			failed = append(failed, *f)
		}
	}
	if len(failed) > 0 {
		return runs, &TasksFailedError{Failed: failed}
	}
	return runs, nil
}

// selectTasks picks the tasks a run works on.
func selectTasks(m *Manifest, opt RunOptions) ([]Task, error) {
	switch {
	case len(opt.IDs) > 0 && opt.ArrayIndex >= 0:
		return nil, errors.New("give task IDs or an array index, not both")
	case len(opt.IDs) > 0:
		byID := map[string]int{}
		for i, t := range m.Tasks {
			byID[t.ID] = i
		}
		var out []Task
		for _, id := range opt.IDs {
			i, ok := byID[id]
			if !ok {
				return nil, fmt.Errorf("work folder %s has no task %q", opt.Work, id)
			}
			out = append(out, m.Tasks[i])
		}
		return out, nil
	case opt.ArrayIndex >= 0:
		k := max(opt.PerElement, 1)
		lo := opt.ArrayIndex * k
		if lo >= len(m.Tasks) {
			return nil, fmt.Errorf("array index %d with %d task(s) per index is past the last of %d tasks", opt.ArrayIndex, k, len(m.Tasks))
		}
		return m.Tasks[lo:min(lo+k, len(m.Tasks))], nil
	}
	return m.Tasks, nil
}

// runTask runs one task unless it is finished or busy. It returns a
// failure record for a task that failed, and an error only when the run
// itself cannot go on (cancelled, or the work folder cannot be written).
func runTask(ctx context.Context, work string, t *Task) (TaskRun, *TaskFailure, error) {
	run := TaskRun{ID: t.ID}
	final := filepath.Join(work, tasksDir, t.ID)
	if finished(final) {
		run.State = StateSkipped
		return run, nil, nil
	}
	scratch := filepath.Join(work, scratchDir, t.ID)
	unlock, busy, err := lockScratch(scratch)
	if err != nil {
		return run, nil, outputError(err)
	}
	if busy {
		run.State = StateBusy
		return run, nil, nil
	}
	defer unlock()
	// A finished or failed task removes its scratch folder while it
	// still holds the lock; a process waiting on it then finds it gone.
	defer os.Remove(scratch)
	if finished(final) { // finished while we waited for the lock
		run.State = StateSkipped
		return run, nil, nil
	}
	// Whatever is in the scratch folder was left by a killed run.
	out := filepath.Join(scratch, "out")
	if err := os.RemoveAll(out); err != nil {
		return run, nil, outputError(err)
	}
	if err := os.Mkdir(out, 0o755); err != nil {
		return run, nil, outputError(err)
	}
	start := time.Now()
	res, err := designTask(ctx, work, t, out)
	run.Wall = time.Since(start)
	if err != nil {
		os.RemoveAll(out)
		if ctx.Err() != nil {
			return run, nil, ctx.Err()
		}
		run.State = StateFailed
		f := &TaskFailure{ID: t.ID, Qubit: t.Qubit, Gate: t.Gate, ExitCode: exitCode(err), Message: err.Error(), err: err}
		if werr := writeJSON(filepath.Join(work, failuresDir, t.ID+".json"), f); werr != nil {
			return run, nil, outputError(werr)
		}
		return run, f, nil
	}
	if err := writeJSON(filepath.Join(out, taskFile), res); err != nil {
		os.RemoveAll(out)
		return run, nil, outputError(err)
	}
	if err := os.Rename(out, final); err != nil {
		os.RemoveAll(out)
		if finished(final) { // another run (without locks) finished it first
			run.State = StateSkipped
			return run, nil, nil
		}
		return run, nil, outputError(fmt.Errorf("task %s: %w", t.ID, err))
	}
	syncDir(filepath.Join(work, tasksDir))
	if err := os.Remove(filepath.Join(work, failuresDir, t.ID+".json")); err != nil && !errors.Is(err, os.ErrNotExist) {
		return run, nil, outputError(err)
	}
	run.State = StateDone
	return run, nil, nil
}

// designTask reads the task's spec, checks it is the one planned, and
// designs it into dir.
func designTask(ctx context.Context, work string, t *Task, dir string) (*TaskResult, error) {
	data, err := os.ReadFile(filepath.Join(work, filepath.FromSlash(t.Spec)))
	if err != nil {
		return nil, inputError(fmt.Errorf("task %s: %w", t.ID, err))
	}
	if h := sha256Hex(data); h != t.SpecSHA256 {
		return nil, inputError(fmt.Errorf("task %s: %s was changed after planning (SHA-256 %s, planned %s); plan again into a new work folder", t.ID, t.Spec, h, t.SpecSHA256))
	}
	ts, probs, err := parseSpec(data, t.SpecName)
	if err == nil && len(probs) > 0 {
		err = inputError(fmt.Errorf("task %s: spec field %s: %s", t.ID, probs[0].Field, probs[0].Msg))
	}
	if err != nil {
		return nil, err
	}
	res, err := designInto(ctx, ts, dir)
	if err != nil {
		return nil, err
	}
	res.ID, res.Qubit, res.Gate, res.Row = t.ID, t.Qubit, t.Gate, t.Row
	return res, nil
}

// lockScratch creates and locks a task's scratch folder. A folder
// removed by its previous holder between creation and locking is made
// again.
func lockScratch(dir string) (unlock func(), busy bool, err error) {
	for try := 0; ; try++ {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return nil, false, err
		}
		unlock, busy, err = lockDir(dir)
		if err == nil || !errors.Is(err, os.ErrNotExist) || try == 3 {
			return unlock, busy, err
		}
	}
}

// finished reports whether a task folder holds a complete task.
func finished(dir string) bool {
	_, err := os.Stat(filepath.Join(dir, taskFile))
	return err == nil
}

// writeJSON writes v as indented JSON, atomically.
func writeJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return writeFileAtomic(path, append(b, '\n'))
}

// syncDir flushes a folder's entries (a rename) to disk, where supported.
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}
