package waveform_test

import (
	"errors"
	"math"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

// DAC codes: round half away from zero, symmetric range ±(2^(b−1) − 1),
// code → Hz → code is the identity and quantising moves a value by at most
// half a step.
func TestDACCodes(t *testing.T) {
	// Full scale = max code in Hz: one step is exactly 1 Hz, so the half
	// cases below are exact in floating point.
	const bits = 14
	mc := float64(int(1)<<(bits-1) - 1)
	fs := mc
	lsb := 1.0
	cases := []struct {
		x    float64
		want int32
	}{
		{0, 0}, {0.5 * lsb, 1}, {-0.5 * lsb, -1}, {1.5 * lsb, 2}, {-1.5 * lsb, -2},
		{0.49 * lsb, 0}, {2.5 * lsb, 3}, {fs, 8191}, {-fs, -8191},
	}
	for _, c := range cases {
		got, err := waveform.DACCode(c.x, fs, mc)
		if err != nil || got != c.want {
			t.Errorf("code(%g LSB) = %d, %v; want %d", c.x/lsb, got, err, c.want)
		}
	}
	// Out of range is reported, not clipped.
	if got, _ := waveform.DACCode(2*fs, fs, mc); got != 16382 {
		t.Errorf("code(2 FS) = %d; want 16382 (unclipped)", got)
	}
	if _, err := waveform.DACCode(1e30, fs, mc); err == nil {
		t.Error("no error for a drive beyond the int32 code range")
	}
	w := wavetest.MustBuild(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6))
	for c := range w.I {
		l := w.Hardware.LSB(c)
		for k := range w.I[c] {
			z := w.Quantized(c, k)
			if math.Abs(real(z)-w.I[c][k]) > l/2*(1+1e-12) || math.Abs(imag(z)-w.Q[c][k]) > l/2*(1+1e-12) {
				t.Fatalf("channel %d sample %d: quantised %v from (%g, %g), step %g", c, k, z, w.I[c][k], w.Q[c][k], l)
			}
			back, _ := waveform.DACCode(real(z), w.Hardware.FullScale[c], w.Hardware.MaxCode())
			if back != w.CodeI[c][k] {
				t.Fatalf("code %d → %g Hz → code %d", w.CodeI[c][k], real(z), back)
			}
		}
	}
}

// Every hardware check of a good design passes, with the limits the
// timing planned for reached but not exceeded.
func TestHardwareChecksPass(t *testing.T) {
	hw := wavetest.Hardware(3, 10e6)
	hw.MaxSlew = 5e13 // tight enough to bind along the loop
	w := wavetest.MustBuild(t, wavetest.TripodPlan(math.Pi/4, 0.05), hw)
	v := wavetest.Must(sim.Verify(w, sim.ErrorModel{}))(t)
	for _, c := range v.Checks {
		t.Log(c)
		if !c.Pass {
			t.Errorf("failed: %v", c)
		}
	}
	c, _ := wavetest.FindCheck(v.Checks, waveform.SlewCheck, "pa")
	if c.Value < 0.8*hw.MaxSlew {
		t.Errorf("slew limit does not bind: %v", c)
	}
	c, _ = wavetest.FindCheck(v.Checks, waveform.PeakRabiCheck, "pa")
	if c.Value < 0.99*hw.MaxRabi[2] {
		t.Errorf("amplitude limit not used: %v", c)
	}
	if w.Len()%hw.Granularity != 0 {
		t.Errorf("%d samples is not a multiple of %d", w.Len(), hw.Granularity)
	}
}

// A violation is a failed check with a negative margin, never a clipped
// sample: limits lowered after the design, and a maximum duration the
// adiabatic timing cannot meet.
func TestHardwareViolations(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6))
	before := append([]float64(nil), w.I[2]...)
	w.Hardware.MaxRabi[2] = 5e6
	w.Hardware.MaxSlew = 1e12
	w.CodeQ[0][100] = 9000 // beyond the 14-bit range
	v := wavetest.Must(sim.Verify(w, sim.ErrorModel{}))(t)
	for _, want := range []struct {
		kind    waveform.CheckKind
		channel string
	}{{waveform.PeakRabiCheck, "pa"}, {waveform.SlewCheck, "pa"}, {waveform.DACRangeCheck, "p0"}} {
		c, ok := wavetest.FindCheck(v.Checks, want.kind, want.channel)
		if !ok || c.Pass || c.Margin >= 0 {
			t.Errorf("%v: %v (found %v)", want, c, ok)
		}
	}
	if v.Pass() {
		t.Error("verification passes with violated limits")
	}
	for k, x := range w.I[2] {
		if x != before[k] {
			t.Fatal("samples changed")
		}
	}
	// The adiabatic gate needs about 3.6 µs; allow only 1 µs.
	hw := wavetest.Hardware(3, 10e6)
	hw.MaxDuration = 1e-6
	w = wavetest.MustBuild(t, wavetest.TripodPlan(math.Pi/4, 0.05), hw)
	v = wavetest.Must(sim.Verify(w, sim.ErrorModel{}))(t)
	c, _ := wavetest.FindCheck(v.Checks, waveform.DurationCheck, "")
	if c.Pass || c.Margin > -2e-6 {
		t.Errorf("duration check: %v", c)
	}
	t.Log(c)
	// Too many samples is refused before allocating.
	hw = wavetest.Hardware(3, 10e6)
	hw.MaxSamples = 1000
	_, err := waveform.Build(wavetest.TripodPlan(math.Pi/4, 0.05), hw)
	var le *waveform.LimitError
	if !errors.As(err, &le) || le.Check.Kind != waveform.SampleCountCheck || le.Check.Margin >= 0 {
		t.Errorf("sample limit: %v", err)
	} else {
		t.Log(err)
	}
}

