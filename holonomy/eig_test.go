package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// eigenCheck factorizes h and returns the scale-relative residual
// ‖HV − VΛ‖_F/‖H‖_F (absolute when H = 0), the orthonormality error
// ‖V†V − I‖_F, and the eigenvalues. It fails the test if the eigenvalues are
// not ascending or do not reproduce the invariants Tr H and ‖H‖_F².
func eigenCheck(t *testing.T, name string, h *Mat) (res, orth float64, vals []float64) {
	t.Helper()
	n := h.R
	e := NewEigen(n)
	vals = make([]float64, n)
	v := NewMat(n, n)
	e.Factorize(h, vals, v)
	hv := NewMat(n, n)
	Mul(hv, h, v)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			hv.Data[i*n+j] -= v.Data[i*n+j] * complex(vals[j], 0)
		}
	}
	scale := FrobeniusNorm(h)
	res = FrobeniusNorm(hv)
	if scale > 0 {
		res /= scale
	}
	orth = UnitarityError(v)
	var sum, sum2 float64
	for i, l := range vals {
		if i > 0 && l < vals[i-1] {
			t.Errorf("%s: eigenvalues not ascending: %v", name, vals)
		}
		sum += l
		sum2 += l * l
	}
	if d := math.Abs(sum - real(Trace(h))); d > 1e-12*math.Max(scale, 1e-300) && scale > 0 {
		t.Errorf("%s: Σλ − Tr H = %g", name, d)
	}
	if scale > 0 {
		if d := math.Abs(math.Sqrt(sum2)-scale) / scale; d > 1e-12 {
			t.Errorf("%s: |‖λ‖ − ‖H‖_F|/‖H‖_F = %g", name, d)
		}
	}
	return res, orth, vals
}

// The property tests use the bounds ‖HV − VΛ‖_F ≤ 1e-12‖H‖_F (residual
// relative to the scale of H, so that the same bound covers H in rad/s at
// 1e9 and at 1e-6) and ‖V†V − I‖_F ≤ 1e-12 (absolute). A backward-stable
// method gives both of order nε ≈ 1e-15.
const eigTol = 1e-12

func TestEigenRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 1; n <= 16; n++ {
		for _, scale := range []float64{1, 1e-7, 3e9} {
			for rep := 0; rep < 5; rep++ {
				name := fmt.Sprintf("n=%d scale=%g rep=%d", n, scale, rep)
				res, orth, _ := eigenCheck(t, name, dynRandHermitian(rng, n, scale))
				if res > eigTol || orth > eigTol {
					t.Errorf("%s: residual %g, orthonormality %g", name, res, orth)
				}
			}
		}
	}
}

// TestEigenDegenerate covers exact degeneracies: U diag(λ) U† with repeated
// λ and a random unitary U, the identity, the zero matrix, and a graded
// matrix. The repeated eigenvalues must come out to rounding and the basis
// of each degenerate eigenspace must still be orthonormal.
func TestEigenDegenerate(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for n := 2; n <= 16; n++ {
		patterns := map[string][]float64{}
		pairs := make([]float64, n) // 0,0,1,1,2,2,…
		triple := make([]float64, n)
		split := make([]float64, n)
		for i := range pairs {
			pairs[i] = float64(i / 2)
			triple[i] = float64(i / 3)
			split[i] = float64(i/2) + 1e-14*float64(i%2)
		}
		patterns["pairs"] = pairs
		patterns["triples"] = triple
		patterns["near-degenerate 1e-14"] = split
		allButOne := make([]float64, n)
		allButOne[n-1] = 1
		patterns["n-1 fold zero"] = allButOne
		for name, lam := range patterns {
			u := dynRandUnitary(rng, n)
			h := dynConjugate(u, lam)
			label := fmt.Sprintf("n=%d %s", n, name)
			res, orth, vals := eigenCheck(t, label, h)
			if res > eigTol || orth > eigTol {
				t.Errorf("%s: residual %g, orthonormality %g", label, res, orth)
			}
			for i, l := range vals {
				if math.Abs(l-lam[i]) > 1e-13*float64(n) {
					t.Errorf("%s: λ_%d = %.17g, want %.17g", label, i, l, lam[i])
				}
			}
		}
		for name, h := range map[string]*Mat{"identity": Identity(n), "zero": NewMat(n, n), "2.5·identity": scaled(Identity(n), 2.5)} {
			label := fmt.Sprintf("n=%d %s", n, name)
			res, orth, _ := eigenCheck(t, label, h)
			if res != 0 || orth > 1e-15 {
				t.Errorf("%s: residual %g, orthonormality %g", label, res, orth)
			}
		}
		// Graded: entries from 1e-8 to 1e8 across the matrix.
		g := dynRandHermitian(rng, n, 1)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				g.Data[i*n+j] *= complex(math.Pow(10, 8-16*float64(i+j)/float64(2*n-2)), 0)
			}
		}
		label := fmt.Sprintf("n=%d graded", n)
		if res, orth, _ := eigenCheck(t, label, g); res > eigTol || orth > eigTol {
			t.Errorf("%s: residual %g, orthonormality %g", label, res, orth)
		}
	}
}

