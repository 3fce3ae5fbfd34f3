package waveform

import (
	"fmt"

	"github.com/loopgate/loopgate/holonomy"
)

// Waveform is a timed, sampled and DAC-quantised gate, ready to be
// verified, written to a file or replayed. Build makes one from a Plan;
// ReadWaveform makes one from a file. All sample slices have Len()
// entries. A Waveform is not modified by Verify or Simulate and may be
// shared between goroutines that only read it.
type Waveform struct {
	// Scheme is the level scheme (a private copy). Its level detunings
	// are exactly 2π times the Hz values written to files.
	Scheme *holonomy.Scheme
	// Target is the d×d target unitary on the computational levels.
	Target *holonomy.Mat
	// Hardware is the hardware description the waveform was built for.
	Hardware Hardware
	// Adiabaticity is the adiabaticity goal α* of the adiabatic segments.
	Adiabaticity float64
	// MinFidelity is the fidelity goal of the verification.
	MinFidelity float64
	// Segments describe the timing of the segments in time order.
	Segments []SegmentTiming
	// I and Q hold, per channel, the unquantised drive Ω cos φ/2π and
	// Ω sin φ/2π of every sample (Hz).
	I, Q [][]float64
	// CodeI and CodeQ hold, per channel, the DAC codes of I and Q.
	CodeI, CodeQ [][]int32
	// Detuning holds, per level, the controlled detuning track of every
	// sample (Hz), or nil for a level without one.
	Detuning [][]float64

	LevelHz []float64 // static level detunings in Hz (canonical)
}

// SegmentTiming describes where one segment of a Waveform lies in the
// samples and how it was timed.
type SegmentTiming struct {
	// Kind is the segment's kind.
	Kind SegmentKind
	// First is the index of the first sample and Len the number of samples.
	First, Len int
	// Ramp is the number of samples of each amplitude ramp of an
	// adiabatic segment (0 for cyclic segments).
	Ramp int
	// Area is the pulse area Σ_k A_k Δt of a cyclic segment in rad (0 for
	// adiabatic segments).
	Area float64
	// Amplitude is the peak envelope A/2π multiplying the unit point (Hz).
	Amplitude float64
	// MinGap is the smallest gap/2π between the working states and the
	// others along an adiabatic loop (Hz; 0 for cyclic segments).
	MinGap float64
}

// Len returns the number of samples per channel.
func (w *Waveform) Len() int {
	if len(w.I) == 0 {
		return 0
	}
	return len(w.I[0])
}

// Dt returns the sample period in seconds.
func (w *Waveform) Dt() float64 { return 1 / w.Hardware.SampleRate }

// Duration returns the waveform duration Len()/SampleRate in seconds,
// including the zero padding.
func (w *Waveform) Duration() float64 { return float64(w.Len()) / w.Hardware.SampleRate }

// Quantized returns the drive channel c emits at sample k after the DAC,
// code × FullScale/(2^(b−1) − 1), in Hz.
func (w *Waveform) Quantized(c, k int) complex128 {
	l := w.Hardware.LSB(c)
	return complex(float64(w.CodeI[c][k])*l, float64(w.CodeQ[c][k])*l)
}

// LimitError reports that a plan cannot be built at all within a hardware
// limit (for example the sample count). Limits that can be exceeded
// without harm to the computation are reported as failed checks instead.
type LimitError struct {
	// Check holds the limit, the value the plan needs and the margin.
	Check Check
	// FileBound is set when the limit is the waveform file format's
	// bound (MaxSampleLimit) rather than the hardware's.
	FileBound bool
}

// Error says which limit is exceeded and by how much.
func (e *LimitError) Error() string {
	c := e.Check
	return fmt.Sprintf("%s: the gate needs %s but the limit is %s (%s over)", c.Name, FormatSI(c.Value, c.Unit), FormatSI(c.Limit, c.Unit), FormatSI(-c.Margin, c.Unit))
}