// Minimum duration stretches the gate; the DAC full scale below the Rabi
// limit caps the amplitude.
func TestDurationAndFullScale(t *testing.T) {
	hw := wavetest.Hardware(2, 10e6)
	hw.MinDuration = 1e-6
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), hw)
	if w.Duration() < 1e-6 {
		t.Errorf("duration %g below the minimum", w.Duration())
	}
	hw = wavetest.Hardware(2, 10e6)
	hw.FullScale = []float64{4e6, 4e6}
	w = wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), hw)
	v := wavetest.Must(sim.Verify(w, sim.ErrorModel{}))(t)
	if !v.Pass() {
		t.Errorf("failed: %v", v.Failed())
	}
	for _, c := range v.Checks {
		if c.Kind == waveform.PeakRabiCheck && c.Channel == "p1" && c.Value > 4e6 {
			t.Errorf("peak %g above the full scale", c.Value)
		}
	}
}

// Invalid plans and hardware descriptions are errors naming the problem.
func TestBuildErrors(t *testing.T) {
	good := wavetest.Hardware(3, 10e6)
	cases := []struct {
		name string
		mod  func(p *waveform.Plan, h *waveform.Hardware)
	}{
		{"no segments", func(p *waveform.Plan, h *waveform.Hardware) { p.Segments = nil }},
		{"open loop", func(p *waveform.Plan, h *waveform.Hardware) { p.Segments[0].Shape = openLoop }},
		{"channel count", func(p *waveform.Plan, h *waveform.Hardware) { h.MaxRabi = h.MaxRabi[:2] }},
		{"NaN sample rate", func(p *waveform.Plan, h *waveform.Hardware) { h.SampleRate = math.NaN() }},
		{"DAC bits", func(p *waveform.Plan, h *waveform.Hardware) { h.DACBits = 40 }},
		{"min above max", func(p *waveform.Plan, h *waveform.Hardware) { h.MinDuration = 2 * h.MaxDuration }},
		{"target shape", func(p *waveform.Plan, h *waveform.Hardware) {
			p.Target = wavetest.Hadamard().Clone()
			p.Target.R, p.Target.C = 1, 4
		}},
		{"loop that does not move", func(p *waveform.Plan, h *waveform.Hardware) { p.Segments[0].Shape = fixedPoint }},
		{"no drive", func(p *waveform.Plan, h *waveform.Hardware) { p.Segments[0].Shape = func(float64, holonomy.Point) {} }},
		{"degenerate base point", func(p *waveform.Plan, h *waveform.Hardware) { p.Segments[0].Shape = degenerateBase }},
	}
	for _, c := range cases {
		p := wavetest.TripodPlan(math.Pi/4, 0.05)
		h := good.Clone()
		c.mod(p, &h)
		_, err := waveform.Build(p, h)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		t.Logf("%s: %v", c.name, err)
	}
}

func openLoop(s float64, p holonomy.Point) {
	p.Drive[2] = complex(1, 0)
	p.Drive[0] = complex(s, 0)
}

func fixedPoint(s float64, p holonomy.Point) { p.Drive[2] = 1 }

// degenerateBase drives only p0 at the base point: g1 and a are both dark
// there, so the qubit level g1 is degenerate with the auxiliary level.
func degenerateBase(s float64, p holonomy.Point) {
	holonomy.TripodPoint(p, 1, math.Pi/2*(1-math.Cos(2*math.Pi*s))/2+math.Pi/2, 0)
}

// CheckKindOf reads back the kind and channel of every check that Verify
// and HardwareChecks write, so that a file storing only names loses
// nothing; unknown names have kind 0.
func TestCheckKindOf(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6))
	v := wavetest.Must(sim.Verify(w, sim.ErrorModel{}))(t)
	seen := map[waveform.CheckKind]bool{}
	for _, c := range v.Checks {
		t.Run(c.Name, func(t *testing.T) {
			k, ch := waveform.CheckKindOf(c.Name)
			if k != c.Kind || ch != c.Channel || k.Lower() != c.Lower {
				t.Errorf("CheckKindOf(%q) = %v, %q; the check has %v, %q", c.Name, k, ch, c.Kind, c.Channel)
			}
		})
		seen[c.Kind] = true
	}
	if len(seen) != 9 {
		t.Errorf("%d kinds of check, want all 9", len(seen))
	}
	if k, _ := waveform.CheckKindOf("colour"); k != 0 {
		t.Errorf("unknown name: kind %v", k)
	}
}
