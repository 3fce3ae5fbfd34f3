package optimize

import (
	"context"
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// Perturbation is one member of an error ensemble, in unit scale (drives
// normalised to a peak Rabi frequency of 1, detunings in units of it).
type Perturbation struct {
	// Amplitude holds relative amplitude errors ε: the drive of channel c
	// becomes (1+ε_c)·Drive_c. A single value applies to every channel;
	// otherwise there is one per channel. Nil means none. Only drives are
	// scaled: on a field-direction sphere that is the transverse field,
	// which tilts the field (a scale of the whole field would leave its
	// direction, and so the holonomy, unchanged).
	Amplitude []float64
	// Detuning is added to each level's detuning (one value per level, in
	// units of the peak Rabi frequency). Nil means none.
	Detuning []float64
}

// Ensemble is a list of perturbations. A robust design minimises the mean
// infidelity over its members, with equal weights.
type Ensemble []Perturbation

// GridEnsemble returns the grid of a common amplitude error
// ε ∈ {−amp, 0, +amp} times a detuning δ ∈ {−det, 0, +det} applied along
// pattern (one weight per level: the member's detunings are δ·pattern; for
// a one-photon detuning of a tripod put 1 on its excited level). A zero amp
// or det collapses that axis to {0}; the member without errors is always
// included.
func GridEnsemble(amp, det float64, pattern []float64) Ensemble {
	axis := func(x float64) []float64 {
		if x == 0 {
			return []float64{0}
		}
		return []float64{-x, 0, x}
	}
	var e Ensemble
	for _, a := range axis(amp) {
		for _, d := range axis(det) {
			var p Perturbation
			if a != 0 {
				p.Amplitude = []float64{a}
			}
			if d != 0 {
				p.Detuning = make([]float64, len(pattern))
				for k, w := range pattern {
					p.Detuning[k] = d * w
				}
			}
			e = append(e, p)
		}
	}
	return e
}

// check reports whether p fits sc.
func (p Perturbation) check(sc *holonomy.Scheme) error {
	if n := len(p.Amplitude); n != 0 && n != 1 && n != len(sc.Channels) {
		return fmt.Errorf("amplitude errors: %d values for %d channels (give 1 or %d)", n, len(sc.Channels), len(sc.Channels))
	}
	if n := len(p.Detuning); n != 0 && n != len(sc.Levels) {
		return fmt.Errorf("detunings: %d values for %d levels", n, len(sc.Levels))
	}
	for _, v := range p.Amplitude {
		if math.IsNaN(v) || math.IsInf(v, 0) || v <= -1 {
			return fmt.Errorf("amplitude error %g is not a finite value above −1", v)
		}
	}
	for _, v := range p.Detuning {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("detuning %g is not finite", v)
		}
	}
	return nil
}

// apply returns a copy of sc with p's detunings added to its levels, and
// the per-channel amplitude factors 1+ε_c.
func (p Perturbation) apply(sc *holonomy.Scheme) (*holonomy.Scheme, []float64) {
	c := *sc
	c.Levels = append([]holonomy.Level(nil), sc.Levels...)
	for k := range p.Detuning {
		c.Levels[k].Detuning += p.Detuning[k]
	}
	scale := make([]float64, len(sc.Channels))
	for i := range scale {
		scale[i] = 1
		switch len(p.Amplitude) {
		case 1:
			scale[i] += p.Amplitude[0]
		case len(scale):
			scale[i] += p.Amplitude[i]
		}
	}
	return &c, scale
}

func (e Ensemble) check(sc *holonomy.Scheme) error {
	for i, p := range e {
		if err := p.check(sc); err != nil {
			return fmt.Errorf("optimize: ensemble member %d: %w", i, err)
		}
	}
	return nil
}

// RobustReport compares a robust design with the nominal design at the
// members of the ensemble it was made for.
type RobustReport struct {
	// Members is the ensemble.
	Members Ensemble
	// NominalParams are the parameters of the nominal design (the robust
	// design's are in the result).
	NominalParams []float64
	// Nominal[i] and Robust[i] are the infidelities of the nominal and the
	// robust design at member i.
	Nominal, Robust []float64
	// NominalMean and RobustMean are their means over the members, and
	// NominalWorst and RobustWorst their largest values.
	NominalMean, RobustMean, NominalWorst, RobustWorst float64
	// Evaluations counts the objective evaluations of the robust stage
	// (each one evaluates every member).
	Evaluations int
	// Insensitive reports that the nominal design's infidelity is the same
	// at every member (spread below 1e-3 of the target infidelity), so the
	// ensemble's errors do not act on this gate and no robust search was
	// run: for the adiabatic holonomy, a common amplitude scale and a
	// detuning of the excited level leave the dark states unchanged.
	Insensitive bool
	// Kept reports that the robust search did not lower the mean
	// infidelity, so the nominal design was kept.
	Kept bool
}

// Improvement returns NominalMean/RobustMean, the factor by which the
// robust design lowers the mean infidelity over the ensemble (1 when it
// does not; +Inf when the robust mean is zero and the nominal is not).
func (r *RobustReport) Improvement() float64 {
	if r.RobustMean == r.NominalMean {
		return 1
	}
	if r.RobustMean == 0 {
		return math.Inf(1)
	}
	return r.NominalMean / r.RobustMean
}

func meanMax(v []float64) (mean, worst float64) {
	for _, x := range v {
		mean += x
		worst = math.Max(worst, x)
	}
	if len(v) > 0 {
		mean /= float64(len(v))
	}
	return mean, worst
}

// robustStage runs the robust Nelder–Mead stage from the nominal optimum x0.
// eval is the search objective (mean infidelity over the members plus
// penalties); measure returns accurate per-member infidelities.
func robustStage(ctx context.Context, members Ensemble, x0 []float64, eval evalFunc, measure func([]float64) []float64,
	maxEvals int, simplex, target float64) (*RobustReport, []float64, error) {
	rep := &RobustReport{Members: members, Nominal: measure(x0)}
	rep.NominalMean, rep.NominalWorst = meanMax(rep.Nominal)
	lo := math.Inf(1)
	for _, v := range rep.Nominal {
		lo = math.Min(lo, v)
	}
	x := append([]float64(nil), x0...)
	if rep.NominalWorst-lo <= 1e-3*target {
		rep.Insensitive = true
	} else {
		dim := len(x0)
		ms := &multiStart{
			dim: dim, restarts: 1, maxEvals: maxEvals, simplex: simplex,
			patience: 30 * dim, progress: 1e-4,
			starts: [][]float64{x0}, eval: eval,
		}
		best, err := ms.run(ctx)
		if err != nil {
			return nil, nil, err
		}
		rep.Evaluations = best.evals
		x = best.x
	}
	rep.Robust = measure(x)
	rep.RobustMean, rep.RobustWorst = meanMax(rep.Robust)
	if !rep.Insensitive && rep.RobustMean >= rep.NominalMean {
		rep.Kept = true
		x = append(x[:0], x0...)
		rep.Robust = append(rep.Robust[:0], rep.Nominal...)
		rep.RobustMean, rep.RobustWorst = rep.NominalMean, rep.NominalWorst
	}
	return rep, x, nil
}
