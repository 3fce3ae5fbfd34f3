package report

import (
	"math"
	"math/cmplx"
)

// syntheticData builds a full report input from simple closed-form
// functions. It is SYNTHETIC: no physics engine produced these numbers; they
// only exercise the report's layout and drawing, and the page says so.
func syntheticData() *Data {
	const (
		T     = 4e-6  // gate duration, s
		n     = 401   // samples
		peak  = 2.5e6 // peak Rabi frequency Ω/2π, Hz
		limit = 3e6   // hardware limit, Hz
	)
	d := &Data{
		Title:         "Synthetic test report",
		Subtitle:      "layout check of the report writer",
		Notice:        "SYNTHETIC DATA: every number on this page comes from closed-form test functions, not from a gate design.",
		Gate:          "X(π/2) (synthetic)",
		Scheme:        "tripod: qubit g0, g1; auxiliary a; excited e; channels p0, p1, pa",
		DynamicalGate: "resonant pulse on g0–g1 with the same peak Rabi frequency (synthetic)",
		Provenance: Provenance{
			Version:  "v0.0.0-test",
			SpecHash: "sha256:5d41402abc4b2a76b9719d911017c592e4f3a1c2b0d9e8f7a6b5c4d3e2f1a0b9",
			Seed:     42,
			Source:   "synthetic (report tests)",
		},
	}

	// The loop: θ(s) = (π/3)·sin²(πs) away from the pa axis, φ(s) = πs/2
	// around it, and a phase 2πs on p1 (closed: θ(0) = θ(1) = 0).
	theta := func(s float64) float64 { x := math.Sin(math.Pi * s); return math.Pi / 3 * x * x }
	phi := func(s float64) float64 { return math.Pi / 2 * s }
	alpha := func(s float64) float64 { return 2 * math.Pi * s }
	drive := func(s float64) [3]complex128 {
		st, ct := math.Sincos(theta(s))
		sp, cp := math.Sincos(phi(s))
		return [3]complex128{
			complex(st*cp, 0),
			cmplx.Rect(st*sp, alpha(s)),
			complex(ct, 0),
		}
	}
	d.Loop = &Loop{Channels: []string{"p0", "p1", "pa"}}
	for k := 0; k <= 200; k++ {
		v := drive(float64(k) / 200)
		d.Loop.Drive = append(d.Loop.Drive, v[:])
	}

	// Waveforms: drive components times a smooth envelope sin(πt/T)^0.5.
	names := []string{"p0", "p1", "pa"}
	for c, name := range names {
		w := Waveform{Channel: name, MaxRabi: limit}
		for k := 0; k < n; k++ {
			t := T * float64(k) / (n - 1)
			s := t / T
			env := math.Sqrt(math.Sin(math.Pi * s))
			v := drive(s)[c]
			w.Time = append(w.Time, t)
			w.Amplitude = append(w.Amplitude, peak*env*cmplx.Abs(v))
			ph := 0.0
			if c == 1 {
				ph = alpha(s) - math.Pi
			}
			w.Phase = append(w.Phase, ph)
		}
		d.Waveforms = append(d.Waveforms, w)
	}

	// Populations: a smooth transfer with a small bump on a and e.
	for in := 0; in < 2; in++ {
		p := Populations{Input: []string{"g0", "g1"}[in], Levels: []string{"g0", "g1", "a", "e"}, P: make([][]float64, 4)}
		for k := 0; k < n; k++ {
			t := T * float64(k) / (n - 1)
			s := t / T
			bump := 0.12 * math.Pow(math.Sin(math.Pi*s), 2)
			eb := 0.01 * math.Pow(math.Sin(2*math.Pi*s), 2)
			move := math.Pow(math.Sin(math.Pi*s/2), 2) / 2
			stay := 1 - move
			rest := 1 - bump - eb
			p.Time = append(p.Time, t)
			own, other := stay*rest, move*rest
			vals := [4]float64{own, other, bump, eb}
			if in == 1 {
				vals = [4]float64{other, own, bump, eb}
			}
			for l := range vals {
				p.P[l] = append(p.P[l], vals[l])
			}
		}
		d.Populations = append(d.Populations, p)
	}

	// Robustness: geometric 1 − F = 1e-5 + 1e-3·(ε/6 %)⁴, dynamical
	// 1 − F = 1e-5 + 1e-3·(ε/1.5 %)²; detuning likewise with 400 kHz and
	// 120 kHz.
	geoAmp := func(e float64) float64 { return 1 - (1e-5 + 1e-3*math.Pow(e/6, 4)) }
	dynAmp := func(e float64) float64 { return 1 - (1e-5 + 1e-3*math.Pow(e/1.5, 2)) }
	geoDet := func(x float64) float64 { return 1 - (1e-5 + 1e-3*math.Pow(x/4e5, 4)) }
	dynDet := func(x float64) float64 { return 1 - (1e-5 + 1e-3*math.Pow(x/1.2e5, 2)) }
	clampF := func(f float64) float64 { return math.Max(f, 0) }
	amp := Sweep{Axis: "amplitude error ε", Unit: "%"}
	det := Sweep{Axis: "detuning δ", Unit: "Hz"}
	for k := -40; k <= 40; k++ {
		e := 0.5 * float64(k)
		amp.X = append(amp.X, e)
		amp.Geometric = append(amp.Geometric, clampF(geoAmp(e)))
		amp.Dynamical = append(amp.Dynamical, clampF(dynAmp(e)))
		x := 2.5e4 * float64(k)
		det.X = append(det.X, x)
		det.Geometric = append(det.Geometric, clampF(geoDet(x)))
		det.Dynamical = append(det.Dynamical, clampF(dynDet(x)))
	}
	d.Sweeps = []Sweep{amp, det}
	for _, s := range d.Sweeps {
		g, dy := widthAbove(s.X, s.Geometric), widthAbove(s.X, s.Dynamical)
		r := math.Inf(1)
		if dy > 0 {
			r = g / dy
		}
		d.Advantage = append(d.Advantage, AdvantageRow{Axis: s.Axis, Unit: s.Unit, Geometric: g, Dynamical: dy, Ratio: r})
	}

	// Map: both errors together, 41×41.
	m := &Map{XAxis: "amplitude error ε", XUnit: "%", YAxis: "detuning δ", YUnit: "Hz"}
	for j := 0; j <= 40; j++ {
		m.X = append(m.X, -20+float64(j))
		m.Y = append(m.Y, -1e6+5e4*float64(j))
	}
	for _, y := range m.Y {
		var gr, dr []float64
		for _, x := range m.X {
			gi := 1e-5 + 1e-3*(math.Pow(x/6, 4)+math.Pow(y/4e5, 4)+0.3*x/6*y/4e5)
			di := 1e-5 + 1e-3*(math.Pow(x/1.5, 2)+math.Pow(y/1.2e5, 2))
			gr = append(gr, math.Max(1-gi, 0))
			dr = append(dr, math.Max(1-di, 0))
		}
		m.Geometric = append(m.Geometric, gr)
		m.Dynamical = append(m.Dynamical, dr)
	}
	d.Map = m

	d.Budget = []BudgetRow{
		{Term: "non-adiabaticity", Infidelity: 4.2e-5, Note: "ideal waveform, no other error (synthetic)"},
		{Term: "leakage", Infidelity: 1.1e-5, Note: "population left outside g0, g1 (synthetic)"},
		{Term: "decay of e", Infidelity: 2.3e-4, Note: "Γ/2π = 6 MHz (synthetic)"},
		{Term: "dephasing", Infidelity: 8.0e-6, Note: "γφ = 1 kHz (synthetic)"},
		{Term: "quantisation", Infidelity: 3.0e-7, Note: "14-bit DAC (synthetic)"},
		{Term: "bandwidth", Infidelity: 2.0e-9, Note: "Gaussian, 5 ns rise time (synthetic)"},
		{Term: "total, all on", Infidelity: 2.9e-4, Note: "", Total: true},
	}
	d.Checks = []CheckRow{
		{Name: "peak Rabi frequency p0", Value: 2.17e6, Limit: limit, Margin: 1 - 2.17e6/limit, Unit: "Hz", Pass: true},
		{Name: "peak Rabi frequency p1", Value: 2.17e6, Limit: limit, Margin: 1 - 2.17e6/limit, Unit: "Hz", Pass: true},
		{Name: "peak Rabi frequency pa", Value: 2.5e6, Limit: limit, Margin: 1 - 2.5e6/limit, Unit: "Hz", Pass: true},
		{Name: "gate duration", Value: T, Limit: 3e-6, Margin: 1 - T/3e-6, Unit: "s", Pass: false},
	}
	d.Verification = &Verification{
		Fidelity:         0.999931,
		Leakage:          2.1e-5,
		Adiabaticity:     0.031,
		AdiabaticityNote: "largest ratio of coupling to gap along the loop (synthetic)",
		Duration:         T,
		Samples:          n,
		SampleRate:       (n - 1) / T,
	}
	d.Cautions = []string{"Synthetic report: do not send these waveforms to any hardware."}
	return d
}

// widthAbove returns the width of the interval of x around the best point
// where f ≥ Threshold, with linear interpolation at both ends.
func widthAbove(x, f []float64) float64 {
	best := 0
	for i := range f {
		if f[i] > f[best] {
			best = i
		}
	}
	if f[best] < Threshold {
		return 0
	}
	lo, hi := x[0], x[len(x)-1]
	for i := best; i > 0; i-- {
		if f[i-1] < Threshold {
			lo = x[i-1] + (Threshold-f[i-1])/(f[i]-f[i-1])*(x[i]-x[i-1])
			break
		}
	}
	for i := best; i+1 < len(f); i++ {
		if f[i+1] < Threshold {
			hi = x[i] + (Threshold-f[i])/(f[i+1]-f[i])*(x[i+1]-x[i])
			break
		}
	}
	return hi - lo
}
