package design

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"

	"github.com/loopgate/loopgate/design/internal/atomicfile"
	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/wavefile"
)

// Version is the loopgate version recorded in every file it writes.
const Version = "0.1.0"

// Output file names written by Design into the output folder.
const (
	WaveformFile = "waveform.json"
	CSVFile      = "waveform.csv"
	NPYFile      = "waveform.npy"
	LoopFile     = "loop.json"
	ReportFile   = "report.html"
)

// loopFilePoints is the number of points per adiabatic segment sampled
// into the loop file.
const loopFilePoints = 512

// Options controls Design.
type Options struct {
	// OutDir is the output folder; it is created when missing.
	OutDir string
	// Overwrite allows replacing existing output files.
	Overwrite bool
	// Seed, if not nil, replaces the spec's search seed.
	Seed *uint64
	// NoReport skips the HTML report.
	NoReport bool
	// NoSweeps skips the robustness sweeps, the map and the comparison
	// with the dynamical gate (the error budget is still computed).
	NoSweeps bool
	// OnProgress, if not nil, receives the progress of the robustness
	// simulations (see robust.SweepOptions.OnProgress).
	OnProgress func(Progress)
	// Log, if not nil, receives one line per pipeline stage.
	Log io.Writer
}

// Design runs the whole pipeline on spec: loop search, timing and
// sampling, verification with and without the spec's error model, error
// budget, robustness analysis, and the output files. It checks that the
// outputs may be written before any work starts, and writes every file
// atomically. The returned Outcome is non-nil whenever the work finished;
// a failed check gives a *ChecksFailedError together with the Outcome.
func Design(ctx context.Context, spc *spec.Spec, opt Options) (*Outcome, error) {
	if spc == nil || spc.Scheme == nil || spc.Target.U == nil {
		return nil, &InputError{Err: errors.New("design: empty spec")}
	}
	seed := spc.Search.Seed
	if opt.Seed != nil {
		seed = *opt.Seed
	}
	paths, err := outputPaths(opt)
	if err != nil {
		return nil, err
	}
	sol, w, err := makeGate(ctx, spc, seed, opt.Log)
	if err != nil {
		return nil, err
	}
	model, sweeps := errorModelOf(spc), sweepsOf(spc, w.Duration())
	if err := checkModels(w, model, sweeps); err != nil {
		return nil, &InputError{Err: fmt.Errorf("spec %s: errors and sweeps: %w", spc.File, err)}
	}
	a, err := analyse(ctx, w, model, sweeps, !opt.NoSweeps, opt.OnProgress, opt.Log)
	if err != nil {
		return nil, err
	}
	out := newOutcome("design", spc.File, spc.Title, spc.Target.Label, w, a)
	out.Method = spc.Method.String()
	out.Seed = seed
	out.SpecHash = spc.Hash()
	out.Search = &sol.summary
	writers, err := designWriters(spc, seed, sol, w, a, out, !opt.NoReport)
	if err != nil {
		return nil, err
	}
	if err := writeAll(ctx, paths, opt.Overwrite, writers); err != nil {
		return nil, err
	}
	out.Files = append(out.Files, paths...)
	logf(opt.Log, "wrote %d files to %s", len(out.Files), opt.OutDir)
	return out, out.err()
}

// outputPaths returns the paths Design writes, after making sure the
// output folder exists and none of them would be replaced without
// opt.Overwrite.
func outputPaths(opt Options) ([]string, error) {
	names := []string{WaveformFile, CSVFile, NPYFile, LoopFile}
	if !opt.NoReport {
		names = append(names, ReportFile)
	}
	paths := make([]string, len(names))
	for i, n := range names {
		paths[i] = filepath.Join(opt.OutDir, n)
	}
	if err := atomicfile.PrepareDir(opt.OutDir); err != nil {
		return nil, &OutputError{Err: err}
	}
	if err := atomicfile.CheckPaths(paths, opt.Overwrite); err != nil {
		return nil, &OutputError{Err: err}
	}
	return paths, nil
}

