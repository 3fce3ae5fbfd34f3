package spec

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

// Resource bounds. A spec cannot ask for more than these; they keep a run
// finite in memory and (together with Ctrl-C) in time.
const (
	// MaxSpecBytes is the largest spec file read.
	MaxSpecBytes = 1 << 20
	// MaxSpecNodes bounds the YAML nodes of a spec after alias expansion.
	MaxSpecNodes = 20000
	// MaxChannels is the largest number of drive channels in a scheme.
	MaxChannels = 32
	// MaxHarmonics bounds search.harmonics of a Fourier loop.
	MaxHarmonics = 32
	// MinVertices and MaxVertices bound search.vertices of a polygon loop.
	MinVertices, MaxVertices = 3, 64
	// MaxRestarts bounds search.restarts.
	MaxRestarts = 256
	// MaxEvaluations bounds search.evaluations (objective evaluations per start).
	MaxEvaluations = 200000
	// MaxTotalEvaluations bounds restarts × evaluations.
	MaxTotalEvaluations = 2000000
	// MinLoopPoints and MaxLoopPoints bound search.loop_points.
	MinLoopPoints, MaxLoopPoints = 16, 1 << 16
	// MaxSweepPoints bounds the points of a 1-D robustness sweep.
	MaxSweepPoints = 1001
	// MaxMapPoints bounds each axis of the 2-D robustness map.
	MaxMapPoints = 201
	// MaxSampleCount bounds hardware.max_samples (samples per channel).
	MaxSampleCount = 1 << 24
	// MaxGranularity bounds hardware.granularity.
	MaxGranularity = 4096
	// MinDACBits and MaxDACBits bound hardware.dac_bits.
	MinDACBits, MaxDACBits = 2, 24
	// BytesPerSample is the memory, in bytes, budgeted for one sample of one
	// channel across every representation the tool keeps (I/Q and
	// amplitude/phase in float64, DAC codes, propagation scratch). It is a
	// planning figure for CheckSampleMemory, not a measured size.
	BytesPerSample = 64
	// MaxWaveformBytes bounds the memory of one waveform: samples ×
	// channels × BytesPerSample.
	MaxWaveformBytes = 1 << 30
	// MaxSeed is the largest search seed: 2^53 − 1, exact in every JSON
	// reader.
	MaxSeed = 1<<53 - 1
	// UnitarityTol is the tolerance on ‖U†U − I‖ (Frobenius norm) for an
	// explicit target unitary.
	UnitarityTol = 1e-9
)

// Method is how a gate is made.
type Method int

const (
	// Adiabatic gates are Wilczek–Zee holonomies of a degenerate (dark)
	// working subspace carried slowly around a loop.
	Adiabatic Method = iota + 1
	// Nonadiabatic gates are Λ-type cyclic evolutions: the bright state
	// returns after pulse area 2π without dynamical phase.
	Nonadiabatic
)

