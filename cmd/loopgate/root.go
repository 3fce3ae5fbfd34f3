package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"github.com/loopgate/loopgate/design"
)

// errPrinted marks an error whose message was already printed.
var errPrinted = errors.New("already reported")

const exitCodes = `Exit codes:
  0    success; every check passed
  1    unexpected failure (a bug)
  2    bad input: flags, spec, loop file or waveform file
  3    the work finished but a check failed (fidelity or adiabaticity goal;
       for verify and check, any check including hardware limits)
  4    the target cannot be reached by the scheme's loops, or the gate does
       not fit the hardware limits (design then writes no files)
  5    an output file exists (use --overwrite) or cannot be written
  130  interrupted (Ctrl-C); no partial files were left`

func newRoot() *cobra.Command {
	root := &cobra.Command{
		Use:   "loopgate",
		Short: "Design holonomic single-qubit gates and write their control waveforms",
		Long: `loopgate designs single-qubit gates from the holonomy of a closed loop in
control space (tripod dark states, Λ systems, spins in a rotating field, or
your own coupling graph), times and samples the loop for an AWG, verifies
the sampled waveform in the full level scheme, and writes a documented
waveform file with every check.

Conventions: ħ = 1 inside; files carry frequencies in Hz (Ω/2π) and
times in seconds.

` + exitCodes,
		Version:       design.Version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.CompletionOptions.DisableDefaultCmd = true
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return &design.InputError{Err: fmt.Errorf("%w (see '%s --help')", err, c.CommandPath())}
	})
	root.AddCommand(newDesignCmd(), newVerifyCmd(), newCheckCmd(), newSchemaCmd(), newStarterCmd(), newGatesCmd())
	return root
}

// inputArgs makes a positional-argument check's error a bad-input error.
func inputArgs(check cobra.PositionalArgs) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if err := check(cmd, args); err != nil {
			return &design.InputError{Err: fmt.Errorf("%w (see '%s --help')", err, cmd.CommandPath())}
		}
		return nil
	}
}

// stderrProgress returns os.Stderr when it is a terminal and quiet is off.
func stderrProgress(quiet bool) io.Writer {
	if quiet || !term.IsTerminal(int(os.Stderr.Fd())) {
		return nil
	}
	return os.Stderr
}

func printJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// emit prints a command's result (as JSON or through text) when there
// is one, then returns the command's error for the exit code.
func emit(cmd *cobra.Command, asJSON bool, res any, have bool, text func(io.Writer), err error) error {
	if have {
		if asJSON {
			if perr := printJSON(cmd.OutOrStdout(), res); perr != nil {
				return perr
			}
		} else {
			text(cmd.OutOrStdout())
		}
	}
	return finish(err)
}

// finish prints the outcome's error after the report and returns it, so
// that the exit code reflects failed checks.
func finish(err error) error {
	if err == nil {
		return nil
	}
	var chk *design.ChecksFailedError
	if errors.As(err, &chk) {
		fmt.Fprintln(os.Stderr, "loopgate:", err)
		return fmt.Errorf("%w%w", errPrinted, err)
	}
	return err
}

func newDesignCmd() *cobra.Command {
	var (
		out       string
		overwrite bool
		seed      uint64
		asJSON    bool
		quiet     bool
		noReport  bool
		noSweeps  bool
	)
	cmd := &cobra.Command{
		Use:   "design [spec.yaml]",
		Short: "Design a gate from a spec and write the waveform, loop and report files",
		Long: `design reads a spec (YAML; with no argument, the built-in demo spec), searches for
a loop whose holonomy is the target gate, times and samples it for the AWG,
verifies the sampled waveform in the full level scheme with and without the
spec's error model, and writes into the output folder:

  waveform.json  the waveform file (JSON Schema: loopgate schema waveform)
  waveform.csv   one row per sample
  waveform.npy   float64 samples, columns documented in waveform.json
  loop.json      the loop's parameters and sampled points
  report.html    a self-contained report with figures and tables

Existing files are not replaced unless --overwrite is given.`,
		Example: `  loopgate design -o out/
  loopgate design testdata/demo-lambda-hadamard.yaml -o out/lambda --overwrite
  loopgate design my-spec.yaml -o out/ --seed 11 --json`,
		Args: inputArgs(cobra.MaximumNArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			var s *spec.Spec
			var err error
			if len(args) == 1 {
				s, err = spec.LoadSpec(args[0])
			} else {
				s, err = spec.LoadDemoSpec()
			}
			if err != nil {
				return &design.InputError{Err: err}
			}
			opt := design.Options{
				OutDir:    out,
				Overwrite: overwrite,
				NoReport:  noReport,
				NoSweeps:  noSweeps,
				Progress:  stderrProgress(quiet || asJSON),
			}
			if cmd.Flags().Changed("seed") {
				opt.Seed = &seed
			}
			if !quiet && !asJSON {
				opt.Log = os.Stderr
			}
			res, err := design.Design(cmd.Context(), s, opt)
			return emit(cmd, asJSON, res, res != nil, func(w io.Writer) { printOutcome(w, res) }, err)
		},
	}
	f := cmd.Flags()
	f.StringVarP(&out, "out", "o", "out", "output folder (created if missing)")
	f.BoolVar(&overwrite, "overwrite", false, "replace existing output files")
	f.Uint64Var(&seed, "seed", 0, "override the spec's search seed")
	f.BoolVar(&asJSON, "json", false, "print the outcome as JSON on stdout")
	f.BoolVarP(&quiet, "quiet", "q", false, "print no progress on stderr")
	f.BoolVar(&noReport, "no-report", false, "do not write report.html")
	f.BoolVar(&noSweeps, "no-sweeps", false, "skip the robustness sweeps and map")
	return cmd
}