// makeGate searches the loop, times and samples it, refuses a waveform
// beyond the hardware limits and simulates the robust-design ensemble.
func makeGate(ctx context.Context, spc *spec.Spec, seed uint64, log io.Writer) (*solution, *waveform.Waveform, error) {
	logf(log, "searching for a loop (%s, %s, seed %d)", spc.Method, spc.Search.Family, seed)
	sol, err := solve(ctx, spc, seed)
	if err != nil {
		return nil, nil, err
	}
	logf(log, "holonomy infidelity %.2e after %d evaluations", sol.summary.Infidelity, sol.summary.Evaluations)

	w, err := timeLoop(spc, sol.plan, log)
	if err != nil {
		return nil, nil, err
	}
	logf(log, "sampled %d samples (%.4g s) at %s", w.Len(), w.Duration(), spec.FormatQuantity(w.Hardware.SampleRate, spec.SampleRate))
	for _, sp := range w.Segments {
		if sp.Kind == waveform.AdiabaticSegment && (sol.summary.MinGap == 0 || sp.MinGap < sol.summary.MinGap) {
			sol.summary.MinGap = sp.MinGap
		}
	}
	if err := hardwareError(spc, w); err != nil {
		return nil, nil, err
	}
	if r := sol.summary.Robust; r != nil {
		if err := simulateEnsemble(spc, w, r); err != nil {
			return nil, nil, err
		}
	}
	return sol, w, nil
}

// designWriters returns the writers of Design's outputs in the order of
// outputPaths.
func designWriters(spc *spec.Spec, seed uint64, sol *solution, w *waveform.Waveform, a *analysis, out *Outcome, report bool) ([]func(io.Writer) error, error) {
	file := &wavefile.File{
		ToolVersion:  Version,
		SpecSHA256:   spc.Hash(),
		Seed:         seed,
		Spec:         string(spc.Source),
		Waveform:     w,
		Verification: a.ideal,
	}
	lf, err := wavefile.NewLoopFile(sol.plan, sol.family, sol.params, loopFilePoints)
	if err != nil {
		return nil, fmt.Errorf("design: loop file: %w", err)
	}
	lf.ToolVersion, lf.SpecSHA256, lf.Seed = Version, spc.Hash(), seed
	writers := []func(io.Writer) error{
		file.WriteJSON,
		func(wr io.Writer) error { return wavefile.WriteCSV(wr, w) },
		func(wr io.Writer) error { return wavefile.WriteNPY(wr, w) },
		lf.WriteJSON,
	}
	if report {
		data := reportData(out, w, sol.plan, a, spc.Preset)
		writers = append(writers, func(wr io.Writer) error { return writeReport(wr, data) })
	}
	return writers, nil
}

// FormatSI formats v with four significant digits and an SI prefix on unit
// ("96 ns", "20 MHz"); see waveform.FormatSI.
func FormatSI(v float64, unit string) string { return waveform.FormatSI(v, unit) }

// writeAll writes every output to a temporary file in its folder first
// and renames them into place only when all were written and the run was
// not interrupted, so an error or Ctrl-C leaves none of them (and a kill
// leaves at most hidden temporary files, which atomicfile.CleanTemps removes).
func writeAll(ctx context.Context, paths []string, overwrite bool, writers []func(io.Writer) error) error {
	files := make([]*atomicfile.File, 0, len(paths))
	defer func() {
		for _, f := range files {
			f.Abort()
		}
	}()
	for i, write := range writers {
		if err := ctx.Err(); err != nil {
			return err
		}
		f, err := atomicfile.Create(paths[i], overwrite)
		if err != nil {
			return &OutputError{Err: err}
		}
		files = append(files, f)
		if err := write(f); err != nil {
			return &OutputError{Err: fmt.Errorf("output %s: %w", paths[i], err)}
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	for _, f := range files {
		if err := f.Commit(); err != nil {
			return &OutputError{Err: err}
		}
	}
	return nil
}

func logf(w io.Writer, format string, args ...any) {
	if w != nil {
		fmt.Fprintf(w, "loopgate: "+format+"\n", args...)
	}
}

func finiteOrZero(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
}
