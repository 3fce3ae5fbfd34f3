package wavefile

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/waveform"
	"io"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

const (
	// WaveformFormat is the format name written into waveform files.
	WaveformFormat = "loopgate-waveform"
	// LoopFormat is the format name written into loop files.
	LoopFormat = "loopgate-loop"
	// FormatVersion is the version of both file formats this package
	// writes and reads.
	FormatVersion = 1
	// MaxFileBytes is the largest waveform or loop file the readers
	// accept (256 MiB).
	MaxFileBytes = 256 << 20
)

// Caution is the safety text written into every waveform file.
const Caution = "This waveform drives lasers or microwave sources. Before using it, check the amplitude calibration of every channel " +
	"(the full_scale_hz recorded here: Rabi frequency per DAC full-scale code) against your own measurement, stay within the damage " +
	"thresholds of every modulator, amplifier, fibre, antenna and sample in the drive chain, and follow your lab's laser and RF safety " +
	"rules and licensed practice, which take precedence over anything in this file. The verification covers only the model stated in it."

// Convention is the Hamiltonian convention written into every waveform
// file.
const Convention = "hbar = 1; angular frequencies are 2π times the Hz values in this file. " +
	"H(t) = Σ_k 2π (detuning_hz[k] + level_detunings[k](t)) |k⟩⟨k| + Σ_c (f_c/2) 2π (I_c(t) + i Q_c(t)) |upper_c⟩⟨lower_c| + h.c., " +
	"with f_c the channel's factor. Sample j holds over [j/sample_rate_hz, (j+1)/sample_rate_hz) (zero-order hold) and the gate is " +
	"U = Π_j exp(−i H_j Δt), later samples acting after earlier ones. The verified drive is the DAC output " +
	"I = i_code × full_scale_hz / (2^(dac_bits−1) − 1), and likewise Q. Decay and dephasing enter only as stated in verification.model."

// File is a waveform file: the waveform, its verification and where it
// came from. Design fills one and calls WriteJSON; ReadWaveform returns one.
type File struct {
	// ToolVersion is the loopgate version that wrote the file.
	ToolVersion string
	// SpecSHA256 is SpecHash of the spec bytes ("" without a spec).
	SpecSHA256 string
	// Seed is the seed of the loop search.
	Seed uint64
	// Spec is the spec text.
	Spec string
	// Waveform is the waveform.
	Waveform *waveform.Waveform
	// Verification is the verification written with it.
	Verification *waveform.Verification
}

// SpecHash returns the lower-case hexadecimal SHA-256 of spec.
func SpecHash(spec []byte) string {
	h := sha256.Sum256(spec)
	return hex.EncodeToString(h[:])
}

// JSON documents. Field order is the file's field order.

type waveDoc struct {
	Format         string          `json:"format"`
	Version        int             `json:"version"`
	ToolVersion    string          `json:"tool_version"`
	SpecSHA256     string          `json:"spec_sha256"`
	Seed           uint64          `json:"seed"`
	Caution        string          `json:"caution"`
	Convention     string          `json:"hamiltonian_convention"`
	Scheme         schemeDoc       `json:"scheme"`
	Target         matDoc          `json:"target"`
	Goals          goalsDoc        `json:"goals"`
	Hardware       hardwareDoc     `json:"hardware"`
	SampleRate     float64         `json:"sample_rate_hz"`
	Samples        int             `json:"samples"`
	Duration       float64         `json:"duration_s"`
	Segments       []segmentDoc    `json:"segments"`
	Channels       []channelDoc    `json:"channels"`
	LevelDetunings []detuningDoc   `json:"level_detunings"`
	Verification   verificationDoc `json:"verification"`
	Spec           string          `json:"spec"`
}

type schemeDoc struct {
	Name     string       `json:"name"`
	Levels   []levelDoc   `json:"levels"`
	Channels []chanDefDoc `json:"channels"`
	Qubit    []string     `json:"qubit_levels"`
}

type levelDoc struct {
	Name     string  `json:"name"`
	Detuning float64 `json:"detuning_hz"`
	Decay    float64 `json:"decay_per_s"`
}

type chanDefDoc struct {
	Name   string  `json:"name"`
	Lower  string  `json:"lower"`
	Upper  string  `json:"upper"`
	Factor float64 `json:"factor"`
}

