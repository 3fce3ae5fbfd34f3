package report

import "github.com/loopgate/loopgate/waveform"

// Threshold is the fidelity that defines the robust region: the report's
// robustness curves, map contour and geometric-advantage widths all refer to
// the region where the average gate fidelity is at least Threshold, the
// threshold the sweeps use.
const Threshold = waveform.DefaultThreshold

// Data is everything a report shows. It holds plain numbers and strings only,
// so any part of the program can fill it. Every section but the header, the
// cautions and the provenance is optional: a nil pointer or an empty slice
// leaves the section out and the page says so in one line.
//
// Units follow the rest of loopgate's files: times in seconds, Rabi
// frequencies in hertz (Ω/2π), phases in radians. Axes of robustness sweeps
// carry their own unit string.
type Data struct {
	// Title is the page heading, e.g. "Hadamard gate on a tripod".
	Title string
	// Subtitle says what the report is about, e.g. "design of spec
	// demo.yaml" or "verification of waveform file gate.json".
	Subtitle string
	// Notice, when not empty, is shown in a framed box under the title
	// (for example to mark demonstration or synthetic data).
	Notice string
	// Gate names the target gate, e.g. "Hadamard" or "X(π/2)".
	Gate string
	// Scheme describes the level scheme, e.g. "tripod: qubit g0, g1;
	// auxiliary a; excited e; channels p0, p1, pa".
	Scheme string
	// DynamicalGate describes the plain dynamical gate the geometric one
	// is compared with, e.g. "resonant pulse on g0–g1, same peak Rabi
	// frequency".
	DynamicalGate string

	// Advantage is the headline: one row per error axis.
	Advantage []AdvantageRow
	// Verification is the verification summary.
	Verification *Verification
	// Loop is the control loop, drawn on the sphere of normalised drive
	// vectors.
	Loop *Loop
	// Waveforms holds one entry per drive channel.
	Waveforms []Waveform
	// Populations holds one entry per computational input state.
	Populations []Populations
	// Sweeps are the one-dimensional robustness curves, one per error axis.
	Sweeps []Sweep
	// Map is the two-dimensional robustness map.
	Map *Map
	// Budget is the error budget, one row per error term, usually ending
	// with the total (all terms on).
	Budget []BudgetRow
	// Checks are the hardware-limit checks.
	Checks []CheckRow

	// Provenance records how the numbers were made.
	Provenance Provenance
	// Cautions are extra caution paragraphs (plain text). The report
	// always shows its own standard cautions first; these are added
	// after them.
	Cautions []string
}

// AdvantageRow compares the geometric gate with the plain dynamical gate
// along one error axis.
type AdvantageRow struct {
	// Axis names the error, e.g. "amplitude error ε" or "detuning δ".
	Axis string
	// Unit is the unit of the widths, e.g. "%" or "Hz" ("" when
	// dimensionless). Widths in "Hz" or "s" are shown with an SI prefix.
	Unit string
	// Geometric and Dynamical are the widths of the region along the
	// axis where the fidelity is at least Threshold, for each gate
	// (0 when the gate never reaches Threshold).
	Geometric, Dynamical float64
	// Ratio is Geometric/Dynamical (+Inf when Dynamical is 0).
	Ratio float64
	// GeometricOpen and DynamicalOpen mark widths that are only lower
	// bounds (the edge lies beyond the range examined); they are shown
	// with ≥.
	GeometricOpen, DynamicalOpen bool
}

// Verification summarises the verification of the gate.
type Verification struct {
	// Fidelity is the average gate fidelity with leakage (Pedersen, Møller
	// and Mølmer, Phys. Lett. A 367, 47 (2007)).
	Fidelity float64
	// Goal is the fidelity the design aims at (0: compare with Threshold).
	Goal float64
	// Leakage is the population lost from the computational subspace,
	// averaged over inputs.
	Leakage float64
	// Adiabaticity is the pipeline's adiabaticity figure (dimensionless;
	// NaN when it does not apply, as for a cyclic nonadiabatic gate;
	// smaller means more adiabatic).
	Adiabaticity float64
	// AdiabaticityNote says how Adiabaticity is defined; shown beside it.
	AdiabaticityNote string
	// Duration is the gate duration in seconds.
	Duration float64
	// Samples is the number of waveform samples per channel.
	Samples int
	// SampleRate is the sample rate in hertz (0: not shown).
	SampleRate float64
}

