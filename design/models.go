package design

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/robust"
	"github.com/loopgate/loopgate/waveform/sim"
)

// hardwareOf converts the spec's hardware section for package waveform.
// The waveform stage has one slew limit for all channels: the smallest.
func hardwareOf(spc *spec.Spec) waveform.Hardware {
	h := spc.Hardware
	slew := math.Inf(1)
	for _, s := range h.MaxSlew {
		slew = math.Min(slew, s)
	}
	return waveform.Hardware{
		MaxRabi:     append([]float64(nil), h.MaxRabi...),
		MaxSlew:     slew,
		SampleRate:  h.SampleRate,
		Granularity: h.Granularity,
		MaxSamples:  h.MaxSamples,
		DACBits:     h.DACBits,
		FullScale:   append([]float64(nil), h.FullScale...),
		MinDuration: h.MinDuration,
		MaxDuration: h.MaxDuration,
	}
}

// errorModelOf converts the spec's verification errors. The decay rate is
// the largest Level.Decay among the excited levels.
func errorModelOf(spc *spec.Spec) sim.ErrorModel {
	e := spc.Errors
	m := sim.ErrorModel{
		OnePhotonDetuning: e.OnePhoton,
		TwoPhotonDetuning: e.TwoPhoton,
		Dephasing:         e.Dephasing,
		SkipDAC:           !e.Quantise,
	}
	switch e.Filter {
	case spec.GaussianFilter:
		m.RiseTime, m.Filter = e.RiseTime, sim.GaussianFilter
	case spec.FirstOrderFilter:
		m.RiseTime, m.Filter = e.RiseTime, sim.FirstOrderFilter
	}
	m.PhaseStep = e.PhaseStep
	common := true
	for _, a := range e.Amplitude {
		if a != e.Amplitude[0] {
			common = false
		}
	}
	if len(e.Amplitude) > 0 {
		if common {
			m.AmplitudeError = e.Amplitude[0]
		} else {
			m.ChannelErrors = append([]float64(nil), e.Amplitude...)
		}
	}
	for _, k := range spc.Excited {
		m.Decay = math.Max(m.Decay, spc.Scheme.Levels[k].Decay)
	}
	return m
}

// checkModels validates the error model and the model at both ends of
// every sweep range before any simulation runs, so that bad input is
// reported as such.
func checkModels(w *waveform.Waveform, m sim.ErrorModel, sp sweepPlan) error {
	if err := sim.CheckModel(w, m); err != nil {
		return err
	}
	ranges := []robust.Range{sp.amplitude, sp.detuning, sp.mapX, sp.mapY}
	if sp.oneExtra != nil {
		ranges = append(ranges, *sp.oneExtra)
	}
	for _, r := range ranges {
		if err := r.Validate(); err != nil {
			return err
		}
		for _, v := range []float64{r.Min, r.Max} {
			e := m
			switch r.Axis {
			case robust.AmplitudeAxis:
				e.AmplitudeError = v
			case robust.OnePhotonAxis:
				e.OnePhotonDetuning = v
			case robust.TwoPhotonAxis:
				e.TwoPhotonDetuning = v
			}
			if err := sim.CheckModel(w, e); err != nil {
				return fmt.Errorf("sweep of the %s to %g: %w", r.Axis, v, err)
			}
		}
	}
	return nil
}

// sweepPlan lists the robustness analysis to run.
type sweepPlan struct {
	amplitude, detuning robust.Range
	oneExtra            *robust.Range // a one-photon sweep, geometric only
	mapX, mapY          robust.Range
}

// sweepsOf plans the robustness analysis of a gate of the given duration
// (s). The comparison with the dynamical gate runs along the amplitude
// error and the two-photon detuning. When the spec sweeps the one-photon
// detuning, that sweep and the map use it, and the comparison's
// two-photon axis spans ±1/duration: a two-photon detuning δ adds a phase
// of order 2πδ·duration, so this range holds the F ≥ 0.999 edge of the
// geometric gate, and edges beyond it are found by the comparison's
// outward search.
func sweepsOf(spc *spec.Spec, duration float64) sweepPlan {
	s := spc.Sweeps
	amp := robust.Range{Axis: robust.AmplitudeAxis, Min: -s.Amplitude.HalfWidth, Max: s.Amplitude.HalfWidth, Points: s.Amplitude.Points}
	det := robust.Range{Axis: robust.TwoPhotonAxis, Min: -s.Detuning.HalfWidth, Max: s.Detuning.HalfWidth, Points: s.Detuning.Points}
	p := sweepPlan{
		amplitude: amp,
		detuning:  det,
		mapX:      robust.Range{Axis: robust.AmplitudeAxis, Min: amp.Min, Max: amp.Max, Points: s.MapAmplitude},
		mapY:      robust.Range{Axis: robust.TwoPhotonAxis, Min: det.Min, Max: det.Max, Points: s.MapDetuning},
	}
	if s.DetuningKind == spec.OnePhoton {
		one := det
		one.Axis = robust.OnePhotonAxis
		p.oneExtra = &one
		p.mapY.Axis = robust.OnePhotonAxis
		if duration > 0 {
			p.detuning.Min, p.detuning.Max = -1/duration, 1/duration
		}
	}
	return p
}