// String returns the spec spelling of m.
func (m Method) String() string {
	switch m {
	case Adiabatic:
		return "adiabatic"
	case Nonadiabatic:
		return "nonadiabatic"
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// LoopFamily is a family of loop shapes for the search.
type LoopFamily int

const (
	// Fourier loops are smooth truncated Fourier series on the sphere of
	// normalised drive vectors.
	Fourier LoopFamily = iota + 1
	// Polygon loops are piecewise geodesic polygons.
	Polygon
)

// String returns the spec spelling of f.
func (f LoopFamily) String() string {
	switch f {
	case Fourier:
		return "fourier"
	case Polygon:
		return "polygon"
	}
	return fmt.Sprintf("LoopFamily(%d)", int(f))
}

// DetuningKind says which detuning an error or sweep acts on.
type DetuningKind int

const (
	// OnePhoton shifts every excited level (see Spec.Excited).
	OnePhoton DetuningKind = iota + 1
	// TwoPhoton shifts qubit level |1⟩ relative to |0⟩.
	TwoPhoton
)

// String returns the spec spelling of k.
func (k DetuningKind) String() string {
	switch k {
	case OnePhoton:
		return "one-photon"
	case TwoPhoton:
		return "two-photon"
	}
	return fmt.Sprintf("DetuningKind(%d)", int(k))
}

// Filter is a low-pass model of the AWG's analog bandwidth.
type Filter int

const (
	// NoFilter passes samples unchanged (infinite bandwidth).
	NoFilter Filter = iota
	// GaussianFilter convolves with a Gaussian of the given 10–90 % rise time.
	GaussianFilter
	// FirstOrderFilter is a single-pole low pass of the given 10–90 % rise time.
	FirstOrderFilter
)

// String returns the spec spelling of f.
func (f Filter) String() string {
	switch f {
	case NoFilter:
		return "none"
	case GaussianFilter:
		return "gaussian"
	case FirstOrderFilter:
		return "first-order"
	}
	return fmt.Sprintf("Filter(%d)", int(f))
}

// Target is the gate a design aims at, up to a global phase.
type Target struct {
	// Name is the canonical gate name for a named gate (see Gates), and
	// empty for a rotation or an explicit unitary.
	Name string
	// Label describes the target in words for reports, e.g. "H (Hadamard)"
	// or "rotation by 90 deg about (1, 0, 0)".
	Label string
	// U is the 2×2 target unitary in the qubit basis (|0⟩, |1⟩).
	U *holonomy.Mat
}

// Hardware holds the hardware limits, in SI units: frequencies in Hz
// (Rabi frequencies as Ω/2π), times in seconds, slew rates in Hz/s.
// Per-channel slices follow the order of the scheme's channels.
type Hardware struct {
	// MaxRabi is the largest Rabi frequency Ω/2π per channel, in Hz.
	MaxRabi []float64
	// MaxSlew is the largest rate of change of Ω/2π per channel, in Hz/s.
	MaxSlew []float64
	// FullScale is the Rabi frequency Ω/2π at DAC full scale per channel,
	// in Hz (the calibration); FullScale ≥ MaxRabi.
	FullScale []float64
	// SampleRate is the AWG sample rate in samples per second.
	SampleRate float64
	// Granularity: sample counts are padded to a multiple of it.
	Granularity int
	// MaxSamples is the largest number of samples per channel.
	MaxSamples int
	// DACBits is the DAC resolution in bits.
	DACBits int
	// MinDuration and MaxDuration bound the gate duration, in seconds.
	MinDuration, MaxDuration float64
}

// Ensemble is the error ensemble of a robust design: the search minimises
// the infidelity averaged over ε ∈ {−Amplitude, 0, +Amplitude} ×
// δ ∈ {−Detuning, 0, +Detuning} (an axis with zero width has one point).
type Ensemble struct {
	// Amplitude is the relative amplitude error x (Ω → (1 ± x)Ω).
	Amplitude float64
	// Detuning is the detuning error y as Δ/2π in Hz.
	Detuning float64
	// DetuningKind says which detuning Detuning varies.
	DetuningKind DetuningKind
}

// Enabled reports whether the ensemble asks for a robust design.
func (e Ensemble) Enabled() bool { return e.Amplitude != 0 || e.Detuning != 0 }

// Search holds the loop-search settings.
type Search struct {
	// Family is the loop family.
	Family LoopFamily
	// Harmonics is the number of Fourier harmonics (Fourier family).
	Harmonics int
	// Vertices is the number of polygon vertices (Polygon family).
	Vertices int
	// Restarts is the number of seeded starts.
	Restarts int
	// Seed seeds the start generator.
	Seed uint64
	// TargetInfidelity stops the search when reached.
	TargetInfidelity float64
	// Evaluations is the objective-evaluation budget of each start.
	Evaluations int
	// LoopPoints is the largest number of points used along a loop to
	// compute its holonomy.
	LoopPoints int
	// Robust is the robust-design ensemble; see Ensemble.Enabled.
	Robust Ensemble
}

// ErrorModel holds the errors applied in verification, in SI units.
// Level decay rates are part of the scheme (Spec.Scheme.Levels[k].Decay,
// 1/s): the ideal model leaves them out and verification with errors
// includes them.
type ErrorModel struct {
	// Amplitude is the amplitude scale error ε per channel (Ω → (1+ε)Ω).
	Amplitude []float64
	// OnePhoton is the detuning error Δ/2π of the excited levels, in Hz.
	OnePhoton float64
	// TwoPhoton is the detuning error δ/2π of qubit level |1⟩, in Hz.
	TwoPhoton float64
	// Dephasing is γ_φ in 1/s: a qubit coherence decays as exp(−γ_φ t).
	Dephasing float64
	// Filter is the model of the AWG's analog bandwidth.
	Filter Filter
	// RiseTime is the filter's 10–90 % rise time in seconds (0 without
	// a filter).
	RiseTime float64
	// Quantise applies DAC quantisation.
	Quantise bool
	// PhaseStep is the drive-phase resolution in radians (0: exact).
	PhaseStep float64
}

// Sweep is a 1-D robustness sweep from −Span to +Span.
type Sweep struct {
	// Span is the half-width: a relative error for amplitude sweeps, Δ/2π
	// in Hz for detuning sweeps.
	Span float64
	// Points is the number of sweep points.
	Points int
}

// Sweeps holds the robustness sweeps.
type Sweeps struct {
	// Amplitude sweeps the common amplitude error.
	Amplitude Sweep
	// Detuning sweeps a detuning error (Span as Δ/2π in Hz).
	Detuning Sweep
	// DetuningKind says which detuning the sweep and the map vary.
	DetuningKind DetuningKind
	// MapAmplitude and MapDetuning are the grid sizes of the 2-D map over
	// the spans of the 1-D sweeps.
	MapAmplitude, MapDetuning int
}

// Spec is a parsed and validated design spec. Values are in SI units and,
// inside Scheme, in the engine's angular units (rad/s); see the field docs.
type Spec struct {
	// File names the spec in messages (the path it was read from).
	File string
	// Title is the spec's free-text title.
	Title string
	// Target is the gate to make.
	Target Target
	// Preset names the scheme preset ("tripod", "lambda", "spin-1/2",
	// "spin"), or is empty for an explicit coupling graph.
	Preset string
	// Scheme is the level scheme in rad/s (detunings 2π × Hz, decay Γ in 1/s).
	Scheme *holonomy.Scheme
	// Excited lists the levels a one-photon detuning shifts: the non-qubit
	// levels that are the upper level of some channel. Spin presets have
	// none (their levels are magnetic sublevels, not optical ones).
	Excited []int
	// Method is how the gate is made.
	Method Method
	// Hardware holds the hardware limits.
	Hardware Hardware
	// Search holds the loop-search settings.
	Search Search
	// Errors holds the error models of verification.
	Errors ErrorModel
	// Sweeps holds the robustness sweeps.
	Sweeps Sweeps
	// Source holds the spec bytes as read.
	Source []byte
}

// Hash returns the hex SHA-256 of the spec bytes as read.
func (s *Spec) Hash() string {
	h := sha256.Sum256(s.Source)
	return hex.EncodeToString(h[:])
}

// Problem is one thing wrong with a spec.
type Problem struct {
	// Path is the field, as "hardware.sample_rate" or
	// "scheme.channels[1].upper"; empty for the whole file.
	Path string
	// Line and Col locate the field in the YAML file (1-based); zero when
	// unknown.
	Line, Col int
	// Msg says what is wrong and what was expected.
	Msg string
}

// SpecError reports every problem found in a spec.
type SpecError struct {
	// File names the spec.
	File string
	// Problems are ordered by position in the file.
	Problems []Problem
}

// Error returns one line per problem, each naming the file, the field and
// its YAML position:
//
//	spec demo.yaml: hardware.sample_rate (line 12, col 16): "1.2 GHz" is not a sample rate ...
func (e *SpecError) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(p.format(e.File))
	}
	return b.String()
}

