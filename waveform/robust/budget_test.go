package robust

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

// TestBudgetLines checks the error budget of a Λ gate: the lines present,
// that every line is its documented simulation, the amplitude line against
// the closed form of TestAdvantageLambdaAreaErrorQuadratic, and the total.
func TestBudgetLines(t *testing.T) {
	w := wavetest.RobustLambda(t, math.Pi/2, 0)
	m := sim.ErrorModel{AmplitudeError: 0.01, TwoPhotonDetuning: 20e3, Decay: 1e5, Dephasing: 2e3, RiseTime: 1.5e-9,
		Filter: sim.FirstOrderFilter, PhaseStep: 2 * math.Pi / 1024}
	rows, err := Budget(context.Background(), w, m, &SweepOptions{Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		t.Logf("%-22s %11.4g %11.4g  %s", r.Term, r.Infidelity, r.Alone, r.Note)
	}
	wantTerms := []string{"ideal waveform", "leakage", "loss (decay Γ)", "dephasing (γ_φ)", "quantisation (DAC)",
		"phase resolution", "bandwidth (low-pass)", "amplitude error", "two-photon detuning", "total"}
	if len(rows) != len(wantTerms) {
		t.Fatalf("%d lines, want %d", len(rows), len(wantTerms))
	}
	for i, r := range rows {
		if r.Term != wantTerms[i] {
			t.Errorf("line %d is %q, want %q", i, r.Term, wantTerms[i])
		}
		if r.Note == "" {
			t.Errorf("line %q has no note", r.Term)
		}
		if r.Total != (i == len(rows)-1) {
			t.Errorf("line %q: Total = %v", r.Term, r.Total)
		}
	}
	ideal := sim.ErrorModel{SkipDAC: true}
	alone := map[string]sim.ErrorModel{}
	set := func(name string, f func(*sim.ErrorModel)) {
		mm := ideal
		f(&mm)
		alone[name] = mm
	}
	set("loss (decay Γ)", func(e *sim.ErrorModel) { e.Decay = m.Decay })
	set("dephasing (γ_φ)", func(e *sim.ErrorModel) { e.Dephasing = m.Dephasing })
	set("quantisation (DAC)", func(e *sim.ErrorModel) { e.SkipDAC = false })
	set("phase resolution", func(e *sim.ErrorModel) { e.PhaseStep = m.PhaseStep })
	set("bandwidth (low-pass)", func(e *sim.ErrorModel) { e.RiseTime, e.Filter = m.RiseTime, m.Filter })
	set("amplitude error", func(e *sim.ErrorModel) { e.AmplitudeError = m.AmplitudeError })
	set("two-photon detuning", func(e *sim.ErrorModel) { e.TwoPhotonDetuning = m.TwoPhotonDetuning })
	alone["total"] = m
	out0, err := sim.Simulate(w, ideal)
	if err != nil {
		t.Fatal(err)
	}
	base := 1 - out0.Fidelity
	if rows[0].Infidelity != base || rows[1].Infidelity != out0.Leakage {
		t.Errorf("ideal line %v / leakage %v; direct simulation %v / %v", rows[0].Infidelity, rows[1].Infidelity, base, out0.Leakage)
	}
	if rows[1].Infidelity > rows[0].Infidelity {
		t.Errorf("leakage %v exceeds the ideal infidelity %v (F ≤ 1 − leakage)", rows[1].Infidelity, rows[0].Infidelity)
	}
	for _, r := range rows[2:] {
		out, err := sim.Simulate(w, alone[r.Term])
		if err != nil {
			t.Fatal(err)
		}
		if r.Alone != 1-out.Fidelity {
			t.Errorf("%s: alone %v, direct simulation %v", r.Term, r.Alone, 1-out.Fidelity)
		}
		if !r.Total && r.Infidelity != r.Alone-base {
			t.Errorf("%s: line %v is not alone − ideal = %v", r.Term, r.Infidelity, r.Alone-base)
		}
	}
	// Amplitude line: 1 − F = (1 − c)(2 + c)/3, c = cos(πε), on top of an
	// ideal error of rounding size.
	c := math.Cos(math.Pi * m.AmplitudeError)
	if got, want := rows[7].Alone, (1-c)*(2+c)/3; math.Abs(got-want) > 1e-10 {
		t.Errorf("amplitude line %.8g, closed form %.8g", got, want)
	}
	if !strings.Contains(rows[len(rows)-1].Note, "sum of the separate lines") {
		t.Errorf("total note %q", rows[len(rows)-1].Note)
	}
}

// A model without errors gives the ideal, leakage and total lines only,
// and an adiabatic waveform names the first line non-adiabaticity.
func TestBudgetWithoutErrors(t *testing.T) {
	tw := wavetest.RobustTripod(t, math.Pi/4, 0.05, 20e6)
	rows, err := Budget(context.Background(), tw, sim.ErrorModel{SkipDAC: true}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || rows[0].Term != "non-adiabaticity" || rows[2].Infidelity != rows[0].Infidelity {
		t.Errorf("error-free budget: %+v", rows)
	}
}
