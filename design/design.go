package design

import (
	"context"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform/wavefile"
	"io"
	"math"
	"math/cmplx"
	"path/filepath"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/optimize"
	"github.com/loopgate/loopgate/waveform"
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
	// Progress, if not nil, receives progress bars (a terminal).
	Progress io.Writer
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
	names := []string{WaveformFile, CSVFile, NPYFile, LoopFile}
	if !opt.NoReport {
		names = append(names, ReportFile)
	}
	paths := make([]string, len(names))
	for i, n := range names {
		paths[i] = filepath.Join(opt.OutDir, n)
	}
	if err := PrepareOutputDir(opt.OutDir); err != nil {
		return nil, &OutputError{Err: err}
	}
	if err := CheckOutputs(paths, opt.Overwrite); err != nil {
		return nil, &OutputError{Err: err}
	}

	logf(opt.Log, "searching for a loop (%s, %s, seed %d)", spc.Method, spc.Search.Family, seed)
	sol, err := solve(ctx, spc, seed)
	if err != nil {
		return nil, err
	}
	logf(opt.Log, "holonomy infidelity %.2e after %d evaluations", sol.summary.Infidelity, sol.summary.Evaluations)

	w, err := timeLoop(spc, sol.plan, opt.Log)
	if err != nil {
		return nil, err
	}
	logf(opt.Log, "sampled %d samples (%.4g s) at %s", w.Len(), w.Duration(), spec.FormatQuantity(w.Hardware.SampleRate, spec.SampleRate))
	for _, sp := range w.Spans {
		if sp.Kind == waveform.Adiabatic && (sol.summary.MinGap == 0 || sp.MinGap < sol.summary.MinGap) {
			sol.summary.MinGap = sp.MinGap
		}
	}

	if err := hardwareError(spc, w); err != nil {
		return nil, err
	}
	if r := sol.summary.Robust; r != nil {
		if err := simulateEnsemble(spc, w, r); err != nil {
			return nil, err
		}
	}
	model, sweeps := errorModelOf(spc), sweepsOf(spc, w.Duration())
	if err := checkModels(w, model, sweeps); err != nil {
		return nil, &InputError{Err: fmt.Errorf("spec %s: errors and sweeps: %w", spc.File, err)}
	}
	a, err := analyse(ctx, w, model, sweeps, !opt.NoSweeps, opt.Progress, opt.Log)
	if err != nil {
		return nil, err
	}

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

	out := newOutcome("design", spc.File, spc.Title, spc.Target.Label, w, a)
	out.Method = spc.Method.String()
	out.Seed = seed
	out.SpecHash = spc.Hash()
	out.Search = &sol.summary

	writers := []func(io.Writer) error{
		file.WriteJSON,
		func(wr io.Writer) error { return wavefile.WriteCSV(wr, w) },
		func(wr io.Writer) error { return wavefile.WriteNPY(wr, w) },
		lf.WriteJSON,
	}
	if !opt.NoReport {
		data := reportData(out, w, sol.plan, a, spc.Preset)
		writers = append(writers, func(wr io.Writer) error { return writeReport(wr, data) })
	}
	if err := writeAll(ctx, paths, opt.Overwrite, writers); err != nil {
		return nil, err
	}
	out.Files = append(out.Files, paths...)
	logf(opt.Log, "wrote %d files to %s", len(out.Files), opt.OutDir)
	return out, out.err()
}

// Timing search parameters: at most maxTimingRounds builds; the timing
// aims at timingMargin of the allowed infidelity 1 − F_goal; adiabaticity
// goals are kept at or below maxAdiabaticity.
const (
	maxTimingRounds = 12
	timingMargin    = 0.5
	maxAdiabaticity = 0.5
)

