package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// dynRandDensity returns a random full-rank density matrix.
func dynRandDensity(rng *rand.Rand, n int) *Mat {
	g := dynRandComplex(rng, n, n)
	rho := NewMat(n, n)
	MulBH(rho, g, g)
	tr := real(Trace(rho))
	for i := range rho.Data {
		rho.Data[i] /= complex(tr, 0)
	}
	return rho
}

func dynRandRates(rng *rand.Rand, n int, scale float64) []float64 {
	r := make([]float64, n)
	for i := range r {
		r[i] = scale * rng.Float64()
	}
	return r
}

// TestLindbladGenerator: the Taylor action of Step equals the n²×n²
// exponential exp(𝓛dt) (Padé, Exponential) of the explicit generator applied
// to vec ρ, for ‖𝓛dt‖ from 0.01 to 40 (up to 40 sub-steps).
func TestLindbladGenerator(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 62))
	for _, n := range []int{1, 2, 3, 4} {
		for _, scale := range []float64{0.01, 0.5, 3, 40} {
			h := dynRandHermitian(rng, n, 1)
			l := NewLindblad(n, dynRandRates(rng, n, 1), dynRandRates(rng, n, 1))
			N := n * n
			gen := NewMat(N, N)
			l.Generator(gen, h)
			dt := scale / math.Max(norm1Cols(gen.Data, N), 1e-300)
			for i := range gen.Data {
				gen.Data[i] *= complex(dt, 0)
			}
			e := NewMat(N, N)
			Expm(e, gen)
			rho := dynRandDensity(rng, n)
			want := NewMat(N, 1)
			Mul(want, e, &Mat{R: N, C: 1, Data: rho.Data})
			l.Step(rho, h, dt)
			if d := FrobeniusDist(&Mat{R: N, C: 1, Data: rho.Data}, want); d > 1e-13*math.Max(1, scale) {
				t.Errorf("n=%d ‖𝓛dt‖≈%g: Step differs from exp(𝓛dt) by %g", n, scale, d)
			}
		}
	}
}

// TestLindbladDecayMatchesStepDecay: with decay only, 𝓛 generates
// ρ ↦ W ρ W† with W = exp(−i(H − iΓ/2)t), the non-Hermitian propagator of
// Propagator.StepDecay.
func TestLindbladDecayMatchesStepDecay(t *testing.T) {
	rng := rand.New(rand.NewPCG(63, 64))
	for _, n := range []int{2, 3, 4, 6} {
		h := dynRandHermitian(rng, n, 2)
		decay := dynRandRates(rng, n, 1.5)
		l := NewLindblad(n, decay, nil)
		rho := dynRandDensity(rng, n)
		w := Identity(n)
		p := NewPropagator(n)
		want := NewMat(n, n)
		tmp := NewMat(n, n)
		r := rho.Clone()
		for k := 0; k < 7; k++ {
			l.Step(r, h, 0.3)
			p.StepDecay(w, h, decay, 0.3)
		}
		Mul(tmp, w, rho)
		MulBH(want, tmp, w)
		if d := FrobeniusDist(r, want); d > 1e-13 {
			t.Errorf("n=%d: Lindblad and StepDecay differ by %g", n, d)
		}
		if tr := real(Trace(r)); tr >= 1 {
			t.Errorf("n=%d: trace %g did not decrease under decay", n, tr)
		}
	}
}

