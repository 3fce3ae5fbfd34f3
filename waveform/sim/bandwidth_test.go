package sim

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
)

// stepWaveform returns the Λ Hadamard waveform (1 GS/s) with channel p0
// replaced by a rectangle of height 1 MHz from sample k0 to the end and
// channel p1 switched off, for reading the filtered drive.
func stepWaveform(t *testing.T, k0 int) *waveform.Waveform {
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6))
	for c := range w.I {
		for k := range w.I[c] {
			v := 0.0
			if c == 0 && k >= k0 {
				v = 1e6
			}
			w.I[c][k], w.Q[c][k] = v, 0
		}
	}
	return w
}

// filteredDrive prepares s for m and returns the filtered drive of
// channel c (Hz) at the midpoint of every propagation step, with the
// times of those midpoints (s, counted from the waveform's start).
func filteredDrive(t *testing.T, s *Simulator, m ErrorModel, c int) (ts, ys []float64) {
	t.Helper()
	steps, err := s.prepare(&m)
	if err != nil {
		t.Fatal(err)
	}
	dt := s.w.Dt()
	for j := 0; j < steps; j++ {
		s.controls(j)
		q, o := j/s.sub-s.padL, j%s.sub
		ts = append(ts, (float64(q)+(float64(o)+0.5)/float64(s.sub))*dt)
		ys = append(ys, real(s.drv[c])/s.scale[c])
	}
	return ts, ys
}

// First-order (single-pole RC) low pass: the step response of
// dy/dt = (x − y)/τ is y(t) = 1 − e^{−t/τ} (e.g. Ogata, Modern Control
// Engineering, Prentice Hall, ch. 5, first-order systems; from memory).
// Its 10–90% rise time follows exactly: y(t₁₀) = 0.1 gives
// t₁₀ = τ ln(10/9), y(t₉₀) = 0.9 gives t₉₀ = τ ln 10, so
// t₉₀ − t₁₀ = τ ln 9 ≈ 2.197τ (the "2.2 RC" rise time of common
// practice). The simulator's filtered drive for a held rectangle from
// t₀ to the end T must be S(t − t₀) − S(t − T) with S(u) = 1 − e^{−u/τ}
// for u > 0, over the whole extended grid (the tail after T included),
// and its measured 10–90% rise must be the requested rise time.
func TestFirstOrderStepResponse(t *testing.T) {
	const k0 = 20
	w := stepWaveform(t, k0)
	rise := 20e-9
	tau := rise / math.Log(9)
	m := ErrorModel{SkipDAC: true, Filter: FirstOrderFilter, RiseTime: rise, SubSteps: 64}
	s := NewSimulator(w)
	ts, ys := filteredDrive(t, s, m, 0)
	for i := range ys {
		ys[i] /= 1e6 // unit step
	}
	if s.padL != 0 || s.ahead != 0 {
		t.Fatalf("a causal filter pads %d samples before and weighs %d future samples", s.padL, s.ahead)
	}
	if reach := float64(s.padR) * w.Dt() / tau; reach < 12*math.Ln10 {
		t.Errorf("the grid extends %.3gτ after the end; need ≥ 12 ln 10 τ = 27.6τ", reach)
	}
	S := func(u float64) float64 {
		if u <= 0 {
			return 0
		}
		return -math.Expm1(-u / tau)
	}
	t0, tEnd := float64(k0)*w.Dt(), w.Duration()
	var worst float64
	for i, tt := range ts {
		want := S(tt-t0) - S(tt-tEnd)
		worst = math.Max(worst, math.Abs(ys[i]-want))
	}
	t.Logf("first-order filter, rise %g s (τ = %.4g s): largest deviation from 1 − e^{−t/τ} over %d points: %.3g", rise, tau, len(ts), worst)
	if worst > 2e-12 {
		t.Errorf("filtered step deviates from S(t − t₀) − S(t − T) by %.3g (allowed 2e-12: the 1e-12 neglected tail)", worst)
	}
	// Measured 10–90% rise: linear interpolation between step midpoints
	// (spacing Δt/64; the interpolation error is about h²/(8τ) ≈ 4e-15 s).
	cross := func(level float64) float64 {
		for i := 1; i < len(ys); i++ {
			if ys[i-1] < level && ys[i] >= level {
				return ts[i-1] + (level-ys[i-1])/(ys[i]-ys[i-1])*(ts[i]-ts[i-1])
			}
		}
		t.Fatalf("the step never crosses %g", level)
		return 0
	}
	t10, t90 := cross(0.1), cross(0.9)
	t.Logf("10%% at t₀ + %.6g s (τ ln(10/9) = %.6g s), 90%% at t₀ + %.6g s (τ ln 10 = %.6g s), rise %.9g s", t10-t0, tau*math.Log(10.0/9), t90-t0, tau*math.Ln10, t90-t10)
	if d := math.Abs((t90-t10)-rise) / rise; d > 1e-6 {
		t.Errorf("measured 10–90%% rise %.9g s, want %g s (relative error %.3g)", t90-t10, rise, d)
	}
	if d := math.Abs((t10 - t0) - tau*math.Log(10.0/9)); d > 1e-6*rise {
		t.Errorf("10%% point at t₀ + %.9g s, want τ ln(10/9) = %.9g s", t10-t0, tau*math.Log(10.0/9))
	}
}

