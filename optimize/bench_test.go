package optimize

import (
	"context"
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
