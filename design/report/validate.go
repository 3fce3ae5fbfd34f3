package report

import (
	"errors"
	"fmt"
	"math"
)

// validate checks shapes and values of d and names the first bad field.
func validate(d *Data) error {
	if d == nil {
		return errors.New("report: no data (nil *Data)")
	}
	for _, check := range []func(*Data) error{
		validateAdvantage,
		validateVerification,
		validateLoop,
		validateWaveforms,
		validatePopulations,
		validateSweeps,
		validateMap,
		validateBudget,
		validateChecks,
	} {
		if err := check(d); err != nil {
			return err
		}
	}
	return nil
}

// validateAdvantage checks the geometric-advantage rows of d.
func validateAdvantage(d *Data) error {
	for i, r := range d.Advantage {
		f := fmt.Sprintf("Advantage[%d] (%q)", i, r.Axis)
		if err := finite(f+".Geometric", r.Geometric); err != nil {
			return err
		}
		if err := finite(f+".Dynamical", r.Dynamical); err != nil {
			return err
		}
		if r.Geometric < 0 || r.Dynamical < 0 {
			return fmt.Errorf("report: %s: widths must not be negative (geometric %g, dynamical %g)", f, r.Geometric, r.Dynamical)
		}
		if math.IsInf(r.Ratio, -1) || r.Ratio < 0 {
			return fmt.Errorf("report: %s.Ratio is %g; want a ratio ≥ 0, +Inf or NaN", f, r.Ratio)
		}
	}
	return nil
}

// validateVerification checks the verification figures of d.
func validateVerification(d *Data) error {
	if v := d.Verification; v != nil {
		for _, q := range []struct {
			name string
			x    float64
		}{{"Fidelity", v.Fidelity}, {"Leakage", v.Leakage}, {"Duration", v.Duration}, {"SampleRate", v.SampleRate}} {
			if err := finite("Verification."+q.name, q.x); err != nil {
				return err
			}
		}
		if v.Samples < 0 {
			return fmt.Errorf("report: Verification.Samples is %d; want ≥ 0", v.Samples)
		}
	}
	return nil
}

// validateLoop checks the loop figure data of d.
func validateLoop(d *Data) error {
	if l := d.Loop; l != nil {
		if len(l.Channels) == 0 {
			return errors.New("report: Loop.Channels is empty; name at least one channel")
		}
		if len(l.Drive) < 2 {
			return fmt.Errorf("report: Loop.Drive has %d samples; want at least 2", len(l.Drive))
		}
		for k, row := range l.Drive {
			if len(row) != len(l.Channels) {
				return fmt.Errorf("report: Loop.Drive[%d] has %d channels; Loop.Channels names %d", k, len(row), len(l.Channels))
			}
			for c, z := range row {
				if err := finite(fmt.Sprintf("Loop.Drive[%d][%d]", k, c), real(z), imag(z)); err != nil {
					return err
				}
			}
		}
		if l.Axial != nil {
			if len(l.Axial) != len(l.Drive) {
				return fmt.Errorf("report: Loop.Axial has %d samples; Loop.Drive has %d", len(l.Axial), len(l.Drive))
			}
			if err := finite("Loop.Axial", l.Axial...); err != nil {
				return err
			}
		}
		v, ok, _, _ := sphereVectors(l)
		n := 0
		for k := range v {
			if ok[k] {
				n++
			}
		}
		if n == 0 {
			return errors.New("report: Loop.Drive is zero at every sample; the normalised drive is undefined")
		}
	}
	return nil
}

// validateWaveforms checks the waveform traces of d.
func validateWaveforms(d *Data) error {
	for i, w := range d.Waveforms {
		f := fmt.Sprintf("Waveforms[%d] (%q)", i, w.Channel)
		if len(w.Time) < 2 {
			return fmt.Errorf("report: %s.Time has %d samples; want at least 2", f, len(w.Time))
		}
		if len(w.Amplitude) != len(w.Time) || len(w.Phase) != len(w.Time) {
			return fmt.Errorf("report: %s: Time, Amplitude and Phase have %d, %d and %d samples; want equal", f, len(w.Time), len(w.Amplitude), len(w.Phase))
		}
		if err := increasing(f+".Time", w.Time); err != nil {
			return err
		}
		if err := finite(f+".Amplitude", w.Amplitude...); err != nil {
			return err
		}
		if err := finite(f+".Phase", w.Phase...); err != nil {
			return err
		}
		if err := finite(f+".MaxRabi", w.MaxRabi); err != nil {
			return err
		}
		if w.MaxRabi < 0 {
			return fmt.Errorf("report: %s.MaxRabi is %g; want ≥ 0 (0: no limit)", f, w.MaxRabi)
		}
	}
	return nil
}

