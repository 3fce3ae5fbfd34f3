package waveform

import (
	"errors"
	"math"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
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
		got, err := DACCode(c.x, fs, mc)
		if err != nil || got != c.want {
			t.Errorf("code(%g LSB) = %d, %v; want %d", c.x/lsb, got, err, c.want)
		}
	}
	// Out of range is reported, not clipped.
	if got, _ := DACCode(2*fs, fs, mc); got != 16382 {
		t.Errorf("code(2 FS) = %d; want 16382 (unclipped)", got)
	}
	if _, err := DACCode(1e30, fs, mc); err == nil {
		t.Error("no error for a drive beyond the int32 code range")
	}
	w := mustBuild(t, tripodPlan(math.Pi/4, 0.05), testHardware(3, 10e6))
	for c := range w.I {
		l := w.Hardware.lsb(c)
		for k := range w.I[c] {
			z := w.Quantized(c, k)
			if math.Abs(real(z)-w.I[c][k]) > l/2*(1+1e-12) || math.Abs(imag(z)-w.Q[c][k]) > l/2*(1+1e-12) {
				t.Fatalf("channel %d sample %d: quantised %v from (%g, %g), step %g", c, k, z, w.I[c][k], w.Q[c][k], l)
			}
			back, _ := DACCode(real(z), w.Hardware.FullScale[c], w.Hardware.MaxCode())
			if back != w.CodeI[c][k] {
				t.Fatalf("code %d → %g Hz → code %d", w.CodeI[c][k], real(z), back)
			}
		}
	}
}

// Every hardware check of a good design passes, with the limits the
// timing planned for reached but not exceeded.
func TestHardwareChecksPass(t *testing.T) {
	hw := testHardware(3, 10e6)
	hw.MaxSlew = 5e13 // tight enough to bind along the loop
	w := mustBuild(t, tripodPlan(math.Pi/4, 0.05), hw)
	v := mustVerify(t, w, ErrorModel{})
	for _, c := range v.Checks {
		t.Log(c)
		if !c.Pass {
			t.Errorf("failed: %v", c)
		}
	}
	c, _ := findCheck(v, "slew rate pa")
	if c.Value < 0.8*hw.MaxSlew {
		t.Errorf("slew limit does not bind: %v", c)
	}
	c, _ = findCheck(v, "peak Rabi frequency pa")
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
	w := mustBuild(t, tripodPlan(math.Pi/4, 0.05), testHardware(3, 10e6))
	before := append([]float64(nil), w.I[2]...)
	w.Hardware.MaxRabi[2] = 5e6
	w.Hardware.MaxSlew = 1e12
	w.CodeQ[0][100] = 9000 // beyond the 14-bit range
	v := mustVerify(t, w, ErrorModel{})
	for _, name := range []string{"peak Rabi frequency pa", "slew rate pa", "DAC code range p0"} {
		c, ok := findCheck(v, name)
		if !ok || c.Pass || c.Margin >= 0 {
			t.Errorf("%s: %v (found %v)", name, c, ok)
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
	hw := testHardware(3, 10e6)
	hw.MaxDuration = 1e-6
	w = mustBuild(t, tripodPlan(math.Pi/4, 0.05), hw)
	v = mustVerify(t, w, ErrorModel{})
	c, _ := findCheck(v, "duration")
	if c.Pass || c.Margin > -2e-6 {
		t.Errorf("duration check: %v", c)
	}
	t.Log(c)
	// Too many samples is refused before allocating.
	hw = testHardware(3, 10e6)
	hw.MaxSamples = 1000
	_, err := Build(tripodPlan(math.Pi/4, 0.05), hw)
	var le *LimitError
	if !errors.As(err, &le) || le.Check.Name != "sample count" || le.Check.Margin >= 0 {
		t.Errorf("sample limit: %v", err)
	} else {
		t.Log(err)
	}
}

// Minimum duration stretches the gate; the DAC full scale below the Rabi
// limit caps the amplitude.
func TestDurationAndFullScale(t *testing.T) {
	hw := testHardware(2, 10e6)
	hw.MinDuration = 1e-6
	w := mustBuild(t, lambdaPlan(math.Pi/4, 0, hadamard()), hw)
	if w.Duration() < 1e-6 {
		t.Errorf("duration %g below the minimum", w.Duration())
	}
	hw = testHardware(2, 10e6)
	hw.FullScale = []float64{4e6, 4e6}
	w = mustBuild(t, lambdaPlan(math.Pi/4, 0, hadamard()), hw)
	v := mustVerify(t, w, ErrorModel{})
	if !v.Pass() {
		t.Errorf("failed: %v", v.Failed())
	}
	for _, c := range v.Checks {
		if c.Name == "peak Rabi frequency p1" && c.Value > 4e6 {
			t.Errorf("peak %g above the full scale", c.Value)
		}
	}
}

// Invalid plans and hardware descriptions are errors naming the problem.
func TestBuildErrors(t *testing.T) {
	good := testHardware(3, 10e6)
	cases := []struct {
		name string
		mod  func(p *Plan, h *Hardware)
	}{
		{"no segments", func(p *Plan, h *Hardware) { p.Segments = nil }},
		{"open loop", func(p *Plan, h *Hardware) { p.Segments[0].Shape = openLoop }},
		{"channel count", func(p *Plan, h *Hardware) { h.MaxRabi = h.MaxRabi[:2] }},
		{"NaN sample rate", func(p *Plan, h *Hardware) { h.SampleRate = math.NaN() }},
		{"DAC bits", func(p *Plan, h *Hardware) { h.DACBits = 40 }},
		{"min above max", func(p *Plan, h *Hardware) { h.MinDuration = 2 * h.MaxDuration }},
		{"target shape", func(p *Plan, h *Hardware) { p.Target = hadamard().Clone(); p.Target.R, p.Target.C = 1, 4 }},
		{"loop that does not move", func(p *Plan, h *Hardware) { p.Segments[0].Shape = fixedPoint }},
		{"no drive", func(p *Plan, h *Hardware) { p.Segments[0].Shape = func(float64, holonomy.Point) {} }},
		{"degenerate base point", func(p *Plan, h *Hardware) { p.Segments[0].Shape = degenerateBase }},
	}
	for _, c := range cases {
		p := tripodPlan(math.Pi/4, 0.05)
		h := good.clone()
		c.mod(p, &h)
		_, err := Build(p, h)
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