type matDoc struct {
	Re [][]float64 `json:"re"`
	Im [][]float64 `json:"im"`
}

type goalsDoc struct {
	MinFidelity  float64 `json:"min_fidelity"`
	Adiabaticity float64 `json:"adiabaticity_target"`
}

type hardwareDoc struct {
	MaxRabi     []float64 `json:"max_rabi_hz"`
	MaxSlew     float64   `json:"max_slew_hz_per_s"`
	Granularity int       `json:"granularity"`
	MaxSamples  int       `json:"max_samples"`
	DACBits     int       `json:"dac_bits"`
	FullScale   []float64 `json:"full_scale_hz"`
	MinDuration float64   `json:"min_duration_s"`
	MaxDuration float64   `json:"max_duration_s"`
}

type segmentDoc struct {
	Kind      string  `json:"kind"`
	First     int     `json:"first_sample"`
	Samples   int     `json:"samples"`
	Ramp      int     `json:"ramp_samples"`
	Area      float64 `json:"area_rad"`
	Amplitude float64 `json:"amplitude_hz"`
	MinGap    float64 `json:"min_gap_hz"`
}

type channelDoc struct {
	Name  string    `json:"name"`
	I     []float64 `json:"i_hz"`
	Q     []float64 `json:"q_hz"`
	CodeI []int32   `json:"i_code"`
	CodeQ []int32   `json:"q_code"`
}

type detuningDoc struct {
	Level string    `json:"level"`
	Hz    []float64 `json:"hz"`
}

type verificationDoc struct {
	Model        modelDoc   `json:"model"`
	Fidelity     float64    `json:"fidelity"`
	Leakage      float64    `json:"leakage"`
	PeakAux      []float64  `json:"peak_aux_population"`
	PeakExcited  []float64  `json:"peak_excited_population"`
	Adiabaticity *float64   `json:"adiabaticity"`
	Checks       []checkDoc `json:"checks"`
	Pass         bool       `json:"pass"`
}

type modelDoc struct {
	AmplitudeError    float64   `json:"amplitude_error"`
	ChannelErrors     []float64 `json:"channel_amplitude_errors"`
	OnePhotonDetuning float64   `json:"one_photon_detuning_hz"`
	TwoPhotonDetuning float64   `json:"two_photon_detuning_hz"`
	Decay             float64   `json:"decay_per_s"`
	Dephasing         float64   `json:"dephasing_per_s"`
	// Filter and PhaseStep are optional when reading (files written
	// before they existed): "" reads as gaussian with a rise time and
	// none without, an absent phase step as 0. They are always written.
	Filter    string  `json:"filter"`
	RiseTime  float64 `json:"rise_time_s"`
	SubSteps  int     `json:"sub_steps"`
	PhaseStep float64 `json:"phase_step_rad"`
	Quantized bool    `json:"quantized"`
}

type checkDoc struct {
	Name   string  `json:"name"`
	Value  float64 `json:"value"`
	Limit  float64 `json:"limit"`
	Margin float64 `json:"margin"`
	Unit   string  `json:"unit"`
	Bound  string  `json:"bound"`
	Pass   bool    `json:"pass"`
}

func newSchemeDoc(s *holonomy.Scheme, hz []float64) schemeDoc {
	d := schemeDoc{Name: s.Name, Levels: []levelDoc{}, Channels: []chanDefDoc{}, Qubit: []string{}}
	for k, l := range s.Levels {
		d.Levels = append(d.Levels, levelDoc{Name: l.Name, Detuning: hz[k], Decay: l.Decay})
	}
	for _, c := range s.Channels {
		d.Channels = append(d.Channels, chanDefDoc{Name: c.Name, Lower: s.Levels[c.Lower].Name, Upper: s.Levels[c.Upper].Name, Factor: c.Factor})
	}
	for _, k := range s.Computational {
		d.Qubit = append(d.Qubit, s.Levels[k].Name)
	}
	return d
}

func newMatDoc(m *holonomy.Mat) matDoc {
	d := matDoc{Re: make([][]float64, m.R), Im: make([][]float64, m.R)}
	for i := 0; i < m.R; i++ {
		d.Re[i], d.Im[i] = make([]float64, m.C), make([]float64, m.C)
		for j := 0; j < m.C; j++ {
			v := m.At(i, j)
			d.Re[i][j], d.Im[i][j] = real(v), imag(v)
		}
	}
	return d
}

