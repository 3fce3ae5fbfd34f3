package dynamical

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/holonomy/holonomytest"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/robust"
	"github.com/loopgate/loopgate/waveform/sim"
)

func TestAdvantageDecomposeQubit(t *testing.T) {
	r := 1 / math.Sqrt2
	named := map[string]struct {
		u    []complex128
		area float64
	}{
		"X":  {[]complex128{0, 1, 1, 0}, math.Pi},
		"H":  {[]complex128{complex(r, 0), complex(r, 0), complex(r, 0), complex(-r, 0)}, math.Pi / 2},
		"T":  {[]complex128{1, 0, 0, cmplx.Rect(1, math.Pi/4)}, 0},
		"√X": {[]complex128{complex(0.5, 0.5), complex(0.5, -0.5), complex(0.5, -0.5), complex(0.5, 0.5)}, math.Pi / 2},
		"I":  {[]complex128{1, 0, 0, 1}, 0},
	}
	check := func(name string, u *holonomy.Mat) DynamicalPulse {
		p, err := DecomposeQubit(u)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if d := holonomytest.PhaseDistance(p.Unitary(), u); d > 1e-12 {
			t.Errorf("%s: %v reconstructs U to %.3g", name, p, d)
		}
		if p.Area < 0 || p.Area > math.Pi+1e-15 || math.Abs(p.Phase) > math.Pi || math.Abs(p.ZAngle) > math.Pi {
			t.Errorf("%s: angles out of range: %+v", name, p)
		}
		return p
	}
	for name, c := range named {
		p := check(name, holonomy.NewMatFrom(2, 2, c.u))
		if math.Abs(p.Area-c.area) > 1e-12 {
			t.Errorf("%s: area %v, want %v", name, p.Area, c.area)
		}
	}
	rng := rand.New(rand.NewPCG(7, 11))
	for k := 0; k < 200; k++ {
		// Haar-random unitary: independent of the pulse parametrisation.
		check("random", holonomytest.RandomQubitUnitary(rng))
	}
	if _, err := DecomposeQubit(holonomy.NewMatFrom(2, 2, []complex128{1, 1, 0, 1})); err == nil {
		t.Error("non-unitary target: no error")
	}
}

// TestAdvantageDynamicalGate checks the comparison gate: ideal fidelity 1 for
// several targets, and for the amplitude error ε the closed form
// 1 − F = (2/3) sin²(θε/2) of a rotation by θ(1 + ε) in place of θ —
// derived from F = (2 + |Tr M|²)/6 (Pedersen, Møller and Mølmer,
// Phys. Lett. A 367, 47 (2007), d = 2, no leakage) with Tr M = 2cos(θε/2).
func TestAdvantageDynamicalGate(t *testing.T) {
	r := 1 / math.Sqrt2
	targets := map[string]*holonomy.Mat{
		"H":   holonomy.NewMatFrom(2, 2, []complex128{complex(r, 0), complex(r, 0), complex(r, 0), complex(-r, 0)}),
		"Ry":  wavetest.Rotation(math.Pi / 4),
		"X":   holonomy.NewMatFrom(2, 2, []complex128{0, 1, 1, 0}),
		"T":   holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, cmplx.Rect(1, math.Pi/4)}),
		"rnd": DynamicalPulse{Area: 2.1, Phase: -0.7, ZAngle: 1.3}.Unitary(),
	}
	for name, u := range targets {
		geo := wavetest.RobustLambda(t, math.Pi/2, 0)
		geo.Target = u
		d, err := NewDynamical(geo)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		dw := d.Waveform
		if name == "T" {
			if dw.Len() != 0 {
				t.Errorf("T: diagonal target needs no pulse, got %d samples", dw.Len())
			}
			out, err := sim.Simulate(dw, sim.ErrorModel{AmplitudeError: 0.2, TwoPhotonDetuning: 1e6})
			if err != nil || math.Abs(1-out.Fidelity) > 1e-15 {
				t.Errorf("T: frame change alone should be exact: %v, %v", out, err)
			}
			t.Logf("T: %v", d)
		} else if peak := d.Waveform.Segments[0].Amplitude; peak > geo.Hardware.MaxRabi[0]*(1+1e-12) {
			t.Errorf("%s: peak Rabi %v Hz above the limit", name, peak)
		}
		for _, eps := range []float64{0, 0.03, -0.05} {
			out, err := sim.Simulate(dw, sim.ErrorModel{SkipDAC: true, AmplitudeError: eps})
			if err != nil {
				t.Fatal(err)
			}
			s := math.Sin(d.Pulse.Area * eps / 2)
			want := 2.0 / 3 * s * s
			if got := 1 - out.Fidelity; math.Abs(got-want) > 1e-10 {
				t.Errorf("%s ε=%v: 1 − F = %.6g, closed form %.6g", name, eps, got, want)
			}
		}
	}
}

