package sim

import (
	"math"

	"github.com/loopgate/loopgate/waveform"
)

// Verification is the outcome of Verify: the simulated figures of merit
// and every check against the goals and the hardware limits.
type Verification struct {
	// Model is the error model the figures were computed with.
	Model ErrorModel
	// Fidelity, Leakage, PeakAux and PeakExcited are those of Figures.
	Fidelity, Leakage float64
	PeakAux           []float64
	PeakExcited       []float64
	// Adiabaticity is the measured adiabaticity parameter (see
	// Waveform.MeasureAdiabaticity), NaN without adiabatic segments.
	Adiabaticity float64
	// Checks lists the fidelity goal, the adiabaticity goal (adiabatic
	// segments only) and the hardware checks, in that order.
	Checks []waveform.Check
}

// Pass reports whether every check passes.
func (v *Verification) Pass() bool {
	for _, c := range v.Checks {
		if !c.Pass {
			return false
		}
	}
	return true
}

// Same reports whether v and o hold the same model, figures and checks,
// bit for bit (a NaN adiabaticity equals a NaN). The verify command uses
// it to confirm that a waveform file reproduces its recorded results.
func (v *Verification) Same(o *Verification) bool {
	eq := func(a, b float64) bool {
		return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
	}
	eqs := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if !eq(a[i], b[i]) {
				return false
			}
		}
		return true
	}
	m, n := v.Model, o.Model
	if !eq(m.AmplitudeError, n.AmplitudeError) || !eqs(m.ChannelErrors, n.ChannelErrors) || !eq(m.OnePhotonDetuning, n.OnePhotonDetuning) ||
		!eq(m.TwoPhotonDetuning, n.TwoPhotonDetuning) || !eq(m.Decay, n.Decay) || !eq(m.Dephasing, n.Dephasing) ||
		!eq(m.RiseTime, n.RiseTime) || m.FilterName() != n.FilterName() || m.SubSteps != n.SubSteps ||
		!eq(m.PhaseStep, n.PhaseStep) || m.SkipDAC != n.SkipDAC {
		return false
	}
	if !eq(v.Fidelity, o.Fidelity) || !eq(v.Leakage, o.Leakage) || !eqs(v.PeakAux, o.PeakAux) ||
		!eqs(v.PeakExcited, o.PeakExcited) || !eq(v.Adiabaticity, o.Adiabaticity) || len(v.Checks) != len(o.Checks) {
		return false
	}
	for i, c := range v.Checks {
		d := o.Checks[i]
		if c.Name != d.Name || !eq(c.Value, d.Value) || !eq(c.Limit, d.Limit) || !eq(c.Margin, d.Margin) ||
			c.Unit != d.Unit || c.Lower != d.Lower || c.Pass != d.Pass {
			return false
		}
	}
	return true
}

// Failed returns the checks that fail.
func (v *Verification) Failed() []waveform.Check {
	var out []waveform.Check
	for _, c := range v.Checks {
		if !c.Pass {
			out = append(out, c)
		}
	}
	return out
}

// Verify simulates w under m, measures its adiabaticity and checks the
// results against the waveform's goals and hardware limits. A failed
// check is not an error: the caller inspects Pass and must not use a
// waveform that fails. Errors are reserved for an invalid model or a
// waveform whose adiabaticity cannot be measured.
func Verify(w *waveform.Waveform, m ErrorModel) (*Verification, error) {
	out := new(Figures)
	if err := NewSimulator(w).Run(m, out); err != nil {
		return nil, err
	}
	alpha, err := w.MeasureAdiabaticity()
	if err != nil {
		return nil, err
	}
	v := &Verification{
		Model:        m,
		Fidelity:     out.Fidelity,
		Leakage:      out.Leakage,
		PeakAux:      out.PeakAux,
		PeakExcited:  out.PeakExcited,
		Adiabaticity: alpha,
	}
	if m.ChannelErrors != nil {
		v.Model.ChannelErrors = append([]float64(nil), m.ChannelErrors...)
	}
	v.Checks = append(v.Checks, waveform.NewCheck(waveform.FidelityCheck, "fidelity", out.Fidelity, w.MinFidelity, ""))
	if !math.IsNaN(alpha) {
		v.Checks = append(v.Checks, waveform.NewCheck(waveform.AdiabaticityCheck, "adiabaticity", alpha, w.Adiabaticity, ""))
	}
	v.Checks = append(v.Checks, w.HardwareChecks()...)
	return v, nil
}
