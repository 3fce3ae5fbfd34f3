package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// The tripod's and Λ's excited level is the common upper level of their
// drives (Unanyan, Shore and Bergmann, Phys. Rev. A 59, 2910 (1999), for
// the tripod); a spin-½ in a field has no level above the qubit.
func TestExcitedLevels(t *testing.T) {
	if e := Tripod().ExcitedLevels(); len(e) != 1 || e[0] != 3 {
		t.Errorf("tripod excited levels %v; want [3] (e)", e)
	}
	if e := Lambda().ExcitedLevels(); len(e) != 1 || e[0] != 2 {
		t.Errorf("Λ excited levels %v; want [2] (e)", e)
	}
	if e := Spin(1, 0, 1).ExcitedLevels(); len(e) != 0 {
		t.Errorf("spin-1/2 excited levels %v; want none", e)
	}
}

func TestFinite(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want bool
	}{{0, true}, {-1e308, true}, {math.Inf(1), false}, {math.Inf(-1), false}, {math.NaN(), false}} {
		if got := Finite(c.x); got != c.want {
			t.Errorf("Finite(%g) = %v; want %v", c.x, got, c.want)
		}
	}
}

// TestBlockInfidelityPhaseGate checks BlockInfidelity against the closed
// form for a phase error on one level: for U = diag(e^{iθ}, 1) and the
// identity target, M = U, Tr(M†M) = 2 and |Tr M|² = 2 + 2cos θ, so
// F = (4 + 2cos θ)/6 (Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47
// (2007), eq. for F with d = 2). It must also equal GateFidelity with
// every level computational, an independent loop over the block.
func TestBlockInfidelityPhaseGate(t *testing.T) {
	for _, th := range []float64{0, 0.1, 1, math.Pi / 2, math.Pi, 4} {
		t.Run(fmt.Sprint(th), func(t *testing.T) {
			u := NewMatFrom(2, 2, []complex128{cmplx.Exp(complex(0, th)), 0, 0, 1})
			want := 1 - (4+2*math.Cos(th))/6
			if got := BlockInfidelity(u, Identity(2)); math.Abs(got-want) > 1e-15 {
				t.Errorf("BlockInfidelity = %.17g; closed form %.17g", got, want)
			}
			fid, _ := GateFidelity(u, []int{0, 1}, Identity(2))
			if got := BlockInfidelity(u, Identity(2)); math.Abs(got-(1-fid)) > 1e-15 {
				t.Errorf("BlockInfidelity = %.17g; 1 − GateFidelity = %.17g", got, 1-fid)
			}
		})
	}
}
