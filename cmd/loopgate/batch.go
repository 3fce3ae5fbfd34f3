package main

import (
	"fmt"
	"os"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"github.com/loopgate/loopgate/design"
	"github.com/loopgate/loopgate/design/batch"
)

func newBatchCmd() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "batch",
		Short: "Design a gate set for every qubit of a calibration table, locally or as a Slurm array",
		Long: `batch designs every gate of a list for every qubit (or site) of a calibration
table. The table is a CSV file with one row per qubit: a "qubit" (or "site")
column, and columns named by the path of the spec field they set, with
values written as in a spec ("hardware.max_rabi" = "18.5 MHz"). Each row's
values replace those of a base spec; an empty cell keeps the base value.

  plan     check every row and gate, write the work folder and a Slurm script
  run      run the tasks here (-j N at once), or one array task's share
  collect  write summary.csv, summary.json and index.html into the work folder`,
		Example: `  loopgate batch plan base.yaml table.csv --gates H,SX,T -o work/
  loopgate batch run work/ -j 4
  sbatch work/array.sbatch
  loopgate batch collect work/`,
	}
	cmd.AddCommand(newBatchPlanCmd(), newBatchRunCmd(), newBatchCollectCmd())
	return cmd
}

func newBatchPlanCmd() *cobra.Command {
	var (
		opt     batch.PlanOptions
		gates   string
		timeReq string
		memReq  string
		noProbe bool
		quiet   bool
		asJSON  bool
	)
	cmd := &cobra.Command{
		Use:   "plan base.yaml table.csv --gates H,SX -o work/",
		Short: "Check a calibration table and write a work folder with one task per qubit × gate",
		Long: `plan checks the base spec, the gate list and every row of the table with every
gate, as specs, before any work: a problem names the table row, the column
and the spec field. Nothing is written unless every task is valid. It then
writes the work folder (plan.json, one spec per task), runs the first task
to measure what a task costs (unless --no-probe), and writes array.sbatch:
a Slurm batch script whose --array covers the tasks, throttled, with time
and memory requests from the measured cost. Planning again into the same
folder with the same inputs keeps the finished tasks and rewrites the script.`,
		Args: inputArgs(cobra.ExactArgs(2)),
		RunE: func(cmd *cobra.Command, args []string) error {
			if opt.Work == "" || gates == "" {
				return &design.InputError{Err: fmt.Errorf("plan needs the work folder (-o) and the gate list (--gates) (see '%s --help')", cmd.CommandPath())}
			}
			opt.Base, opt.Table, opt.Probe = args[0], args[1], !noProbe
			for _, g := range strings.Split(gates, ",") {
				if g = strings.TrimSpace(g); g != "" {
					opt.Gates = append(opt.Gates, g)
				}
			}
			var err error
			if timeReq != "" {
				if opt.Slurm.Time, err = parseTimeFlag(timeReq); err != nil {
					return &design.InputError{Err: err}
				}
			}
			if memReq != "" {
				if opt.Slurm.Memory, err = parseMemFlag(memReq); err != nil {
					return &design.InputError{Err: err}
				}
			}
			if !quiet && !asJSON {
				opt.Log = os.Stderr
			}
			res, err := batch.Plan(cmd.Context(), opt)
			if err != nil {
				return err
			}
			if asJSON {
				return printJSON(cmd.OutOrStdout(), map[string]any{"work": opt.Work, "tasks": len(res.Manifest.Tasks),
					"gates": res.Manifest.Gates, "qubits": len(res.Manifest.Qubits), "script": res.Script, "cost": res.Cost, "reused": res.Reused})
			}
			fmt.Fprintf(cmd.OutOrStdout(), "%d tasks in %s\nrun here:  loopgate batch run %s -j N\nor submit: sbatch %s\nthen:      loopgate batch collect %s\n",
				len(res.Manifest.Tasks), opt.Work, opt.Work, res.Script, opt.Work)
			return nil
		},
	}
	f := cmd.Flags()
	f.StringVarP(&opt.Work, "out", "o", "", "work folder, required (created; must be new, empty, or hold this plan)")
	f.StringVar(&gates, "gates", "", "target gates, comma separated, required (see loopgate gates)")
	f.BoolVar(&noProbe, "no-probe", false, "do not run a task to measure the cost")
	f.BoolVarP(&quiet, "quiet", "q", false, "print no progress on stderr")
	f.BoolVar(&asJSON, "json", false, "print the plan's figures as JSON")
	f.StringVar(&opt.Slurm.Partition, "partition", "", "Slurm partition")
	f.StringVar(&opt.Slurm.Account, "account", "", "Slurm account")
	f.StringArrayVar(&opt.Slurm.Modules, "module", nil, "environment module to load (repeatable)")
	f.StringArrayVar(&opt.Slurm.Setup, "setup", nil, "shell line run before the tasks (repeatable)")
	f.StringArrayVar(&opt.Slurm.Options, "sbatch", nil, "extra sbatch option, e.g. --sbatch=--qos=short (repeatable)")
	f.IntVar(&opt.Slurm.Throttle, "throttle", 0, fmt.Sprintf("most array tasks at once (default %d)", batch.DefaultThrottle))
	f.IntVar(&opt.Slurm.PerElement, "per-index", 0, fmt.Sprintf("tasks per array index (default: enough to keep the array within --max-array)"))
	f.IntVar(&opt.Slurm.MaxArray, "max-array", 0, fmt.Sprintf("the cluster's largest array index (default %d)", batch.DefaultMaxArray))
	f.StringVar(&timeReq, "time", "", `time per array task, e.g. "20m" or "1h30m" (default: from the measured cost)`)
	f.StringVar(&memReq, "mem", "", `memory per array task, e.g. "512M" or "2G" (default: from the measured cost)`)
	f.StringVar(&opt.Slurm.Command, "command", "", "loopgate program the array tasks run (default: this one)")
	return cmd
}