func newVerifyCmd() *cobra.Command {
	var (
		asJSON, quiet, overwrite, noSweeps bool
		report                             string
		errs                               design.ErrorFlags
	)
	cmd := &cobra.Command{
		Use:   "verify waveform.json",
		Short: "Re-run every check on a waveform file (exit 3 if one fails)",
		Long: `verify reads a waveform file written by design, validates it against its
JSON Schema, replays the samples in the level scheme the file carries, and
re-runs every fidelity, adiabaticity and hardware check. The error model stored
in the file is used unless flags override its terms.`,
		Example: `  loopgate verify out/waveform.json
  loopgate verify out/waveform.json --amplitude-error 2% --report out/verify.html
  loopgate verify out/waveform.json --rise-time "5 ns" --filter first-order --phase-step "pi/256"
  loopgate verify out/waveform.json --json`,
		Args: inputArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			opt := design.VerifyOptions{
				Errors:    errs,
				Report:    report,
				Overwrite: overwrite,
				NoSweeps:  noSweeps,
				Progress:  stderrProgress(quiet || asJSON),
			}
			res, err := design.VerifyFile(cmd.Context(), args[0], opt)
			return emit(cmd, asJSON, res, res != nil, func(w io.Writer) { printOutcome(w, res) }, err)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&asJSON, "json", false, "print the outcome as JSON on stdout")
	f.BoolVarP(&quiet, "quiet", "q", false, "print no progress on stderr")
	f.StringVar(&report, "report", "", "also write an HTML report to this file")
	f.BoolVar(&overwrite, "overwrite", false, "replace an existing report file")
	f.BoolVar(&noSweeps, "no-sweeps", false, "skip the robustness sweeps and map")
	f.StringVar(&errs.Amplitude, "amplitude-error", "", `common amplitude error ε, e.g. "2%" or 0.02`)
	f.StringVar(&errs.OnePhoton, "one-photon-detuning", "", `excited-level detuning error Δ/2π, e.g. "500 kHz"`)
	f.StringVar(&errs.TwoPhoton, "two-photon-detuning", "", `qubit two-photon detuning error δ/2π, e.g. "20 kHz"`)
	f.StringVar(&errs.Decay, "decay", "", `decay of the excited levels, Γ/2π in Hz or Γ in /s`)
	f.StringVar(&errs.Dephasing, "dephasing", "", `qubit dephasing, γφ/2π in Hz or γφ in /s`)
	f.StringVar(&errs.RiseTime, "rise-time", "", `analog bandwidth as a 10–90 % rise time, e.g. "2 ns"`)
	f.StringVar(&errs.Filter, "filter", "", `low-pass shape for --rise-time: none, gaussian or first-order`)
	f.StringVar(&errs.PhaseStep, "phase-step", "", `drive-phase resolution, e.g. "1.4 deg" or "pi/128"`)
	return cmd
}

