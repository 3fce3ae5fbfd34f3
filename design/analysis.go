package design

import (
	"context"
	"fmt"
	"io"

	"github.com/loopgate/loopgate/waveform"
)

// analysis holds every figure computed from one waveform.
type analysis struct {
	model      waveform.ErrorModel
	ideal      *waveform.Verification // ideal model of the quantised waveform
	withErrors *waveform.Verification // the spec's (or the flags') error model
	traces     *waveform.Outcome      // ideal model, with population traces
	budget     []waveform.BudgetRow
	compare    *waveform.Comparison // nil when sweeps are off
	extra      *waveform.Sweep      // one-photon sweep, geometric only
	errMap     *waveform.ErrorMap
}

// analyse verifies w with the ideal model and with model, computes the
// error budget and, when sweeps is true, the robustness sweeps, the map
// and the comparison with the dynamical gate. Every stage is
// deterministic whatever the number of cores.
func analyse(ctx context.Context, w *waveform.Waveform, model waveform.ErrorModel, sp sweepPlan, sweeps bool, progress, log io.Writer) (*analysis, error) {
	a := &analysis{model: model}
	var err error
	if a.ideal, err = waveform.Verify(w, waveform.ErrorModel{}); err != nil {
		return nil, fmt.Errorf("verification (ideal model): %w", err)
	}
	logf(log, "ideal model: fidelity %.8f, leakage %.2e", a.ideal.Fidelity, a.ideal.Leakage)
	if a.withErrors, err = waveform.Verify(w, model); err != nil {
		return nil, fmt.Errorf("verification (with errors): %w", err)
	}
	logf(log, "with errors: fidelity %.8f, leakage %.2e", a.withErrors.Fidelity, a.withErrors.Leakage)
	if a.traces, err = waveform.Simulate(w, waveform.ErrorModel{}); err != nil {
		return nil, fmt.Errorf("population traces: %w", err)
	}
	opt := &waveform.SweepOptions{Progress: progress}
	if a.budget, err = waveform.Budget(ctx, w, model, opt); err != nil {
		return nil, fmt.Errorf("error budget: %w", err)
	}
	if !sweeps {
		return a, nil
	}
	logf(log, "robustness: sweeps, %d×%d map and the dynamical-gate comparison", sp.mapX.Points, sp.mapY.Points)
	if a.compare, err = waveform.Compare(ctx, w, []waveform.Range{sp.amplitude, sp.detuning}, opt); err != nil {
		return nil, err
	}
	if sp.oneExtra != nil {
		if a.extra, err = waveform.SweepAxis(ctx, w, *sp.oneExtra, opt); err != nil {
			return nil, fmt.Errorf("robustness sweep: %w", err)
		}
	}
	if a.errMap, err = waveform.SweepMap(ctx, w, sp.mapX, sp.mapY, opt); err != nil {
		return nil, err
	}
	return a, nil
}
