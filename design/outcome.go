package design

import (
	"math"

	"github.com/loopgate/loopgate/design/internal/atomicfile"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/sim"
	"github.com/loopgate/loopgate/waveform/wavefile"
)

// Outcome is what Design and VerifyFile report: the figures of merit, the
// checks and the files written. It marshals to JSON for --json; numbers
// that are not finite (an open robust region, say) are written as null.
type Outcome struct {
	// Command is "design" or "verify".
	Command string `json:"command"`
	// Source names the spec or waveform file the outcome is about.
	Source string `json:"source"`
	// Title is the spec's title.
	Title string `json:"title,omitempty"`
	// Target describes the target gate.
	Target string `json:"target"`
	// Scheme names the level scheme.
	Scheme string `json:"scheme"`
	// Method is "adiabatic" or "nonadiabatic" (design only).
	Method string `json:"method,omitempty"`
	// Seed is the search seed and SpecHash the SHA-256 of the spec bytes.
	Seed     uint64 `json:"seed"`
	SpecHash string `json:"spec_sha256"`
	// Search summarises the loop search (design only).
	Search *SearchSummary `json:"search,omitempty"`
	// Duration (s), Samples and SampleRate (S/s) describe the waveform.
	Duration   float64 `json:"duration_s"`
	Samples    int     `json:"samples"`
	SampleRate float64 `json:"sample_rate"`
	// Ideal holds the figures of the quantised waveform without errors;
	// its checks decide Pass.
	Ideal Figures `json:"ideal"`
	// WithErrors holds the figures under the error model.
	WithErrors Figures `json:"with_errors"`
	// Checks are the checks of the ideal model: fidelity, adiabaticity
	// and every hardware limit.
	Checks []CheckRow `json:"checks"`
	// Budget is the error budget, one line per term.
	Budget []BudgetRow `json:"budget,omitempty"`
	// Advantage compares the geometric gate with a plain dynamical gate.
	Advantage *Advantage `json:"advantage,omitempty"`
	// Files lists the files written.
	Files []string `json:"files,omitempty"`
	// Reproduced is set by VerifyFile: whether the recomputed ideal
	// figures equal those stored in the file bit for bit.
	Reproduced *bool `json:"reproduced,omitempty"`
	// Pass reports whether every check passed (ideal model; the figures
	// with errors are reported, not checked).
	Pass bool `json:"pass"`
	// Caution is the safety caution that goes with every waveform.
	Caution string `json:"caution"`
}

// SearchSummary describes the loop search.
type SearchSummary struct {
	Family        string         `json:"family"`
	Parameters    int            `json:"parameters"`
	Infidelity    float64        `json:"holonomy_infidelity"`
	HolonomyError float64        `json:"holonomy_error_estimate,omitempty"`
	LoopPoints    int            `json:"loop_points,omitempty"`
	LoopLength    float64        `json:"loop_length_rad,omitempty"`
	MinGap        float64        `json:"min_gap_hz,omitempty"` // smallest gap/2π along the timed loop (adiabatic)
	Evaluations   int            `json:"evaluations"`
	Restarts      int            `json:"restarts"`
	Findings      []string       `json:"findings,omitempty"`
	Robust        *RobustSummary `json:"robust,omitempty"`
}

// RobustSummary describes the robust-design stage. The nominal and robust
// means and worst cases are those of the search's own model (unit-scale
// holonomies, or square pulses for the Λ scheme); Built holds the members
// simulated on the waveform actually built, the figures that count.
type RobustSummary struct {
	Members      int     `json:"members"`
	NominalMean  float64 `json:"nominal_mean_infidelity"`
	RobustMean   float64 `json:"robust_mean_infidelity"`
	NominalWorst float64 `json:"nominal_worst_infidelity"`
	RobustWorst  float64 `json:"robust_worst_infidelity"`
	Improvement  float64 `json:"improvement"`
	Insensitive  bool    `json:"insensitive"`
	Kept         bool    `json:"kept_nominal"`
	// Built lists the ensemble members with the infidelity of the built
	// waveform (ideal model plus the member's errors).
	Built []EnsembleMember `json:"built_waveform"`
	// BuiltMean and BuiltWorst summarise Built.
	BuiltMean  float64 `json:"built_mean_infidelity"`
	BuiltWorst float64 `json:"built_worst_infidelity"`
}

// EnsembleMember is one error case of the robust design: a common
// amplitude error, a detuning error (Hz) of the given kind, and the
// infidelity of the built waveform under it.
type EnsembleMember struct {
	Amplitude  float64 `json:"amplitude_error"`
	Detuning   float64 `json:"detuning_hz"`
	Kind       string  `json:"detuning_kind"`
	Infidelity float64 `json:"infidelity"`
}

