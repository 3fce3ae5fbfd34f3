package waveform

import (
	"fmt"
	"math"
)

// Check is one goal or hardware limit with the value the waveform reaches.
type Check struct {
	// Name says what is checked, for example "peak Rabi frequency p0".
	Name string
	// Value is the measured value and Limit the limit, both in Unit.
	Value, Limit float64
	// Margin is Limit − Value for an upper bound and Value − Limit for a
	// lower bound; a negative margin is a failure.
	Margin float64
	// Unit is the unit of Value, Limit and Margin ("" if dimensionless).
	Unit string
	// Lower is true when Limit is a lower bound (Value must not fall
	// below it) and false for an upper bound.
	Lower bool
	// Pass reports whether the check passes.
	Pass bool
}

const (
	boundMax = false
	boundMin = true
)

func NewCheck(name string, value, limit float64, unit string, lower bool) Check {
	m := limit - value
	if lower {
		m = value - limit
	}
	return Check{Name: name, Value: value, Limit: limit, Margin: m, Unit: unit, Lower: lower, Pass: m >= 0}
}

// String formats the check as one line for messages and logs.
func (c Check) String() string {
	op, verdict := "≤", "pass"
	if c.Lower {
		op = "≥"
	}
	if !c.Pass {
		verdict = "FAIL"
	}
	return fmt.Sprintf("%s: %s %s %s (margin %s) %s", c.Name, fmtUnit(c.Value, c.Unit), op, fmtUnit(c.Limit, c.Unit), fmtUnit(c.Margin, c.Unit), verdict)
}

// HardwareChecks checks the quantised waveform against every hardware
// limit: per channel the peak Rabi frequency |I + iQ| of the DAC output,
// the peak slew rate |z[k+1] − z[k]|·SampleRate (including the steps from
// and to zero at both ends), and the DAC code range; then the sample count,
// the granularity and the minimum and maximum duration.
func (w *Waveform) HardwareChecks() []Check {
	hw := &w.Hardware
	var out []Check
	n := w.Len()
	mc := hw.MaxCode()
	for c, ch := range w.Scheme.Channels {
		var peak, slew, code float64
		var prev complex128
		for k := 0; k <= n; k++ {
			var z complex128
			if k < n {
				z = w.Quantized(c, k)
				peak = math.Max(peak, cabs(z))
				code = math.Max(code, math.Max(math.Abs(float64(w.CodeI[c][k])), math.Abs(float64(w.CodeQ[c][k]))))
			}
			slew = math.Max(slew, cabs(z-prev)*hw.SampleRate)
			prev = z
		}
		out = append(out,
			NewCheck("peak Rabi frequency "+ch.Name, peak, hw.MaxRabi[c], "Hz", boundMax),
			NewCheck("slew rate "+ch.Name, slew, hw.MaxSlew, "Hz/s", boundMax),
			NewCheck("DAC code range "+ch.Name, code, mc, "", boundMax),
		)
	}
	rem := 0.0
	if hw.Granularity > 0 {
		rem = float64(n % hw.Granularity)
	}
	out = append(out,
		NewCheck("sample count", float64(n), float64(hw.MaxSamples), "", boundMax),
		NewCheck("sample count remainder modulo granularity", rem, 0, "", boundMax),
		NewCheck("duration", w.Duration(), hw.MaxDuration, "s", boundMax),
		NewCheck("minimum duration", w.Duration(), hw.MinDuration, "s", boundMin),
	)
	return out
}
