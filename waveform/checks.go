package waveform

import (
	"fmt"
	"math"
	"strings"
)

// Check is one goal or hardware limit with the value the waveform reaches.
type Check struct {
	// Kind says what is checked; code tests it instead of Name.
	Kind CheckKind
	// Channel names the drive channel of a per-channel limit (peak Rabi
	// frequency, slew rate, DAC code range); empty otherwise.
	Channel string
	// Name says what is checked in words, for example "peak Rabi
	// frequency p0".
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

// CheckKind is what a Check checks.
type CheckKind int

// The kinds of check. FidelityCheck and MinDurationCheck are lower bounds,
// the others upper bounds.
const (
	FidelityCheck     CheckKind = iota + 1 // average gate fidelity ≥ goal
	AdiabaticityCheck                      // adiabaticity parameter ≤ goal
	PeakRabiCheck                          // peak Rabi frequency of a channel ≤ its limit
	SlewCheck                              // slew rate of a channel ≤ the slew limit
	DACRangeCheck                          // largest DAC code of a channel ≤ full scale
	SampleCountCheck                       // samples ≤ the AWG's (or the file format's) limit
	GranularityCheck                       // samples modulo granularity = 0
	DurationCheck                          // duration ≤ the longest allowed
	MinDurationCheck                       // duration ≥ the shortest allowed
)

// Lower reports whether checks of kind k are lower bounds.
func (k CheckKind) Lower() bool { return k == FidelityCheck || k == MinDurationCheck }

// Hardware reports whether k is a hardware limit (rather than a goal).
func (k CheckKind) Hardware() bool { return k >= PeakRabiCheck }

// Long reports whether failing a check of kind k means the gate is too
// long (too many samples or too long a duration).
func (k CheckKind) Long() bool { return k == SampleCountCheck || k == DurationCheck }

// CheckKindOf returns the kind and channel of a check from its display
// name as HardwareChecks and sim.Verify write it, for readers of files
// that store only the name; kind 0 if the name is not one of them.
func CheckKindOf(name string) (CheckKind, string) {
	switch name {
	case "fidelity":
		return FidelityCheck, ""
	case "adiabaticity":
		return AdiabaticityCheck, ""
	case "sample count", "sample count (waveform file bound)":
		return SampleCountCheck, ""
	case "sample count remainder modulo granularity":
		return GranularityCheck, ""
	case "duration":
		return DurationCheck, ""
	case "minimum duration":
		return MinDurationCheck, ""
	}
	for _, x := range []struct {
		prefix string
		k      CheckKind
	}{
		{"peak Rabi frequency ", PeakRabiCheck}, {"slew rate ", SlewCheck}, {"DAC code range ", DACRangeCheck},
	} {
		if ch, ok := strings.CutPrefix(name, x.prefix); ok {
			return x.k, ch
		}
	}
	return 0, ""
}

// channelCheck returns NewCheck for the limit of kind k on channel ch.
func channelCheck(k CheckKind, what, ch string, value, limit float64, unit string) Check {
	c := NewCheck(k, what+" "+ch, value, limit, unit)
	c.Channel = ch
	return c
}

// NewCheck returns the check of kind k named name: value against limit,
// a lower bound when k.Lower().
func NewCheck(k CheckKind, name string, value, limit float64, unit string) Check {
	m := limit - value
	if k.Lower() {
		m = value - limit
	}
	return Check{Kind: k, Name: name, Value: value, Limit: limit, Margin: m, Unit: unit, Lower: k.Lower(), Pass: m >= 0}
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
	return fmt.Sprintf("%s: %s %s %s (margin %s) %s", c.Name, FormatSI(c.Value, c.Unit), op, FormatSI(c.Limit, c.Unit), FormatSI(c.Margin, c.Unit), verdict)
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
			channelCheck(PeakRabiCheck, "peak Rabi frequency", ch.Name, peak, hw.MaxRabi[c], "Hz"),
			channelCheck(SlewCheck, "slew rate", ch.Name, slew, hw.MaxSlew, "Hz/s"),
			channelCheck(DACRangeCheck, "DAC code range", ch.Name, code, mc, ""),
		)
	}
	rem := 0.0
	if hw.Granularity > 0 {
		rem = float64(n % hw.Granularity)
	}
	out = append(out,
		NewCheck(SampleCountCheck, "sample count", float64(n), float64(hw.MaxSamples), ""),
		NewCheck(GranularityCheck, "sample count remainder modulo granularity", rem, 0, ""),
		NewCheck(DurationCheck, "duration", w.Duration(), hw.MaxDuration, "s"),
		NewCheck(MinDurationCheck, "minimum duration", w.Duration(), hw.MinDuration, "s"),
	)
	return out
}