// TestDephasingFreeCoherence: a qubit with H = Δ|1⟩⟨1| and pure dephasing
// γ_φ of level 1 only keeps its populations and its coherence evolves as
// ρ_01(t) = ρ_01(0) e^{(iΔ − γ_φ)t}: |ρ_01| decays as e^{−γ_φ t} (the
// definition of the rate, see Lindblad). With both levels dephased the rate
// is γ_0 + γ_1. Checked to 1e-10 over several coherence times.
func TestDephasingFreeCoherence(t *testing.T) {
	delta := 2 * math.Pi * 1e6
	for _, c := range []struct{ g0, g1 float64 }{{0, 1e5}, {3e4, 7e4}, {2e5, 0}} {
		l := NewLindblad(2, nil, []float64{c.g0, c.g1})
		h := NewMatFrom(2, 2, []complex128{0, 0, 0, complex(delta, 0)})
		rho := NewMatFrom(2, 2, []complex128{0.5, 0.5, 0.5, 0.5})
		const dt = 1e-7
		for k := 1; k <= 300; k++ {
			l.Step(rho, h, dt)
			tm := float64(k) * dt
			want := 0.5 * cmplx.Exp(complex(-(c.g0+c.g1)*tm, delta*tm))
			if d := cmplx.Abs(rho.At(0, 1) - want); d > 1e-10 {
				t.Fatalf("γ=(%g,%g) t=%g: ρ_01 = %v, want %v", c.g0, c.g1, tm, rho.At(0, 1), want)
			}
			if d := math.Abs(real(rho.At(0, 0))-0.5) + math.Abs(real(rho.At(1, 1))-0.5); d > 1e-13 {
				t.Fatalf("populations changed by %g", d)
			}
		}
	}
}

// TestDephasedRabi: resonant drive H = (Ω/2)(|1⟩⟨0| + h.c.) with pure
// dephasing γ of level 1 (coherence decay rate γ, no population decay). With
// s = Im ρ_01 and w = ρ_11 − ρ_00 the master equation gives
// ṡ = −(Ω/2)w − γs and ẇ = 2Ωs, so ẅ + γẇ + Ω²w = 0 with w(0) = −1,
// ẇ(0) = 0:
//
//	w(t) = −e^{−γt/2} [cos μt + (γ/(2μ)) sin μt],  μ = √(Ω² − γ²/4),
//
// the damped Rabi nutation of Torrey, Phys. Rev. 76, 1059 (1949), in its
// on-resonance, T₁ → ∞ case (derived here independently, complex μ covering
// the over-damped case). P_1 = (1 + w)/2, checked to 1e-11 along the pulse.
func TestDephasedRabi(t *testing.T) {
	omega := 2 * math.Pi * 1e6
	for _, gamma := range []float64{0.05 * omega, 0.6 * omega, 3 * omega} {
		mu := cmplx.Sqrt(complex(omega*omega-gamma*gamma/4, 0))
		sch := dynTwoLevel(0, 0)
		pt := sch.NewPoint()
		pt.Drive[0] = complex(omega, 0)
		h := NewMat(2, 2)
		sch.Hamiltonian(h, pt)
		l := NewLindblad(2, nil, []float64{0, gamma})
		rho := NewMatFrom(2, 2, []complex128{1, 0, 0, 0})
		const dt = 2e-8
		for k := 1; k <= 150; k++ {
			l.Step(rho, h, dt)
			tm := float64(k) * dt
			x := mu * complex(tm, 0)
			w := -math.Exp(-gamma*tm/2) * real(cmplx.Cos(x)+complex(gamma/2, 0)*cmplx.Sin(x)/mu)
			want := (1 + w) / 2
			if d := math.Abs(real(rho.At(1, 1)) - want); d > 1e-11 {
				t.Fatalf("γ/Ω=%g t=%g: P_1 = %.14f, damped nutation %.14f", gamma/omega, tm, real(rho.At(1, 1)), want)
			}
		}
	}
}

// TestLindbladPhysical: with dephasing only the step is trace preserving,
// Hermiticity preserving and positive.
func TestLindbladPhysical(t *testing.T) {
	rng := rand.New(rand.NewPCG(65, 66))
	n := 4
	h := dynRandHermitian(rng, n, 1)
	l := NewLindblad(n, nil, dynRandRates(rng, n, 2))
	rho := dynRandDensity(rng, n)
	for k := 0; k < 30; k++ {
		l.Step(rho, h, 0.37)
	}
	if d := math.Abs(real(Trace(rho)) - 1); d > 1e-13 {
		t.Errorf("trace changed by %g", d)
	}
	adj := NewMat(n, n)
	Adjoint(adj, rho)
	if d := FrobeniusDist(adj, rho); d > 1e-14 {
		t.Errorf("ρ not Hermitian: %g", d)
	}
	vals := make([]float64, n)
	NewEigen(n).Factorize(rho, vals, NewMat(n, n))
	if vals[0] < -1e-14 {
		t.Errorf("negative eigenvalue %g", vals[0])
	}
}

