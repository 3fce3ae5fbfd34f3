package design

import (
	"context"
	"fmt"
	"io"

	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/dynamical"
	"github.com/loopgate/loopgate/waveform/robust"
	"github.com/loopgate/loopgate/waveform/sim"
)

// analysis holds every figure computed from one waveform.
type analysis struct {
	model      sim.ErrorModel
	ideal      *sim.Verification // ideal model of the quantised waveform
	withErrors *sim.Verification // the spec's (or the flags') error model
	traces     *sim.Figures      // ideal model, with population traces
	budget     []robust.BudgetRow
	compare    *dynamical.Comparison // nil when sweeps are off
	extra      *robust.Sweep         // one-photon sweep, geometric only
	errMap     *robust.ErrorMap
}

// Progress is one report on a batch of robustness simulations.
type Progress = robust.Progress

// analyse verifies w with the ideal model and with model, computes the
// error budget and, when sweeps is true, the robustness sweeps, the map
// and the comparison with the dynamical gate. Every stage is
// deterministic whatever the number of cores.
func analyse(ctx context.Context, w *waveform.Waveform, model sim.ErrorModel, sp sweepPlan, sweeps bool, progress func(Progress), log io.Writer) (*analysis, error) {
	a := &analysis{model: model}
	var err error
	if a.ideal, err = sim.Verify(w, sim.ErrorModel{}); err != nil {
		return nil, fmt.Errorf("verification (ideal model): %w", err)
	}
	logf(log, "ideal model: fidelity %.8f, leakage %.2e", a.ideal.Fidelity, a.ideal.Leakage)
	if a.withErrors, err = sim.Verify(w, model); err != nil {
		return nil, fmt.Errorf("verification (with errors): %w", err)
	}
	logf(log, "with errors: fidelity %.8f, leakage %.2e", a.withErrors.Fidelity, a.withErrors.Leakage)
	if a.traces, err = sim.Simulate(w, sim.ErrorModel{}); err != nil {
		return nil, fmt.Errorf("population traces: %w", err)
	}
	opt := &robust.SweepOptions{OnProgress: progress}
	if a.budget, err = robust.Budget(ctx, w, model, opt); err != nil {
		return nil, fmt.Errorf("error budget: %w", err)
	}
	if !sweeps {
		return a, nil
	}
	logf(log, "robustness: sweeps, %d×%d map and the dynamical-gate comparison", sp.mapX.Points, sp.mapY.Points)
	if a.compare, err = dynamical.Compare(ctx, w, []robust.Range{sp.amplitude, sp.detuning}, opt); err != nil {
		return nil, err
	}
	if sp.oneExtra != nil {
		if a.extra, err = robust.SweepAxis(ctx, w, *sp.oneExtra, opt); err != nil {
			return nil, fmt.Errorf("robustness sweep: %w", err)
		}
	}
	if a.errMap, err = robust.SweepMap(ctx, w, sp.mapX, sp.mapY, opt); err != nil {
		return nil, err
	}
	return a, nil
}
