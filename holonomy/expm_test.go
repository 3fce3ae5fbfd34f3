package holonomy

import (
	"fmt"
	"math"
	"math/big"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestPadeCoefficients checks the [m/m] Padé coefficients against the exact
// rationals b_j/b_0 with b_j = (2m−j)! m! / ((2m)! j! (m−j)!) (Higham, SIAM
// J. Matrix Anal. Appl. 26, 1179 (2005)), computed here in exact
// arithmetic, and the m = 13 integers b_j = (26−j)!/(j!(13−j)!) listed in
// that paper (from memory) against the same formula.
func TestPadeCoefficients(t *testing.T) {
	fact := func(k int) *big.Int { return new(big.Int).MulRange(1, int64(max(k, 1))) }
	for _, m := range padeDegrees {
		for j := 0; j <= m; j++ {
			// b_j/b_0 = (2m−j)! m! / ((2m)! j! (m−j)!) · (2m)!/m! ... with b_0 = 1 here.
			num := new(big.Int).Mul(fact(2*m-j), fact(m))
			den := new(big.Int).Mul(fact(2*m), new(big.Int).Mul(fact(j), fact(m-j)))
			want, _ := new(big.Rat).SetFrac(num, den).Float64()
			got := padeCoef[m][j]
			if math.Abs(got-want) > 1e-15*want {
				t.Errorf("m=%d j=%d: coefficient %.17g, exact %.17g", m, j, got, want)
			}
		}
	}
	published := []int64{64764752532480000, 32382376266240000, 7771770303897600,
		1187353796428800, 129060195264000, 10559470521600, 670442572800,
		33522128640, 1323241920, 40840800, 960960, 16380, 182, 1}
	for j, b := range published {
		f := new(big.Int).Div(fact(26-j), new(big.Int).Mul(fact(j), fact(13-j)))
		if f.Int64() != b {
			t.Errorf("b_%d for m=13: formula %v, published %d", j, f, b)
		}
		want := float64(b) / float64(published[0])
		if got := padeCoef[13][j]; math.Abs(got-want) > 1e-15*want {
			t.Errorf("m=13 j=%d: coefficient %.17g, published ratio %.17g", j, got, want)
		}
	}
}

// expmByEigen returns exp(−i h t) for Hermitian h from its
// eigendecomposition, the reference for the Hermitian tests.
func expmByEigen(h *Mat, tm float64) *Mat {
	n := h.R
	vals := make([]float64, n)
	v := NewMat(n, n)
	NewEigen(n).Factorize(h, vals, v)
	d := NewMat(n, n)
	for i, l := range vals {
		d.Set(i, i, cmplx.Exp(complex(0, -l*tm)))
	}
	t1, out := NewMat(n, n), NewMat(n, n)
	Mul(t1, v, d)
	MulBH(out, t1, v)
	return out
}

// TestExpmHermitian compares exp(−iHt) by Padé scaling and squaring with the
// eigendecomposition, over norms that select every Padé degree and up to
// ten squarings. Both are unitary, so the bound is absolute:
// 1e-13·max(1, ‖Ht‖₁) (the conditioning of exp at a skew-Hermitian matrix
// grows like its norm).
func TestExpmHermitian(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	seen := map[int]bool{}
	maxSquare := 0
	for _, n := range []int{1, 2, 3, 4, 6, 9, 16} {
		for _, target := range []float64{1e-3, 0.1, 0.5, 1.5, 4, 20, 3000} {
			h := dynRandHermitian(rng, n, 1)
			a := NewMat(n, n)
			for i, v := range h.Data {
				a.Data[i] = complex(imag(v), -real(v))
			}
			tm := target / norm1Cols(a.Data, n)
			for i := range a.Data {
				a.Data[i] *= complex(tm, 0)
			}
			x := NewExponential(n)
			got := NewMat(n, n)
			x.Exp(got, a)
			seen[x.lastDegree] = true
			maxSquare = max(maxSquare, x.lastSquare)
			want := expmByEigen(h, tm)
			tol := 1e-13 * math.Max(1, target)
			if d := FrobeniusDist(got, want); d > tol {
				t.Errorf("n=%d ‖A‖₁≈%g (m=%d, s=%d): error %g > %g", n, target, x.lastDegree, x.lastSquare, d, tol)
			}
			if u := UnitarityError(got); u > tol {
				t.Errorf("n=%d ‖A‖₁≈%g: unitarity error %g", n, target, u)
			}
			// The Hermitian fast path of Propagator.Step, where it applies.
			if norm := norm1Cols(a.Data, n); norm <= padeTheta[4] {
				b := NewMat(n, n)
				for i, v := range h.Data {
					b.Data[i] = v * complex(tm, 0)
				}
				got2 := NewMat(n, n)
				x.expHermitian(got2.Data, b.Data, norm)
				seen[100+x.lastDegree] = true
				if d := FrobeniusDist(got2, want); d > tol {
					t.Errorf("expHermitian n=%d ‖A‖₁≈%g (m=%d): error %g > %g", n, target, x.lastDegree, d, tol)
				}
			}
		}
	}
	for _, m := range padeDegrees {
		if !seen[m] || !seen[100+m] {
			t.Errorf("Padé degree %d not exercised (Exp %v, expHermitian %v)", m, seen[m], seen[100+m])
		}
	}
	if maxSquare < 8 {
		t.Errorf("at most %d squarings exercised", maxSquare)
	}
}

// TestExpmNilpotent: for strictly upper-triangular N, exp(N) = Σ_{k<n} N^k/k!
// exactly (a finite sum), a non-normal closed form. Entries up to 30 force
// scaling and squaring; the bound is relative to ‖exp N‖.
func TestExpmNilpotent(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	for _, n := range []int{2, 3, 4, 6} {
		for _, scale := range []float64{0.01, 0.3, 3, 30} {
			a := NewMat(n, n)
			for i := 0; i < n; i++ {
				for j := i + 1; j < n; j++ {
					a.Set(i, j, complex(scale*rng.NormFloat64(), scale*rng.NormFloat64()))
				}
			}
			want := Identity(n)
			term := Identity(n)
			for k := 1; k < n; k++ {
				next := dynNaiveMul(term, a)
				for i := range next.Data {
					next.Data[i] /= complex(float64(k), 0)
				}
				term = next
				for i := range want.Data {
					want.Data[i] += term.Data[i]
				}
			}
			got := NewMat(n, n)
			Expm(got, a)
			if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want) {
				t.Errorf("n=%d scale=%g: relative error %g", n, scale, d/FrobeniusNorm(want))
			}
		}
	}
}

