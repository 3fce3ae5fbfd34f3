package device

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// cascade returns an undriven three-level device: "2" decays at g2 with
// fractions b21 into "1" and b20 into "0" (the rest leaves the model), "1"
// decays at g1 into "0".
func cascade(g2, g1, b21, b20 float64) *Device {
	return &Device{
		Name: "cascade",
		Levels: []Level{{Name: "0"}, {Name: "1", Energy: HzToRad(4e9), Decay: g1, Branches: []Branch{{To: 0, Fraction: 1}}},
			{Name: "2", Energy: HzToRad(7e9), Decay: g2, Branches: []Branch{{To: 1, Fraction: b21}, {To: 0, Fraction: b20}}}},
		Tones:         []Tone{{Name: "d", Carrier: HzToRad(4e9), Couplings: []Coupling{{Lower: 0, Upper: 1, Factor: 1}}}},
		Computational: []int{0, 1},
	}
}

// Decay with branching: with no drive the populations obey the rate
// equations Ṗ₂ = −Γ₂P₂, Ṗ₁ = b₂₁Γ₂P₂ − Γ₁P₁, Ṗ₀ = b₂₀Γ₂P₂ + Γ₁P₁, whose closed
// form from P₂(0) = 1 is
//
//	P₂ = e^{−Γ₂t},  P₁ = b₂₁Γ₂ (e^{−Γ₂t} − e^{−Γ₁t})/(Γ₁ − Γ₂),
//	P₀ = b₂₀(1 − e^{−Γ₂t}) + b₂₁[1 − (Γ₁e^{−Γ₂t} − Γ₂e^{−Γ₁t})/(Γ₁ − Γ₂)],
//
// (first-order linear kinetics; any physical-chemistry text), and the total
// 1 − (1 − b₂₁ − b₂₀)(1 − e^{−Γ₂t}) is conserved exactly when the branches
// sum to 1.
func TestBranchingDecayRateEquations(t *testing.T) {
	g2, g1 := 3e6, 1.1e6
	for _, b := range [][2]float64{{0.6, 0.3}, {0.7, 0.3}, {0, 1}, {1, 0}} {
		b21, b20 := b[0], b[1]
		m := compile(t, cascade(g2, g1, b21, b20))
		sim := NewSimulator(m)
		rho := holonomy.NewMat(3, 3)
		rho.Set(2, 2, 1)
		dt := 5e-8
		pts := constSamples(m, 1, 0)
		for step := 1; step <= 40; step++ {
			if err := sim.Evolve(rho, pts, dt); err != nil {
				t.Fatal(err)
			}
			tm := float64(step) * dt
			e2, e1 := math.Exp(-g2*tm), math.Exp(-g1*tm)
			p2 := e2
			p1 := b21 * g2 * (e2 - e1) / (g1 - g2)
			p0 := b20*(1-e2) + b21*(1-(g1*e2-g2*e1)/(g1-g2))
			got := [3]float64{real(rho.At(0, 0)), real(rho.At(1, 1)), real(rho.At(2, 2))}
			for k, want := range [3]float64{p0, p1, p2} {
				if math.Abs(got[k]-want) > 1e-12 {
					t.Fatalf("b = %v, t = %g: P%d = %.15g, rate equations %.15g", b, tm, k, got[k], want)
				}
			}
			trace := got[0] + got[1] + got[2]
			if want := 1 - (1-b21-b20)*(1-e2); math.Abs(trace-want) > 1e-13 {
				t.Fatalf("b = %v, t = %g: total population %.15g, want %.15g", b, tm, trace, want)
			}
		}
	}
}

