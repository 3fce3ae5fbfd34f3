package batch

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"time"
)

// Slurm holds the settings of the batch script Plan writes.
type Slurm struct {
	// Partition and Account, if set, become --partition and --account.
	Partition, Account string
	// Modules are loaded with `module load` before the run.
	Modules []string
	// Setup lines are shell lines run before the run (after the modules),
	// e.g. "export OMP_NUM_THREADS=1".
	Setup []string
	// Options are extra sbatch options, one per line, as "--qos=short".
	Options []string
	// Throttle is the most array tasks running at once (the %N of
	// --array); 0 means DefaultThrottle.
	Throttle int
	// PerElement is the number of tasks each array task runs; 0 chooses
	// the smallest that keeps the array within MaxArray indices.
	PerElement int
	// MaxArray is the cluster's largest array size (its MaxArraySize
	// less one); 0 means DefaultMaxArray.
	MaxArray int
	// Time and Memory, if not zero, replace the requests computed from
	// the measured cost (Memory in bytes).
	Time   time.Duration
	Memory int64
	// Command is the loopgate program the array tasks run (an absolute
	// path, or a name found on the cluster's PATH after the modules load).
	Command string
}

// Defaults of the batch script.
const (
	// DefaultThrottle is the default most array tasks running at once.
	DefaultThrottle = 50
	// DefaultMaxArray is the largest array index Slurm accepts by default
	// (MaxArraySize = 1001, so indices 0 to 1000); arrays stay below it.
	DefaultMaxArray = 1000
	// timeFactor and memFactor pad the measured cost of one task: tasks
	// of other qubits may take longer (more search evaluations, longer
	// gates). Common practice, not a measured spread.
	timeFactor = 3
	memFactor  = 2
	// timeStartup is added per array task for starting the program and
	// reading the plan; minTime and minMemory are floors.
	timeStartup = 2 * time.Minute
	minTime     = 5 * time.Minute
	minMemory   = 256 << 20
	// Requests used when nothing was measured (Plan without a probe).
	unmeasuredTime   = 30 * time.Minute
	unmeasuredMemory = 1 << 30
)

// Cost is the measured cost of one task (cost.json): its wall-clock time
// and the peak resident memory of the process that ran it.
type Cost struct {
	Task        string  `json:"task"`
	WallSeconds float64 `json:"wall_s"`
	PeakBytes   int64   `json:"peak_memory_bytes"`
}

// arrayShape returns the tasks per array index and the number of indices.
func (s *Slurm) arrayShape(tasks int) (per, size int) {
	per = s.PerElement
	if per <= 0 {
		maxArr := s.MaxArray
		if maxArr <= 0 {
			maxArr = DefaultMaxArray
		}
		per = (tasks + maxArr - 1) / maxArr
		per = max(per, 1)
	}
	return per, (tasks + per - 1) / per
}

// requests returns the time and memory requests of one array task.
func (s *Slurm) requests(cost *Cost, per int) (time.Duration, int64) {
	t, mem := s.Time, s.Memory
	if t == 0 {
		t = unmeasuredTime
		if cost != nil {
			t = time.Duration(float64(per)*cost.WallSeconds*timeFactor*float64(time.Second)) + timeStartup
			t = max(t, minTime)
		}
		t = (t + time.Minute - 1).Truncate(time.Minute)
	}
	if mem == 0 {
		mem = unmeasuredMemory
		if cost != nil && cost.PeakBytes > 0 {
			mem = max(memFactor*cost.PeakBytes, minMemory)
		}
		const step = 64 << 20
		mem = (mem + step - 1) / step * step
	}
	return t, mem
}

// slurmTime formats a duration as Slurm's [days-]hours:minutes:seconds.
func slurmTime(d time.Duration) string {
	s := int64(math.Ceil(d.Seconds()))
	days, s := s/86400, s%86400
	hms := fmt.Sprintf("%02d:%02d:%02d", s/3600, s/60%60, s%60)
	if days > 0 {
		return fmt.Sprintf("%d-%s", days, hms)
	}
	return hms
}

// slurmMemory formats bytes as whole megabytes for --mem.
func slurmMemory(b int64) string { return fmt.Sprintf("%dM", (b+(1<<20)-1)>>20) }

var optionRE = regexp.MustCompile(`^--[a-z][a-z-]*(=\S.*)?$`)