func scaled(m *Mat, f float64) *Mat {
	c := m.Clone()
	for i := range c.Data {
		c.Data[i] *= complex(f, 0)
	}
	return c
}

// TestEigenTripodDarkStates: a resonant tripod with drives Ω_k has exactly
// two zero eigenvalues whose eigenvectors have no excited-state amplitude
// and are orthogonal to the bright state Σ_k Ω_k*|g_k⟩ (Duan, Cirac and
// Zoller, Science 292, 1695 (2001)); the other two eigenvalues are ±Ω_rms/2
// with Ω_rms = √(Σ|Ω_k|²).
func TestEigenTripodDarkStates(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	s := Tripod()
	p := s.NewPoint()
	h := NewMat(4, 4)
	for rep := 0; rep < 50; rep++ {
		omega := 2 * math.Pi * 1e6 * (0.1 + rng.Float64()*50) // 0.1–50 MHz
		var o2 float64
		for c := range p.Drive {
			p.Drive[c] = complex(rng.NormFloat64(), rng.NormFloat64()) * complex(omega, 0)
			o2 += real(p.Drive[c] * cmplx.Conj(p.Drive[c]))
		}
		if rep%5 == 0 {
			p.Drive[rep%3] = 0 // a drive switched off: still two dark states
			o2 = 0
			for _, d := range p.Drive {
				o2 += real(d * cmplx.Conj(d))
			}
		}
		s.Hamiltonian(h, p)
		label := fmt.Sprintf("tripod rep %d", rep)
		res, orth, vals := eigenCheck(t, label, h)
		if res > eigTol || orth > eigTol {
			t.Errorf("%s: residual %g, orthonormality %g", label, res, orth)
		}
		half := math.Sqrt(o2) / 2
		want := []float64{-half, 0, 0, half}
		for i := range want {
			if math.Abs(vals[i]-want[i]) > 1e-13*half {
				t.Errorf("%s: λ = %v, want %v", label, vals, want)
				break
			}
		}
		// Dark vectors (columns 1, 2): no weight on e, orthogonal to the
		// bright state.
		v := NewMat(4, 4)
		NewEigen(4).Factorize(h, make([]float64, 4), v)
		for _, c := range []int{1, 2} {
			if a := cmplx.Abs(v.At(3, c)); a > 1e-13 {
				t.Errorf("%s: dark vector %d has excited amplitude %g", label, c, a)
			}
			var b complex128
			for k := 0; k < 3; k++ {
				b += p.Drive[k] * v.At(k, c) // ⟨bright|v⟩ with ⟨bright| = Σ Ω_k⟨g_k| (unnormalised)
			}
			if cmplx.Abs(b) > 1e-13*math.Sqrt(o2) {
				t.Errorf("%s: dark vector %d overlaps the bright state by %g", label, c, cmplx.Abs(b))
			}
		}
	}
}