// rbFitExponent returns the least-squares slope of log y against log x.
func rbFitExponent(x, y []float64) float64 {
	var sx, sy, sxx, sxy float64
	for i := range x {
		lx, ly := math.Log(x[i]), math.Log(y[i])
		sx += lx
		sy += ly
		sxx += lx * lx
		sxy += lx * ly
	}
	n := float64(len(x))
	return (n*sxy - sx*sy) / (n*sxx - sx*sx)
}

// TestAdvantageLambdaAreaErrorQuadratic: for the nonadiabatic Λ gate
// (Sjöqvist et al., New J. Phys. 14, 103035 (2012)) a pulse-area error ε
// (area 2π(1 + ε)) leaves the bright state with amplitude −cos(πε) and
// the rest in the excited level, so the infidelity grows as ε². With
// F = (Tr(M†M) + |Tr M|²)/6 (Pedersen et al. 2007) and
// M ∝ |d⟩⟨d| + cos(πε)|b⟩⟨b| this is, derived here,
//
//	1 − F = (1 − c)(2 + c)/3,  c = cos(πε),  ≈ (π²/2) ε².
//
// The test measures the exponent by a log-log fit over small ε (both
// signs) and compares every point with the closed form.
func TestAdvantageLambdaAreaErrorQuadratic(t *testing.T) {
	w := wavetest.RobustLambda(t, math.Pi/3, 0.4)
	eps := []float64{-0.016, -0.008, -0.004, -0.002, -0.001, 0.001, 0.002, 0.004, 0.008, 0.016}
	sm := sim.NewSimulator(w)
	out := new(sim.Figures)
	var ax, ay []float64
	for _, e := range eps {
		if err := sm.Run(sim.ErrorModel{SkipDAC: true, AmplitudeError: e}, out); err != nil {
			t.Fatal(err)
		}
		inf := 1 - out.Fidelity
		c := math.Cos(math.Pi * e)
		if want := (1 - c) * (2 + c) / 3; math.Abs(inf-want) > 1e-10 {
			t.Errorf("ε = %v: 1 − F = %.8g, closed form %.8g", e, inf, want)
		}
		ax = append(ax, math.Abs(e))
		ay = append(ay, inf)
	}
	p := rbFitExponent(ax, ay)
	pref := ay[len(ay)-1] / (ax[len(ax)-1] * ax[len(ax)-1])
	t.Logf("Λ gate: measured exponent %.5f, prefactor at ε = 0.016 %.4f (π²/2 = %.4f)", p, pref, math.Pi*math.Pi/2)
	if math.Abs(p-2) > 0.1 {
		t.Errorf("exponent %.4f, want 2 ± 0.1", p)
	}
}