// TestSuperoperator: StepSuper accumulates the channel of a sequence, which
// applied to vec ρ equals stepping ρ; Sequence does the same through a
// scheme.
func TestSuperoperator(t *testing.T) {
	rng := rand.New(rand.NewPCG(67, 68))
	sch := Tripod()
	n := sch.Dim()
	N := n * n
	l := NewLindblad(n, []float64{0, 0, 0, 3e6}, []float64{1e5, 2e5, 0, 0})
	pts := make([]Point, 12)
	for i := range pts {
		pts[i] = sch.NewPoint()
		for c := range pts[i].Drive {
			pts[i].Drive[c] = complex(rng.NormFloat64(), rng.NormFloat64()) * 2e7
		}
	}
	s := Identity(N)
	l.Sequence(s, sch, pts, 5e-8)
	rho := dynRandDensity(rng, n)
	want := NewMat(N, 1)
	Mul(want, s, &Mat{R: N, C: 1, Data: rho.Data})
	h := NewMat(n, n)
	for _, p := range pts {
		sch.Hamiltonian(h, p)
		l.Step(rho, h, 5e-8)
	}
	if d := FrobeniusDist(&Mat{R: N, C: 1, Data: rho.Data}, want); d > 1e-13 {
		t.Errorf("superoperator and density-matrix steps differ by %g", d)
	}
}

// TestChannelFidelityUnitary: without dissipation the channel fidelity of a
// sequence equals GateFidelity of its propagator; with decay only (one Kraus
// operator W, the non-Hermitian propagator) it equals GateFidelity(W).
func TestChannelFidelityUnitary(t *testing.T) {
	rng := rand.New(rand.NewPCG(69, 70))
	sch := Tripod()
	n := sch.Dim()
	pts := make([]Point, 30)
	for i := range pts {
		pts[i] = sch.NewPoint()
		for c := range pts[i].Drive {
			pts[i].Drive[c] = complex(rng.NormFloat64(), rng.NormFloat64()) * 1e7
		}
	}
	target := dynRandUnitary(rng, 2)
	for _, decay := range [][]float64{{0, 0, 0, 0}, {0, 0, 0, 4e6}, {1e5, 0, 2e5, 4e6}} {
		l := NewLindblad(n, decay, nil)
		s := Identity(n * n)
		l.Sequence(s, sch, pts, 2e-8)
		withDecay := *sch
		withDecay.Levels = append([]Level(nil), sch.Levels...)
		for k := range withDecay.Levels {
			withDecay.Levels[k].Decay = decay[k]
		}
		u := PropagateZOH(&withDecay, pts, 2e-8)
		f1, l1 := ChannelFidelity(s, n, sch.Computational, target)
		f2, l2 := GateFidelity(u, sch.Computational, target)
		if math.Abs(f1-f2) > 1e-12 || math.Abs(l1-l2) > 1e-12 {
			t.Errorf("decay %v: channel F = %.14f leak %.3g, gate F = %.14f leak %.3g", decay, f1, l1, f2, l2)
		}
	}
}

// TestChannelFidelityDephasing: pure dephasing of one qubit level for time t
// multiplies the coherence by c = e^{−γt}. Then Σ|Tr M_k|² = 2 + 2c and
// Σ Tr M_k†M_k = 2, so F = (2 + c)/3, the known average fidelity of the
// phase-damping channel (equivalently F = (dF_e + 1)/(d + 1) with
// entanglement fidelity F_e = (1 + c)/2: Horodecki, Horodecki and Horodecki,
// Phys. Rev. A 60, 1888 (1999); Nielsen, Phys. Lett. A 303, 249 (2002)).
func TestChannelFidelityDephasing(t *testing.T) {
	gamma := 1e5
	for _, tm := range []float64{1e-6, 7e-6, 3e-5} {
		l := NewLindblad(2, nil, []float64{0, gamma})
		s := Identity(4)
		l.StepSuper(s, NewMat(2, 2), tm)
		c := math.Exp(-gamma * tm)
		fid, leak := ChannelFidelity(s, 2, []int{0, 1}, Identity(2))
		if want := (2 + c) / 3; math.Abs(fid-want) > 1e-14 || math.Abs(leak) > 1e-14 {
			t.Errorf("t=%g: F = %.15f leak %g, want %.15f", tm, fid, leak, want)
		}
	}
}

