package optimize

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/holonomy/holonomytest"
)

// Sjöqvist et al., New J. Phys. 14, 103035 (2012): a resonant pulse of
// area 2π on the bright transition of the Λ scheme, with bright-state
// parameters (θ, φ), gives U = n·σ on the qubit exactly,
//
//	[[cos θ, sin θ e^{−iφ}], [sin θ e^{iφ}, −cos θ]],
//
// while the excited level returns with amplitude −1 and nothing leaks.
// Checked element by element on the full propagator.
func TestLambdaLoopIsNSigma(t *testing.T) {
	sc := holonomy.Lambda()
	lc, err := NewLambdaCoupling(sc)
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range [][2]float64{{0, 0}, {math.Pi / 4, 0}, {1.1, -2.3}, {math.Pi, 0.4}} {
		th, ph := a[0], a[1]
		e := newLambdaEval(lc, sc, nil, gate("I"))
		e.fullGate([]Segment{{Theta: th, Phi: ph, Area: 2 * math.Pi}})
		want := holonomy.NewMatFrom(3, 3, []complex128{
			complex(math.Cos(th), 0), cmplx.Rect(math.Sin(th), -ph), 0,
			cmplx.Rect(math.Sin(th), ph), complex(-math.Cos(th), 0), 0,
			0, 0, -1,
		})
		if d := maxAbsDiff(e.u, want); d > 1e-13 {
			t.Errorf("θ = %g, φ = %g: propagator\n%vdiffers from n·σ ⊕ (−1) by %.3g", th, ph, e.u, d)
		}
	}
}

// Herterich and Sjöqvist, Phys. Rev. A 94, 052310 (2016): one loop in two
// half pulses of area π with the same bright state, the second with its
// drive phase shifted by χ, gives U = |d⟩⟨d| − e^{−iχ}|b⟩⟨b|. If the second
// half has a different bright state the loop does not close on the
// qubit: part of the first half's dark state is left in e (our derivation:
// leakage |⟨b2|d1⟩|²/2 averaged over the qubit, as U2 takes d1 to
// ⟨d2|d1⟩d2 − i⟨b2|d1⟩e).
func TestLambdaHalfPulses(t *testing.T) {
	sc := holonomy.Lambda()
	lc, _ := NewLambdaCoupling(sc)
	th, ph, chi := 0.7, 0.3, 1.9
	e := newLambdaEval(lc, sc, nil, gate("I"))
	e.fullGate([]Segment{{Theta: th, Phi: ph, Area: math.Pi}, {Theta: th, Phi: ph, Phase: chi, Area: math.Pi}})
	d := []complex128{complex(math.Cos(th/2), 0), cmplx.Rect(math.Sin(th/2), ph)}
	b := []complex128{cmplx.Rect(math.Sin(th/2), -ph), complex(-math.Cos(th/2), 0)}
	f := -cmplx.Exp(complex(0, -chi))
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			want := d[i]*cmplx.Conj(d[j]) + f*b[i]*cmplx.Conj(b[j])
			if cmplx.Abs(e.u.At(i, j)-want) > 1e-13 {
				t.Errorf("U[%d][%d] = %v, want %v", i, j, e.u.At(i, j), want)
			}
		}
	}
	// Different bright states in the two halves leak.
	th2 := 1.6
	_, leak := e.gate([]Segment{{Theta: th, Area: math.Pi}, {Theta: th2, Area: math.Pi}})
	s := math.Sin((th2 - th) / 2) // ⟨b2|d1⟩ for φ = 0
	if want := s * s / 2; math.Abs(leak-want) > 1e-13 {
		t.Errorf("leakage %.15g, want |⟨b2|d1⟩|²/2 = %.15g", leak, want)
	}
}

// The closed forms give every gate exactly: named gates and random
// unitaries (seeded), in both forms, propagated exactly, infidelity and
// leakage below 1e-12; also by holonomy.GateFidelity, an independent
// implementation of the fidelity formula.
func TestLambdaClosedForm(t *testing.T) {
	sc := holonomy.Lambda()
	lc, _ := NewLambdaCoupling(sc)
	targets := map[string]*holonomy.Mat{}
	for _, n := range []string{"I", "X", "Y", "Z", "H", "S", "T", "SX"} {
		targets[n] = gate(n)
	}
	rng := rand.New(rand.NewPCG(11, 12))
	for i := 0; i < 20; i++ {
		targets["random"+string(rune('a'+i))] = holonomytest.RandomQubitUnitary(rng)
	}
	for name, tg := range targets {
		for _, form := range []LambdaForm{SingleLoop, TwoLoops} {
			segs, err := LambdaClosedForm(tg, form)
			if err != nil {
				t.Fatal(err)
			}
			e := newLambdaEval(lc, sc, nil, tg)
			inf, leak := e.fullGate(segs)
			fid, leak2 := holonomy.GateFidelity(e.u, sc.Computational, tg)
			if inf > 1e-12 || leak > 1e-12 || 1-fid > 1e-12 || leak2 > 1e-12 {
				t.Errorf("%s, %v: infidelity %.3g (GateFidelity %.3g), leakage %.3g", name, form, inf, 1-fid, leak)
			}
			var area float64
			for _, g := range segs {
				area += g.Area
			}
			if form == SingleLoop && (len(segs) != 2 || area != 2*math.Pi) {
				t.Errorf("%s single loop: %d segments, area %g", name, len(segs), area)
			}
		}
	}
}