// check validates the settings.
func (s *Slurm) check() error {
	for _, o := range s.Options {
		if !optionRE.MatchString(o) || strings.ContainsAny(o, "\n\r") {
			return fmt.Errorf("sbatch option %q: expected one long option such as --qos=short", o)
		}
	}
	for _, v := range append(append([]string{s.Partition, s.Account, s.Command}, s.Modules...), s.Setup...) {
		if strings.ContainsAny(v, "\n\r") {
			return fmt.Errorf("%q: a setting of the batch script is one line", v)
		}
	}
	for _, v := range append([]string{s.Partition, s.Account}, s.Modules...) {
		if strings.ContainsAny(v, " \t'\"$`;&|<>") {
			return fmt.Errorf("%q: partition, account and module names are single words", v)
		}
	}
	if s.Throttle < 0 || s.PerElement < 0 || s.MaxArray < 0 || s.Time < 0 || s.Memory < 0 {
		return fmt.Errorf("throttle, tasks per array index, array size, time and memory are not negative")
	}
	return nil
}

// script returns the batch script of a work folder at absolute path work.
func (s *Slurm) script(m *Manifest, work string, cost *Cost) string {
	per, size := s.arrayShape(len(m.Tasks))
	throttle := s.Throttle
	if throttle == 0 {
		throttle = DefaultThrottle
	}
	throttle = min(throttle, size)
	t, mem := s.requests(cost, per)
	var b strings.Builder
	w := func(format string, args ...any) { fmt.Fprintf(&b, format+"\n", args...) }
	if len(s.Modules) > 0 {
		w("#!/bin/bash -l") // a login shell defines the module command
	} else {
		w("#!/bin/bash")
	}
	w("# Written by loopgate batch plan %s: %d tasks (%d qubits × %d gates: %s),", ToolVersion, len(m.Tasks), len(m.Qubits), len(m.Gates), strings.Join(m.Gates, " "))
	w("# %d per array task, %d array tasks, at most %d at once.", per, size, throttle)
	switch {
	case s.Time != 0 || s.Memory != 0:
		w("# Time and memory requests as given to plan.")
	case cost != nil:
		w("# Requests: %d × %.3g s (task %s, measured by plan) × %d + %s; memory %d × %s peak (floor %s).",
			per, cost.WallSeconds, cost.Task, timeFactor, timeStartup, memFactor, slurmMemory(cost.PeakBytes), slurmMemory(minMemory))
	default:
		w("# Requests: not measured (plan ran no task); generous defaults.")
	}
	w("# Submit: sbatch %s   Then: loopgate batch collect %s", shellQuote(work+"/"+ScriptFile), shellQuote(work))
	w("#SBATCH --job-name=loopgate-%s", jobName(work))
	w("#SBATCH --array=0-%d%%%d", size-1, throttle)
	w("#SBATCH --ntasks=1")
	w("#SBATCH --cpus-per-task=1")
	w("#SBATCH --time=%s", slurmTime(t))
	w("#SBATCH --mem=%s", slurmMemory(mem))
	w("#SBATCH --chdir=%s", work)
	w("#SBATCH --output=%s/%%A_%%a.out", logsDir)
	if s.Partition != "" {
		w("#SBATCH --partition=%s", s.Partition)
	}
	if s.Account != "" {
		w("#SBATCH --account=%s", s.Account)
	}
	for _, o := range s.Options {
		w("#SBATCH %s", o)
	}
	w("set -eu")
	for _, mod := range s.Modules {
		w("module load %s", mod)
	}
	for _, l := range s.Setup {
		w("%s", l)
	}
	w("# One thread per task; the tasks of the array are the parallelism.")
	w("export GOMAXPROCS=${SLURM_CPUS_PER_TASK:-1}")
	w("exec %s batch run . --array-index \"$SLURM_ARRAY_TASK_ID\" --per-index %d", shellQuote(s.Command), per)
	return b.String()
}

// jobName is the work folder's base name, made safe for a job name.
func jobName(work string) string {
	base := work[strings.LastIndexByte(work, '/')+1:]
	return strings.Map(func(r rune) rune {
		if r < 128 && (r == '-' || r == '_' || r == '.' || r >= '0' && r <= '9' || r >= 'A' && r <= 'Z' || r >= 'a' && r <= 'z') {
			return r
		}
		return '_'
	}, base)
}

// shellQuote quotes s for a POSIX shell when it needs quoting.
func shellQuote(s string) string {
	if s != "" && strings.Trim(s, "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_-./=:+@%") == "" {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