// TestEigenNonFinite: non-finite input gives NaN output and terminates.
func TestEigenNonFinite(t *testing.T) {
	for _, bad := range []complex128{complex(math.NaN(), 0), complex(math.Inf(1), 0), complex(0, math.Inf(-1))} {
		h := dynRandHermitian(rand.New(rand.NewPCG(1, 1)), 4, 1)
		h.Set(1, 2, bad)
		vals := make([]float64, 4)
		v := NewMat(4, 4)
		NewEigen(4).Factorize(h, vals, v)
		for _, l := range vals {
			if !math.IsNaN(l) {
				t.Errorf("input %v: eigenvalue %g, want NaN", bad, l)
			}
		}
	}
}

// TestEigenExtremeScales: the power-of-two prescaling keeps tiny and huge
// (but finite) matrices accurate.
func TestEigenExtremeScales(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for _, scale := range []float64{1e-300, 1e-160, 1e160, 1e300} {
		h := dynRandHermitian(rng, 5, scale)
		e := NewEigen(5)
		vals := make([]float64, 5)
		v := NewMat(5, 5)
		e.Factorize(h, vals, v)
		// Compare with the factorisation of the unit-scale matrix.
		h1 := scaled(h, 1/scale)
		vals1 := make([]float64, 5)
		e.Factorize(h1, vals1, NewMat(5, 5))
		for i := range vals {
			if d := math.Abs(vals[i]/scale - vals1[i]); d > 1e-13 {
				t.Errorf("scale %g: λ_%d/scale = %g, unit-scale %g", scale, i, vals[i]/scale, vals1[i])
			}
		}
		if o := UnitarityError(v); o > eigTol {
			t.Errorf("scale %g: orthonormality %g", scale, o)
		}
	}
}

func TestEigenAllocs(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	for _, n := range []int{2, 4, 9} {
		h := dynRandHermitian(rng, n, 1)
		e := NewEigen(n)
		vals := make([]float64, n)
		v := NewMat(n, n)
		if a := testing.AllocsPerRun(20, func() { e.Factorize(h, vals, v) }); a != 0 {
			t.Errorf("n=%d: %v allocations per Factorize", n, a)
		}
	}
}

func benchEigen(b *testing.B, n int) {
	rng := rand.New(rand.NewPCG(3, 4))
	h := dynRandHermitian(rng, n, 1)
	e := NewEigen(n)
	vals := make([]float64, n)
	v := NewMat(n, n)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		e.Factorize(h, vals, v)
	}
}

// BenchmarkEigen4: one 4×4 Hermitian eigendecomposition (a tripod-sized
// problem with random complex entries).
func BenchmarkEigen4(b *testing.B) { benchEigen(b, 4) }

// BenchmarkEigen16: the largest scheme size.
func BenchmarkEigen16(b *testing.B) { benchEigen(b, 16) }

func ExampleEigen_Factorize() {
	// A resonant Λ system with equal drives: H = (Ω/2)(|e⟩⟨g0| + |e⟩⟨g1| + h.c.)
	// has the dark state (|g0⟩ − |g1⟩)/√2 at zero energy and bright
	// superpositions at ±Ω/√2.
	s := Lambda()
	p := s.NewPoint()
	p.Drive[0], p.Drive[1] = 2, 2 // Ω = 2 rad/s on both channels
	h := NewMat(3, 3)
	s.Hamiltonian(h, p)
	e := NewEigen(3)
	vals := make([]float64, 3)
	v := NewMat(3, 3)
	e.Factorize(h, vals, v)
	fmt.Printf("eigenvalues: %.4f %.4f %.4f\n", dynRound4(vals[0]), dynRound4(vals[1]), dynRound4(vals[2]))
	// Fix the arbitrary phase of the dark vector by its g0 component.
	ph := v.At(0, 1) / complex(cmplx.Abs(v.At(0, 1)), 0)
	fmt.Printf("dark state:  %.4f %.4f %.4f\n", dynRound4(real(v.At(0, 1)/ph)), dynRound4(real(v.At(1, 1)/ph)), dynRound4(real(v.At(2, 1)/ph)))
	// Output:
	// eigenvalues: -1.4142 0.0000 1.4142
	// dark state:  0.7071 -0.7071 0.0000
}

// dynRound4 rounds to four decimals for printing, turning −0 into 0.
func dynRound4(x float64) float64 { return math.Round(x*1e4)/1e4 + 0 }