// Loop is the closed control loop, sampled along the loop parameter
// s ∈ [0, 1]; the first sample is the base point (s = 0).
//
// The sphere figure maps each drive vector to a real 3-vector v and
// normalises it to unit length:
//   - Axial given (e.g. a spin in a rotating field): v = (Re d₀, Im d₀, a),
//     with d₀ the first channel's drive and a the axial component;
//   - one channel: v = (Re d₀, Im d₀, 0), a point on the equator;
//   - two channels: the Bloch (Hopf) map of (d₀, d₁):
//     v = (2 Re d₀*d₁, 2 Im d₀*d₁, |d₀|² − |d₁|²) / (|d₀|² + |d₁|²);
//   - three or more channels: the moduli of the first three channels,
//     v = (|d₀|, |d₁|, |d₂|) / |d| with |d| the norm over all channels
//     (the relative phases are seen in the waveform phase panel).
//
// Samples where the drive vector vanishes are skipped.
type Loop struct {
	// Channels names the drive channels, in the order of Drive's columns.
	Channels []string
	// Drive[k][c] is the complex drive of channel c at sample k, on any
	// common scale (only directions are drawn).
	Drive [][]complex128
	// Axial, if not nil, holds one axial (longitudinal) component per
	// sample on the same scale as Drive.
	Axial []float64
}

// Waveform is one channel's control waveform.
type Waveform struct {
	// Channel names the channel.
	Channel string
	// Time holds the sample times in seconds.
	Time []float64
	// Amplitude holds the Rabi frequency Ω/2π in hertz per sample.
	Amplitude []float64
	// Phase holds the drive phase in radians per sample.
	Phase []float64
	// MaxRabi is the hardware limit on Ω/2π in hertz (0: no limit drawn).
	MaxRabi float64
}

// Populations is the level populations over time for one computational
// input state.
type Populations struct {
	// Input names the input state, e.g. "g0".
	Input string
	// Time holds the sample times in seconds.
	Time []float64
	// Levels names the levels, in the order of P's rows.
	Levels []string
	// P[l][k] is the population of level l at Time[k].
	P [][]float64
}

// Sweep is a one-dimensional robustness curve: fidelity against one error.
type Sweep struct {
	// Axis names the error, e.g. "amplitude error ε".
	Axis string
	// Unit is the unit of X ("" when dimensionless); "Hz" and "s" are
	// shown with an SI prefix.
	Unit string
	// X holds the error values, increasing.
	X []float64
	// Geometric holds the fidelity of the geometric gate at each X.
	Geometric []float64
	// Dynamical holds the fidelity of the plain dynamical gate at each X
	// (nil: not drawn).
	Dynamical []float64
}

// Map is the two-dimensional robustness map.
type Map struct {
	// XAxis, XUnit, X describe the horizontal error axis (increasing).
	XAxis, XUnit string
	X            []float64
	// YAxis, YUnit, Y describe the vertical error axis (increasing).
	YAxis, YUnit string
	Y            []float64
	// Geometric[i][j] is the fidelity of the geometric gate at X[j], Y[i].
	Geometric [][]float64
	// Dynamical, if not nil, has the same shape for the plain dynamical
	// gate; only its Threshold contour is drawn.
	Dynamical [][]float64
}

// BudgetRow is one line of the error budget.
type BudgetRow struct {
	// Term names the error term, e.g. "non-adiabaticity".
	Term string
	// Infidelity is the infidelity of the line: for the ideal line and the
	// total, 1 − F; for an error term, the increase of 1 − F over the
	// ideal model when that term alone is switched on.
	Infidelity float64
	// Note explains the term or the model used.
	Note string
	// Total marks the row with all terms on; it is shown emphasised.
	Total bool
}

// CheckRow is one hardware-limit check.
type CheckRow struct {
	// Name names the check, e.g. "peak Rabi frequency p0".
	Name string
	// Value is the value reached and Limit the hardware limit, in Unit.
	Value, Limit float64
	// Margin is the headroom as a fraction of the limit (0.2: 20 % below
	// the limit; negative: over it).
	Margin float64
	// Unit is the unit of Value and Limit ("Hz" and "s" are shown with an
	// SI prefix).
	Unit string
	// Pass reports whether the check passed.
	Pass bool
}

// Provenance records what made the report.
type Provenance struct {
	// Version is the loopgate version.
	Version string
	// SpecHash identifies the input specification (e.g. a SHA-256 hex
	// string).
	SpecHash string
	// Seed is the random seed of the design search.
	Seed int64
	// Source names the input file.
	Source string
}