// TestAdvantageTripodCommonScale: a common amplitude scale Ω → (1 + ε)Ω
// leaves the normalised drive vector, hence the dark subspace along the
// loop and the adiabatic tripod holonomy, unchanged (Duan, Cirac and
// Zoller, Science 292, 1695 (2001)); only the non-adiabatic error moves.
//
// The bound used: scaling H by (1 + ε) scales ⟨m|∂_tH|n⟩ by (1 + ε) and
// the gaps by (1 + ε), so the adiabaticity parameter α = max|⟨m|∂_tH|n⟩|/
// (E_m − E_n)² becomes α/(1 + ε). First-order adiabatic perturbation theory
// gives an admixture of the other states of amplitude at most α, so the
// non-adiabatic infidelity is bounded by α² (common practice as an
// estimate, not a rigorous bound). The test asserts
// 1 − F(ε) ≤ (α/(1 + ε))² for ε = ±5% and, so that it could fail, that this
// bound is well below the error a dynamical rotation of the same angle
// would show at the same ε.
func TestAdvantageTripodCommonScale(t *testing.T) {
	w := wavetest.RobustTripod(t, math.Pi/2, 0.02, 20e6)
	alpha, err := w.MeasureAdiabaticity()
	if err != nil {
		t.Fatal(err)
	}
	sm := sim.NewSimulator(w)
	out := new(sim.Figures)
	if err := sm.Run(sim.ErrorModel{SkipDAC: true}, out); err != nil {
		t.Fatal(err)
	}
	f0 := out.Fidelity
	for _, e := range []float64{-0.05, 0.05} {
		if err := sm.Run(sim.ErrorModel{SkipDAC: true, AmplitudeError: e}, out); err != nil {
			t.Fatal(err)
		}
		bound := math.Pow(alpha/(1+e), 2)
		s := math.Sin(math.Pi / 2 * e) // rotation angle π
		dyn := 2.0 / 3 * s * s
		t.Logf("ε = %+.2f: 1 − F = %.3g (ε = 0: %.3g), bound α² = %.3g, dynamical π rotation %.3g", e, 1-out.Fidelity, 1-f0, bound, dyn)
		if 1-out.Fidelity > bound {
			t.Errorf("ε = %v: infidelity %.3g above the non-adiabatic bound %.3g", e, 1-out.Fidelity, bound)
		}
		if bound > dyn/4 {
			t.Errorf("bound %.3g does not separate from the dynamical error %.3g", bound, dyn)
		}
	}
}

// TestAdvantageDynamicalPrefactor: the dynamical gate's infidelity grows as
// ε² (exponent measured by a log-log fit) with a prefactor far larger than
// the tripod holonomy's, which is insensitive to a common scale. The
// tripod's prefactor is measured as max |F(ε) − F(0)|/ε² over the same ε.
func TestAdvantageDynamicalPrefactor(t *testing.T) {
	geo := wavetest.RobustTripod(t, math.Pi/2, 0.02, 20e6)
	dyn, err := NewDynamical(geo)
	if err != nil {
		t.Fatal(err)
	}
	eps := []float64{0.0025, 0.005, 0.01, 0.02}
	var all []float64
	for _, e := range eps {
		all = append(all, -e, e)
	}
	all = append(all, 0)
	base := sim.ErrorModel{SkipDAC: true}
	var sw [2]*robust.Sweep
	for g, w := range []*waveform.Waveform{geo, dyn.Waveform} {
		s := &robust.Sweep{Axis: robust.AmplitudeAxis, X: all}
		wk := new(robust.Worker)
		for _, x := range all {
			m := base
			m.AmplitudeError = x
			out, err := wk.Run(w, m)
			if err != nil {
				t.Fatal(err)
			}
			s.Fidelity = append(s.Fidelity, out.Fidelity)
		}
		sw[g] = s
	}
	prefactor := func(s *robust.Sweep) (exp, pref float64) {
		f0 := s.Fidelity[len(s.Fidelity)-1]
		var ax, ay []float64
		for i, x := range s.X[:len(s.X)-1] {
			d := math.Abs(s.Fidelity[i] - f0)
			ax = append(ax, math.Abs(x))
			ay = append(ay, math.Max(d, 1e-300))
			pref = math.Max(pref, d/(x*x))
		}
		return rbFitExponent(ax, ay), pref
	}
	pd, cd := prefactor(sw[1])
	_, cg := prefactor(sw[0])
	t.Logf("dynamical: exponent %.4f, prefactor %.4f (closed form (2/3)(θ/2)² = %.4f); tripod prefactor %.3g; ratio %.3g",
		pd, cd, 2.0/3*math.Pow(dyn.Pulse.Area/2, 2), cg, cd/cg)
	if math.Abs(pd-2) > 0.1 {
		t.Errorf("dynamical exponent %.4f, want 2 ± 0.1", pd)
	}
	if !(cd > 10*cg) {
		t.Errorf("dynamical prefactor %.3g not well above the tripod's %.3g", cd, cg)
	}
}