// TestExpm2x2 uses the closed form for a general complex 2×2 matrix,
// exp(A) = e^τ [cosh δ I + (sinh δ/δ)(A − τI)], τ = Tr A/2,
// δ² = ((a−d)/2)² + bc (Cayley–Hamilton), at norms from 1e-3 to 40.
func TestExpm2x2(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	for rep := 0; rep < 40; rep++ {
		scale := math.Pow(10, -3+4.6*float64(rep)/39)
		a := dynRandComplex(rng, 2, 2)
		for i := range a.Data {
			a.Data[i] *= complex(scale, 0)
		}
		A, B, C, D := a.Data[0], a.Data[1], a.Data[2], a.Data[3]
		tau := (A + D) / 2
		delta := cmplx.Sqrt((A-D)*(A-D)/4 + B*C)
		ch := cmplx.Cosh(delta)
		sh := complex(1, 0)
		if cmplx.Abs(delta) > 1e-8 {
			sh = cmplx.Sinh(delta) / delta
		} else {
			sh = 1 + delta*delta/6
		}
		e := cmplx.Exp(tau)
		want := NewMatFrom(2, 2, []complex128{
			e * (ch + sh*(A-tau)), e * sh * B,
			e * sh * C, e * (ch + sh*(D-tau)),
		})
		got := NewMat(2, 2)
		Expm(got, a)
		if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want)*math.Max(1, scale) {
			t.Errorf("scale %g: relative error %g", scale, d/FrobeniusNorm(want))
		}
	}
}

