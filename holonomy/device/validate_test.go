package device

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

func nv(t *testing.T) *Device {
	d, err := NV(NVParams{ZeroField: HzToRad(2.87e9), Zeeman: HzToRad(60e6)})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// Bad input gets a typed error naming the field and carrying the numbers.
func TestValidateBadInput(t *testing.T) {
	cases := []struct {
		name     string
		change   func(d *Device)
		sentinel error
		field    string
		words    []string
	}{
		{"branching above 1", func(d *Device) {
			d.Levels[2].Decay = 1e5
			d.Levels[2].Branches = []Branch{{To: 0, Fraction: 0.7}, {To: 1, Fraction: 0.4}}
		}, ErrBranching, "levels[2].branches", []string{"1.1"}},
		{"decay into itself", func(d *Device) {
			d.Levels[1].Branches = []Branch{{To: 1, Fraction: 1}}
		}, ErrSelfDecay, "levels[1].branches[0].to", []string{"m=-1"}},
		{"carrier in Hz instead of rad/s", func(d *Device) {
			d.Tones[0].Pin = nil
			d.Tones[0].Carrier = 2.87e9
		}, ErrFarCarrier, "tones[0].carrier", []string{"t-", "MHz", "m=0→m=-1"}},
		{"levels listed upside down", func(d *Device) {
			d.Tones[1].Pin = nil
			d.Tones[1].Carrier = HzToRad(2.9e9)
			d.Tones[1].Couplings = []Coupling{{Lower: 1, Upper: 0, Factor: 1}, {Lower: 2, Upper: 0, Factor: 1}}
		}, ErrFarCarrier, "tones[1].carrier", []string{"t+"}},
		{"carrier and pin", func(d *Device) { d.Tones[0].Carrier = 1 }, ErrValue, "tones[0].carrier", nil},
		{"pair listed twice", func(d *Device) {
			d.Tones[0].Couplings = append(d.Tones[0].Couplings, Coupling{Lower: 1, Upper: 0, Factor: 1})
		}, ErrShape, "tones[0].couplings[2]", nil},
		{"negative dephasing", func(d *Device) { d.Levels[0].Dephasing = -1 }, ErrValue, "levels[0].dephasing", nil},
		{"counter-rotating on a rotating-frame device", func(d *Device) {
			*d = *Lambda()
			d.CounterRotating = true
		}, ErrValue, "counter_rotating", nil},
	}
	for _, c := range cases {
		d := nv(t)
		c.change(d)
		err := d.Validate()
		if !errors.Is(err, c.sentinel) {
			t.Errorf("%s: got %v, want %v", c.name, err, c.sentinel)
			continue
		}
		var field string
		var fe *FieldError
		var fc *FarCarrierError
		switch {
		case errors.As(err, &fe):
			field = fe.Field
		case errors.As(err, &fc):
			field = fc.Field
		}
		if field != c.field {
			t.Errorf("%s: field %q, want %q (%v)", c.name, field, c.field, err)
		}
		for _, w := range c.words {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: message %q lacks %q", c.name, err, w)
			}
		}
	}
	// Within FarFraction the neighbouring transition is fine: the NV tone
	// at m=0↔−1 also lists m=0↔+1, 60 MHz away.
	if err := nv(t).Validate(); err != nil {
		t.Errorf("NV preset: %v", err)
	}
}

// The NV-like preset: m=0 is the lower end of both couplings, each tone
// drives both transitions, one resonantly and the other detuned by the
// Zeeman splitting (sign by which transition is higher).
func TestNVPresetCrosstalk(t *testing.T) {
	d := nv(t)
	m := compile(t, d)
	zeeman := HzToRad(60e6)
	want := map[[2]int]float64{{0, 1}: 0, {0, 2}: zeeman, {1, 1}: -zeeman, {1, 2}: 0}
	for _, tm := range m.Terms() {
		if tm.Lower != 0 {
			t.Errorf("coupling %d→%d: m=0 should be the lower level", tm.Lower, tm.Upper)
		}
		if w := want[[2]int{tm.Tone, tm.Upper}]; math.Abs(tm.Detuning-w) > 1e-12*d.Levels[2].Energy {
			t.Errorf("tone %d on 0→%d: detuning %g, want %g", tm.Tone, tm.Upper, tm.Detuning, w)
		}
	}
	if d.Levels[0].Name != "m=0" || d.Computational[0] != 1 || d.Computational[1] != 2 {
		t.Errorf("levels %v, computational %v", d.Levels, d.Computational)
	}
}

// A frame far from the carriers makes every term rotate at GHz rates; the
// step count passes the bound and the error carries the numbers, before any
// work is done. The default frame needs few sub-steps.
func TestFrameStepLimit(t *testing.T) {
	m, pts, dt, _ := transmonGate(t)
	sim := NewSimulator(m)
	sim.MaxSubsteps = 5000
	if n, err := sim.Substeps(pts, dt); err != nil || n > 1000 {
		t.Fatalf("default frame: %d sub-steps, %v", n, err)
	}
	d := m.Device()
	d.Frame = make([]float64, d.Dim()) // the laboratory frame
	lab := NewSimulator(compile(t, &d))
	lab.MaxSubsteps = 5000
	u := holonomy.Identity(4)
	err := lab.Propagate(u, pts, dt)
	var se *StepLimitError
	if !errors.As(err, &se) || !errors.Is(err, ErrStepLimit) {
		t.Fatalf("laboratory frame: got %v, want a StepLimitError", err)
	}
	if se.Limit != 5000 || se.Needed <= se.Limit || se.Rate < HzToRad(5e9) || se.Dt != dt {
		t.Errorf("step limit numbers: %+v", se)
	}
	if !identical(u, holonomy.Identity(4)) {
		t.Error("a refused propagation changed its output")
	}
}
