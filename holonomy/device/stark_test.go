package device

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// twoLevel returns a laboratory two-level device: "g" at 0, "a" at wt, one
// tone at carrier w coupling g→a with factor 1.
func twoLevel(wt, w float64) *Device {
	return &Device{
		Name:          "two-level",
		Levels:        []Level{{Name: "g"}, {Name: "a", Energy: wt}},
		Tones:         []Tone{{Name: "drive", Carrier: w, Couplings: []Coupling{{Lower: 0, Upper: 1, Factor: 1}}}},
		Computational: []int{0, 1},
	}
}

// constSamples returns n samples with drive omega on tone 0 of m.
func constSamples(m *Model, n int, omega complex128) []holonomy.Point {
	pts := make([]holonomy.Point, n)
	for j := range pts {
		pts[j] = m.NewPoint()
		pts[j].Drive[0] = omega
	}
	return pts
}

// eigenphases2 returns the eigenvalues of the 2×2 unitary w.
func eigenphases2(w *holonomy.Mat) (complex128, complex128) {
	tr := w.At(0, 0) + w.At(1, 1)
	det := w.At(0, 0)*w.At(1, 1) - w.At(0, 1)*w.At(1, 0)
	s := cmplx.Sqrt(tr*tr/4 - det)
	return tr/2 + s, tr/2 - s
}

// starkEnergies simulates a two-level system driven at Rabi frequency omega
// with the transition wt above the carrier by delta, in the frame of bare
// energies (F = E), where the drive term rotates as e^{iδt}, and returns the
// dressed energies read from the eigenphases of the propagator carried to
// the frame of the tone, with the simulated time T.
func starkEnergies(t *testing.T, omega, delta, kappa float64) (ep, em, T float64) {
	wt := HzToRad(5e9)
	d := twoLevel(wt, wt-delta)
	d.Frame = []float64{0, wt} // bare energies: the coupling rotates
	m := compile(t, d)
	if tm := m.Terms(); math.Abs(tm[0].Detuning-delta) > 1e-12*math.Abs(wt) {
		t.Fatalf("coupling detuning %g, want %g", tm[0].Detuning, delta)
	}
	dt := 1 / 2.4e9
	n := 3
	T = float64(n) * dt
	sim := NewSimulator(m)
	sim.StepPhase = kappa
	u := holonomy.Identity(2)
	if err := sim.Propagate(u, constSamples(m, n, complex(omega, 0)), dt); err != nil {
		t.Fatal(err)
	}
	// Tone frame G = (0, ω): ψ_G = e^{i(G−F)t} ψ_F, so row 1 of U picks up
	// e^{i(ω − ω_t)T} = e^{−iδT}; then U_G(T) = exp(−i H_G T) with
	// H_G = diag(0, δ) + (Ω/2)σ_x.
	ph := cmplx.Rect(1, -delta*T)
	u.Set(1, 0, u.At(1, 0)*ph)
	u.Set(1, 1, u.At(1, 1)*ph)
	l1, l2 := eigenphases2(u)
	e1, e2 := -cmplx.Phase(l1)/T, -cmplx.Phase(l2)/T
	return max(e1, e2), min(e1, e2), T
}

// AC Stark shift: a two-level system driven off resonance has, in the frame
// of the tone and in the Ω/2 convention, the exact dressed energies
//
//	E± = (Δ ± √(Δ² + Ω²))/2,  Δ = ω_t − ω,
//
// so the transition moves by ≈ Ω²/(2Δ) for |Δ| ≫ Ω (Foot, Atomic Physics,
// Oxford (2005), ch. 7; any atomic-physics text). The simulation runs in
// the frame of bare energies, where only the time-dependent phase e^{iΔt}
// carries the detuning, and the energies come from the simulated phases.
// The error is checked against the documented bound C κ⁴ ∫a dt, C = 1/1000.
func TestACStarkShiftExactDressedEnergies(t *testing.T) {
	for _, c := range []struct{ omegaMHz, deltaMHz float64 }{
		{5, 100}, {20, 100}, {40, 220}, {40, -220}, {10, -30}, {60, 60},
	} {
		omega, delta := HzToRad(c.omegaMHz*1e6), HzToRad(c.deltaMHz*1e6)
		ep, em, T := starkEnergies(t, omega, delta, DefaultStepPhase)
		r := math.Sqrt(delta*delta + omega*omega)
		wp, wm := (delta+r)/2, (delta-r)/2
		bound := math.Pow(DefaultStepPhase, 4) * (omega / 2) * T / 1000
		if e := math.Max(math.Abs(ep-wp), math.Abs(em-wm)) * T; e > bound {
			t.Errorf("Ω=%g MHz, Δ=%g MHz: energies %g, %g rad/s, exact %g, %g: phase error %.3g > bound %.3g",
				c.omegaMHz, c.deltaMHz, ep, em, wp, wm, e, bound)
		}
		if math.Abs(c.deltaMHz) >= 8*c.omegaMHz {
			// Far off resonance the transition shift is Ω²/(2Δ) to
			// O(Ω⁴/Δ³).
			shift := (ep - em) - math.Abs(delta)
			approx := omega * omega / (2 * math.Abs(delta))
			if math.Abs(shift-approx) > approx*omega*omega/(delta*delta) {
				t.Errorf("Ω=%g MHz, Δ=%g MHz: Stark shift %g rad/s, Ω²/2Δ = %g", c.omegaMHz, c.deltaMHz, shift, approx)
			}
		}
	}
}

// The sub-stepper is of order four: doubling the sub-step count divides the
// error by about 2⁴ = 16 (Blanes and Moan, Appl. Numer. Math. 56, 1519
// (2006)), measured against the exact dressed energies. Here ν = |Δ| (the
// fastest rate), so κ = ν·dt/N gives exactly N sub-steps per sample.
func TestSubstepOrderFour(t *testing.T) {
	omega, delta := HzToRad(40e6), HzToRad(220e6)
	r := math.Sqrt(delta*delta + omega*omega)
	wp := (delta + r) / 2
	dt := 1 / 2.4e9
	var prev float64
	for i, n := range []float64{1, 2, 4, 8} {
		ep, _, T := starkEnergies(t, omega, delta, delta*dt/n*(1+1e-9))
		e := math.Abs(ep-wp) * T
		if i > 0 {
			if ratio := prev / e; ratio < 13 || ratio > 19 {
				t.Errorf("N %g → %g sub-steps: error %g → %g, ratio %g, want ≈16", n/2, n, prev, e, ratio)
			}
		}
		prev = e
	}
}