// The first-order kernel: no weight on future samples, every weight the
// difference of step responses it stands for, and every row summing to
// 1 − e^{−a(x + back)} ≥ 1 − 1e−12 (unit DC gain up to the neglected
// tail).
func TestFirstOrderKernel(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6))
	s := NewSimulator(w)
	const sub = 8
	rise := 3e-9
	s.setKernel(FirstOrderFilter, rise, sub)
	if s.ahead != 0 {
		t.Fatalf("first-order kernel weighs %d future samples", s.ahead)
	}
	a := w.Dt() / (rise / math.Log(9))
	width := s.back + 1
	S := func(u float64) float64 { return math.Max(0, 1-math.Exp(-u)) }
	for o := 0; o < sub; o++ {
		x := (float64(o) + 0.5) / sub
		row := s.kernel[o*width : (o+1)*width]
		var sum float64
		for r := -s.back; r <= 0; r++ {
			v := row[r+s.back]
			if v < 0 {
				t.Fatalf("sub-step %d: negative weight %g at r = %d", o, v, r)
			}
			if want := S((x-float64(r))*a) - S((x-float64(r)-1)*a); math.Abs(v-want) > 1e-15 {
				t.Errorf("sub-step %d, r = %d: weight %.17g, S difference %.17g", o, r, v, want)
			}
			sum += v
		}
		tail := math.Exp(-a * (x + float64(s.back)))
		if math.Abs(sum-(1-tail)) > 1e-14 || tail > 1e-12 {
			t.Errorf("sub-step %d: weights sum to %.17g; want 1 − %.3g with the tail ≤ 1e-12", o, sum, tail)
		}
	}
}

