package holonomy

import (
	"math"
	"math/rand/v2"
	"testing"
)

// randJumps returns decay rates and jumps in which every level k returns
// a random part (or, when closed, all) of its decay to other levels.
func randJumps(rng *rand.Rand, n int, closed bool) ([]float64, []Jump) {
	decay := dynRandRates(rng, n, 1)
	var jumps []Jump
	for k := 0; k < n; k++ {
		var fr []float64
		var sum float64
		for m := 0; m < n; m++ {
			f := 0.0
			if m != k {
				f = rng.Float64()
			}
			fr = append(fr, f)
			sum += f
		}
		scale := 1 / sum
		if !closed {
			scale *= rng.Float64()
		}
		for m, f := range fr {
			if m != k && f > 0 {
				jumps = append(jumps, Jump{From: k, To: m, Rate: decay[k] * f * scale})
			}
		}
	}
	return decay, jumps
}

// With jumps, Step still equals exp(𝓛dt) of the explicit generator (the
// recycling term r ρ_kk|m⟩⟨m| of each collapse operator √r|m⟩⟨k|), and when
// every level's jumps add up to its decay the trace is preserved and ρ stays
// Hermitian and positive on the diagonal (a Lindblad form).
func TestLindbladJumps(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	for _, n := range []int{2, 3, 4} {
		for _, closed := range []bool{false, true} {
			for _, scale := range []float64{0.05, 2, 30} {
				h := dynRandHermitian(rng, n, 1)
				decay, jumps := randJumps(rng, n, closed)
				l := NewLindblad(n, decay, dynRandRates(rng, n, 1))
				l.Jumps = jumps
				N := n * n
				gen := NewMat(N, N)
				l.Generator(gen, h)
				dt := scale / norm1Cols(gen.Data, N)
				for i := range gen.Data {
					gen.Data[i] *= complex(dt, 0)
				}
				e := NewMat(N, N)
				Expm(e, gen)
				rho := dynRandDensity(rng, n)
				want := NewMat(N, 1)
				Mul(want, e, &Mat{R: N, C: 1, Data: rho.Data})
				l.Step(rho, h, dt)
				if d := FrobeniusDist(&Mat{R: N, C: 1, Data: rho.Data}, want); d > 1e-13*math.Max(1, scale) {
					t.Errorf("n=%d closed=%v ‖𝓛dt‖≈%g: Step differs from exp(𝓛dt) by %g", n, closed, scale, d)
				}
				tr := real(Trace(rho))
				if closed && math.Abs(tr-1) > 1e-13 {
					t.Errorf("n=%d closed: trace %.16g after a step", n, tr)
				}
				if !closed && tr > 1+1e-13 {
					t.Errorf("n=%d open: trace grew to %.16g", n, tr)
				}
				for k := 0; k < n; k++ {
					if real(rho.At(k, k)) < -1e-15 {
						t.Errorf("n=%d: negative population %g", n, real(rho.At(k, k)))
					}
				}
			}
		}
	}
}