// timeLoop times and samples the plan. A cyclic plan is timed once. For
// an adiabatic plan it searches the adiabaticity goal α (larger α, shorter
// gate) for the loosest one whose sampled waveform, in the ideal model,
// meets the fidelity goal with half the allowed infidelity kept as a
// margin (timingMargin) and passes every hardware check. Each trial is
// classed as
//
//   - valid;
//   - too loose: the fidelity misses the target, or a limit that a slower
//     gate would meet fails (minimum duration, slew, amplitude) — go
//     tighter;
//   - too long: the longest allowed duration or the sample count is
//     exceeded — go looser.
//
// From α = waveform.DefaultAdiabaticity it steps by ×1.25 towards the
// other class (a too-loose trial is rescaled by 0.7·√((1−F_target)/(1−F)),
// between ×0.25 and ×0.9, since the non-adiabatic error falls about as
// α²), then bisects geometrically between the loosest valid α and the
// tightest too-loose one until they are within 10 %. It returns the valid
// waveform with the loosest α; when none is valid after maxTimingRounds,
// the one with the best fidelity among those that fit the hardware (or
// the first built); its checks tell the rest.
func timeLoop(spc *spec.Spec, plan *waveform.Plan, log io.Writer) (*waveform.Waveform, error) {
	hw := hardwareOf(spc)
	adiabatic := false
	for _, s := range plan.Segments {
		adiabatic = adiabatic || s.Kind == waveform.Adiabatic
	}
	goal := waveform.DefaultMinFidelity
	if plan.MinFidelity != 0 {
		goal = plan.MinFidelity
	}
	target := 1 - timingMargin*(1-goal)
	var (
		valid, best, first *waveform.Waveform
		bestF              = -1.0
		validAlpha         = math.NaN() // loosest valid α
		tooLoose           = math.NaN() // tightest too-loose α
		tooLong            = math.NaN() // loosest too-long α
		lastF              = math.NaN()
		alpha              = waveform.DefaultAdiabaticity
	)
	for round := 0; round < maxTimingRounds; round++ {
		plan.Adiabaticity = alpha
		w, err := waveform.Build(plan, hw)
		var le *waveform.LimitError
		switch {
		case err != nil && !errors.As(err, &le):
			return nil, fmt.Errorf("spec %s: timing and sampling: %w", spc.File, err)
		case err != nil && (!adiabatic || le.Check.Name != "sample count"):
			return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: hardware: %s", spc.File, describeCheck(le.Check))}
		case err != nil:
			tooLong = math.Max(nanTo(tooLong, 0), alpha) // only the sample count can stop Build
		default:
			if first == nil {
				first = w
			}
			if !adiabatic {
				return w, nil
			}
			v, err := waveform.Verify(w, waveform.ErrorModel{})
			if err != nil {
				return nil, fmt.Errorf("spec %s: verification: %w", spc.File, err)
			}
			long, other := hardwareFailures(v)
			switch {
			case long:
				tooLong = math.Max(nanTo(tooLong, 0), alpha)
			case other || v.Fidelity < target:
				tooLoose = math.Min(nanTo(tooLoose, math.Inf(1)), alpha)
				lastF = v.Fidelity
				if !other && v.Fidelity > bestF {
					best, bestF = w, v.Fidelity
				}
				if !other {
					logf(log, "fidelity %.6f misses the timing target %.6g at adiabaticity goal %.3g (%s); re-timing",
						v.Fidelity, target, alpha, spec.FormatQuantity(w.Duration(), spec.Time))
				}
			default:
				if math.IsNaN(validAlpha) || alpha > validAlpha {
					valid, validAlpha = w, alpha
				}
			}
		}
		// The next goal.
		switch {
		case !math.IsNaN(validAlpha) && !math.IsNaN(tooLoose):
			if tooLoose/validAlpha < 1.1 {
				return valid, nil
			}
			alpha = math.Sqrt(validAlpha * tooLoose)
		case !math.IsNaN(validAlpha):
			if validAlpha >= maxAdiabaticity {
				return valid, nil
			}
			alpha = math.Min(maxAdiabaticity, validAlpha*1.25)
		case !math.IsNaN(tooLong) && !math.IsNaN(tooLoose):
			if tooLoose <= tooLong*1.02 {
				round = maxTimingRounds // no goal fits between the two limits
			}
			alpha = math.Sqrt(tooLong * tooLoose)
		case !math.IsNaN(tooLong):
			if tooLong >= maxAdiabaticity {
				round = maxTimingRounds
			}
			alpha = math.Min(maxAdiabaticity, tooLong*1.25)
		default:
			f := 0.9
			if !math.IsNaN(lastF) && lastF < 1 {
				f = math.Max(0.25, math.Min(0.9, 0.7*math.Sqrt((1-target)/(1-lastF))))
			}
			alpha = tooLoose * f
		}
	}
	switch {
	case valid != nil:
		return valid, nil
	case best != nil:
		logf(log, "the timing target %.6g is out of reach within the hardware limits; keeping the best waveform, F = %.6f", target, bestF)
		return best, nil
	case first != nil:
		return first, nil
	}
	return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: no adiabaticity goal up to %g gives a gate within the sample limit", spc.File, maxAdiabaticity)}
}

