package holonomy

import (
	"fmt"
	"math"
	"testing"
)

// benchWilson times Wilson.Loop with n points and reports the wall-clock
// time per loop point and, where the system tells, the process CPU time per
// loop point (the fair figure on a machine shared with other work).
func benchWilson(b *testing.B, w *Wilson, loop Loop, n int) {
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

// peerTripod is the tripod loop of the batched NumPy peer
// (../shared/bench/numpy_peer.py, function loop): θ = sin²(πs),
// φ = 1.3 sin²(πs) + 0.5 sin 2πs, and the three couplings ⟨e|H|g⟩ equal
// omega·(sin θ cos φ, sin θ sin φ, cos θ), so the drives (Ω = 2⟨e|H|g⟩ by the
// package's convention) are twice that.
func peerTripod(omega float64) Loop {
	return func(s float64, p Point) {
		x := math.Sin(math.Pi * s)
		th := x * x
		ph := 1.3*x*x + 0.5*math.Sin(2*math.Pi*s)
		st, ct := math.Sincos(th)
		sp, cp := math.Sincos(ph)
		p.Drive[0] = complex(2*omega*st*cp, 0)
		p.Drive[1] = complex(2*omega*st*sp, 0)
		p.Drive[2] = complex(2*omega*ct, 0)
	}
}

// BenchmarkWilsonLoopTripod: the non-Abelian dark-state holonomy of the
// tripod (4 levels, 2-dimensional working subspace) on the NumPy peer's
// loop; N = 4096 is the reference size compared with the peer by .ci/bench,
// the other sizes show the cost is linear in N. The loop is evaluated
// inside the timing (the peer builds its Hamiltonians before timing).
// "complex" is a loop with complex drive phases, "tabulated" the same loop
// read from a table, and "general" the general eigensolver path that the
// closed form for the dark subspace replaces.
func BenchmarkWilsonLoopTripod(b *testing.B) {
	for _, n := range []int{1024, 4096, 16384} {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) { benchWilson(b, NewWilson(Tripod()), peerTripod(1), n) })
	}
	const n = 4096
	b.Run("N=4096-complex", func(b *testing.B) { benchWilson(b, NewWilson(Tripod()), geoSmoothTripod, n) })
	tri := Tripod()
	table := make([]Point, n+1)
	for j := range table {
		table[j] = tri.NewPoint()
		geoSmoothTripod(float64(j)/n, table[j])
	}
	tab := func(s float64, p Point) { copy(p.Drive, table[int(math.Round(s*n))].Drive) }
	b.Run("N=4096-complex-tabulated", func(b *testing.B) { benchWilson(b, NewWilson(tri), tab, n) })
	b.Run("N=4096-general", func(b *testing.B) {
		w := NewWilson(Tripod())
		w.noFast = true
		benchWilson(b, w, peerTripod(1), n)
	})
}

// BenchmarkWilsonLoopSpin: spin-½ with both levels computational (two
// Berry phases) and spin-3/2 with all four levels computational (four
// one-state clusters), N = 4096, around a cone.
func BenchmarkWilsonLoopSpin(b *testing.B) {
	b.Run("spin-1/2", func(b *testing.B) { benchWilson(b, NewWilson(Spin(1, 0, 1)), geoCone(0.8, 1), 4096) })
	b.Run("spin-3/2", func(b *testing.B) { benchWilson(b, NewWilson(Spin(3, 0, 1, 2, 3)), geoCone(0.8, 1), 4096) })
}

// BenchmarkWilsonLoopLarge: a 16-level ladder (spin-15/2), the largest
// scheme, with one computational level.
func BenchmarkWilsonLoopLarge(b *testing.B) {
	benchWilson(b, NewWilson(Spin(15, 0)), func(s float64, p Point) { SpinPoint(p, geoOmega, 0.3, 2*math.Pi*s) }, 4096)
}
