package holonomytest

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// TestRandomQubitUnitary checks unitarity and one Haar moment: for Haar
// U(2), E|U₀₀|² = 1/2 and E|U₀₀|⁴ = 1/3 (the first column is uniform on the
// unit sphere of C², so |U₀₀|² is uniform on [0, 1]; Mezzadri 2007, §3).
func TestRandomQubitUnitary(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const n = 20000
	var m2, m4 float64
	for k := 0; k < n; k++ {
		u := RandomQubitUnitary(rng)
		if e := holonomy.UnitarityError(u); e > 1e-12 {
			t.Fatalf("sample %d: ‖U†U − I‖ = %g", k, e)
		}
		x := cmplx.Abs(u.Data[0])
		m2 += x * x / n
		m4 += x * x * x * x / n
	}
	// Standard errors: √(1/12/n) ≈ 0.002 and √(4/45/n) ≈ 0.0021.
	if math.Abs(m2-0.5) > 0.01 || math.Abs(m4-1.0/3) > 0.01 {
		t.Errorf("E|U00|² = %.4f (want 1/2), E|U00|⁴ = %.4f (want 1/3)", m2, m4)
	}
}

// TestPhaseDistance: zero for gates that differ by a global phase, and
// for X against Z the closed form min_χ ‖X − e^{iχ}Z‖_F = 2 (Tr(Z†X) = 0,
// so the distance is √(‖X‖² + ‖Z‖²) = √(2 + 2)).
func TestPhaseDistance(t *testing.T) {
	x := holonomy.NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	z := holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, -1})
	xp := x.Clone()
	for i := range xp.Data {
		xp.Data[i] *= cmplx.Rect(1, 0.7)
	}
	if d := PhaseDistance(x, xp); d > 1e-15 {
		t.Errorf("X vs e^{0.7i}X: %g, want 0", d)
	}
	if d := PhaseDistance(x, z); math.Abs(d-2) > 1e-15 {
		t.Errorf("X vs Z: %g, want 2", d)
	}
}
