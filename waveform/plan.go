package waveform

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// Kind says how a segment of a gate is traversed.
type Kind int

const (
	// Adiabatic segments ramp the amplitude up at the loop's base point,
	// traverse the loop slowly enough for the working subspace to follow
	// (Wilczek–Zee holonomy) and ramp down again.
	Adiabatic Kind = iota + 1
	// Cyclic segments hold a fixed drive direction under an envelope of
	// prescribed pulse area, so that the driven (bright) state returns
	// to itself (nonadiabatic holonomy).
	Cyclic
)

// String returns "adiabatic" or "cyclic", the names used in files.
func (k Kind) String() string {
	switch k {
	case Adiabatic:
		return "adiabatic"
	case Cyclic:
		return "cyclic"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

func ParseKind(s string) (Kind, error) {
	switch s {
	case "adiabatic":
		return Adiabatic, nil
	case "cyclic":
		return Cyclic, nil
	}
	return 0, fmt.Errorf("unknown segment kind %q (want adiabatic or cyclic)", s)
}

// Segment is one part of a gate.
type Segment struct {
	// Kind says how the segment is traversed.
	Kind Kind
	// Shape gives the unit-scale control point at loop parameter s in
	// [0, 1]; Shape(0) must equal Shape(1). The physical point at time t is
	// A(t)·Shape(s(t)) (drives and controlled detunings) plus the scheme's
	// static detunings. A Cyclic segment uses only Shape(0). Shape must
	// not retain p and must not allocate.
	Shape holonomy.Loop
	// Area is the pulse area ∫A dt in rad of a Cyclic segment (2π for a
	// full cycle of the bright state when the unit drive vector is
	// normalised to Σ_c f_c²|u_c|² = 1). Adiabatic segments ignore it.
	Area float64
}

// Plan is what the design pipeline hands to Build: the level scheme, the
// target gate and the segments realising it, with the design goals.
type Plan struct {
	// Scheme is the level scheme; Build copies it.
	Scheme *holonomy.Scheme
	// Target is the d×d target unitary on the computational levels
	// (d = len(Scheme.Computational)).
	Target *holonomy.Mat
	// Segments are executed in order.
	Segments []Segment
	// Adiabaticity is the target α* for the adiabaticity parameter
	// max_t |⟨m|∂_tH|n⟩|/(E_m − E_n)² of adiabatic segments; zero means
	// DefaultAdiabaticity.
	Adiabaticity float64
	// MinFidelity is the smallest acceptable average gate fidelity in
	// the verification; zero means DefaultMinFidelity.
	MinFidelity float64
}

const (
	// DefaultAdiabaticity is the adiabaticity target used when a Plan
	// gives none. With the schedule of this package the tripod test loop
	// reaches a nonadiabatic infidelity of 2.4e-5 at this value and 5e-7
	// at 0.02 (TestTripodAdiabaticFidelity); lower it for more margin.
	DefaultAdiabaticity = 0.05
	// DefaultMinFidelity is the fidelity goal used when a Plan gives none.
	DefaultMinFidelity = 0.9999
	// MaxSampleLimit is the largest sample count this package builds or
	// reads, whatever the hardware allows: 2^20 samples per channel (1 ms
	// at 1 GS/s, far beyond any holonomic gate), which keeps a waveform
	// file below MaxFileBytes. Hardware.MaxSamples may be larger (the AWG
	// may hold more); Build then stops at this bound.
	MaxSampleLimit = 1 << 20
	// MaxDACBits is the largest DAC resolution supported.
	MaxDACBits = 24
	// MaxSegments is the largest number of segments in a plan or file.
	MaxSegments = 64
	maxChannels = 256
)

// Hardware holds the limits of the AWG and drive chain and the DAC
// calibration. Frequencies are Ω/2π in Hz.
type Hardware struct {
	// MaxRabi is the largest allowed Rabi frequency per channel (Hz),
	// in the order of Scheme.Channels.
	MaxRabi []float64
	// MaxSlew is the largest allowed rate of change of a channel's complex
	// drive I + iQ, in Hz/s; on samples it is |z[k+1] − z[k]|·SampleRate.
	MaxSlew float64
	// SampleRate is the AWG sample rate in samples per second.
	SampleRate float64
	// Granularity: the sample count is padded with zeros to a multiple
	// of it.
	Granularity int
	// MaxSamples is the largest sample count the AWG accepts.
	MaxSamples int
	// DACBits is the DAC resolution (2 to MaxDACBits).
	DACBits int
	// FullScale is, per channel, the Rabi frequency (Hz) produced by the
	// largest positive code 2^(DACBits−1) − 1.
	FullScale []float64
	// MinDuration and MaxDuration bound the gate duration in seconds.
	MinDuration, MaxDuration float64
}

// Validate reports whether h is complete and sensible for a scheme with
// nch channels.
func (h *Hardware) Validate(nch int) error {
	if len(h.MaxRabi) != nch {
		return fmt.Errorf("hardware: %d maximum Rabi frequencies for %d channels", len(h.MaxRabi), nch)
	}
	if len(h.FullScale) != nch {
		return fmt.Errorf("hardware: %d DAC full-scale calibrations for %d channels", len(h.FullScale), nch)
	}
	for c := 0; c < nch; c++ {
		if !positive(h.MaxRabi[c]) {
			return fmt.Errorf("hardware: maximum Rabi frequency of channel %d is %v Hz; need a positive finite number", c, h.MaxRabi[c])
		}
		if !positive(h.FullScale[c]) {
			return fmt.Errorf("hardware: DAC full scale of channel %d is %v Hz; need a positive finite number", c, h.FullScale[c])
		}
	}
	if !positive(h.MaxSlew) {
		return fmt.Errorf("hardware: maximum slew rate is %v Hz/s; need a positive finite number", h.MaxSlew)
	}
	if !positive(h.SampleRate) {
		return fmt.Errorf("hardware: sample rate is %v Hz; need a positive finite number", h.SampleRate)
	}
	if h.Granularity < 1 || h.Granularity > MaxSampleLimit {
		return fmt.Errorf("hardware: granularity %d; need 1 to %d", h.Granularity, MaxSampleLimit)
	}
	if h.MaxSamples < 1 {
		return fmt.Errorf("hardware: maximum sample count %d; need at least 1", h.MaxSamples)
	}
	if h.DACBits < 2 || h.DACBits > MaxDACBits {
		return fmt.Errorf("hardware: DAC resolution %d bits; need 2 to %d", h.DACBits, MaxDACBits)
	}
	if !holonomy.Finite(h.MinDuration) || h.MinDuration < 0 {
		return fmt.Errorf("hardware: minimum duration %v s; need a finite number ≥ 0", h.MinDuration)
	}
	if !positive(h.MaxDuration) {
		return fmt.Errorf("hardware: maximum duration %v s; need a positive finite number", h.MaxDuration)
	}
	if h.MinDuration > h.MaxDuration {
		return fmt.Errorf("hardware: minimum duration %g s exceeds maximum duration %g s", h.MinDuration, h.MaxDuration)
	}
	return nil
}

// MaxCode returns the largest DAC code, 2^(bits−1) − 1.
func (h *Hardware) MaxCode() float64 { return float64(int64(1)<<(h.DACBits-1) - 1) }

// lsb returns the drive step (Hz) of one DAC code on channel c.
func (h *Hardware) lsb(c int) float64 { return h.FullScale[c] / h.MaxCode() }

// clone returns a deep copy.
func (h Hardware) clone() Hardware {
	h.MaxRabi = append([]float64(nil), h.MaxRabi...)
	h.FullScale = append([]float64(nil), h.FullScale...)
	return h
}

// Validate checks the plan's shape and dimensions; it evaluates each shape
// at s = 0 and s = 1.
func (p *Plan) Validate() error {
	if p.Scheme == nil {
		return errors.New("plan has no level scheme")
	}
	if err := p.Scheme.Validate(); err != nil {
		return fmt.Errorf("plan: %w", err)
	}
	if len(p.Scheme.Channels) > maxChannels {
		return fmt.Errorf("plan: %d channels; at most %d are supported", len(p.Scheme.Channels), maxChannels)
	}
	if err := uniqueChannels(p.Scheme); err != nil {
		return fmt.Errorf("plan: %w", err)
	}
	d := len(p.Scheme.Computational)
	if p.Target == nil || p.Target.R != d || p.Target.C != d {
		return fmt.Errorf("plan: target must be %d×%d for %d computational levels", d, d, d)
	}
	for _, v := range p.Target.Data {
		if !holonomy.Finite(real(v)) || !holonomy.Finite(imag(v)) {
			return errors.New("plan: target has a non-finite element")
		}
	}
	if len(p.Segments) == 0 || len(p.Segments) > MaxSegments {
		return fmt.Errorf("plan has %d segments; need 1 to %d", len(p.Segments), MaxSegments)
	}
	if !holonomy.Finite(p.Adiabaticity) || p.Adiabaticity < 0 {
		return fmt.Errorf("plan: adiabaticity target %v; need a positive number or 0 for the default", p.Adiabaticity)
	}
	if !holonomy.Finite(p.MinFidelity) || p.MinFidelity < 0 || p.MinFidelity > 1 {
		return fmt.Errorf("plan: minimum fidelity %v; need a number in (0, 1] or 0 for the default", p.MinFidelity)
	}
	a, b := p.Scheme.NewPoint(), p.Scheme.NewPoint()
	for i, s := range p.Segments {
		if s.Shape == nil {
			return fmt.Errorf("plan: segment %d has no shape", i)
		}
		switch s.Kind {
		case Adiabatic:
			clearPoint(a)
			clearPoint(b)
			s.Shape(0, a)
			s.Shape(1, b)
			if !pointFinite(a) || !pointFinite(b) {
				return fmt.Errorf("plan: segment %d: shape gives a non-finite control point", i)
			}
			if d := pointDist(a, b); d > 1e-9*(1+pointNorm(a)) {
				return fmt.Errorf("plan: segment %d: loop does not close (|Shape(1) − Shape(0)| = %.3g)", i, d)
			}
		case Cyclic:
			if !positive(s.Area) {
				return fmt.Errorf("plan: segment %d: pulse area %v rad; need a positive finite number", i, s.Area)
			}
			clearPoint(a)
			s.Shape(0, a)
			if !pointFinite(a) {
				return fmt.Errorf("plan: segment %d: shape gives a non-finite control point", i)
			}
		default:
			return fmt.Errorf("plan: segment %d has unknown kind %d", i, int(s.Kind))
		}
	}
	return nil
}

func (p *Plan) adiabaticity() float64 {
	if p.Adiabaticity > 0 {
		return p.Adiabaticity
	}
	return DefaultAdiabaticity
}

func (p *Plan) minFidelity() float64 {
	if p.MinFidelity > 0 {
		return p.MinFidelity
	}
	return DefaultMinFidelity
}

func clearPoint(p holonomy.Point) {
	for i := range p.Drive {
		p.Drive[i] = 0
	}
	for i := range p.Detuning {
		p.Detuning[i] = 0
	}
}

func pointFinite(p holonomy.Point) bool {
	for _, v := range p.Drive {
		if !holonomy.Finite(real(v)) || !holonomy.Finite(imag(v)) {
			return false
		}
	}
	for _, v := range p.Detuning {
		if !holonomy.Finite(v) {
			return false
		}
	}
	return true
}

func pointDist(a, b holonomy.Point) float64 {
	var s float64
	for i, v := range a.Drive {
		d := v - b.Drive[i]
		s += real(d)*real(d) + imag(d)*imag(d)
	}
	for i, v := range a.Detuning {
		d := v - b.Detuning[i]
		s += d * d
	}
	return math.Sqrt(s)
}

func pointNorm(a holonomy.Point) float64 {
	var s float64
	for _, v := range a.Drive {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	for _, v := range a.Detuning {
		s += v * v
	}
	return math.Sqrt(s)
}

func positive(x float64) bool { return holonomy.Finite(x) && x > 0 }

// CanonScheme returns a deep copy of s whose level detunings are exactly
// 2π·hz[k] with hz[k] = Detuning/2π, so that writing hz to a file and
// reading it back reproduces the scheme bit for bit.
func CanonScheme(s *holonomy.Scheme) (*holonomy.Scheme, []float64) {
	hz := make([]float64, len(s.Levels))
	for k, l := range s.Levels {
		hz[k] = l.Detuning / (2 * math.Pi)
	}
	return SchemeFromHz(s, hz), hz
}

// SchemeFromHz returns a deep copy of s with level detunings 2π·hz.
func SchemeFromHz(s *holonomy.Scheme, hz []float64) *holonomy.Scheme {
	c := &holonomy.Scheme{
		Name:          s.Name,
		Levels:        append([]holonomy.Level(nil), s.Levels...),
		Channels:      append([]holonomy.Channel(nil), s.Channels...),
		Computational: append([]int(nil), s.Computational...),
	}
	for k := range c.Levels {
		c.Levels[k].Detuning = 2 * math.Pi * hz[k]
	}
	return c
}

// uniqueChannels reports a channel name used twice (names label file
// columns).
func uniqueChannels(s *holonomy.Scheme) error {
	seen := make(map[string]bool, len(s.Channels))
	for _, c := range s.Channels {
		if seen[c.Name] {
			return fmt.Errorf("channel name %q is used twice", c.Name)
		}
		seen[c.Name] = true
	}
	return nil
}
