package sim

import (
	"math"
	"testing"

	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
)

// tripod2000 is a tripod gate of about 2000 samples at 1 GS/s (18 MHz
// Rabi limit, default adiabaticity target).
func tripod2000(tb testing.TB) *waveform.Waveform {
	return wavetest.MustBuild(tb, wavetest.TripodPlan(math.Pi/4, waveform.DefaultAdiabaticity), wavetest.Hardware(3, 18e6))
}

// The propagation loop allocates nothing: after a first run, Run with the
// same model shape allocates nothing at all.
func TestRunAllocatesNothing(t *testing.T) {
	w := tripod2000(t)
	s := NewSimulator(w)
	var out Figures
	for _, m := range []ErrorModel{{}, {AmplitudeError: 0.01, TwoPhotonDetuning: 1e4}, {Decay: 1e5}, {RiseTime: 3e-9},
		{RiseTime: 3e-9, Filter: FirstOrderFilter}, {PhaseStep: 2 * math.Pi / 256}, {RiseTime: 3e-9, Filter: FirstOrderFilter, PhaseStep: 2 * math.Pi / 256}} {
		if err := s.Run(m, &out); err != nil {
			t.Fatal(err)
		}
		if a := testing.AllocsPerRun(3, func() { s.Run(m, &out) }); a != 0 {
			t.Errorf("model %+v: %v allocations per run", m, a)
		}
	}
}

// BenchmarkSimulateTripod2000 is one ideal-model simulation of a tripod
// gate of about 2000 samples, the unit of work of a robustness map.
func BenchmarkSimulateTripod2000(b *testing.B) {
	w := tripod2000(b)
	s := NewSimulator(w)
	var out Figures
	m := ErrorModel{AmplitudeError: 0.01, OnePhotonDetuning: 2e5}
	s.Run(m, &out)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := s.Run(m, &out); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.Len()), "samples")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(w.Len()), "ns/sample")
}

// BenchmarkSimulateTripod2000FirstOrder adds a first-order filter of 3 ns
// rise time (8 sub-steps per sample, kernel reach 27.6τ) and a drive-phase
// resolution of 2π/256.
func BenchmarkSimulateTripod2000FirstOrder(b *testing.B) {
	w := tripod2000(b)
	s := NewSimulator(w)
	var out Figures
	m := ErrorModel{RiseTime: 3e-9, Filter: FirstOrderFilter, PhaseStep: 2 * math.Pi / 256}
	s.Run(m, &out)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s.Run(m, &out)
	}
}

// BenchmarkSimulateTripod2000Gaussian is the same with the Gaussian
// filter of 3 ns rise time, for comparison.
func BenchmarkSimulateTripod2000Gaussian(b *testing.B) {
	w := tripod2000(b)
	s := NewSimulator(w)
	var out Figures
	m := ErrorModel{RiseTime: 3e-9, PhaseStep: 2 * math.Pi / 256}
	s.Run(m, &out)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s.Run(m, &out)
	}
}

// BenchmarkSimulateTripod2000Decay adds excited-level decay
// (non-Hermitian steps).
func BenchmarkSimulateTripod2000Decay(b *testing.B) {
	w := tripod2000(b)
	s := NewSimulator(w)
	var out Figures
	m := ErrorModel{Decay: 1e6}
	s.Run(m, &out)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s.Run(m, &out)
	}
}

// BenchmarkSimulateTripod2000Dephasing adds qubit dephasing (density
// matrices).
func BenchmarkSimulateTripod2000Dephasing(b *testing.B) {
	w := tripod2000(b)
	s := NewSimulator(w)
	var out Figures
	m := ErrorModel{Dephasing: 1e4}
	s.Run(m, &out)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s.Run(m, &out)
	}
}

// BenchmarkBuildTripod times the timing analysis, sampling and
// quantisation of the tripod gate.
func BenchmarkBuildTripod(b *testing.B) {
	p := wavetest.TripodPlan(math.Pi/4, waveform.DefaultAdiabaticity)
	hw := wavetest.Hardware(3, 18e6)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := waveform.Build(p, hw); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkVerifyTripod is a full verification: simulation, adiabaticity
// measurement and checks.
func BenchmarkVerifyTripod(b *testing.B) {
	w := tripod2000(b)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Verify(w, ErrorModel{}); err != nil {
			b.Fatal(err)
		}
	}
}