func (p Problem) format(file string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "spec %s: ", file)
	switch {
	case p.Path != "" && p.Line > 0 && p.Col > 0:
		fmt.Fprintf(&b, "%s (line %d, col %d): ", p.Path, p.Line, p.Col)
	case p.Path != "" && p.Line > 0:
		fmt.Fprintf(&b, "%s (line %d): ", p.Path, p.Line)
	case p.Path != "":
		fmt.Fprintf(&b, "%s: ", p.Path)
	case p.Line > 0 && p.Col > 0:
		fmt.Fprintf(&b, "line %d, col %d: ", p.Line, p.Col)
	case p.Line > 0:
		fmt.Fprintf(&b, "line %d: ", p.Line)
	}
	b.WriteString(p.Msg)
	return b.String()
}

func (e *SpecError) sort() {
	sort.SliceStable(e.Problems, func(i, j int) bool {
		a, b := e.Problems[i], e.Problems[j]
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		if a.Col != b.Col {
			return a.Col < b.Col
		}
		if a.Path != b.Path {
			return a.Path < b.Path
		}
		return a.Msg < b.Msg
	})
	// Drop exact duplicates (a per-channel problem reported once for a
	// value written once for every channel).
	out := e.Problems[:0]
	for i, p := range e.Problems {
		if i > 0 && p == e.Problems[i-1] {
			continue
		}
		out = append(out, p)
	}
	e.Problems = out
}

