package robust

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/sim"
)

// BudgetRow is one line of an error budget.
type BudgetRow struct {
	// Term names the error term, e.g. "non-adiabaticity" or "loss (decay Γ)".
	Term string
	// Infidelity is the term's share of the infidelity: (1 − F with this
	// term alone) − (1 − F of the ideal model). It may be negative when
	// the term happens to cancel part of the ideal error. For the ideal
	// line it is 1 − F of the ideal model, for the leakage line the ideal
	// model's leakage and for the total line 1 − F with every term on.
	Infidelity float64
	// Alone is 1 − F with this term alone on the ideal model (the ideal
	// error included); equal to Infidelity for the ideal, leakage and
	// total lines.
	Alone float64
	// Note says how the line was computed and with which value.
	Note string
	// Total marks the line with every term on.
	Total bool
}

// Budget splits the infidelity of w under the error model m into its
// terms. Every line is one simulation of the zero-order-hold waveform; the
// simulations run in parallel (opt's Workers, Progress and OnProgress
// apply; its Base and Threshold are not used).
//
// The lines, in order:
//
//   - non-adiabaticity (ideal waveform, for waveforms without adiabatic
//     segments): 1 − F of the ideal model — unquantised samples, no error
//     of any kind. It holds the non-adiabatic transitions of adiabatic
//     segments and whatever design and sampling error the waveform has.
//   - leakage: the leakage 1 − Tr(M†M)/d of the same ideal simulation,
//     i.e. the population left outside the qubit levels. It is part of
//     the line above, not an extra term: F ≤ 1 − leakage for the fidelity
//     of Pedersen, Møller and Mølmer (Phys. Lett. A 367, 47 (2007)),
//     because |Tr M|² ≤ d·Tr(M†M).
//   - loss (decay Γ), dephasing (γ_φ), quantisation (DAC codes instead of
//     unquantised samples), phase resolution (ErrorModel.PhaseStep),
//     bandwidth (the low-pass of ErrorModel.RiseTime and Filter),
//     amplitude error (common and per channel), one-photon detuning and
//     two-photon detuning: each is the ideal model
//     with that one term of m switched on, and the line is the increase
//     of 1 − F over the ideal line. A term that m does not contain (zero
//     rate, zero error, SkipDAC set) has no line.
//   - total: 1 − F with all of m on; its note also gives the sum of the
//     separate lines, which differs from the total when terms interact.
func Budget(ctx context.Context, w *waveform.Waveform, m sim.ErrorModel, opt *SweepOptions) ([]BudgetRow, error) {
	terms := budgetTerms(w, m)
	outs := make([]sim.Figures, len(terms))
	err := RunJobs(ctx, len(terms), opt, "error budget", func(wk *Worker, k int) error {
		out, err := wk.Run(w, terms[k].model)
		if err != nil {
			return err
		}
		outs[k].Fidelity, outs[k].Leakage = out.Fidelity, out.Leakage
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("error budget: %w", err)
	}
	base := 1 - outs[0].Fidelity
	idealName, idealNote := "non-adiabaticity", "ideal model: unquantised samples, no errors; non-adiabatic transitions plus any residual design and sampling error"
	if !hasAdiabatic(w) {
		idealName, idealNote = "ideal waveform", "ideal model: unquantised samples, no errors; residual design and sampling error (no adiabatic segments)"
	}
	rows := []BudgetRow{
		{Term: idealName, Infidelity: base, Alone: base, Note: idealNote},
		{Term: "leakage", Infidelity: outs[0].Leakage, Alone: outs[0].Leakage,
			Note: "population outside the qubit levels at the end, ideal model; contained in the line above (F ≤ 1 − leakage), not added"},
	}
	sum := base
	var on []string
	for k := 1; k < len(terms)-1; k++ {
		a := 1 - outs[k].Fidelity
		rows = append(rows, BudgetRow{Term: terms[k].name, Infidelity: a - base, Alone: a, Note: terms[k].note})
		sum += a - base
		on = append(on, terms[k].name)
	}
	total := 1 - outs[len(outs)-1].Fidelity
	var note string
	if len(on) > 0 {
		note = fmt.Sprintf("every term on (%s); sum of the separate lines %.4g", strings.Join(on, ", "), sum)
	} else {
		note = "no error terms in the model: the total is the ideal line"
	}
	rows = append(rows, BudgetRow{Term: "total", Infidelity: total, Alone: total, Note: note, Total: true})
	return rows, nil
}

// budgetTerm is one simulation of the error budget.
type budgetTerm struct {
	name, note string
	model      sim.ErrorModel
}

// budgetTerms returns the models of the budget: index 0 the ideal model
// (also the leakage line), then each term of m that is on alone on the
// ideal model, then m itself (the total).
func budgetTerms(w *waveform.Waveform, m sim.ErrorModel) []budgetTerm {
	ideal := sim.ErrorModel{SkipDAC: true}
	type term = budgetTerm
	terms := []term{{model: ideal}}
	add := func(on bool, name, note string, set func(*sim.ErrorModel)) {
		if !on {
			return
		}
		mm := ideal
		set(&mm)
		terms = append(terms, term{name: name, note: note, model: mm})
	}
	add(m.Decay > 0, "loss (decay Γ)",
		fmt.Sprintf("Γ = %.4g /s from every excited level, non-Hermitian loss; alone on the ideal model", m.Decay),
		func(e *sim.ErrorModel) { e.Decay = m.Decay })
	add(m.Dephasing > 0, "dephasing (γ_φ)",
		fmt.Sprintf("γ_φ = %.4g /s on the qubit levels, Lindblad master equation; alone on the ideal model", m.Dephasing),
		func(e *sim.ErrorModel) { e.Dephasing = m.Dephasing })
	add(!m.SkipDAC, "quantisation (DAC)",
		fmt.Sprintf("drive from the %d-bit DAC codes instead of the unquantised samples; alone on the ideal model", w.Hardware.DACBits),
		func(e *sim.ErrorModel) { e.SkipDAC = false })
	add(m.PhaseStep > 0, "phase resolution",
		fmt.Sprintf("drive phases rounded to multiples of %.4g rad (%.4g°); alone on the ideal model", m.PhaseStep, m.PhaseStep*180/math.Pi),
		func(e *sim.ErrorModel) { e.PhaseStep = m.PhaseStep })
	add(m.RiseTime > 0, "bandwidth (low-pass)",
		fmt.Sprintf("%s low-pass, 10–90%% rise time %.4g ns, %d sub-steps per sample; alone on the ideal model", m.Filter, m.RiseTime*1e9, subSteps(m.SubSteps)),
		func(e *sim.ErrorModel) { e.RiseTime, e.Filter, e.SubSteps = m.RiseTime, m.Filter, m.SubSteps })
	add(m.AmplitudeError != 0 || anyNonZero(m.ChannelErrors), "amplitude error",
		amplitudeNote(w, m),
		func(e *sim.ErrorModel) { e.AmplitudeError, e.ChannelErrors = m.AmplitudeError, m.ChannelErrors })
	add(m.OnePhotonDetuning != 0, "one-photon detuning",
		fmt.Sprintf("Δ/2π = %s on every excited level; alone on the ideal model", waveform.FormatSI(m.OnePhotonDetuning, "Hz")),
		func(e *sim.ErrorModel) { e.OnePhotonDetuning = m.OnePhotonDetuning })
	add(m.TwoPhotonDetuning != 0, "two-photon detuning",
		fmt.Sprintf("δ/2π = %s on the second qubit level; alone on the ideal model", waveform.FormatSI(m.TwoPhotonDetuning, "Hz")),
		func(e *sim.ErrorModel) { e.TwoPhotonDetuning = m.TwoPhotonDetuning })
	return append(terms, term{name: "total", model: m})
}

func subSteps(n int) int {
	if n == 0 {
		return 8
	}
	return n
}

func anyNonZero(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return true
		}
	}
	return false
}

func amplitudeNote(w *waveform.Waveform, m sim.ErrorModel) string {
	var b strings.Builder
	fmt.Fprintf(&b, "Ω → (1 + ε)Ω with ε = %.4g", m.AmplitudeError)
	for c, v := range m.ChannelErrors {
		if v != 0 && c < len(w.Scheme.Channels) {
			fmt.Fprintf(&b, ", channel %s × (1 %+.4g)", w.Scheme.Channels[c].Name, v)
		}
	}
	b.WriteString("; alone on the ideal model")
	return b.String()
}

func hasAdiabatic(w *waveform.Waveform) bool {
	for _, s := range w.Segments {
		if s.Kind == waveform.AdiabaticSegment {
			return true
		}
	}
	return false
}