// Free induction decay (Bloch, Phys. Rev. 70, 460 (1946)): a qubit with
// relaxation time T1 and coherence time T2 (SetQubitT1T2), prepared in
// (|0⟩ + |1⟩)/√2 and left undriven with a detuning Δ of the frame, keeps
// |ρ₀₁| = ½e^{−t/T2} rotating at Δ and excited population ½e^{−t/T1}. The
// third level dephases on its own and must not affect the qubit.
func TestFreeInductionDecayT1T2(t *testing.T) {
	t1, t2 := 40e-6, 25e-6
	delta := HzToRad(0.3e6)
	d := cascade(0, 0, 0, 0)
	d.Levels[2].Branches = nil
	d.Levels[2].Dephasing = 2e5
	if err := SetQubitT1T2(d, 0, 1, t1, t2); err != nil {
		t.Fatal(err)
	}
	d.Frame = []float64{0, d.Levels[1].Energy - delta, d.Levels[2].Energy}
	m := compile(t, d)
	sim := NewSimulator(m)
	rho := holonomy.NewMat(3, 3)
	for _, i := range []int{0, 1} {
		for _, j := range []int{0, 1} {
			rho.Set(i, j, 0.5)
		}
	}
	dt := 1e-6
	pts := constSamples(m, 1, 0)
	for step := 1; step <= 60; step++ {
		if err := sim.Evolve(rho, pts, dt); err != nil {
			t.Fatal(err)
		}
		tm := float64(step) * dt
		if p1, want := real(rho.At(1, 1)), 0.5*math.Exp(-tm/t1); math.Abs(p1-want) > 1e-13 {
			t.Fatalf("t = %g: P1 = %g, ½e^{−t/T1} = %g", tm, p1, want)
		}
		// ρ₁₀ evolves as e^{−iΔt} in the frame where level 1 sits at Δ; Δ
		// is the difference of two 2π·4 GHz numbers, exact to about
		// 4·10⁻⁶ rad/s, hence the tolerance.
		want := cmplx.Rect(0.5*math.Exp(-tm/t2), -delta*tm)
		if c := rho.At(1, 0); cmplx.Abs(c-want) > 1e-9 {
			t.Fatalf("t = %g: ρ10 = %v, ½e^{−t/T2}e^{−iΔt} = %v", tm, c, want)
		}
	}
	if err := SetQubitT1T2(d, 0, 1, 10e-6, 25e-6); !errors.Is(err, ErrT2) {
		t.Errorf("T2 > 2T1: got %v, want ErrT2", err)
	}
}

// Every declared rate is used as declared: the decay of the lowest level of
// a qubit, a spectator's decay and a spectator's dephasing each change the
// evolution (none is merged into another or dropped).
func TestEveryDeclaredRateCounts(t *testing.T) {
	base := cascade(2e6, 1e6, 0.5, 0.5)
	run := func(d *Device) *holonomy.Mat {
		m := compile(t, d)
		rho := holonomy.NewMat(3, 3)
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				rho.Set(i, j, 1.0/3)
			}
		}
		if err := NewSimulator(m).Evolve(rho, constSamples(m, 1, 0), 1e-7); err != nil {
			t.Fatal(err)
		}
		return rho
	}
	ref := run(base)
	for _, change := range []func(d *Device){
		func(d *Device) { d.Levels[0].Decay = 5e5 },
		func(d *Device) { d.Levels[2].Decay = 4e6 },
		func(d *Device) { d.Levels[2].Dephasing = 1e6 },
		func(d *Device) { d.Levels[0].Dephasing = 1e6 },
		func(d *Device) { d.Levels[2].Branches[1].Fraction = 0.2 },
	} {
		d := cascade(2e6, 1e6, 0.5, 0.5)
		change(d)
		if dist := holonomy.FrobeniusDist(run(d), ref); dist < 1e-3 {
			t.Errorf("a changed rate moved ρ by only %g", dist)
		}
	}
}

// GateFidelity evolving only the computational operators equals the
// fidelity of the full channel (holonomy.ChannelFidelity of Channel), and
// for a model without dissipation the propagator's holonomy.GateFidelity.
func TestGateFidelityPaths(t *testing.T) {
	m, pts, dt, _ := transmonGate(t)
	pts = pts[:40]
	target := holonomy.NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	u := holonomy.Identity(4)
	sim := NewSimulator(m)
	if err := sim.Propagate(u, pts, dt); err != nil {
		t.Fatal(err)
	}
	wf, wl := holonomy.GateFidelity(u, m.Device().Computational, target)
	f, l, err := sim.GateFidelity(pts, dt, target)
	if err != nil || f != wf || l != wl {
		t.Errorf("pure path: %g, %g (%v), want %g, %g", f, l, err, wf, wl)
	}
	d := m.Device()
	d.Levels = append([]Level(nil), d.Levels...)
	d.Levels[1].Decay, d.Levels[1].Branches = 2e5, []Branch{{To: 0, Fraction: 1}}
	d.Levels[2].Dephasing = 3e5
	lm := compile(t, &d)
	ls := NewSimulator(lm)
	sup := holonomy.Identity(16)
	if err := ls.Channel(sup, pts, dt); err != nil {
		t.Fatal(err)
	}
	wf, wl = holonomy.ChannelFidelity(sup, 4, d.Computational, target)
	f, l, err = ls.GateFidelity(pts, dt, target)
	if err != nil || math.Abs(f-wf) > 1e-13 || math.Abs(l-wl) > 1e-13 {
		t.Errorf("Lindblad path: %.15g, %.15g (%v), want %.15g, %.15g", f, l, err, wf, wl)
	}
}
