package design

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/optimize"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/sim"
)

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
	sc := unitScheme(spc.Scheme, ref)
	var ens optimize.Ensemble
	if spc.Search.Robust.Enabled() {
		ens = robustEnsemble(spc, spc.Search.Robust.Amplitude, spc.Search.Robust.Detuning/ref)
	}
	if spc.Method == spec.Nonadiabatic {
		return solveCyclic(ctx, spc, sc, seed, ens)
	}
	return solveAdiabatic(ctx, spc, sc, seed, ens)
}

// solveCyclic searches the cyclic Λ pulses of the nonadiabatic method on
// the unit-scale scheme sc.
func solveCyclic(ctx context.Context, spc *spec.Spec, sc *holonomy.Scheme, seed uint64, ens optimize.Ensemble) (*solution, error) {
	target := spc.Target.U
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
			Kind:  waveform.CyclicSegment,
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
}

// searchShape returns the loop family of the adiabatic search on the
// unit-scale scheme sc.
func searchShape(spc *spec.Spec, sc *holonomy.Scheme) (optimize.Shape, error) {
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
	if spc.Search.Family == spec.Polygon {
		return optimize.NewPolygon(sp, spc.Search.Vertices), nil
	}
	return optimize.NewFourier(sp, spc.Search.Harmonics), nil
}

// solveAdiabatic searches the loop of the adiabatic method on the
// unit-scale scheme sc.
func solveAdiabatic(ctx context.Context, spc *spec.Spec, sc *holonomy.Scheme, seed uint64, ens optimize.Ensemble) (*solution, error) {
	target := spc.Target.U
	shape, err := searchShape(spc, sc)
	if err != nil {
		return nil, err
	}
	family := spc.Search.Family.String()
	s := &optimize.Search{
		Scheme:           sc,
		Target:           target,
		Shape:            shape,
		Penalty:          amplitudePenalty(sc, shape, spc.Hardware.MaxRabi),
		Restarts:         spc.Search.Restarts,
		Seed:             seed,
		TargetInfidelity: spc.Search.TargetInfidelity,
		MaxEvaluations:   totalEvaluations(spc),
		Points:           min(shape.NumPoints(), spc.Search.LoopPoints),
		Ensemble:         ens,
	}
	res, err := s.Run(ctx)
	if err != nil {
		return nil, searchError(spc, err)
	}
	plan := &waveform.Plan{
		Scheme:   spc.Scheme,
		Target:   target,
		Segments: []waveform.Segment{{Kind: waveform.AdiabaticSegment, Shape: res.Loop}},
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
	sm := sim.NewSimulator(w)
	out := new(sim.Figures)
	r.Built, r.BuiltMean, r.BuiltWorst = nil, 0, 0
	for _, e := range []float64{-rb.Amplitude, 0, rb.Amplitude} {
		for _, d := range []float64{-rb.Detuning, 0, rb.Detuning} {
			if (rb.Amplitude == 0 && e != 0) || (rb.Detuning == 0 && d != 0) {
				continue
			}
			m := sim.ErrorModel{AmplitudeError: e}
			if rb.DetuningKind == spec.TwoPhoton {
				m.TwoPhotonDetuning = d
			} else {
				m.OnePhotonDetuning = d
			}
			if err := sm.Run(m, out); err != nil {
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
	case errors.Is(err, optimize.ErrTargetNotReached):
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