// A fixed-direction cyclic Λ gate (Sjöqvist et al., New J. Phys. 14,
// 103035 (2012)) has H(t) = A(t)H₀: its steps commute and the gate
// depends only on the pulse area ∫A dt. A first-order filter has unit DC
// gain (∫ of its impulse response = 1), so the filtered pulse, followed
// to the end of its tail, has the same area and the gate is unchanged,
// for a short and for a long rise time. Two back-to-back pulses of
// different phase (the two-segment loop of TestTwoSegmentLoop) are not
// protected: the tail of the first leaks into the second with the wrong
// drive direction, so a rise time short against the pulses keeps
// F ≥ 0.9999 while a long one degrades the gate.
func TestFirstOrderLambda(t *testing.T) {
	lam := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6))
	ideal, err := Simulate(lam, ErrorModel{SkipDAC: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, rise := range []float64{1e-9, 50e-9} {
		m := ErrorModel{SkipDAC: true, Filter: FirstOrderFilter, RiseTime: rise}
		// Area of the filtered drive against the held samples'.
		s := NewSimulator(lam)
		_, ys := filteredDrive(t, s, m, 1)
		var filtArea, heldArea float64
		for _, y := range ys {
			filtArea += y * lam.Dt() / float64(s.sub)
		}
		for _, v := range lam.I[1] {
			heldArea += v * lam.Dt()
		}
		if d := math.Abs(filtArea/heldArea - 1); d > 1e-11 {
			t.Errorf("rise %g s: filtered area %.15g, held area %.15g (relative %.3g)", rise, filtArea, heldArea, d)
		}
		out, err := Simulate(lam, m)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("single Λ pulse (%d samples), first-order rise %g s: F = %.12f (unfiltered %.12f), area off by %.3g", lam.Len(), rise, out.Fidelity, ideal.Fidelity, filtArea/heldArea-1)
		if d := math.Abs(out.Fidelity - ideal.Fidelity); d > 1e-9 {
			t.Errorf("single Λ pulse, rise %g s: F = %.12f, unfiltered %.12f", rise, out.Fidelity, ideal.Fidelity)
		}
	}

	theta, phi, gamma := math.Pi/3, 0.4, math.Pi/2
	p := twoSegmentPlan(theta, phi, gamma)
	w := wavetest.MustBuild(t, p, wavetest.Hardware(2, 10e6))
	zoh, err := Simulate(w, ErrorModel{})
	if err != nil {
		t.Fatal(err)
	}
	fid := map[float64]float64{}
	for _, rise := range []float64{1e-9, 5e-9, 20e-9, 50e-9} {
		out, err := Simulate(w, ErrorModel{Filter: FirstOrderFilter, RiseTime: rise})
		if err != nil {
			t.Fatal(err)
		}
		fid[rise] = out.Fidelity
		t.Logf("two-segment Λ gate (%d samples, %.3g s), first-order rise %g s: F = %.9f (1 − F = %.3g; unfiltered 1 − F = %.3g)",
			w.Len(), w.Duration(), rise, out.Fidelity, 1-out.Fidelity, 1-zoh.Fidelity)
	}
	if fid[1e-9] < 0.9999 {
		t.Errorf("two-segment gate, 1 ns rise time: F = %.9f < 0.9999", fid[1e-9])
	}
	if !(fid[50e-9] < 0.9999 && fid[50e-9] < fid[1e-9]) {
		t.Errorf("two-segment gate, 50 ns rise time: F = %.9f does not degrade (1 ns: %.9f)", fid[50e-9], fid[1e-9])
	}
}

// twoSegmentPlan is the plan of TestTwoSegmentLoop: two pulses of area π
// along the bright direction of (θ, φ), the second with its drive phase
// shifted by γ.
func twoSegmentPlan(theta, phi, gamma float64) *waveform.Plan {
	b := []complex128{cmplx.Rect(math.Sin(theta/2), -phi), complex(-math.Cos(theta/2), 0)}
	f := 1 + cmplx.Rect(1, -gamma)
	target := holonomy.NewMat(2, 2)
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			v := -f * b[i] * cmplx.Conj(b[j])
			if i == j {
				v++
			}
			target.Set(i, j, v)
		}
	}
	return &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: target,
		Segments: []waveform.Segment{
			{Kind: waveform.CyclicSegment, Area: math.Pi, Shape: func(s float64, p holonomy.Point) { holonomy.LambdaPoint(p, 1, theta, phi) }},
			{Kind: waveform.CyclicSegment, Area: math.Pi, Shape: func(s float64, p holonomy.Point) {
				holonomy.LambdaPoint(p, 1, theta, phi)
				for c := range p.Drive {
					p.Drive[c] *= cmplx.Rect(1, gamma)
				}
			}},
		},
	}
}