// hardwareFailures sorts the failed hardware checks of v: long reports a
// gate that is too long (duration or sample count), other any other
// failed hardware limit.
func hardwareFailures(v *waveform.Verification) (long, other bool) {
	for _, c := range v.Checks {
		switch {
		case c.Pass || c.Name == "fidelity" || c.Name == "adiabaticity":
		case c.Name == "duration" || c.Name == "sample count":
			long = true
		default:
			other = true
		}
	}
	return long, other
}

func nanTo(x, v float64) float64 {
	if math.IsNaN(x) {
		return v
	}
	return x
}

// hardwareError refuses a waveform that breaks a hardware limit: no file
// is written for it (a waveform that would overdrive the hardware is worse
// than none). The error names every broken limit with the value needed,
// the limit and the excess.
func hardwareError(spc *spec.Spec, w *waveform.Waveform) error {
	var bad []string
	for _, c := range w.HardwareChecks() {
		if !c.Pass {
			bad = append(bad, describeCheck(c))
		}
	}
	if len(bad) == 0 {
		return nil
	}
	return &InfeasibleError{Err: fmt.Errorf("spec %s: the gate does not fit the hardware limits (no files written): %s",
		spc.File, strings.Join(bad, "; "))}
}

// describeCheck says in words what a failed check needs and by how much it
// misses the limit.
func describeCheck(c waveform.Check) string {
	rel, word := "above the largest allowed", "over"
	if c.Lower {
		rel, word = "below the smallest allowed", "short"
	}
	return fmt.Sprintf("%s is %s, %s %s (%s by %s)", c.Name, FormatSI(c.Value, c.Unit), rel, FormatSI(c.Limit, c.Unit), word, FormatSI(math.Abs(c.Margin), c.Unit))
}

// FormatSI formats v with four significant digits and an SI prefix on unit
// ("96 ns", "20 MHz"); see waveform.FormatSI.
func FormatSI(v float64, unit string) string { return waveform.FormatSI(v, unit) }