// validatePopulations checks the population traces of d.
func validatePopulations(d *Data) error {
	for i, p := range d.Populations {
		f := fmt.Sprintf("Populations[%d] (input %q)", i, p.Input)
		if len(p.Time) < 2 {
			return fmt.Errorf("report: %s.Time has %d samples; want at least 2", f, len(p.Time))
		}
		if err := increasing(f+".Time", p.Time); err != nil {
			return err
		}
		if len(p.Levels) == 0 || len(p.P) != len(p.Levels) {
			return fmt.Errorf("report: %s: %d level names and %d population rows; want equal and at least one", f, len(p.Levels), len(p.P))
		}
		for l, row := range p.P {
			if len(row) != len(p.Time) {
				return fmt.Errorf("report: %s.P[%d] (level %q) has %d samples; Time has %d", f, l, p.Levels[l], len(row), len(p.Time))
			}
			if err := finite(fmt.Sprintf("%s.P[%d]", f, l), row...); err != nil {
				return err
			}
		}
	}
	return nil
}

// validateSweeps checks the robustness sweeps of d.
func validateSweeps(d *Data) error {
	for i, s := range d.Sweeps {
		f := fmt.Sprintf("Sweeps[%d] (%q)", i, s.Axis)
		if len(s.X) < 2 {
			return fmt.Errorf("report: %s.X has %d points; want at least 2", f, len(s.X))
		}
		if err := increasing(f+".X", s.X); err != nil {
			return err
		}
		if len(s.Geometric) != len(s.X) {
			return fmt.Errorf("report: %s.Geometric has %d points; X has %d", f, len(s.Geometric), len(s.X))
		}
		if s.Dynamical != nil && len(s.Dynamical) != len(s.X) {
			return fmt.Errorf("report: %s.Dynamical has %d points; X has %d", f, len(s.Dynamical), len(s.X))
		}
		if err := finite(f+".Geometric", s.Geometric...); err != nil {
			return err
		}
		if err := finite(f+".Dynamical", s.Dynamical...); err != nil {
			return err
		}
	}
	return nil
}

// validateMap checks the robustness map of d.
func validateMap(d *Data) error {
	if m := d.Map; m != nil {
		if len(m.X) < 2 || len(m.Y) < 2 {
			return fmt.Errorf("report: Map is %d×%d points; want at least 2×2", len(m.X), len(m.Y))
		}
		if err := increasing("Map.X", m.X); err != nil {
			return err
		}
		if err := increasing("Map.Y", m.Y); err != nil {
			return err
		}
		for _, g := range []struct {
			name string
			z    [][]float64
		}{{"Geometric", m.Geometric}, {"Dynamical", m.Dynamical}} {
			if g.z == nil && g.name == "Dynamical" {
				continue
			}
			if len(g.z) != len(m.Y) {
				return fmt.Errorf("report: Map.%s has %d rows; Map.Y has %d points", g.name, len(g.z), len(m.Y))
			}
			for i, row := range g.z {
				if len(row) != len(m.X) {
					return fmt.Errorf("report: Map.%s[%d] has %d columns; Map.X has %d points", g.name, i, len(row), len(m.X))
				}
				if err := finite(fmt.Sprintf("Map.%s[%d]", g.name, i), row...); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

// validateBudget checks the error budget of d.
func validateBudget(d *Data) error {
	for i, r := range d.Budget {
		if err := finite(fmt.Sprintf("Budget[%d] (%q).Infidelity", i, r.Term), r.Infidelity); err != nil {
			return err
		}
	}
	return nil
}

// validateChecks checks the check rows of d.
func validateChecks(d *Data) error {
	for i, r := range d.Checks {
		f := fmt.Sprintf("Checks[%d] (%q)", i, r.Name)
		if err := finite(f+".Value", r.Value); err != nil {
			return err
		}
		if err := finite(f+".Limit", r.Limit); err != nil {
			return err
		}
		if err := finite(f+".Margin", r.Margin); err != nil {
			return err
		}
	}
	return nil
}

// finite reports the first non-finite value of xs.
func finite(field string, xs ...float64) error {
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			if len(xs) == 1 {
				return fmt.Errorf("report: %s is %g; want a finite number", field, x)
			}
			return fmt.Errorf("report: %s[%d] is %g; want a finite number", field, i, x)
		}
	}
	return nil
}

// increasing reports whether xs is strictly increasing.
func increasing(field string, xs []float64) error {
	if err := finite(field, xs...); err != nil {
		return err
	}
	for i := 1; i < len(xs); i++ {
		if !(xs[i] > xs[i-1]) {
			return fmt.Errorf("report: %s is not increasing at index %d (%g after %g)", field, i, xs[i], xs[i-1])
		}
	}
	return nil
}