func newCheckDocs(cs []waveform.Check) []checkDoc {
	out := []checkDoc{}
	for _, c := range cs {
		b := "max"
		if c.Lower {
			b = "min"
		}
		out = append(out, checkDoc{Name: c.Name, Value: c.Value, Limit: c.Limit, Margin: c.Margin, Unit: c.Unit, Bound: b, Pass: c.Pass})
	}
	return out
}

func orEmpty(x []float64) []float64 {
	if x == nil {
		return []float64{}
	}
	return x
}

// doc builds the JSON document of f.
func (f *File) doc() (*waveDoc, error) {
	w, v := f.Waveform, f.Verification
	if w == nil || v == nil {
		return nil, errors.New("waveform file needs a waveform and its verification")
	}
	hw := &w.Hardware
	d := &waveDoc{
		Format: WaveformFormat, Version: FormatVersion,
		ToolVersion: f.ToolVersion, SpecSHA256: f.SpecSHA256, Seed: f.Seed,
		Caution: Caution, Convention: Convention,
		Scheme: newSchemeDoc(w.Scheme, w.LevelHz),
		Target: newMatDoc(w.Target),
		Goals:  goalsDoc{MinFidelity: w.MinFidelity, Adiabaticity: w.Adiabaticity},
		Hardware: hardwareDoc{
			MaxRabi: orEmpty(hw.MaxRabi), MaxSlew: hw.MaxSlew, Granularity: hw.Granularity, MaxSamples: hw.MaxSamples,
			DACBits: hw.DACBits, FullScale: orEmpty(hw.FullScale), MinDuration: hw.MinDuration, MaxDuration: hw.MaxDuration,
		},
		SampleRate:     hw.SampleRate,
		Samples:        w.Len(),
		Duration:       w.Duration(),
		Segments:       []segmentDoc{},
		Channels:       []channelDoc{},
		LevelDetunings: []detuningDoc{},
		Spec:           f.Spec,
	}
	for _, s := range w.Spans {
		d.Segments = append(d.Segments, segmentDoc{Kind: s.Kind.String(), First: s.First, Samples: s.Len, Ramp: s.Ramp, Area: s.Area, Amplitude: s.Amplitude, MinGap: s.MinGap})
	}
	for c, ch := range w.Scheme.Channels {
		d.Channels = append(d.Channels, channelDoc{Name: ch.Name, I: w.I[c], Q: w.Q[c], CodeI: w.CodeI[c], CodeQ: w.CodeQ[c]})
	}
	for l, tr := range w.Detuning {
		if tr != nil {
			d.LevelDetunings = append(d.LevelDetunings, detuningDoc{Level: w.Scheme.Levels[l].Name, Hz: tr})
		}
	}
	m := v.Model
	d.Verification = verificationDoc{
		Model: modelDoc{
			AmplitudeError: m.AmplitudeError, ChannelErrors: orEmpty(m.ChannelErrors),
			OnePhotonDetuning: m.OnePhotonDetuning, TwoPhotonDetuning: m.TwoPhotonDetuning,
			Decay: m.Decay, Dephasing: m.Dephasing, Filter: m.FilterName(), RiseTime: m.RiseTime, SubSteps: m.SubSteps,
			PhaseStep: m.PhaseStep, Quantized: !m.Unquantized,
		},
		Fidelity: v.Fidelity, Leakage: v.Leakage,
		PeakAux: orEmpty(v.PeakAux), PeakExcited: orEmpty(v.PeakExcited),
		Checks: newCheckDocs(v.Checks),
		Pass:   v.Pass(),
	}
	if !math.IsNaN(v.Adiabaticity) {
		a := v.Adiabaticity
		d.Verification.Adiabaticity = &a
	}
	return d, nil
}

// WriteJSON writes f as a waveform file (schemas.Waveform) to w. The
// output is a deterministic function of f. It fails for a file without
// waveform or verification and for non-finite numbers.
func (f *File) WriteJSON(w io.Writer) error {
	d, err := f.doc()
	if err != nil {
		return err
	}
	b, err := marshalDoc(d)
	if err != nil {
		return fmt.Errorf("encoding waveform file: %w", err)
	}
	if _, err := w.Write(b); err != nil {
		return fmt.Errorf("writing waveform file: %w", err)
	}
	return nil
}
