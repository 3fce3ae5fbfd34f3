package holonomy

import (
	"math"
	"testing"
)

// TestSpectrumAdiabaticRatio checks κ = max_{n∉C} ‖P_C ∂H|n⟩‖/(E_C − E_n)²
// on a diagonal H where it has a closed form: H = diag(0, 0, 1, 3) on the
// tripod's levels (computational levels 0 and 1 form the working cluster
// C at E = 0) and ∂H coupling C to level 2 with amplitudes a, b and to
// level 3 with c gives κ = max(√(a² + b²)/1², |c|/3²), whatever basis the
// eigensolver picks inside C; the smallest gap is 1.
func TestSpectrumAdiabaticRatio(t *testing.T) {
	sc := Tripod()
	if len(sc.Computational) != 2 || sc.Computational[0] != 0 || sc.Computational[1] != 1 {
		t.Fatalf("tripod computational levels %v, want [0 1]", sc.Computational)
	}
	sp := NewSpectrum(sc)
	h := NewMat(4, 4)
	h.Set(2, 2, 1)
	h.Set(3, 3, 3)
	sp.Factorize(h)
	if err := sp.ChooseWorking(); err != nil {
		t.Fatal(err)
	}
	if w := sp.Working(); len(w) != 1 || w[0] != [2]int{0, 2} {
		t.Fatalf("working clusters %v, want [[0 2]]", w)
	}
	for _, c := range []struct {
		name    string
		a, b, c complex128
		want    float64
	}{
		{"level 2 dominates", 0.3, 0.4i, 0.9, 0.5},
		{"level 3 dominates", 0.01, 0, 9, 1},
		{"no coupling", 0, 0, 0, 0},
	} {
		t.Run(c.name, func(t *testing.T) {
			dh := NewMat(4, 4)
			for _, e := range []struct {
				i, j int
				v    complex128
			}{{0, 2, c.a}, {1, 2, c.b}, {0, 3, c.c}} {
				dh.Set(e.i, e.j, e.v)
				dh.Set(e.j, e.i, complex(real(e.v), -imag(e.v)))
			}
			kappa, gap := sp.AdiabaticRatio(dh, 1e-12)
			if math.Abs(kappa-c.want) > 1e-12 || math.Abs(gap-1) > 1e-12 {
				t.Errorf("κ = %.15g, gap %.15g; want κ = %g, gap 1", kappa, gap, c.want)
			}
		})
	}
	// A state outside C that is degenerate with C and coupled to it makes
	// κ infinite.
	h.Set(2, 2, 0)
	sp.Factorize(h)
	sp.SetWorking([][2]int{{0, 2}})
	dh := NewMat(4, 4)
	dh.Set(0, 2, 1)
	dh.Set(2, 0, 1)
	if kappa, _ := sp.AdiabaticRatio(dh, 1e-12); !math.IsInf(kappa, 1) {
		t.Errorf("degenerate coupled state: κ = %g, want +Inf", kappa)
	}
}