// Gates that are one n·σ up to a phase (π rotations: X, Y, Z, H) take a
// single 2π loop in the two-loop form (Sjöqvist et al. 2012), with the
// axis of the gate: H has n = (1, 0, 1)/√2, θ = π/4, φ = 0; X has θ = π/2,
// φ = 0; Y has θ = π/2, φ = π/2; Z has θ = 0. In the single-loop form
// their second half has χ = 0, so the halves join into the same pulse.
func TestLambdaPauliSingleSegment(t *testing.T) {
	want := map[string][2]float64{"H": {math.Pi / 4, 0}, "X": {math.Pi / 2, 0}, "Y": {math.Pi / 2, math.Pi / 2}, "Z": {0, 0}}
	for name, a := range want {
		segs, err := LambdaClosedForm(gate(name), TwoLoops)
		if err != nil {
			t.Fatal(err)
		}
		if len(segs) != 1 || segs[0].Area != 2*math.Pi {
			t.Fatalf("%s: %d segments %+v, want one 2π loop", name, len(segs), segs)
		}
		// n and −n give the same gate up to a phase.
		th, ph := segs[0].Theta, segs[0].Phi
		if !(math.Abs(th-a[0]) < 1e-12 && math.Abs(wrap(ph-a[1])) < 1e-12) &&
			!(math.Abs(th-(math.Pi-a[0])) < 1e-12 && math.Abs(wrap(ph-a[1]-math.Pi)) < 1e-12) {
			t.Errorf("%s: θ = %g, φ = %g; want %v (or the opposite axis)", name, th, ph, a)
		}
		one, _ := LambdaClosedForm(gate(name), SingleLoop)
		if math.Abs(wrap(one[1].Phase)) > 1e-12 {
			t.Errorf("%s single loop: second-half phase %g, want 0", name, one[1].Phase)
		}
	}
}

// rotation returns the rotation (axis n, angle γ ∈ [0, π]) of a SU(2)
// gate, with the sign of the axis fixed by its largest component.
func rotation(u *holonomy.Mat) ([3]float64, float64) {
	a0, a := su2Params(u)
	na := math.Sqrt(a[0]*a[0] + a[1]*a[1] + a[2]*a[2])
	return [3]float64{a[0] / na, a[1] / na, a[2] / na}, 2 * math.Atan2(na, a0)
}

// The search, started from random angles (not from the closed form), lands
// on H, T, √X and X to 1e-6 in both forms. In the single-loop form the gate
// fixes the rotation, so the rotation axis and angle of the design found
// agree with the closed form's.
func TestLambdaSearchLands(t *testing.T) {
	sc := holonomy.Lambda()
	for _, name := range []string{"H", "T", "SX", "X"} {
		for _, form := range []LambdaForm{SingleLoop, TwoLoops} {
			s := &LambdaSearch{Scheme: sc, Target: gate(name), Form: form, Seed: 5}
			res, err := s.Run(context.Background())
			if err != nil {
				t.Fatalf("%s %v: %v", name, form, err)
			}
			fid, leak := holonomy.GateFidelity(res.U, sc.Computational, gate(name))
			if res.Infidelity > 1e-6 || 1-fid > 1e-6 || leak > 1e-12 {
				t.Errorf("%s %v: infidelity %.3g (GateFidelity %.3g), leakage %.3g", name, form, res.Infidelity, 1-fid, leak)
			}
			if form == SingleLoop {
				blk := holonomy.NewMat(2, 2)
				holonomy.Block(blk, res.U, sc.Computational)
				n1, g1 := rotation(blk)
				n2, g2 := rotation(gate(name))
				dn := math.Min(math.Hypot(math.Hypot(n1[0]-n2[0], n1[1]-n2[1]), n1[2]-n2[2]),
					math.Hypot(math.Hypot(n1[0]+n2[0], n1[1]+n2[1]), n1[2]+n2[2]))
				if math.Abs(g1-g2) > 3e-3 || (g2 > 1e-3 && dn > 3e-3) {
					t.Errorf("%s: rotation %.4f about %v, closed form %.4f about %v", name, g1, n1, g2, n2)
				}
			}
			t.Logf("%s %v: infidelity %.2e after %d evaluations in %d runs", name, form, res.Infidelity, res.Evaluations, res.Restarts)
		}
	}
}

