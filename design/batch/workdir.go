package batch

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"
)

// PlanOptions controls Plan.
type PlanOptions struct {
	// Base is the base spec file and Table the calibration table (CSV).
	Base, Table string
	// Gates are the target gates, by name (see the gates command).
	Gates []string
	// Work is the work folder. Plan creates it, or finds it holding the
	// same plan (then only the batch script is written again).
	Work string
	// Probe runs the first task while planning, to measure the cost the
	// batch script requests; its outputs are kept, as a run's would be.
	Probe bool
	// Slurm holds the batch script's settings.
	Slurm Slurm
	// Log, if not nil, receives a line per step.
	Log io.Writer
}

// PlanResult describes a planned work folder.
type PlanResult struct {
	Manifest *Manifest
	// Script is the batch script's path, and Cost the measured cost of
	// one task (nil when nothing was measured).
	Script string
	Cost   *Cost
	// Reused is set when the work folder already held this plan.
	Reused bool
}

// Plan checks every row of the table with every gate as a spec before any
// work, then writes the work folder: plan.json, the inputs, one spec per
// task, the logs folder and the batch script. With bad input it returns a
// *PlanError (wrapped as bad input) and writes nothing.
func Plan(ctx context.Context, opt PlanOptions) (*PlanResult, error) {
	if err := opt.Slurm.check(); err != nil {
		return nil, inputError(err)
	}
	base, err := readLimited(opt.Base, maxSpecBytes, "base spec")
	if err != nil {
		return nil, err
	}
	table, err := readLimited(opt.Table, MaxTableBytes, "table")
	if err != nil {
		return nil, err
	}
	m, specs, err := checkInputs(base, filepath.Base(opt.Base), table, filepath.Base(opt.Table), opt.Gates)
	if err != nil {
		return nil, err
	}
	work, err := filepath.Abs(opt.Work)
	if err != nil {
		return nil, outputError(err)
	}
	if strings.ContainsAny(work, " \t\n\r'\"\\") {
		return nil, inputError(fmt.Errorf("work folder %q: the batch script's #SBATCH lines cannot hold a path with blanks or quotes; choose another folder", work))
	}
	mbytes, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return nil, err
	}
	mbytes = append(mbytes, '\n')
	res := &PlanResult{Manifest: m, Script: filepath.Join(work, ScriptFile)}
	res.Reused, err = samePlan(work, mbytes)
	if err != nil {
		return nil, err
	}
	if !res.Reused {
		files := map[string][]byte{ManifestFile: mbytes,
			inputsDir + "/" + m.Base: base, inputsDir + "/" + m.Table: table}
		for i, t := range m.Tasks {
			files[t.Spec] = specs[i]
		}
		if err := createWork(work, files); err != nil {
			return nil, outputError(err)
		}
		logf(opt.Log, "planned %d tasks (%d qubits × %d gates) in %s", len(m.Tasks), len(m.Qubits), len(m.Gates), work)
	} else {
		logf(opt.Log, "%s holds this plan already; finished tasks are kept", work)
	}
	res.Cost = readCost(work)
	if res.Cost == nil && opt.Probe {
		if res.Cost, err = probe(ctx, work, &m.Tasks[0], opt.Log); err != nil {
			return nil, err
		}
	}
	if opt.Slurm.Command == "" {
		if opt.Slurm.Command, err = os.Executable(); err != nil {
			opt.Slurm.Command = "loopgate"
		}
	}
	if err := writeFileAtomic(res.Script, []byte(opt.Slurm.script(m, work, res.Cost))); err != nil {
		return nil, outputError(err)
	}
	return res, nil
}

// samePlan reports whether work holds the plan mbytes. It fails when work
// holds a different plan or other files.
func samePlan(work string, mbytes []byte) (bool, error) {
	old, err := os.ReadFile(filepath.Join(work, ManifestFile))
	if err == nil {
		if bytes.Equal(old, mbytes) {
			return true, nil
		}
		return false, outputError(fmt.Errorf("work folder %s holds a different plan (other inputs, gates or tool version); plan into a new folder", work))
	}
	entries, rerr := os.ReadDir(work)
	if rerr == nil && len(entries) > 0 {
		return false, outputError(fmt.Errorf("work folder %s exists and is not empty; plan into a new or empty folder", work))
	}
	if rerr != nil && !errors.Is(rerr, os.ErrNotExist) {
		return false, outputError(rerr)
	}
	return false, nil
}

// createWork writes files (relative slash paths) into a new folder next
// to work and renames it into place, so that work appears complete or
// not at all.
func createWork(work string, files map[string][]byte) error {
	parent := filepath.Dir(work)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return err
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(work)+".plan-*")
	if err != nil {
		return err
	}
	ok := false
	defer func() {
		if !ok {
			os.RemoveAll(tmp)
		}
	}()
	for _, d := range []string{inputsDir, specsDir, tasksDir, failuresDir, scratchDir, logsDir} {
		if err := os.Mkdir(filepath.Join(tmp, d), 0o755); err != nil {
			return err
		}
	}
	for name, data := range files {
		if err := os.WriteFile(filepath.Join(tmp, filepath.FromSlash(name)), data, 0o644); err != nil {
			return err
		}
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	if err := os.Rename(tmp, work); err != nil {
		return fmt.Errorf("work folder %s: %w", work, err)
	}
	ok = true
	syncDir(parent)
	return nil
}

// probe runs one task and measures its cost.
func probe(ctx context.Context, work string, t *Task, log io.Writer) (*Cost, error) {
	logf(log, "running task %s to measure the cost of a task", t.ID)
	start := time.Now()
	run, fail, err := runTask(ctx, work, t)
	if err != nil {
		return nil, err
	}
	if fail != nil {
		logf(log, "task %s failed (%s); the batch script requests unmeasured defaults", t.ID, fail.Message)
		return nil, nil
	}
	if run.State != StateDone {
		return nil, nil
	}
	c := &Cost{Task: t.ID, WallSeconds: time.Since(start).Seconds(), PeakBytes: peakMemory()}
	if err := writeJSON(filepath.Join(work, CostFile), c); err != nil {
		return nil, outputError(err)
	}
	logf(log, "task %s took %.2f s, peak memory %s", t.ID, c.WallSeconds, slurmMemory(c.PeakBytes))
	return c, nil
}

func readCost(work string) *Cost {
	data, err := os.ReadFile(filepath.Join(work, CostFile))
	if err != nil {
		return nil
	}
	var c Cost
	if json.Unmarshal(data, &c) != nil || c.WallSeconds <= 0 {
		return nil
	}
	return &c
}

func logf(w io.Writer, format string, args ...any) {
	if w != nil {
		fmt.Fprintf(w, format+"\n", args...)
	}
}