// writeAll writes every output to a temporary file in its folder first
// and renames them into place only when all were written and the run was
// not interrupted, so an error or Ctrl-C leaves none of them (and a kill
// leaves at most hidden temporary files, which CleanTemps removes).
func writeAll(ctx context.Context, paths []string, overwrite bool, writers []func(io.Writer) error) error {
	files := make([]*AtomicFile, 0, len(paths))
	defer func() {
		for _, f := range files {
			f.Abort()
		}
	}()
	for i, write := range writers {
		if err := ctx.Err(); err != nil {
			return err
		}
		f, err := CreateAtomic(paths[i], overwrite)
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

// solution is what the search stage hands on.
type solution struct {
	plan    *waveform.Plan
	family  string
	params  []float64
	summary SearchSummary
}

// solve runs the loop search for spec's method and builds the plan.
func solve(ctx context.Context, spc *spec.Spec, seed uint64) (*solution, error) {
	// The search works at unit scale, where the peak Rabi frequency is 1:
	// static detunings and detuning errors are expressed in units of the
	// largest Rabi limit, the amplitude the timing stage aims at. The plan
	// keeps the physical scheme.
	ref := 0.0
	for _, r := range spc.Hardware.MaxRabi {
		ref = math.Max(ref, r)
	}
	sc, target := unitScheme(spc.Scheme, ref), spc.Target.U
	var ens optimize.Ensemble
	if spc.Search.Robust.Enabled() {
		ens = robustEnsemble(spc, spc.Search.Robust.Amplitude, spc.Search.Robust.Detuning/ref)
	}
	switch spc.Method {
	case spec.Nonadiabatic:
		s := &optimize.LambdaSearch{
			Scheme:           sc,
			Target:           target,
			Form:             optimize.SingleLoop,
			Restarts:         spc.Search.Restarts,
			Seed:             seed,
			TargetInfidelity: spc.Search.TargetInfidelity,
			MaxEvaluations:   totalEvaluations(spc),
			FromClosedForm:   true,
			Ensemble:         ens,
		}
		res, err := s.Run(ctx)
		if err != nil {
			return nil, searchError(spc, err)
		}
		lc, err := optimize.NewLambdaCoupling(sc)
		if err != nil {
			return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: scheme: %w", spc.File, err)}
		}
		plan := &waveform.Plan{Scheme: spc.Scheme, Target: target}
		for _, g := range res.Segments {
			g := g
			plan.Segments = append(plan.Segments, waveform.Segment{
				Kind:  waveform.Cyclic,
				Area:  g.Area,
				Shape: func(_ float64, p holonomy.Point) { lc.Point(g, p) },
			})
		}
		sum := SearchSummary{
			Family:      "lambda " + res.Form.String(),
			Parameters:  len(res.Params),
			Infidelity:  res.Infidelity,
			Evaluations: res.Evaluations,
			Restarts:    res.Restarts,
		}
		sum.Robust = robustSummary(res.Robust)
		return &solution{plan: plan, family: sum.Family, params: res.Params, summary: sum}, nil

	default:
		var sp *optimize.Sphere
		var err error
		if spec.IsSpinPreset(spc.Preset) {
			sp, err = optimize.NewFieldSphere(sc)
		} else {
			sp, err = optimize.NewDriveSphere(sc, false)
		}
		if err != nil {
			return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: scheme: %w", spc.File, err)}
		}
		var shape optimize.Shape
		family := spc.Search.Family.String()
		switch spc.Search.Family {
		case spec.Polygon:
			shape = optimize.NewPolygon(sp, spc.Search.Vertices)
		default:
			shape = optimize.NewFourier(sp, spc.Search.Harmonics)
		}
		s := &optimize.Search{
			Scheme:           sc,
			Target:           target,
			Shape:            shape,
			Penalty:          amplitudePenalty(sc, shape, spc.Hardware.MaxRabi),
			Restarts:         spc.Search.Restarts,
			Seed:             seed,
			TargetInfidelity: spc.Search.TargetInfidelity,
			MaxEvaluations:   totalEvaluations(spc),
			Points:           min(shape.Points(), spc.Search.LoopPoints),
			Ensemble:         ens,
		}
		res, err := s.Run(ctx)
		if err != nil {
			return nil, searchError(spc, err)
		}
		plan := &waveform.Plan{
			Scheme:   spc.Scheme,
			Target:   target,
			Segments: []waveform.Segment{{Kind: waveform.Adiabatic, Shape: res.Loop}},
		}
		sum := SearchSummary{
			Family:      family,
			Parameters:  len(res.Params),
			Infidelity:  res.Infidelity,
			Evaluations: res.Evaluations,
			Restarts:    res.Restarts,
			LoopLength:  res.Length,
		}
		if res.Check != nil {
			sum.HolonomyError = res.Check.ErrorEstimate
			sum.LoopPoints = res.Check.Points
			for _, f := range res.Check.Findings {
				sum.Findings = append(sum.Findings, f.Message)
			}
		}
		sum.Robust = robustSummary(res.Robust)
		return &solution{plan: plan, family: family, params: res.Params, summary: sum}, nil
	}
}

// penaltyPoints is the number of loop points amplitudePenalty samples, and
// minAmplitudeShare the share of the strongest channel's Rabi limit below
// which it starts to penalise.
const (
	penaltyPoints     = 64
	minAmplitudeShare = 0.5
)

// amplitudePenalty returns the hardware penalty of the adiabatic search.
// A loop of unit-scale drive vectors u(s) runs at the peak amplitude
// A = min_c MaxRabi_c / max_s |u_c(s)|: a channel with a low Rabi limit
// that the loop drives hard slows the whole gate down. Loops with
// A ≥ minAmplitudeShare · ref cost nothing, where ref is the largest Rabi
// limit capped at the amplitude the base point itself allows (every loop
// passes through it); below that the penalty grows as the square of the
// shortfall relative to ref. With equal limits no loop is penalised,
// since |u_c| ≤ 1.
// It returns nil for spin schemes, whose field magnitude is fixed. The
// penalty keeps its own copy of the shape, so the search must call it
// from one goroutine at a time (it does).
func amplitudePenalty(sc *holonomy.Scheme, shape optimize.Shape, maxRabi []float64) func([]float64) float64 {
	if shape.Control().Kind == optimize.FieldSphere || len(maxRabi) != len(sc.Channels) {
		return nil
	}
	ref := 0.0
	for _, r := range maxRabi {
		ref = math.Max(ref, r)
	}
	equal := true
	for _, r := range maxRabi {
		equal = equal && r == ref
	}
	if equal || ref <= 0 {
		return nil
	}
	own := shape.Clone()
	p := sc.NewPoint()
	// Every loop passes through the base point: the amplitude it allows is
	// the most any loop can have.
	own.Point(0, p)
	for c, d := range p.Drive {
		if a := cmplx.Abs(d); a > 0 {
			ref = math.Min(ref, maxRabi[c]/a)
		}
	}
	peak := make([]float64, len(sc.Channels))
	return func(x []float64) float64 {
		own.SetParams(x)
		for c := range peak {
			peak[c] = 0
		}
		for j := 0; j < penaltyPoints; j++ {
			own.Point(float64(j)/penaltyPoints, p)
			for c, d := range p.Drive {
				peak[c] = math.Max(peak[c], cmplx.Abs(d))
			}
		}
		amp := math.Inf(1)
		for c, u := range peak {
			if u > 0 {
				amp = math.Min(amp, maxRabi[c]/u)
			}
		}
		short := minAmplitudeShare - amp/ref
		if short <= 0 {
			return 0
		}
		return short * short
	}
}

// simulateEnsemble evaluates the robust design's error ensemble on the
// built waveform: the ideal model of the quantised waveform with each
// member's common amplitude error and detuning error.
func simulateEnsemble(spc *spec.Spec, w *waveform.Waveform, r *RobustSummary) error {
	rb := spc.Search.Robust
	sim := waveform.NewSimulator(w)
	out := new(waveform.Outcome)
	r.Built, r.BuiltMean, r.BuiltWorst = nil, 0, 0
	for _, e := range []float64{-rb.Amplitude, 0, rb.Amplitude} {
		for _, d := range []float64{-rb.Detuning, 0, rb.Detuning} {
			if (rb.Amplitude == 0 && e != 0) || (rb.Detuning == 0 && d != 0) {
				continue
			}
			m := waveform.ErrorModel{AmplitudeError: e}
			if rb.DetuningKind == spec.TwoPhoton {
				m.TwoPhotonDetuning = d
			} else {
				m.OnePhotonDetuning = d
			}
			if err := sim.Run(m, out); err != nil {
				return fmt.Errorf("spec %s: robust design: %w", spc.File, err)
			}
			inf := 1 - out.Fidelity
			r.Built = append(r.Built, EnsembleMember{Amplitude: e, Detuning: d, Kind: rb.DetuningKind.String(), Infidelity: inf})
			r.BuiltMean += inf
			r.BuiltWorst = math.Max(r.BuiltWorst, inf)
		}
	}
	r.BuiltMean /= float64(len(r.Built))
	return nil
}

// unitScheme returns a copy of sc for the loop search at unit scale: each
// static level detuning (rad/s) divided by 2π·refHz, the peak Rabi
// frequency the timing stage aims at, and no decay (the search is about
// the coherent holonomy).
func unitScheme(sc *holonomy.Scheme, refHz float64) *holonomy.Scheme {
	u := *sc
	u.Levels = append([]holonomy.Level(nil), sc.Levels...)
	for k := range u.Levels {
		if refHz > 0 {
			u.Levels[k].Detuning /= 2 * math.Pi * refHz
		}
		u.Levels[k].Decay = 0
	}
	return &u
}

// totalEvaluations is the search's whole evaluation budget: the spec's
// search.evaluations per start times search.restarts, capped at
// MaxTotalEvaluations.
func totalEvaluations(spc *spec.Spec) int {
	n := spc.Search.Evaluations * max(1, spc.Search.Restarts)
	return min(n, spec.MaxTotalEvaluations)
}

// searchError classifies an error from the search stage.
func searchError(spc *spec.Spec, err error) error {
	var ue *optimize.UnreachableError
	switch {
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return err
	case errors.As(err, &ue):
		return &InfeasibleError{Err: fmt.Errorf("spec %s: target %s: %w", spc.File, spc.Target.Label, err)}
	case errors.Is(err, optimize.ErrNotConverged):
		return &InfeasibleError{Err: fmt.Errorf("spec %s: target %s: the search did not reach search.target_infidelity %g "+
			"(raise search.restarts or search.evaluations, try another search.seed or loop family, or relax the target): %w",
			spc.File, spc.Target.Label, spc.Search.TargetInfidelity, err)}
	}
	return &InfeasibleError{Err: fmt.Errorf("spec %s: loop search: %w", spc.File, err)}
}

// robustEnsemble is the 3×3 grid of amplitude errors ±amp and detuning
// errors ±det (in units of the peak Rabi frequency, the search's scale) on
// the levels the spec's robust detuning kind moves.
func robustEnsemble(spc *spec.Spec, amp, det float64) optimize.Ensemble {
	sc := spc.Scheme
	levels := spc.Excited
	if spc.Search.Robust.DetuningKind == spec.TwoPhoton && len(sc.Computational) > 1 {
		levels = sc.Computational[1:2]
	}
	var ens optimize.Ensemble
	for _, e := range []float64{-amp, 0, amp} {
		for _, d := range []float64{-det, 0, det} {
			if (amp == 0 && e != 0) || (det == 0 && d != 0) {
				continue
			}
			p := optimize.Perturbation{Amplitude: make([]float64, len(sc.Channels)), Detuning: make([]float64, len(sc.Levels))}
			for c := range p.Amplitude {
				p.Amplitude[c] = e
			}
			for _, k := range levels {
				p.Detuning[k] = d
			}
			ens = append(ens, p)
		}
	}
	return ens
}

func robustSummary(r *optimize.RobustReport) *RobustSummary {
	if r == nil {
		return nil
	}
	return &RobustSummary{
		Members:      len(r.Members),
		NominalMean:  r.NominalMean,
		RobustMean:   r.RobustMean,
		NominalWorst: r.NominalWorst,
		RobustWorst:  r.RobustWorst,
		Improvement:  finiteOrZero(r.Improvement()),
		Insensitive:  r.Insensitive,
		Kept:         r.Kept,
	}
}

// hardwareOf converts the spec's hardware section for package waveform.
// The waveform stage has one slew limit for all channels: the smallest.
func hardwareOf(spc *spec.Spec) waveform.Hardware {
	h := spc.Hardware
	slew := math.Inf(1)
	for _, s := range h.MaxSlew {
		slew = math.Min(slew, s)
	}
	return waveform.Hardware{
		MaxRabi:     append([]float64(nil), h.MaxRabi...),
		MaxSlew:     slew,
		SampleRate:  h.SampleRate,
		Granularity: h.Granularity,
		MaxSamples:  h.MaxSamples,
		DACBits:     h.DACBits,
		FullScale:   append([]float64(nil), h.FullScale...),
		MinDuration: h.MinDuration,
		MaxDuration: h.MaxDuration,
	}
}

// errorModelOf converts the spec's verification errors. The decay rate is
// the largest Level.Decay among the excited levels.
func errorModelOf(spc *spec.Spec) waveform.ErrorModel {
	e := spc.Errors
	m := waveform.ErrorModel{
		OnePhotonDetuning: e.OnePhoton,
		TwoPhotonDetuning: e.TwoPhoton,
		Dephasing:         e.Dephasing,
		Unquantized:       !e.Quantise,
	}
	switch e.Filter {
	case spec.GaussianFilter:
		m.RiseTime, m.Filter = e.RiseTime, waveform.GaussianFilter
	case spec.FirstOrderFilter:
		m.RiseTime, m.Filter = e.RiseTime, waveform.FirstOrderFilter
	}
	m.PhaseStep = e.PhaseStep
	common := true
	for _, a := range e.Amplitude {
		if a != e.Amplitude[0] {
			common = false
		}
	}
	if len(e.Amplitude) > 0 {
		if common {
			m.AmplitudeError = e.Amplitude[0]
		} else {
			m.ChannelErrors = append([]float64(nil), e.Amplitude...)
		}
	}
	for _, k := range spc.Excited {
		m.Decay = math.Max(m.Decay, spc.Scheme.Levels[k].Decay)
	}
	return m
}

// checkModels validates the error model and the model at both ends of
// every sweep range before any simulation runs, so that bad input is
// reported as such.
func checkModels(w *waveform.Waveform, m waveform.ErrorModel, sp sweepPlan) error {
	if err := w.CheckModel(m); err != nil {
		return err
	}
	ranges := []waveform.Range{sp.amplitude, sp.detuning, sp.mapX, sp.mapY}
	if sp.oneExtra != nil {
		ranges = append(ranges, *sp.oneExtra)
	}
	for _, r := range ranges {
		if err := r.Validate(); err != nil {
			return err
		}
		for _, v := range []float64{r.Min, r.Max} {
			e := m
			switch r.Axis {
			case waveform.AmplitudeAxis:
				e.AmplitudeError = v
			case waveform.OnePhotonAxis:
				e.OnePhotonDetuning = v
			case waveform.TwoPhotonAxis:
				e.TwoPhotonDetuning = v
			}
			if err := w.CheckModel(e); err != nil {
				return fmt.Errorf("sweep of the %s to %g: %w", r.Axis, v, err)
			}
		}
	}
	return nil
}

// sweepPlan lists the robustness analysis to run.
type sweepPlan struct {
	amplitude, detuning waveform.Range
	oneExtra            *waveform.Range // a one-photon sweep, geometric only
	mapX, mapY          waveform.Range
}

// sweepsOf plans the robustness analysis of a gate of the given duration
// (s). The comparison with the dynamical gate runs along the amplitude
// error and the two-photon detuning. When the spec sweeps the one-photon
// detuning, that sweep and the map use it, and the comparison's
// two-photon axis spans ±1/duration: a two-photon detuning δ adds a phase
// of order 2πδ·duration, so this range holds the F ≥ 0.999 edge of the
// geometric gate, and edges beyond it are found by the comparison's
// outward search.
func sweepsOf(spc *spec.Spec, duration float64) sweepPlan {
	s := spc.Sweeps
	amp := waveform.Range{Axis: waveform.AmplitudeAxis, Min: -s.Amplitude.Span, Max: s.Amplitude.Span, Points: s.Amplitude.Points}
	det := waveform.Range{Axis: waveform.TwoPhotonAxis, Min: -s.Detuning.Span, Max: s.Detuning.Span, Points: s.Detuning.Points}
	p := sweepPlan{
		amplitude: amp,
		detuning:  det,
		mapX:      waveform.Range{Axis: waveform.AmplitudeAxis, Min: amp.Min, Max: amp.Max, Points: s.MapAmplitude},
		mapY:      waveform.Range{Axis: waveform.TwoPhotonAxis, Min: det.Min, Max: det.Max, Points: s.MapDetuning},
	}
	if s.DetuningKind == spec.OnePhoton {
		one := det
		one.Axis = waveform.OnePhotonAxis
		p.oneExtra = &one
		p.mapY.Axis = waveform.OnePhotonAxis
		if duration > 0 {
			p.detuning.Min, p.detuning.Max = -1/duration, 1/duration
		}
	}
	return p
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
