package device

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// floquetSplitting returns the quasi-energy splitting ε (rad/s) of a
// two-level system (transition w0) under a linearly polarised drive of Rabi
// frequency omega at carrier w with counter-rotating terms on. In the
// default frame (the tone's) the Hamiltonian
//
//	H(t) = (w0 − w)|a⟩⟨a| + (Ω/2)(|a⟩⟨g| + e^{2iwt}|a⟩⟨g| + h.c.)
//
// is periodic with period π/w, so the propagator over one period is
// exp(−i H_F π/w) with H_F the Floquet Hamiltonian, whose splitting ε is
// gauge independent.
func floquetSplitting(t *testing.T, w0, w, omega float64) float64 {
	d := twoLevel(w0, w)
	d.CounterRotating = true
	m := compile(t, d)
	period := math.Pi / w
	sim := NewSimulator(m)
	sim.StepPhase = 0.1
	u := holonomy.Identity(2)
	if err := sim.Propagate(u, constSamples(m, 1, complex(omega, 0)), period); err != nil {
		t.Fatal(err)
	}
	l1, l2 := eigenphases2(u)
	return math.Abs(cmplx.Phase(l1/l2)) / period
}

// blochSiegertShift returns the measured shift of the resonance: the
// carrier at which the Floquet splitting is smallest, from the vertex of
// the parabola ε²(w) ≈ (w0 + δ_BS − w)² + Ω_eff² through three carriers
// around w0.
func blochSiegertShift(t *testing.T, w0, omega float64) float64 {
	x := omega / 4
	var e2 [3]float64
	for i := range e2 {
		w := w0 + float64(i-1)*x
		e := floquetSplitting(t, w0, w, omega)
		e2[i] = e * e
	}
	// Vertex of the parabola through (−x, e0), (0, e1), (x, e2).
	return x * (e2[0] - e2[2]) / (2 * (e2[0] - 2*e2[1] + e2[2]))
}

// Bloch–Siegert shift (Bloch and Siegert, Phys. Rev. 57, 522 (1940); value
// from memory). A linear drive Ω cos(ωt)(|g⟩⟨a| + |a⟩⟨g|) is, besides the
// co-rotating part that gives Rabi frequency Ω, a counter-rotating part of
// the same strength at frequency −ω, i.e. a second drive detuned from the
// transition by Δ' = ω₀ + ω ≈ 2ω₀. By the exact two-level energies of the
// AC Stark test, a drive detuned by Δ' > 0 below the transition pushes it
// up by Ω²/(2Δ') to leading order, so the resonance moves to
//
//	ω_res ≈ ω₀ + Ω²/(2·2ω₀) = ω₀ + Ω²/(4ω₀),
//
// with corrections of relative order (Ω/ω₀)². The test measures the
// resonance from the Floquet splitting, compares it with Ω²/(4ω₀) within
// 2 %, and checks the scaling: ×4 when Ω doubles, ×½ when ω₀ doubles.
func TestBlochSiegertShift(t *testing.T) {
	w0 := HzToRad(200e6)
	omega := HzToRad(20e6)
	base := blochSiegertShift(t, w0, omega)
	want := omega * omega / (4 * w0)
	if math.Abs(base-want) > 0.02*want {
		t.Errorf("shift %g rad/s, Ω²/(4ω₀) = %g", base, want)
	}
	if r := blochSiegertShift(t, w0, 2*omega) / base; math.Abs(r-4) > 0.2 {
		t.Errorf("doubling Ω scales the shift by %g, want 4", r)
	}
	if r := blochSiegertShift(t, 2*w0, omega) / base; math.Abs(r-0.5) > 0.025 {
		t.Errorf("doubling ω₀ scales the shift by %g, want 1/2", r)
	}
	// Without counter-rotating terms the resonance does not move.
	d := twoLevel(w0, w0)
	m := compile(t, d)
	u := holonomy.Identity(2)
	if err := NewSimulator(m).Propagate(u, constSamples(m, 1, complex(omega, 0)), math.Pi/omega); err != nil {
		t.Fatal(err)
	}
	if p := cmplx.Abs(u.At(1, 0)); math.Abs(p-1) > 1e-12 {
		t.Errorf("rotating-wave π pulse at resonance transfers amplitude %g, want 1", p)
	}
}
