package device

import (
	"math"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// transmonGate returns a 4-level transmon ladder (ω₀₁ = 2π·5 GHz,
// α = −2π·220 MHz; Koch et al., Phys. Rev. A 76, 042319 (2007), typical
// values, from memory) with both tones driven over a 50 ns gate at
// 2.4 GS/s: a sine-envelope 40 MHz drive on w01 and a weaker quadrature
// drive on w12, every tone coupling every transition (crosstalk), and the
// rotating pulse area ∫a dt of the documented bound.
func transmonGate(t testing.TB) (*Model, []holonomy.Point, float64, float64) {
	d, err := Transmon(TransmonParams{Levels: 4, Omega01: HzToRad(5e9), Anharmonicity: HzToRad(-220e6)})
	if err != nil {
		t.Fatal(err)
	}
	m := compile(t, d)
	n, dt := 120, 1/2.4e9
	pts := make([]holonomy.Point, n)
	var area float64
	for j := range pts {
		pts[j] = m.NewPoint()
		x := (float64(j) + 0.5) / float64(n)
		pts[j].Drive[0] = complex(HzToRad(40e6)*math.Sin(math.Pi*x), 0)
		pts[j].Drive[1] = complex(0, HzToRad(10e6)*math.Sin(2*math.Pi*x))
		// Largest row sum of rotating amplitudes: level 2 sees the w01
		// tone on 1↔2 (√2/2) and 2↔3 (√3/2).
		area += dt * (math.Sqrt(2)/2 + math.Sqrt(3)/2) * (cabs(pts[j].Drive[0]) + cabs(pts[j].Drive[1]))
	}
	return m, pts, dt, area
}

// The documented bound ‖U − U_exact‖ ≤ C κ⁴ ∫a dt with C = 1/1000 holds for a
// transmon gate with crosstalk, the exact propagator taken from 16 times
// finer sub-steps (an independent run of the fourth-order method whose own
// error is 16⁴ times smaller), and ErrorEstimate agrees with the true error
// within a factor of two.
func TestSubstepBoundTransmon(t *testing.T) {
	m, pts, dt, area := transmonGate(t)
	sim := NewSimulator(m)
	sim.StepPhase = DefaultStepPhase / 16
	ref := holonomy.Identity(4)
	if err := sim.Propagate(ref, pts, dt); err != nil {
		t.Fatal(err)
	}
	for _, kappa := range []float64{1, 0.5, 0.25} {
		sim.StepPhase = kappa
		u := holonomy.Identity(4)
		if err := sim.Propagate(u, pts, dt); err != nil {
			t.Fatal(err)
		}
		e := holonomy.FrobeniusDist(u, ref)
		if bound := math.Pow(kappa, 4) * area / 1000; e > bound {
			t.Errorf("κ = %g: error %g above the bound %g", kappa, e, bound)
		}
		est, err := sim.ErrorEstimate(pts, dt)
		if err != nil {
			t.Fatal(err)
		}
		if est < e/2 || est > 2*e {
			t.Errorf("κ = %g: ErrorEstimate %g, true error %g", kappa, est, e)
		}
	}
}