// Figures are the simulated figures of merit of one error model.
type Figures struct {
	Fidelity float64 `json:"fidelity"`
	Leakage  float64 `json:"leakage"`
	// PeakAux is, per computational input, the largest population
	// outside the qubit levels.
	PeakAux []float64 `json:"peak_aux_population"`
	// PeakExcited is, per computational input, the largest population of
	// the excited levels (the ones that decay).
	PeakExcited []float64 `json:"peak_excited_population"`
	// Adiabaticity is max_t |⟨m|∂_tH|n⟩|/(E_m − E_n)² (null without
	// adiabatic segments).
	Adiabaticity *float64 `json:"adiabaticity"`
}

// CheckRow is one check: value, limit, margin and verdict.
type CheckRow struct {
	// Kind says what is checked (not printed: Name says it in words).
	Kind waveform.CheckKind `json:"-"`
	wavefile.CheckRecord
}

// IsFidelity reports whether the row is the fidelity goal.
func (c CheckRow) IsFidelity() bool { return c.Kind == waveform.FidelityCheck }

// BudgetRow is one line of the error budget.
type BudgetRow struct {
	Term       string  `json:"term"`
	Infidelity float64 `json:"infidelity"`
	Note       string  `json:"note"`
	Total      bool    `json:"total,omitempty"`
}

// Advantage is the geometric-advantage comparison: the width of the
// region where fidelity ≥ Threshold along each error axis, for the
// geometric gate and for a plain dynamical gate with the same limits.
type Advantage struct {
	Threshold float64        `json:"threshold"`
	Dynamical string         `json:"dynamical_gate"`
	Rows      []AdvantageRow `json:"rows"`
}

// AdvantageRow compares the two gates along one axis. Widths are in Unit;
// Open marks a width that is only a lower bound. Ratio is null when it
// is not finite.
type AdvantageRow struct {
	Axis          string   `json:"axis"`
	Unit          string   `json:"unit"`
	Geometric     float64  `json:"geometric_width"`
	GeometricOpen bool     `json:"geometric_open,omitempty"`
	Dynamical     float64  `json:"dynamical_width"`
	DynamicalOpen bool     `json:"dynamical_open,omitempty"`
	Ratio         *float64 `json:"ratio"`
	Note          string   `json:"note,omitempty"`
}

func newOutcome(cmd, source, title, target string, w *waveform.Waveform, a *analysis) *Outcome {
	o := &Outcome{
		Command:    cmd,
		Source:     source,
		Title:      title,
		Target:     target,
		Scheme:     w.Scheme.Name,
		Duration:   w.Duration(),
		Samples:    w.Len(),
		SampleRate: w.Hardware.SampleRate,
		Ideal:      figures(a.ideal),
		WithErrors: figures(a.withErrors),
		Pass:       a.ideal.Pass(),
		Caution:    Caution,
	}
	for _, c := range a.ideal.Checks {
		o.Checks = append(o.Checks, CheckRow{Kind: c.Kind, CheckRecord: wavefile.NewCheckRecord(c)})
	}

	for _, b := range a.budget {
		o.Budget = append(o.Budget, BudgetRow{Term: b.Term, Infidelity: b.Infidelity, Note: b.Note, Total: b.Total})
	}
	if a.compare != nil {
		adv := &Advantage{Threshold: a.compare.Threshold, Dynamical: a.compare.Dynamical.String()}
		// A diagonal target needs no pulse on a directly driven qubit (a
		// virtual z rotation): there is nothing to compare, so no rows.
		for _, r := range a.compare.Rows {
			if a.compare.Dynamical.Waveform.Len() == 0 {
				break
			}
			adv.Rows = append(adv.Rows, AdvantageRow{
				Axis: r.Axis.String(), Unit: r.Axis.Unit(),
				Geometric: r.Geometric.Width, GeometricOpen: r.Geometric.Open(),
				Dynamical: r.Dynamical.Width, DynamicalOpen: r.Dynamical.Open(),
				Ratio: finitePtr(r.Ratio), Note: r.Note,
			})
		}
		o.Advantage = adv
	}
	return o
}

func figures(v *sim.Verification) Figures {
	return Figures{
		Fidelity:     v.Fidelity,
		Leakage:      v.Leakage,
		PeakAux:      append([]float64(nil), v.PeakAux...),
		PeakExcited:  append([]float64(nil), v.PeakExcited...),
		Adiabaticity: finitePtr(v.Adiabaticity),
	}
}

// err returns a *ChecksFailedError when a check failed.
func (o *Outcome) err() error {
	if o.Pass {
		return nil
	}
	e := &ChecksFailedError{}
	for _, c := range o.Checks {
		if !c.Pass {
			e.Failed = append(e.Failed, c.Name)
		}
	}
	return e
}

func finitePtr(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

// WriteOutput writes data to path in one step: the path holds either its
// previous content or all of data, never a part. Without overwrite an
// existing path is refused (the error wraps fs.ErrExist). Errors are
// *OutputError.
func WriteOutput(path string, data []byte, overwrite bool) error {
	if err := atomicfile.WriteFile(path, data, overwrite); err != nil {
		return &OutputError{Err: err}
	}
	return nil
}