// TestAdvantageCompareTripod runs the geometric-advantage comparison on a tripod
// gate and checks that every closed edge is where the fidelity crosses the
// threshold and that, along the amplitude axis, the geometric gate is the
// more robust (Duan, Cirac and Zoller 2001); the detuning result is only
// reported.
func TestAdvantageCompareTripod(t *testing.T) {
	geo := wavetest.RobustTripod(t, math.Pi/4, 0.05, 20e6)
	ranges := []robust.Range{
		{Axis: robust.AmplitudeAxis, Min: -0.1, Max: 0.1, Points: 11},
		{Axis: robust.TwoPhotonAxis, Min: -50e3, Max: 50e3, Points: 11},
	}
	base := sim.ErrorModel{SkipDAC: true}
	cmp, err := Compare(context.Background(), geo, ranges, &robust.SweepOptions{Base: base})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("dynamical gate: %v", cmp.Dynamical)
	for _, r := range cmp.Rows {
		t.Logf("%v: geometric [%.6g, %.6g] (open %v %v), dynamical [%.6g, %.6g] (open %v %v), ratio %.4g; %s",
			r.Axis, r.Geometric.Low, r.Geometric.High, r.Geometric.LowOpen, r.Geometric.HighOpen,
			r.Dynamical.Low, r.Dynamical.High, r.Dynamical.LowOpen, r.Dynamical.HighOpen, r.Ratio, r.Note)
		for g, w := range map[*waveform.Waveform]robust.Width{geo: r.Geometric, cmp.Dynamical.Waveform: r.Dynamical} {
			for _, e := range []struct {
				x    float64
				open bool
			}{{w.Low, w.LowOpen}, {w.High, w.HighOpen}} {
				if e.open {
					continue
				}
				m := base
				r.Axis.Set(&m, e.x)
				out, err := sim.Simulate(g, m)
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(out.Fidelity-cmp.Threshold) > 1e-7 {
					t.Errorf("%v: fidelity at edge %v is %.9f, not the threshold", r.Axis, e.x, out.Fidelity)
				}
			}
		}
	}
	// Dynamical amplitude edges: closed form ε* = (2/θ) asin(√(3(1 − F*)/2)).
	amp := cmp.Rows[0]
	want := 2 / cmp.Dynamical.Pulse.Area * math.Asin(math.Sqrt(1.5*(1-cmp.Threshold)))
	if math.Abs(amp.Dynamical.High-want) > 1e-6*want || math.Abs(amp.Dynamical.Low+want) > 1e-6*want {
		t.Errorf("dynamical amplitude edges [%v, %v], closed form ±%v", amp.Dynamical.Low, amp.Dynamical.High, want)
	}
	if !(amp.Ratio > 1) {
		t.Errorf("amplitude axis: geometric width %v not above dynamical %v", amp.Geometric.Width, amp.Dynamical.Width)
	}
	if _, err := Compare(context.Background(), geo, []robust.Range{{Axis: robust.OnePhotonAxis, Min: -1, Max: 1, Points: 3}}, nil); err == nil {
		t.Error("one-photon axis: no error")
	}
}