// TestExpmDiagonalAndScalar: exp of a diagonal complex matrix and of a 1×1
// matrix are element-wise exponentials; dst may alias a.
func TestExpmDiagonalAndScalar(t *testing.T) {
	z := []complex128{-3 + 2i, 0.5 - 40i, 1e-9i, -20}
	a := NewMat(4, 4)
	for i, v := range z {
		a.Set(i, i, v)
	}
	Expm(a, a) // in place
	for i, v := range z {
		want := cmplx.Exp(v)
		if d := cmplx.Abs(a.At(i, i) - want); d > 1e-13*math.Max(1, cmplx.Abs(want))*40 {
			t.Errorf("diag %v: got %v want %v", v, a.At(i, i), want)
		}
	}
	for _, v := range z {
		s := NewMatFrom(1, 1, []complex128{v})
		Expm(s, s)
		if d := cmplx.Abs(s.Data[0] - cmplx.Exp(v)); d > 1e-14*cmplx.Abs(cmplx.Exp(v))*math.Max(1, cmplx.Abs(v)) {
			t.Errorf("1×1 %v: got %v want %v", v, s.Data[0], cmplx.Exp(v))
		}
	}
}

// TestExpmGroupProperty: exp(A)exp(−A) = I for a random non-normal A.
func TestExpmGroupProperty(t *testing.T) {
	rng := rand.New(rand.NewPCG(27, 28))
	for _, n := range []int{3, 5, 8} {
		a := dynRandComplex(rng, n, n)
		m := NewMat(n, n)
		for i, v := range a.Data {
			m.Data[i] = -v
		}
		ea, em, p := NewMat(n, n), NewMat(n, n), NewMat(n, n)
		Expm(ea, a)
		Expm(em, m)
		Mul(p, ea, em)
		if d := FrobeniusDist(p, Identity(n)); d > 1e-11 {
			t.Errorf("n=%d: ‖e^A e^−A − I‖ = %g", n, d)
		}
	}
}

func TestExpmNonFinite(t *testing.T) {
	a := NewMat(3, 3)
	a.Set(0, 1, complex(math.Inf(1), 0))
	Expm(a, a)
	for _, v := range a.Data {
		if !cmplx.IsNaN(v) {
			t.Fatalf("exp of non-finite input gave %v, want NaN", v)
		}
	}
}

func TestExpmAllocs(t *testing.T) {
	rng := rand.New(rand.NewPCG(29, 30))
	for _, n := range []int{2, 4, 7} {
		for _, s := range []float64{0.01, 1, 100} {
			a := dynRandComplex(rng, n, n)
			for i := range a.Data {
				a.Data[i] *= complex(s, 0)
			}
			x := NewExponential(n)
			dst := NewMat(n, n)
			if got := testing.AllocsPerRun(10, func() { x.Exp(dst, a) }); got != 0 {
				t.Errorf("n=%d scale %g: %v allocations", n, s, got)
			}
		}
	}
}

func ExampleExpm() {
	// exp of the nilpotent [[0, 1], [0, 0]] is [[1, 1], [0, 1]].
	a := NewMatFrom(2, 2, []complex128{0, 1, 0, 0})
	e := NewMat(2, 2)
	Expm(e, a)
	fmt.Printf("%.4f %.4f\n%.4f %.4f\n", dynRound4(real(e.At(0, 0))), dynRound4(real(e.At(0, 1))), dynRound4(real(e.At(1, 0))), dynRound4(real(e.At(1, 1))))
	// Output:
	// 1.0000 1.0000
	// 0.0000 1.0000
}