// LoadSpec reads, parses and validates the spec file at path (see
// ParseSpec). A directory, a missing file or a file over MaxSpecBytes is
// an error naming the file.
func LoadSpec(path string) (*Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, errors.Unwrap(err))
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, err)
	}
	if st.IsDir() {
		return nil, fmt.Errorf("spec %s: is a directory; expected a YAML spec file", path)
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxSpecBytes+1))
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, err)
	}
	if len(data) > MaxSpecBytes {
		return nil, fmt.Errorf("spec %s: file is larger than %d bytes; a spec is a short YAML file", path, MaxSpecBytes)
	}
	return ParseSpec(data, path)
}

// ParseSpec parses and validates a YAML design spec; name is used in
// messages (usually the file path). It checks, in order: the YAML syntax;
// the JSON Schema schemas.Spec (unknown keys, missing fields, types, unit
// syntax and bounds); then the meaning (units and their dimensions, level
// and channel names, unitarity of an explicit target, hardware consistency,
// resource bounds and the working subspace of the scheme, see
// Spec.Validate). Every problem is reported in a *SpecError naming the
// field and its line and column.
func ParseSpec(data []byte, name string) (*Spec, error) {
	if len(data) > MaxSpecBytes {
		return nil, &SpecError{File: name, Problems: []Problem{{Msg: fmt.Sprintf("file is larger than %d bytes; a spec is a short YAML file", MaxSpecBytes)}}}
	}
	doc, idx, perr := readYAML(data)
	if perr != nil {
		return nil, &SpecError{File: name, Problems: []Problem{*perr}}
	}
	if probs := validateSchema(doc, idx); len(probs) > 0 {
		e := &SpecError{File: name, Problems: probs}
		e.sort()
		return nil, e
	}
	d := &decoder{idx: idx}
	s := d.spec(doc.(map[string]any))
	if len(d.probs) == 0 {
		d.probs = append(d.probs, s.check()...)
	}
	if len(d.probs) > 0 {
		for i := range d.probs {
			d.probs[i] = idx.locate(d.probs[i])
		}
		e := &SpecError{File: name, Problems: d.probs}
		e.sort()
		return nil, e
	}
	s.File = name
	s.Source = append([]byte(nil), data...)
	return s, nil
}

// Validate checks a Spec's meaning: bounds, hardware consistency, the
// target's unitarity, the scheme's structure and its working subspace for
// the method. ParseSpec calls it; call it again after changing fields (for
// instance from command-line flags). Problems name fields but carry no
// YAML position.
func (s *Spec) Validate() error {
	probs := s.check()
	if len(probs) == 0 {
		return nil
	}
	e := &SpecError{File: s.File, Problems: probs}
	e.sort()
	return e
}
