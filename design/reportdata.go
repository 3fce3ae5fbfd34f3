package design

import (
	"github.com/loopgate/loopgate/design/spec"
	"io"
	"math"
	"path/filepath"

	"github.com/loopgate/loopgate/design/report"
	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
)

// reportLoopPoints is the number of points per adiabatic segment drawn on
// the sphere figure; reportMaxSamples bounds the samples drawn per
// waveform panel (longer waveforms are decimated evenly).
const (
	reportLoopPoints = 400
	reportMaxSamples = 2000
)

// Caution is the text carried by reports and printed by the command.
const Caution = "loopgate computes waveforms from a model; it does not know your hardware. " +
	"Calibrate the DAC full scale against measured Rabi frequencies before use, start at reduced amplitude, " +
	"and stay below the damage thresholds of amplifiers, modulators, fibres and samples. " +
	"Laser and microwave sources driven by these files can cause injury: follow your laboratory's own safety rules, " +
	"interlocks and licensed practice, which take precedence over anything loopgate writes."

func writeReport(w io.Writer, d *report.Data) error { return report.Write(w, d) }

// reportData fills the report from an outcome and its analysis. The
// source file is named by its base name only, so that the report does not
// depend on the folder the spec was read from.
func reportData(o *Outcome, w *waveform.Waveform, plan *waveform.Plan, a *analysis, preset string) *report.Data {
	sc := w.Scheme
	d := &report.Data{
		Title:    o.Title,
		Subtitle: o.Command + " of " + filepath.Base(o.Source),
		Gate:     o.Target,
		Scheme:   schemeWords(sc),
		Provenance: report.Provenance{
			Version: Version, SpecHash: o.SpecHash, Seed: int64(o.Seed), Source: filepath.Base(o.Source),
		},
		Cautions: []string{Caution},
	}
	if d.Title == "" {
		d.Title = o.Target + " on " + sc.Name
	}
	ad, adNote := math.NaN(), "not applicable: the gate is a cyclic (nonadiabatic) evolution whose pulse areas are exact"
	if o.Ideal.Adiabaticity != nil {
		ad, adNote = *o.Ideal.Adiabaticity, "max over the loop of |⟨m|∂ₜH|n⟩|/(Eₘ−Eₙ)² (ideal model)"
	}
	d.Verification = &report.Verification{
		Fidelity:         o.Ideal.Fidelity,
		Goal:             w.MinFidelity,
		Leakage:          o.Ideal.Leakage,
		Adiabaticity:     ad,
		AdiabaticityNote: adNote,
		Duration:         w.Duration(),
		Samples:          w.Len(),
		SampleRate:       w.Hardware.SampleRate,
	}
	if plan != nil {
		d.Loop = loopDrawing(plan, preset)
	}
	d.Waveforms = waveformPanels(w)
	d.Populations = populationPanels(sc, a.traces)
	for _, b := range o.Budget {
		d.Budget = append(d.Budget, report.BudgetRow{Term: b.Term, Infidelity: b.Infidelity, Note: b.Note, Total: b.Total})
	}
	// The hardware table holds the hardware limits only; the fidelity and
	// adiabaticity goals are in the verification summary.
	for _, c := range w.HardwareChecks() {
		m := c.Margin
		if c.Limit != 0 {
			m = c.Margin / math.Abs(c.Limit)
		}
		row := report.CheckRow{Name: c.Name, Value: c.Value, Limit: c.Limit, Margin: m, Unit: c.Unit, Pass: c.Pass}
		if c.Unit == "Hz/s" { // slew rates read best in MHz/µs
			row.Value, row.Limit, row.Unit = c.Value/1e12, c.Limit/1e12, "MHz/µs"
		}
		d.Checks = append(d.Checks, row)
	}
	if cmp := a.compare; cmp != nil {
		d.DynamicalGate = cmp.Dynamical.String()
		for i, r := range cmp.Rows {
			if cmp.Dynamical.Waveform.Len() == 0 {
				// No pulse to compare with (diagonal target): show the
				// geometric gate's curves only.
				g := cmp.Geometric[i]
				d.Sweeps = append(d.Sweeps, report.Sweep{Axis: r.Axis.String(), Unit: r.Axis.Unit(), X: g.X, Geometric: g.Fidelity})
				continue
			}
			d.Advantage = append(d.Advantage, report.AdvantageRow{
				Axis: r.Axis.String(), Unit: r.Axis.Unit(),
				Geometric: r.Geometric.Width, Dynamical: r.Dynamical.Width, Ratio: r.Ratio,
				GeometricOpen: r.Geometric.Open(), DynamicalOpen: r.Dynamical.Open(),
			})
			g, dy := cmp.Geometric[i], cmp.DynamicalSweeps[i]
			d.Sweeps = append(d.Sweeps, report.Sweep{
				Axis: r.Axis.String(), Unit: r.Axis.Unit(), X: g.X, Geometric: g.Fidelity, Dynamical: dy.Fidelity,
			})
		}
	}
	if a.extra != nil {
		d.Sweeps = append(d.Sweeps, report.Sweep{Axis: a.extra.Axis.String(), Unit: a.extra.Axis.Unit(), X: a.extra.X, Geometric: a.extra.Fidelity})
	}
	if m := a.errMap; m != nil {
		d.Map = &report.Map{
			XAxis: m.XAxis.String(), XUnit: m.XAxis.Unit(), X: m.X,
			YAxis: m.YAxis.String(), YUnit: m.YAxis.Unit(), Y: m.Y,
			Geometric: m.Fidelity,
		}
	}
	return d
}