func newCheckCmd() *cobra.Command {
	var (
		asJSON bool
		target string
		rabi   string
	)
	cmd := &cobra.Command{
		Use:   "check loop.json",
		Short: "Compute a loop file's holonomy and compare it with a target gate",
		Long: `check reads a loop file (as written by design, or your own candidate loop),
computes the holonomy of the working subspace with an error estimate, the
fidelity to the target gate (the file's, or --target), the smallest gap along
the loop, and explains in words what the loop can and cannot do.`,
		Example: `  loopgate check out/loop.json
  loopgate check out/loop.json --target T --json`,
		Args: inputArgs(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			opt := design.CheckOptions{Target: target}
			if rabi != "" {
				v, err := spec.ParseQuantity(rabi, spec.Frequency)
				if err != nil || v <= 0 {
					return &design.InputError{Err: fmt.Errorf("flag --rabi: %q is not a positive Rabi frequency Ω/2π such as \"20 MHz\"", rabi)}
				}
				opt.Rabi = v
			}
			res, err := design.CheckLoopFile(cmd.Context(), args[0], opt)
			return emit(cmd, asJSON, res, res != nil, func(w io.Writer) { printLoopCheck(w, res) }, err)
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the outcome as JSON on stdout")
	cmd.Flags().StringVar(&target, "target", "", "compare with this named gate instead of the file's target")
	cmd.Flags().StringVar(&rabi, "rabi", "", `peak Rabi frequency Ω/2π the loop is driven with, e.g. "20 MHz" (scales the static detunings)`)
	return cmd
}

func newSchemaCmd() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:       "schema {spec|waveform|loop}",
		Short:     "Print a JSON Schema of a loopgate file format",
		Example:   "  loopgate schema waveform > waveform.schema.json",
		Args:      inputArgs(cobra.ExactArgs(1)),
		ValidArgs: design.SchemaNames(),
		RunE: func(cmd *cobra.Command, args []string) error {
			b, err := design.Schema(args[0])
			if err != nil {
				return &design.InputError{Err: err}
			}
			_, err = cmd.OutOrStdout().Write(b)
			return err
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "the schema is JSON already; accepted for uniformity")
	return cmd
}

func newStarterCmd() *cobra.Command {
	var (
		out       string
		overwrite bool
		asJSON    bool
	)
	cmd := &cobra.Command{
		Use:   "starter {" + strings.Join(spec.StarterPresets(), "|") + "}",
		Short: "Write a commented starter spec for a level-scheme preset",
		Example: `  loopgate starter tripod > my-tripod.yaml
  loopgate starter lambda -o my-lambda.yaml`,
		Args:      inputArgs(cobra.ExactArgs(1)),
		ValidArgs: spec.StarterPresets(),
		RunE: func(cmd *cobra.Command, args []string) error {
			b, err := spec.StarterSpec(args[0])
			if err != nil {
				return &design.InputError{Err: err}
			}
			if out == "" {
				if asJSON {
					return printJSON(cmd.OutOrStdout(), map[string]string{"preset": args[0], "spec": string(b)})
				}
				_, err = cmd.OutOrStdout().Write(b)
				return err
			}
			if err := design.WriteFileAtomic(out, b, overwrite); err != nil {
				return &design.OutputError{Err: err}
			}
			if asJSON {
				return printJSON(cmd.OutOrStdout(), map[string]string{"preset": args[0], "file": out})
			}
			fmt.Fprintf(cmd.OutOrStdout(), "wrote %s\n", out)
			return nil
		},
	}
	cmd.Flags().StringVarP(&out, "out", "o", "", "write to this file instead of stdout")
	cmd.Flags().BoolVar(&overwrite, "overwrite", false, "replace an existing file")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the outcome as JSON")
	return cmd
}

func newGatesCmd() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:     "gates",
		Short:   "List the named target gates",
		Example: "  loopgate gates\n  loopgate gates --json",
		Args:    inputArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			type gateJSON struct {
				Name        string           `json:"name"`
				Symbol      string           `json:"symbol"`
				Aliases     []string         `json:"aliases"`
				Description string           `json:"description"`
				Matrix      [2][2][2]float64 `json:"matrix"`
			}
			var list []gateJSON
			for _, g := range spec.Gates() {
				j := gateJSON{Name: g.Name, Symbol: g.Symbol, Aliases: g.Aliases, Description: g.Description}
				for r := 0; r < 2; r++ {
					for c := 0; c < 2; c++ {
						j.Matrix[r][c] = [2]float64{real(g.U[r][c]), imag(g.U[r][c])}
					}
				}
				list = append(list, j)
			}
			if asJSON {
				return printJSON(cmd.OutOrStdout(), list)
			}
			w := cmd.OutOrStdout()
			for _, g := range list {
				fmt.Fprintf(w, "%-6s %-5s %-26s %s\n", g.Name, g.Symbol, strings.Join(g.Aliases, ", "), g.Description)
			}
			return nil
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print the list as JSON")
	return cmd
}
