package robust

import (
	"context"
	"errors"
	"math"
	"runtime"
	"sync/atomic"
	"testing"

	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

func TestSweepRangeValues(t *testing.T) {
	r := Range{Axis: AmplitudeAxis, Min: -0.3, Max: 0.3, Points: 7}
	x := r.Values()
	if len(x) != 7 || x[0] != -0.3 || x[6] != 0.3 || x[3] != 0 {
		t.Fatalf("values %v: want 7 values from −0.3 to 0.3 with an exact zero in the middle", x)
	}
	for i := 1; i < len(x); i++ {
		if !(x[i] > x[i-1]) || math.Abs(x[i]-x[i-1]-0.1) > 1e-15 {
			t.Errorf("step %d: %v → %v", i, x[i-1], x[i])
		}
	}
	bad := []Range{
		{Axis: AmplitudeAxis, Min: -1, Max: 0.1, Points: 3},
		{Axis: TwoPhotonAxis, Min: 1, Max: -1, Points: 3},
		{Axis: TwoPhotonAxis, Min: -1, Max: 1, Points: 1},
		{Axis: Axis(9), Min: -1, Max: 1, Points: 3},
		{Axis: OnePhotonAxis, Min: math.NaN(), Max: 1, Points: 3},
		{Axis: OnePhotonAxis, Min: -1, Max: 1, Points: MaxPoints + 1},
	}
	for _, r := range bad {
		if err := r.Validate(); err == nil {
			t.Errorf("%+v: no error", r)
		}
	}
}

// TestSweepWidthQuadratic checks the interpolation of Sweep.Width: for an
// exactly quadratic infidelity 1 − F = c(x − x₀)² the interpolation in
// √(1 − F) must find the crossings x₀ ± √((1 − F*)/c) exactly, whatever
// the grid.
func TestSweepWidthQuadratic(t *testing.T) {
	const c, x0, thr = 3.7, 0.004, 0.999
	r := Range{Axis: AmplitudeAxis, Min: -0.05, Max: 0.06, Points: 12}
	s := &Sweep{Axis: AmplitudeAxis, X: r.Values()}
	for _, x := range s.X {
		s.Fidelity = append(s.Fidelity, 1-c*(x-x0)*(x-x0))
	}
	w := s.Width(thr)
	d := math.Sqrt((1 - thr) / c)
	if math.Abs(w.Low-(x0-d)) > 1e-14 || math.Abs(w.High-(x0+d)) > 1e-14 || w.Open() {
		t.Errorf("width %+v; want [%v, %v], closed", w, x0-d, x0+d)
	}
	if math.Abs(w.Width-2*d) > 1e-14 {
		t.Errorf("width %v, want %v", w.Width, 2*d)
	}
	// A region reaching the end of the grid is open there.
	s.Fidelity[len(s.Fidelity)-1] = 1
	s.Fidelity[len(s.Fidelity)-2] = 1
	for i := range s.X {
		if s.X[i] > 0 {
			s.Fidelity[i] = 1
		}
	}
	if w := s.Width(thr); !w.HighOpen || w.LowOpen || w.High != s.X[len(s.X)-1] {
		t.Errorf("open upper side: %+v", w)
	}
	// Below the threshold at zero error: no region.
	s.Fidelity[nearestZero(s.X)] = 0.99
	if w := s.Width(thr); w != (Width{}) {
		t.Errorf("fidelity below threshold at zero: %+v", w)
	}
}

// TestSweepMapDeterministic checks that the map does not depend on the
// number of workers and that every point equals a direct simulation.
func TestSweepMapDeterministic(t *testing.T) {
	w := wavetest.RobustLambda(t, math.Pi/2, 0)
	x := Range{Axis: AmplitudeAxis, Min: -0.05, Max: 0.05, Points: 5}
	y := Range{Axis: TwoPhotonAxis, Min: -1e5, Max: 2e5, Points: 4}
	base := sim.ErrorModel{Decay: 2e5}
	var maps []*ErrorMap
	for _, nw := range []int{1, 3} {
		m, err := SweepMap(context.Background(), w, x, y, &SweepOptions{Base: base, Workers: nw})
		if err != nil {
			t.Fatal(err)
		}
		maps = append(maps, m)
	}
	for i := range maps[0].Fidelity {
		for j, f := range maps[0].Fidelity[i] {
			if math.Float64bits(f) != math.Float64bits(maps[1].Fidelity[i][j]) {
				t.Errorf("point (%d, %d): %v with 1 worker, %v with 3", i, j, f, maps[1].Fidelity[i][j])
			}
		}
	}
	// Spot check against a fresh simulation.
	m := base
	m.AmplitudeError, m.TwoPhotonDetuning = maps[0].X[4], maps[0].Y[1]
	out, err := sim.Simulate(w, m)
	if err != nil {
		t.Fatal(err)
	}
	if out.Fidelity != maps[0].Fidelity[1][4] {
		t.Errorf("map point %v, direct simulation %v", maps[0].Fidelity[1][4], out.Fidelity)
	}
	if _, err := SweepMap(context.Background(), w, x, x, nil); err == nil {
		t.Error("map with the same axis twice: no error")
	}
}

func TestSweepProgressAndCancel(t *testing.T) {
	w := wavetest.RobustLambda(t, math.Pi/2, 0)
	r := Range{Axis: AmplitudeAxis, Min: -0.1, Max: 0.1, Points: 41}
	var got []Progress
	opt := &SweepOptions{OnProgress: func(p Progress) { got = append(got, p) }}
	if _, err := SweepAxis(context.Background(), w, r, opt); err != nil {
		t.Fatal(err)
	}
	if len(got) != 41+2 {
		t.Fatalf("%d progress reports, want 43 (start, 41 simulations, final)", len(got))
	}
	for i, p := range got {
		want := Progress{Label: "sweep " + r.Axis.String(), Done: min(i, 41), Total: 41, Final: i == 42}
		if p != want {
			t.Errorf("report %d: %+v, want %+v", i, p, want)
		}
	}

	// Cancelled before the start: nothing runs.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var n atomic.Int32
	_, err := SweepAxis(ctx, w, r, &SweepOptions{OnProgress: func(p Progress) {
		if p.Done > 0 {
			n.Add(1)
		}
	}})
	if !errors.Is(err, context.Canceled) || n.Load() != 0 {
		t.Errorf("pre-cancelled: err %v after %d simulations", err, n.Load())
	}
	// Cancelled while running: each worker finishes at most its current
	// simulation.
	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	workers := 2
	_, err = SweepAxis(ctx, w, r, &SweepOptions{Workers: workers, OnProgress: func(p Progress) {
		n.Store(int32(p.Done))
		if p.Done == 5 {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) || int(n.Load()) > 5+workers {
		t.Errorf("cancelled at 5: err %v, %d simulations done", err, n.Load())
	}
}

// BenchmarkMap41 times a 41×41 robustness map (amplitude error × qubit
// detuning) of an adiabatic tripod gate of about 2 000 samples on
// GOMAXPROCS workers; run with -cpu 1,2 for the parallel speed-up.
func BenchmarkMap41(b *testing.B) {
	w := wavetest.RobustTripod(b, math.Pi/4, 0.05, 20e6)
	x := Range{Axis: AmplitudeAxis, Min: -0.2, Max: 0.2, Points: 41}
	y := Range{Axis: TwoPhotonAxis, Min: -20e3, Max: 20e3, Points: 41}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := SweepMap(context.Background(), w, x, y, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.Len()), "samples")
	b.ReportMetric(float64(runtime.GOMAXPROCS(0)), "workers")
}

// BenchmarkSweepPoint times one simulation of a sweep in a worker's
// reused workspace (the unit of work of SweepAxis and SweepMap); it must
// not allocate.
func BenchmarkSweepPoint(b *testing.B) {
	w := wavetest.RobustTripod(b, math.Pi/4, 0.05, 20e6)
	wk := new(Worker)
	if _, err := wk.Run(w, sim.ErrorModel{}); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := wk.Run(w, sim.ErrorModel{AmplitudeError: 0.01, TwoPhotonDetuning: 1e3}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(w.Len()), "samples")
}
