package holonomy

import (
	"fmt"
	"math"
	"testing"
)

// benchWilson times Wilson.Loop with n points and reports the time per loop
// point.
func benchWilson(b *testing.B, s *Scheme, loop Loop, n int) {
	w := NewWilson(s)
	u := NewMat(w.K(), w.K())
	if _, err := w.Loop(loop, n, u); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := w.Loop(loop, n, u); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/point")
}

// BenchmarkWilsonLoopTripod: the non-Abelian dark-state holonomy of the
// tripod (4 levels, 2-dimensional working subspace) on a smooth loop with
// complex drives; N = 4096 is the reference size, the other sizes show the
// cost is linear in N.
func BenchmarkWilsonLoopTripod(b *testing.B) {
	for _, n := range []int{1024, 4096, 16384} {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) { benchWilson(b, Tripod(), geoSmoothTripod, n) })
	}
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