// Finite drive-phase resolution on the cyclic Λ gate of Sjöqvist et al.,
// New J. Phys. 14, 103035 (2012): the drive (sin(θ/2)e^{iφ}, −cos(θ/2))
// gives n·σ with n = (sin θ cos φ, sin θ sin φ, cos θ). Rounding φ to a
// grid of step 2π/2^b turns it into φ' = φ − δ (channel p1's phase π is
// on the grid and stays exact), so the gate becomes n'·σ and its average
// fidelity (Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47 (2007))
// is F = (2 + |Tr((n·σ)(n'·σ))|²)/6 = (2 + 4(n·n')²)/6 with
// n·n' = sin²θ cos δ + cos²θ: checked gate by gate. Over many gates with
// unrelated φ the rounding error δ is spread uniformly over a step, with
// variance step²/12, so the mean infidelity ≈ (2/3) sin²θ ⟨δ²⟩ =
// sin²θ step²/18 falls as step² (exponent 2): measured by a log-log fit.
func TestPhaseStepLambda(t *testing.T) {
	theta := math.Pi / 3
	const gates = 24
	bits := []int{3, 4, 5, 6, 7, 8, 9, 10}
	mean := make([]float64, len(bits))
	for g := 0; g < gates; g++ {
		// Quasi-random phases in (−π, π), unrelated to the grids.
		_, fr := math.Modf(0.1 + float64(g)*0.6180339887498949)
		phi := 2*math.Pi*fr - math.Pi
		w := wavetest.MustBuild(t, wavetest.LambdaPlan(theta, phi, wavetest.NDotSigma(theta, phi)), wavetest.Hardware(2, 10e6))
		s := NewSimulator(w)
		var base Figures
		if err := s.Run(ErrorModel{SkipDAC: true}, &base); err != nil {
			t.Fatal(err)
		}
		for i, b := range bits {
			step := 2 * math.Pi / float64(int(1)<<b)
			var out Figures
			if err := s.Run(ErrorModel{SkipDAC: true, PhaseStep: step}, &out); err != nil {
				t.Fatal(err)
			}
			delta := phi - step*math.Round(phi/step)
			nn := math.Pow(math.Sin(theta), 2)*math.Cos(delta) + math.Pow(math.Cos(theta), 2)
			want := (2 + 4*nn*nn) / 6
			// The sampled gate's own error (1 − F of the exact phases)
			// combines with the rounding error like two small rotations:
			// the infidelities' square roots add at worst.
			if d := math.Abs(out.Fidelity - want); d > combined(1-base.Fidelity, 1-want)+1e-12 {
				t.Errorf("φ = %.6f, step 2π/2^%d: 1 − F = %.6g, predicted %.6g from δ = %.3g (unrounded 1 − F = %.3g)",
					phi, b, 1-out.Fidelity, 1-want, delta, 1-base.Fidelity)
			}
			mean[i] += (1 - out.Fidelity) / gates
		}
	}
	// Least-squares slope of log(mean infidelity) against log(step).
	var sx, sy, sxx, sxy float64
	for i, b := range bits {
		x, y := math.Log(2*math.Pi/float64(int(1)<<b)), math.Log(mean[i])
		sx, sy, sxx, sxy = sx+x, sy+y, sxx+x*x, sxy+x*y
	}
	n := float64(len(bits))
	slope := (n*sxy - sx*sy) / (n*sxx - sx*sx)
	for i, b := range bits {
		step := 2 * math.Pi / float64(int(1)<<b)
		pred := math.Pow(math.Sin(theta), 2) * step * step / 18
		t.Logf("step 2π/2^%-2d = %.4g rad: mean 1 − F over %d gates = %.4g (uniform-error estimate sin²θ step²/18 = %.4g, ratio %.3f)", b, step, gates, mean[i], pred, mean[i]/pred)
		if i > 0 && !(mean[i] < mean[i-1]) {
			t.Errorf("mean infidelity does not fall from step 2π/2^%d to 2π/2^%d: %.4g → %.4g", bits[i-1], b, mean[i-1], mean[i])
		}
	}
	t.Logf("measured exponent: mean 1 − F ∝ step^%.4f (expected 2)", slope)
	if math.Abs(slope-2) > 0.15 {
		t.Errorf("mean infidelity ∝ step^%.3f; want an exponent near 2", slope)
	}
}

// The ideal model is reproduced bit for bit: filter none (a filter kind
// without a rise time) and PhaseStep = 0 give the same outcome as the
// zero ErrorModel, and so does a phase step on whose grid every drive
// phase already lies (the Λ Hadamard's drives are real: phases 0 on p0
// and π on p1, both multiples of π/2 and of 2π/1024).
func TestIdealModelBitForBit(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6))
	ref, err := Simulate(w, ErrorModel{})
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range []ErrorModel{
		{Filter: FirstOrderFilter},
		{Filter: GaussianFilter, PhaseStep: 0},
		{PhaseStep: math.Pi / 2},
		{PhaseStep: 2 * math.Pi / 1024, Filter: FirstOrderFilter},
	} {
		out, err := Simulate(w, m)
		if err != nil {
			t.Fatal(err)
		}
		if !sameOutcome(ref, out) {
			t.Errorf("model %+v: F = %.17g, leakage %.17g; ideal F = %.17g, leakage %.17g (or traces differ)", m, out.Fidelity, out.Leakage, ref.Fidelity, ref.Leakage)
		}
	}
	// A phase step that moves p1's phase π (to 4π/3) changes the gate.
	out, err := Simulate(w, ErrorModel{PhaseStep: math.Pi * 2 / 3})
	if err != nil {
		t.Fatal(err)
	}
	// p0 keeps phase 0, p1 goes from π to 4π/3: a relative phase error
	// δ = π/3, so (TestPhaseStepLambda) F = (2 + 4(n·n')²)/6 with
	// n·n' = sin²θ cos δ + cos²θ = 3/4 for θ = π/4: F = 17/24.
	want := 17.0 / 24
	t.Logf("Λ Hadamard: F = %.12f ideal, %.12f with phase step 2π/3 (predicted 17/24 = %.12f)", ref.Fidelity, out.Fidelity, want)
	if d := math.Abs(out.Fidelity - want); d > combined(1-ref.Fidelity, 1-want) {
		t.Errorf("a phase step of 2π/3 gives F = %.12f; predicted %.12f", out.Fidelity, want)
	}
}