func TestLambdaSearchFromClosedForm(t *testing.T) {
	s := &LambdaSearch{Scheme: holonomy.Lambda(), Target: gate("SX"), FromClosedForm: true}
	res, err := s.Run(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	if res.Infidelity > 1e-12 || res.Evaluations > 10 {
		t.Errorf("infidelity %.3g after %d evaluations", res.Infidelity, res.Evaluations)
	}
}

func TestLambdaSearchDeterministicAndCancel(t *testing.T) {
	run := func() *LambdaResult {
		res, err := (&LambdaSearch{Scheme: holonomy.Lambda(), Target: gate("T"), Form: TwoLoops, Seed: 9}).Run(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	a, b := run(), run()
	for i := range a.Params {
		if math.Float64bits(a.Params[i]) != math.Float64bits(b.Params[i]) {
			t.Errorf("parameter %d: %v vs %v", i, a.Params[i], b.Params[i])
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := (&LambdaSearch{Scheme: holonomy.Lambda(), Target: gate("T")}).Run(ctx); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// A pulse-area error ε (a common amplitude scale) gives an infidelity
// growing as ε² for small ε (issue 4; second order because the ideal gate
// is a stationary point of the fidelity). The exponent is measured from
// ε = 1e-3 and 2e-3.
func TestLambdaAreaErrorQuadratic(t *testing.T) {
	sc := holonomy.Lambda()
	lc, _ := NewLambdaCoupling(sc)
	for _, form := range []LambdaForm{SingleLoop, TwoLoops} {
		segs, _ := LambdaClosedForm(gate("H"), form)
		inf := func(eps float64) float64 {
			psc, scale := Perturbation{Amplitude: []float64{eps}}.apply(sc)
			v, _ := newLambdaEval(lc, psc, scale, gate("H")).gate(segs)
			return v
		}
		p := math.Log2(inf(2e-3) / inf(1e-3))
		if math.Abs(p-2) > 0.05 {
			t.Errorf("%v: measured exponent %.4f, want 2", form, p)
		}
	}
}

// The robust Λ design over amplitude and detuning errors is reported
// against the nominal one at every member.
func TestLambdaRobust(t *testing.T) {
	s := &LambdaSearch{Scheme: holonomy.Lambda(), Target: gate("H"), Form: TwoLoops, FromClosedForm: true,
		Ensemble: GridEnsemble(0.05, 0.1, []float64{0, 0, 1})}
	res, err := s.Run(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	r := res.Robust
	if r == nil || len(r.Nominal) != 9 || len(r.Robust) != 9 {
		t.Fatalf("report %+v", r)
	}
	// The fallback to the nominal design (Kept) would make robust ≤
	// nominal hold trivially; this ensemble is known to be improvable
	// (measured ×1.11), so the robust stage must find a better loop.
	if r.Kept || r.Improvement() < 1.05 {
		t.Errorf("robust stage kept the nominal loop or improved the mean only ×%.3f", r.Improvement())
	}
	// The nominal member (ε = 0, δ = 0) of the nominal design is exact.
	if r.Nominal[4] > 1e-12 {
		t.Errorf("nominal design at the nominal member: %.3g", r.Nominal[4])
	}
	t.Logf("Λ two loops, ε ∈ ±5%%, δ_e ∈ ±0.1: mean infidelity nominal %.3g, robust %.3g (×%.2f), worst %.3g → %.3g",
		r.NominalMean, r.RobustMean, r.Improvement(), r.NominalWorst, r.RobustWorst)
}

func TestLambdaCouplingErrors(t *testing.T) {
	if _, err := NewLambdaCoupling(holonomy.Spin(1, 0, 1)); err == nil {
		t.Error("spin-½ has no third level: want an error")
	}
	lc, err := NewLambdaCoupling(holonomy.Tripod())
	if err != nil || lc.Excited != 3 {
		t.Errorf("tripod contains a Λ through e: %+v, %v", lc, err)
	}
	if _, err := LambdaClosedForm(holonomy.Identity(3), SingleLoop); err == nil {
		t.Error("3×3 target: want an error")
	}
}

// TestLambdaColumnsMatchFull: the search propagates only the computational
// columns; their block, infidelity and leakage equal those of the full
// propagator bit for bit (each column is propagated on its own), with and
// without detunings.
func TestLambdaColumnsMatchFull(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	for _, det := range []float64{0, 0.3} {
		sc := holonomy.Lambda()
		sc.Levels[2].Detuning = det
		sc.Levels[1].Detuning = det / 7
		lc, err := NewLambdaCoupling(sc)
		if err != nil {
			t.Fatal(err)
		}
		for rep := 0; rep < 20; rep++ {
			segs := []Segment{
				{Theta: math.Pi * rng.Float64(), Phi: 2 * math.Pi * rng.Float64(), Area: 4 * rng.Float64()},
				{Theta: math.Pi * rng.Float64(), Phi: 2 * math.Pi * rng.Float64(), Phase: rng.Float64(), Area: 4 * rng.Float64()},
			}
			e := newLambdaEval(lc, sc, nil, gate("H"))
			i1, l1 := e.gate(segs)
			b1 := e.blk.Clone()
			i2, l2 := e.fullGate(segs)
			if i1 != i2 || l1 != l2 || holonomy.FrobeniusDist(b1, e.blk) != 0 {
				t.Errorf("detuning %g rep %d: columns (%g, %g), full (%g, %g), blocks differ by %g", det, rep, i1, l1, i2, l2, holonomy.FrobeniusDist(b1, e.blk))
			}
		}
	}
}
