package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// Verification is the outcome of Verify: the simulated figures of merit
// and every check against the goals and the hardware limits.
type Verification struct {
	// Model is the error model the figures were computed with.
	Model ErrorModel
	// Fidelity, Leakage, PeakAux and PeakExcited are those of Outcome.
	Fidelity, Leakage float64
	PeakAux           []float64
	PeakExcited       []float64
	// Adiabaticity is the measured adiabaticity parameter (see
	// Waveform.MeasureAdiabaticity), NaN without adiabatic segments.
	Adiabaticity float64
	// Checks lists the fidelity goal, the adiabaticity goal (adiabatic
	// segments only) and the hardware checks, in that order.
	Checks []Check
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
		!eq(m.PhaseStep, n.PhaseStep) || m.Unquantized != n.Unquantized {
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
func (v *Verification) Failed() []Check {
	var out []Check
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
func Verify(w *Waveform, m ErrorModel) (*Verification, error) {
	out := new(Outcome)
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
	v.Checks = append(v.Checks, NewCheck("fidelity", out.Fidelity, w.MinFidelity, "", boundMin))
	if !math.IsNaN(alpha) {
		v.Checks = append(v.Checks, NewCheck("adiabaticity", alpha, w.Adiabaticity, "", boundMax))
	}
	v.Checks = append(v.Checks, w.HardwareChecks()...)
	return v, nil
}

// MeasureAdiabaticity returns the adiabaticity parameter
//
//	α = max_k max_{C, n∉C} ‖P_C ∂_tH|n⟩‖ / (E_C − E_n)²
//
// over the interior samples k of every adiabatic segment, where the
// eigendecomposition is that of H at sample k (unquantised drive) and
// ∂_tH is the central difference (H_{k+1} − H_{k−1})/(2Δt). The working
// clusters C are chosen by their weight on the computational levels at
// every ramp sample and, along the loop, are the clusters chosen at its
// first sample followed by their places in the ascending spectrum. It
// returns NaN when the waveform has no adiabatic segment and an error when
// the gap closes.
func (w *Waveform) MeasureAdiabaticity() (float64, error) {
	sc := w.Scheme
	n := sc.Dim()
	sp := newSpectrum(sc)
	h, hp, hm := holonomy.NewMat(n, n), holonomy.NewMat(n, n), holonomy.NewMat(n, n)
	pt := sc.NewPoint()
	set := func(dst *holonomy.Mat, k int) {
		w.unquantizedPoint(k, pt)
		sc.Hamiltonian(dst, pt)
	}
	alpha := math.NaN()
	dt := w.Dt()
	for si, span := range w.Spans {
		if span.Kind != Adiabatic {
			continue
		}
		if math.IsNaN(alpha) {
			alpha = 0
		}
		loop0, loop1 := span.First+span.Ramp, span.First+span.Len-span.Ramp
		// Working clusters of the loop, chosen at its first sample.
		set(h, loop0)
		sp.factor(h)
		if err := sp.choose(); err != nil {
			return 0, fmt.Errorf("segment %d, first loop sample %d: %w", si, loop0, err)
		}
		loopWork := append([][2]int(nil), sp.work...)
		for k := span.First + 1; k < span.First+span.Len-1; k++ {
			set(h, k)
			set(hp, k+1)
			set(hm, k-1)
			for i := range hp.Data {
				hp.Data[i] = (hp.Data[i] - hm.Data[i]) / complex(2*dt, 0)
			}
			sp.factor(h)
			if k >= loop0 && k < loop1 {
				sp.work = append(sp.work[:0], loopWork...)
			} else if err := sp.choose(); err != nil {
				return 0, fmt.Errorf("segment %d, ramp sample %d: %w", si, k, err)
			}
			thr := 1e-9 * (holonomy.FrobeniusNorm(hp) + 1e-300)
			kappa, gap := sp.coupling(hp, thr)
			if math.IsInf(kappa, 1) || (k >= loop0 && k < loop1 && gap <= sp.tol()) {
				return 0, fmt.Errorf("segment %d, sample %d: %w", si, k, &holonomy.GapError{S: float64(k-loop0) / float64(max(1, loop1-loop0)), V: math.NaN(), Gap: gap, Tol: sp.tol()})
			}
			alpha = math.Max(alpha, kappa)
		}
	}
	return alpha, nil
}

// unquantizedPoint writes the control point of sample k from the
// unquantised samples into pt (rad/s): drives 2π(I + iQ) and the
// controlled detuning tracks (zero for levels without one).
func (w *Waveform) unquantizedPoint(k int, pt holonomy.Point) {
	for c := range pt.Drive {
		pt.Drive[c] = complex(2*math.Pi*w.I[c][k], 2*math.Pi*w.Q[c][k])
	}
	for l := range pt.Detuning {
		pt.Detuning[l] = 0
		if w.Detuning[l] != nil {
			pt.Detuning[l] = 2 * math.Pi * w.Detuning[l][k]
		}
	}
}