// combined bounds how far the fidelity of a gate with two small errors,
// of infidelities e1 and e2 alone, can lie from 1 − e2: the errors add as
// rotation angles, whose squares the infidelities are to leading order,
// so the cross term is at most 2√(e1 e2), plus e1 itself.
func combined(e1, e2 float64) float64 {
	return 2*math.Sqrt(math.Abs(e1*e2)) + math.Abs(e1)
}

// sameOutcome reports whether a and b agree bit for bit.
func sameOutcome(a, b *Figures) bool {
	eq := func(x, y []float64) bool {
		if len(x) != len(y) {
			return false
		}
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(y[i]) {
				return false
			}
		}
		return true
	}
	if math.Float64bits(a.Fidelity) != math.Float64bits(b.Fidelity) || math.Float64bits(a.Leakage) != math.Float64bits(b.Leakage) ||
		!eq(a.PeakAux, b.PeakAux) || !eq(a.PeakExcited, b.PeakExcited) || !eq(a.Times, b.Times) || len(a.Populations) != len(b.Populations) {
		return false
	}
	for i := range a.Populations {
		for l := range a.Populations[i] {
			if !eq(a.Populations[i][l], b.Populations[i][l]) {
				return false
			}
		}
	}
	return true
}

// roundPhase keeps the modulus, lands on the grid, rounds to the nearest
// multiple and leaves on-grid and zero samples untouched.
func TestRoundPhase(t *testing.T) {
	step := 2 * math.Pi / 64
	for _, z := range []complex128{complex(3, 4), complex(-1e6, 2.5e5), complex(-2, -1e-9), complex(0, -7)} {
		r := roundPhase(z, step)
		if d := math.Abs(cmplx.Abs(r)/cmplx.Abs(z) - 1); d > 1e-15 {
			t.Errorf("%v → %v: modulus changed by %.3g", z, r, d)
		}
		ph := cmplx.Phase(r)
		if k := ph / step; math.Abs(k-math.Round(k)) > 1e-9 {
			t.Errorf("%v → %v: phase %.17g is %.6g steps", z, r, ph, k)
		}
		if d := math.Abs(cmplx.Phase(z) - ph); d > step/2+1e-12 {
			t.Errorf("%v → %v: phase moved by %.6g > half a step", z, r, d)
		}
	}
	for _, z := range []complex128{0, 5, -5, complex(0, 2), complex(0, -2), complex(3, 3)} {
		if r := roundPhase(z, math.Pi/4); r != z {
			t.Errorf("on-grid %v changed to %v", z, r)
		}
	}
}

// Invalid filter and phase-step settings are errors that say what is
// wrong.
func TestFilterAndPhaseStepErrors(t *testing.T) {
	w := tripod2000(t)
	for _, c := range []struct {
		m   ErrorModel
		msg string
	}{
		{ErrorModel{Filter: FilterKind(7), RiseTime: 1e-9}, "unknown filter kind 7"},
		{ErrorModel{Filter: FilterKind(-1)}, "unknown filter kind -1"},
		// 400 ns: the Gaussian kernel reaches 936 samples, the
		// first-order one 27.6 × 400 ns / ln 9 × 1 GS/s = 5030 > 4096.
		{ErrorModel{Filter: FirstOrderFilter, RiseTime: 400e-9}, "first-order filter of rise time 4e-07 s reaches 5030 samples"},
		{ErrorModel{PhaseStep: -0.1}, "phase step -0.1 rad"},
		{ErrorModel{PhaseStep: math.NaN()}, "phase step NaN rad"},
		{ErrorModel{PhaseStep: math.Inf(1)}, "phase step +Inf rad"},
		{ErrorModel{PhaseStep: math.Nextafter(math.Pi, 4)}, "to π"},
	} {
		_, err := Simulate(w, c.m)
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("model %+v: error %v; want one containing %q", c.m, err, c.msg)
		}
	}
	if _, err := Simulate(w, ErrorModel{Filter: GaussianFilter, RiseTime: 400e-9, SubSteps: 1}); err != nil {
		t.Errorf("Gaussian filter of 400 ns on a %d-sample gate: %v", w.Len(), err)
	}
	if _, err := Simulate(w, ErrorModel{PhaseStep: math.Pi}); err != nil {
		t.Errorf("phase step π: %v", err)
	}
	if FirstOrderFilter.String() != "first-order" || GaussianFilter.String() != "gaussian" || FilterKind(5).String() != "FilterKind(5)" {
		t.Errorf("filter names %q %q %q", FirstOrderFilter, GaussianFilter, FilterKind(5))
	}
}
