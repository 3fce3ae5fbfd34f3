package design

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/sim"
)

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
		adiabatic = adiabatic || s.Kind == waveform.AdiabaticSegment
	}
	goal := waveform.DefaultMinFidelity
	if plan.MinFidelity != 0 {
		goal = plan.MinFidelity
	}
	ts := &timingSearch{
		target: 1 - timingMargin*(1-goal), log: log, bestF: -1,
		validAlpha: math.NaN(), tooLoose: math.NaN(), tooLong: math.NaN(), lastF: math.NaN(),
	}
	alpha := waveform.DefaultAdiabaticity
	for round := 0; round < maxTimingRounds; round++ {
		plan.Adiabaticity = alpha
		w, err := waveform.Build(plan, hw)
		var le *waveform.LimitError
		switch {
		case err != nil && !errors.As(err, &le):
			return nil, fmt.Errorf("spec %s: timing and sampling: %w", spc.File, err)
		case err != nil && (!adiabatic || le.Check.Kind != waveform.SampleCountCheck || le.FileBound):
			return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: hardware: %s", spc.File, describeCheck(le.Check))}
		case err != nil:
			ts.tooLong = math.Max(nanTo(ts.tooLong, 0), alpha) // only the sample count can stop Build
		default:
			if ts.first == nil {
				ts.first = w
			}
			if !adiabatic {
				return w, nil
			}
			if err := ts.classify(w, alpha); err != nil {
				return nil, fmt.Errorf("spec %s: verification: %w", spc.File, err)
			}
		}
		var done bool
		if alpha, done = ts.next(alpha); done {
			if ts.valid != nil {
				return ts.valid, nil
			}
			break
		}
	}
	return ts.result(spc)
}

// timingSearch is the state of timeLoop's search over the adiabaticity
// goal α.
type timingSearch struct {
	target             float64 // fidelity the timing aims at
	log                io.Writer
	valid, best, first *waveform.Waveform
	bestF              float64
	validAlpha         float64 // loosest valid α
	tooLoose           float64 // tightest too-loose α
	tooLong            float64 // loosest too-long α
	lastF              float64
}

// classify verifies w, built for goal alpha, in the ideal model and
// records it as valid, too loose or too long.
func (ts *timingSearch) classify(w *waveform.Waveform, alpha float64) error {
	v, err := sim.Verify(w, sim.ErrorModel{})
	if err != nil {
		return err
	}
	long, other := hardwareFailures(v)
	switch {
	case long:
		ts.tooLong = math.Max(nanTo(ts.tooLong, 0), alpha)
	case other || v.Fidelity < ts.target:
		ts.tooLoose = math.Min(nanTo(ts.tooLoose, math.Inf(1)), alpha)
		ts.lastF = v.Fidelity
		if !other && v.Fidelity > ts.bestF {
			ts.best, ts.bestF = w, v.Fidelity
		}
		if !other {
			logf(ts.log, "fidelity %.6f misses the timing target %.6g at adiabaticity goal %.3g (%s); re-timing",
				v.Fidelity, ts.target, alpha, spec.FormatQuantity(w.Duration(), spec.Time))
		}
	default:
		if math.IsNaN(ts.validAlpha) || alpha > ts.validAlpha {
			ts.valid, ts.validAlpha = w, alpha
		}
	}
	return nil
}

// next returns the next goal after alpha, and done when the search is
// over (converged, or no goal fits between the limits).
func (ts *timingSearch) next(alpha float64) (float64, bool) {
	switch {
	case !math.IsNaN(ts.validAlpha) && !math.IsNaN(ts.tooLoose):
		if ts.tooLoose/ts.validAlpha < 1.1 {
			return alpha, true
		}
		return math.Sqrt(ts.validAlpha * ts.tooLoose), false
	case !math.IsNaN(ts.validAlpha):
		if ts.validAlpha >= maxAdiabaticity {
			return alpha, true
		}
		return math.Min(maxAdiabaticity, ts.validAlpha*1.25), false
	case !math.IsNaN(ts.tooLong) && !math.IsNaN(ts.tooLoose):
		// No goal fits between the two limits when they are this close.
		return math.Sqrt(ts.tooLong * ts.tooLoose), ts.tooLoose <= ts.tooLong*1.02
	case !math.IsNaN(ts.tooLong):
		return math.Min(maxAdiabaticity, ts.tooLong*1.25), ts.tooLong >= maxAdiabaticity
	}
	f := 0.9
	if !math.IsNaN(ts.lastF) && ts.lastF < 1 {
		f = math.Max(0.25, math.Min(0.9, 0.7*math.Sqrt((1-ts.target)/(1-ts.lastF))))
	}
	return ts.tooLoose * f, false
}

// result returns the valid waveform with the loosest goal, else the one
// with the best fidelity among those that fit the hardware, else the
// first built.
func (ts *timingSearch) result(spc *spec.Spec) (*waveform.Waveform, error) {
	switch {
	case ts.valid != nil:
		return ts.valid, nil
	case ts.best != nil:
		logf(ts.log, "the timing target %.6g is out of reach within the hardware limits; keeping the best waveform, F = %.6f", ts.target, ts.bestF)
		return ts.best, nil
	case ts.first != nil:
		return ts.first, nil
	}
	return nil, &InfeasibleError{Err: fmt.Errorf("spec %s: no adiabaticity goal up to %g gives a gate within the sample limit", spc.File, maxAdiabaticity)}
}

// hardwareFailures sorts the failed hardware checks of v: long reports a
// gate that is too long (duration or sample count), other any other
// failed hardware limit.
func hardwareFailures(v *sim.Verification) (long, other bool) {
	for _, c := range v.Checks {
		switch {
		case c.Pass || !c.Kind.Hardware():
		case c.Kind.Long():
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