func schemeWords(sc *holonomy.Scheme) string {
	s := sc.Name + ": levels"
	for i, l := range sc.Levels {
		if i > 0 {
			s += ","
		}
		s += " " + l.Name
	}
	s += "; qubit"
	for i, k := range sc.Computational {
		if i > 0 {
			s += ","
		}
		s += " " + sc.Levels[k].Name
	}
	s += "; channels"
	for i, c := range sc.Channels {
		if i > 0 {
			s += ","
		}
		s += " " + c.Name + " (" + sc.Levels[c.Lower].Name + "–" + sc.Levels[c.Upper].Name + ")"
	}
	return s
}

// loopDrawing samples the plan's unit-scale control points along each
// segment for the sphere figure. For spin schemes the axial component is
// the field's z component, recovered from the detuning of level 0
// (m = s): δ₀ = cos θ · s.
func loopDrawing(plan *waveform.Plan, preset string) *report.Loop {
	sc := plan.Scheme
	l := &report.Loop{}
	for _, c := range sc.Channels {
		l.Channels = append(l.Channels, c.Name)
	}
	spin := spec.IsSpinPreset(preset)
	p := sc.NewPoint()
	s := float64(sc.Dim()-1) / 2
	for _, seg := range plan.Segments {
		n := reportLoopPoints
		if seg.Kind == waveform.Cyclic {
			n = 1
		}
		for j := 0; j <= n; j++ {
			if seg.Kind == waveform.Cyclic && j == n {
				break
			}
			for k := range p.Detuning {
				p.Detuning[k] = 0
			}
			seg.Shape(float64(j)/float64(n), p)
			l.Drive = append(l.Drive, append([]complex128(nil), p.Drive...))
			if spin {
				l.Axial = append(l.Axial, p.Detuning[0]/s)
			}
		}
	}
	return l
}

func waveformPanels(w *waveform.Waveform) []report.Waveform {
	n := w.Len()
	stride := 1
	if n > reportMaxSamples {
		stride = (n + reportMaxSamples - 1) / reportMaxSamples
	}
	dt := w.Dt()
	var out []report.Waveform
	for c, ch := range w.Scheme.Channels {
		p := report.Waveform{Channel: ch.Name, MaxRabi: w.Hardware.MaxRabi[c]}
		for k := 0; k < n; k += stride {
			i, q := w.I[c][k], w.Q[c][k]
			p.Time = append(p.Time, float64(k)*dt)
			p.Amplitude = append(p.Amplitude, math.Hypot(i, q))
			p.Phase = append(p.Phase, math.Atan2(q, i))
		}
		out = append(out, p)
	}
	return out
}

func populationPanels(sc *holonomy.Scheme, tr *waveform.Outcome) []report.Populations {
	if tr == nil || len(tr.Times) == 0 {
		return nil
	}
	var names []string
	for _, l := range sc.Levels {
		names = append(names, l.Name)
	}
	var out []report.Populations
	for i, k := range sc.Computational {
		if i >= len(tr.Populations) {
			break
		}
		out = append(out, report.Populations{
			Input: "|" + sc.Levels[k].Name + "⟩", Time: tr.Times, Levels: names, P: tr.Populations[i],
		})
	}
	return out
}