func newBatchRunCmd() *cobra.Command {
	var (
		opt    batch.RunOptions
		ids    []string
		quiet  bool
		asJSON bool
	)
	cmd := &cobra.Command{
		Use:   "run work/",
		Short: "Run the tasks of a work folder (skipping finished ones)",
		Long: `run runs the tasks of a planned work folder: all of them, -j at a time; the
ones named by --task; or, with --array-index, the share of one Slurm array
task (the batch script passes $SLURM_ARRAY_TASK_ID). Finished tasks are
skipped, and a task another process is running is left to it. A task
writes into scratch/ and appears in tasks/ only when complete. A failed
task is recorded in failures/ with its message and exit code; the others
still run, and run exits with the first failure's exit code.`,
		Args: inputArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			opt.Work, opt.IDs = args[0], ids
			if !quiet && !asJSON {
				opt.Log = cmd.OutOrStdout()
			}
			runs, err := batch.Run(cmd.Context(), opt)
			if asJSON && runs != nil {
				type runJSON struct {
					ID    string  `json:"id"`
					State string  `json:"state"`
					Wall  float64 `json:"wall_s"`
				}
				list := []runJSON{}
				for _, r := range runs {
					if r.ID != "" {
						list = append(list, runJSON{r.ID, r.State, r.Wall.Seconds()})
					}
				}
				if perr := printJSON(cmd.OutOrStdout(), list); perr != nil {
					return perr
				}
				return err
			}
			counts := map[string]int{}
			for _, r := range runs {
				counts[r.State]++
			}
			if runs != nil && !quiet {
				fmt.Fprintf(cmd.OutOrStdout(), "%d done, %d skipped (finished before), %d busy (running elsewhere), %d failed\n",
					counts[batch.StateDone], counts[batch.StateSkipped], counts[batch.StateBusy], counts[batch.StateFailed])
			}
			return err
		},
	}
	f := cmd.Flags()
	f.IntVarP(&opt.Jobs, "jobs", "j", 1, "tasks run at once")
	f.StringArrayVar(&ids, "task", nil, "run only this task ID, as q07-H (repeatable)")
	f.IntVar(&opt.ArrayIndex, "array-index", -1, "run the share of this array index")
	f.IntVar(&opt.PerElement, "per-index", 1, "tasks per array index (as planned)")
	f.BoolVarP(&quiet, "quiet", "q", false, "print nothing on stdout")
	f.BoolVar(&asJSON, "json", false, "print each task's state as JSON")
	return cmd
}

func newBatchCollectCmd() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "collect work/",
		Short: "Write the summary (CSV, JSON) and the index page of a work folder",
		Long: `collect reads every task of a work folder and writes summary.csv, summary.json
and index.html (a chip figure of the error-model infidelity per qubit and
gate, and a table linking every report). It exits with code 3 when a task
did not pass, failed or has not run.`,
		Args: inputArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			s, err := batch.Collect(args[0])
			if s == nil {
				return err
			}
			if asJSON {
				if perr := printJSON(cmd.OutOrStdout(), s.Counts); perr != nil {
					return perr
				}
			} else {
				c := s.Counts
				fmt.Fprintf(cmd.OutOrStdout(), "%d tasks: %d passed, %d with failed checks, %d failed, %d not run\nwrote %s, %s, %s in %s\n",
					c.Tasks, c.Passed, c.ChecksFailed, c.Failed, c.NotRun, batch.SummaryCSV, batch.SummaryJSON, batch.IndexFile, args[0])
			}
			return err
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the counts as JSON")
	return cmd
}

// parseTimeFlag reads a duration such as "20m" or "1h30m".
func parseTimeFlag(s string) (time.Duration, error) {
	d, err := time.ParseDuration(s)
	if err != nil || d <= 0 {
		return 0, fmt.Errorf("flag --time: %q is not a positive duration such as \"20m\" or \"1h30m\"", s)
	}
	return d, nil
}

// parseMemFlag reads a memory size such as "512M" or "2G" (binary units).
func parseMemFlag(s string) (int64, error) {
	units := map[string]int64{"K": 1 << 10, "M": 1 << 20, "G": 1 << 30, "T": 1 << 40}
	u := strings.ToUpper(strings.TrimSuffix(strings.TrimSuffix(strings.TrimSpace(s), "B"), "b"))
	for suffix, mul := range units {
		if strings.HasSuffix(u, suffix) {
			var n int64
			if _, err := fmt.Sscanf(strings.TrimSuffix(u, suffix), "%d", &n); err == nil && n > 0 {
				return n * mul, nil
			}
		}
	}
	return 0, fmt.Errorf("flag --mem: %q is not a memory size such as \"512M\" or \"2G\"", s)
}