func TestLindbladAllocs(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	n := 4
	h := dynRandHermitian(rng, n, 1)
	l := NewLindblad(n, dynRandRates(rng, n, 1), dynRandRates(rng, n, 1))
	rho := dynRandDensity(rng, n)
	s := Identity(n * n)
	id2 := Identity(2)
	comp := []int{0, 1}
	for name, f := range map[string]func(){
		"Step":      func() { l.Step(rho, h, 0.2) },
		"StepSuper": func() { l.StepSuper(s, h, 3) },
		"Fidelity":  func() { ChannelFidelity(s, n, comp, id2) },
	} {
		if a := testing.AllocsPerRun(10, f); a != 0 {
			t.Errorf("%s: %v allocations", name, a)
		}
	}
}

// BenchmarkLindbladStep4: one exact density-matrix step of the tripod with
// decay of e and dephasing of the ground levels, Ω/2π = 10 MHz, Δt = 1 ns.
func BenchmarkLindbladStep4(b *testing.B) {
	hs := dynTripodPath(1024, 2*math.Pi*10e6)
	l := NewLindblad(4, []float64{0, 0, 0, 2 * math.Pi * 6e6}, []float64{1e4, 1e4, 1e4, 0})
	rho := NewMat(4, 4)
	rho.Set(0, 0, 1)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		l.Step(rho, hs[i&1023], 1e-9)
	}
}

// BenchmarkLindbladSuperStep4: one step of the 16×16 superoperator of the
// same tripod (channel accumulation for ChannelFidelity).
func BenchmarkLindbladSuperStep4(b *testing.B) {
	hs := dynTripodPath(1024, 2*math.Pi*10e6)
	l := NewLindblad(4, []float64{0, 0, 0, 2 * math.Pi * 6e6}, []float64{1e4, 1e4, 1e4, 0})
	s := Identity(16)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		l.StepSuper(s, hs[i&1023], 1e-9)
	}
}

func ExampleLindblad() {
	// A qubit coherence under pure dephasing of level 1 at γ_φ = 1/(10 µs):
	// after 10 µs it has fallen to e^{−1}.
	l := NewLindblad(2, nil, []float64{0, 1e5})
	rho := NewMatFrom(2, 2, []complex128{0.5, 0.5, 0.5, 0.5})
	l.Step(rho, NewMat(2, 2), 10e-6)
	fmt.Printf("|ρ01| = %.4f, 0.5/e = %.4f\n", cmplx.Abs(rho.At(0, 1)), 0.5/math.E)
	// Output:
	// |ρ01| = 0.1839, 0.5/e = 0.1839
}

func TestLindbladPanics(t *testing.T) {
	cases := map[string]func(){
		"negative decay":  func() { NewLindblad(2, []float64{0, -1}, nil).Step(NewMat(2, 2), NewMat(2, 2), 1) },
		"NaN dephasing":   func() { NewLindblad(2, nil, []float64{math.NaN(), 0}).Step(NewMat(2, 2), NewMat(2, 2), 1) },
		"rate count":      func() { NewLindblad(3, []float64{1}, nil) },
		"H shape":         func() { NewLindblad(2, nil, nil).Step(NewMat(2, 2), NewMat(3, 3), 1) },
		"S shape":         func() { NewLindblad(2, nil, nil).StepSuper(NewMat(2, 2), NewMat(2, 2), 1) },
		"fidelity shape":  func() { ChannelFidelity(NewMat(4, 4), 3, []int{0}, Identity(1)) },
		"fidelity levels": func() { ChannelFidelity(NewMat(4, 4), 2, []int{2}, Identity(1)) },
	}
	for name, f := range cases {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}
