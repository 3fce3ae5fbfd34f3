package optimize

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

func benchSearch(b *testing.B, name string, shape func(*Sphere) Shape) {
	s := tripodSearch(b, gate(name), false, shape)
	var evals int
	b.ReportAllocs()
	for b.Loop() {
		res, err := s.Run(context.Background())
		if err != nil {
			b.Fatal(err)
		}
		evals = res.Evaluations
	}
	b.ReportMetric(float64(evals), "evals/op")
}

func BenchmarkSearchTripodH(b *testing.B)     { benchSearch(b, "H", fourier1) }
func BenchmarkSearchTripodT(b *testing.B)     { benchSearch(b, "T", fourier1) }
func BenchmarkSearchTripodSqrtX(b *testing.B) { benchSearch(b, "SX", fourier1) }
func BenchmarkSearchTripodHPolygon(b *testing.B) {
	benchSearch(b, "H", func(sp *Sphere) Shape { return NewPolygon(sp, 2) })
}

func BenchmarkLambdaSearchH(b *testing.B) {
	s := &LambdaSearch{Scheme: holonomy.Lambda(), Target: gate("H"), Seed: 5}
	var evals int
	b.ReportAllocs()
	for b.Loop() {
		res, err := s.Run(context.Background())
		if err != nil {
			b.Fatal(err)
		}
		evals = res.Evaluations
	}
	b.ReportMetric(float64(evals), "evals/op")
}

// BenchmarkObjectiveTripod times one objective evaluation of the tripod
// search: a 128-point Wilson loop plus the loop length.
func BenchmarkObjectiveTripod(b *testing.B) {
	s := tripodSearch(b, gate("H"), false, fourier1)
	o := newObjective(s, s.config())
	x := make([]float64, s.Shape.NumParams())
	for i := range x {
		x[i] = 0.3 * math.Sin(float64(i))
	}
	b.ReportAllocs()
	for b.Loop() {
		o.nominal(x)
	}
}

// BenchmarkSearchTripodMultiStart: a multi-start search whose eight runs
// all go to the end, the case the worker pool is for: a hardware penalty
// that no loop meets (a constant 1e-3), so no run meets the target and
// every starting point is tried. Run with -cpu 1,2 to see the pool's gain;
// the result is the same for every GOMAXPROCS
// (TestSearchSameOnAnyGOMAXPROCS). A search met in its first run, the
// usual case for the tripod gates (BenchmarkSearchTripodH), gains nothing.
func BenchmarkSearchTripodMultiStart(b *testing.B) {
	s := tripodSearch(b, gate("H"), false, fourier1)
	s.Restarts, s.MaxEvaluations = 8, 1000000 // runs end by convergence, not by the budget
	s.Penalty = func([]float64) float64 { return 1e-3 }
	var runs, evals int
	b.ReportAllocs()
	for b.Loop() {
		res, err := s.Run(context.Background())
		if res == nil || !errors.Is(err, ErrTargetNotReached) {
			b.Fatal(err)
		}
		runs, evals = res.Restarts, res.Evaluations
	}
	b.ReportMetric(float64(runs), "runs/op")
	b.ReportMetric(float64(evals), "evals/op")
}
