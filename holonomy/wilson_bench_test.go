package holonomy

import (
	"fmt"
	"math"
	"testing"
)

// benchWilson times Wilson.Loop with n points and reports the wall-clock
// time per loop point and, where the system tells, the process CPU time per
// loop point (the fair figure on a machine shared with other work).
func benchWilson(b *testing.B, s *Scheme, loop Loop, n int) {
	w := NewWilson(s)
	u := NewMat(w.K(), w.K())
	if _, err := w.Loop(loop, n, u); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	cpu0, okCPU := geoProcessCPU()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := w.Loop(loop, n, u); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	points := float64(b.N) * float64(n)
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/points, "ns/point")
	if cpu1, ok := geoProcessCPU(); ok && okCPU {
		b.ReportMetric(float64((cpu1-cpu0).Nanoseconds())/points, "cpu-ns/point")
	}
}

// BenchmarkWilsonLoopTripod: the non-Abelian dark-state holonomy of the
// tripod (4 levels, 2-dimensional working subspace) on a smooth loop with
// complex drives; N = 4096 is the reference size, the other sizes show the
// cost is linear in N.
func BenchmarkWilsonLoopTripod(b *testing.B) {
	for _, n := range []int{1024, 4096, 16384} {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) { benchWilson(b, Tripod(), geoSmoothTripod, n) })
	}
	// The same loop read from a table, to separate the engine's cost from
	// the cost of evaluating the loop (here seven sines and cosines).
	const n = 4096
	tri := Tripod()
	table := make([]Point, n+1)
	for j := range table {
		table[j] = tri.NewPoint()
		geoSmoothTripod(float64(j)/n, table[j])
	}
	tab := func(s float64, p Point) { copy(p.Drive, table[int(math.Round(s*n))].Drive) }
	b.Run("N=4096-tabulated", func(b *testing.B) { benchWilson(b, tri, tab, n) })
}

// BenchmarkWilsonLoopSpin: spin-½ with both levels computational (two
// Berry phases) and spin-3/2 with all four levels computational (four
// one-state clusters), N = 4096, around a cone.
func BenchmarkWilsonLoopSpin(b *testing.B) {
	b.Run("spin-1/2", func(b *testing.B) { benchWilson(b, Spin(1, 0, 1), geoCone(0.8, 1), 4096) })
	b.Run("spin-3/2", func(b *testing.B) { benchWilson(b, Spin(3, 0, 1, 2, 3), geoCone(0.8, 1), 4096) })
}

// BenchmarkWilsonLoopLarge: a 16-level ladder (spin-15/2), the largest
// scheme, with one computational level.
func BenchmarkWilsonLoopLarge(b *testing.B) {
	benchWilson(b, Spin(15, 0), func(s float64, p Point) { SpinPoint(p, geoOmega, 0.3, 2*math.Pi*s) }, 4096)
}
