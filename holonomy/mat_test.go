package holonomy

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// Test helpers of the linear-algebra and dynamics files (prefix dyn).

// dynRandComplex returns an r×c matrix of independent standard complex
// normal entries.
func dynRandComplex(rng *rand.Rand, r, c int) *Mat {
	m := NewMat(r, c)
	for i := range m.Data {
		m.Data[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return m
}

// dynRandHermitian returns a random Hermitian n×n matrix with entries of
// size scale.
func dynRandHermitian(rng *rand.Rand, n int, scale float64) *Mat {
	h := NewMat(n, n)
	for i := 0; i < n; i++ {
		h.Set(i, i, complex(scale*rng.NormFloat64(), 0))
		for j := i + 1; j < n; j++ {
			v := complex(scale*rng.NormFloat64(), scale*rng.NormFloat64())
			h.Set(i, j, v)
			h.Set(j, i, cmplx.Conj(v))
		}
	}
	return h
}

// dynRandUnitary returns a random unitary n×n matrix: the Q factor of a
// complex Ginibre matrix by modified Gram–Schmidt.
func dynRandUnitary(rng *rand.Rand, n int) *Mat {
	q := dynRandComplex(rng, n, n)
	for j := 0; j < n; j++ {
		for k := 0; k < j; k++ {
			var dot complex128
			for i := 0; i < n; i++ {
				dot += cmplx.Conj(q.At(i, k)) * q.At(i, j)
			}
			for i := 0; i < n; i++ {
				q.Set(i, j, q.At(i, j)-dot*q.At(i, k))
			}
		}
		var nrm float64
		for i := 0; i < n; i++ {
			nrm += real(q.At(i, j) * cmplx.Conj(q.At(i, j)))
		}
		nrm = math.Sqrt(nrm)
		for i := 0; i < n; i++ {
			q.Set(i, j, q.At(i, j)/complex(nrm, 0))
		}
	}
	return q
}

// dynConjugate returns U diag(vals) U†.
func dynConjugate(u *Mat, vals []float64) *Mat {
	n := u.R
	d := NewMat(n, n)
	for i, v := range vals {
		d.Set(i, i, complex(v, 0))
	}
	t, h := NewMat(n, n), NewMat(n, n)
	Mul(t, u, d)
	MulBH(h, t, u)
	return h
}

// dynNaiveMul returns a·b by the textbook triple loop, independent of the
// kernels under test.
func dynNaiveMul(a, b *Mat) *Mat {
	c := NewMat(a.R, b.C)
	for i := 0; i < a.R; i++ {
		for j := 0; j < b.C; j++ {
			var s complex128
			for k := 0; k < a.C; k++ {
				s += a.At(i, k) * b.At(k, j)
			}
			c.Set(i, j, s)
		}
	}
	return c
}

func dynAdjoint(a *Mat) *Mat {
	b := NewMat(a.C, a.R)
	Adjoint(b, a)
	return b
}

// TestMulKernels checks Mul, MulAH and MulBH, including the unrolled 4×4
// kernels, against the textbook triple loop for square and rectangular
// shapes.
func TestMulKernels(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	shapes := [][3]int{{4, 4, 4}, {1, 1, 1}, {2, 3, 4}, {3, 3, 3}, {4, 4, 1}, {5, 4, 4}, {16, 16, 16}, {4, 2, 4}}
	for _, sh := range shapes {
		a := dynRandComplex(rng, sh[0], sh[1])
		b := dynRandComplex(rng, sh[1], sh[2])
		want := dynNaiveMul(a, b)
		got := NewMat(sh[0], sh[2])
		Mul(got, a, b)
		if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want) {
			t.Errorf("Mul %v: error %g", sh, d)
		}
		ah := dynAdjoint(a) // sh[1]×sh[0]
		MulAH(got, ah, b)   // (a†)† b = a b
		if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want) {
			t.Errorf("MulAH %v: error %g", sh, d)
		}
		bh := dynAdjoint(b) // sh[2]×sh[1]
		MulBH(got, a, bh)   // a (b†)† = a b
		if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want) {
			t.Errorf("MulBH %v: error %g", sh, d)
		}
		if sh[0] == sh[1] && sh[1] == sh[2] {
			n := sh[0]
			g := NewMat(n, n)
			mulSq(g.Data, a.Data, b.Data, n)
			if d := FrobeniusDist(g, want); d > 1e-13*FrobeniusNorm(want) {
				t.Errorf("mulSq %d: error %g", n, d)
			}
			mulSqBH(g.Data, a.Data, bh.Data, n)
			if d := FrobeniusDist(g, want); d > 1e-13*FrobeniusNorm(want) {
				t.Errorf("mulSqBH %d: error %g", n, d)
			}
		}
	}
}

// TestMulHerm checks the Hermitian-product kernel on commuting Hermitian
// matrices (powers of one Hermitian matrix).
func TestMulHerm(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	for _, n := range []int{1, 2, 3, 4, 7} {
		h := dynRandHermitian(rng, n, 1)
		h2 := dynNaiveMul(h, h)
		want := dynNaiveMul(h2, h)
		got := NewMat(n, n)
		mulHerm(got.Data, h2.Data, h.Data, n)
		if d := FrobeniusDist(got, want); d > 1e-13*FrobeniusNorm(want) {
			t.Errorf("n=%d: error %g", n, d)
		}
	}
}

func TestMatBasics(t *testing.T) {
	a := NewMatFrom(2, 2, []complex128{1, 2i, 3, 4 - 1i})
	if Trace(a) != 5-1i {
		t.Errorf("Trace = %v", Trace(a))
	}
	b := NewMat(2, 2)
	Adjoint(b, a)
	if b.At(0, 1) != 3 || b.At(1, 0) != -2i || b.At(1, 1) != 4+1i {
		t.Errorf("Adjoint = %v", b)
	}
	if got := FrobeniusNorm(a); math.Abs(got-math.Sqrt(1+4+9+17)) > 1e-15 {
		t.Errorf("FrobeniusNorm = %g", got)
	}
	if UnitarityError(Identity(3)) != 0 {
		t.Error("identity not unitary")
	}
	c := a.Clone()
	c.Set(0, 0, 7)
	if a.At(0, 0) != 1 {
		t.Error("Clone shares storage")
	}
	sub := NewMat(2, 2)
	u := NewMatFrom(3, 3, []complex128{1, 2, 3, 4, 5, 6, 7, 8, 9})
	Block(sub, u, []int{2, 0})
	if sub.At(0, 0) != 9 || sub.At(0, 1) != 7 || sub.At(1, 0) != 3 || sub.At(1, 1) != 1 {
		t.Errorf("Block = %v", sub)
	}
}

func TestMatPanicsOnShape(t *testing.T) {
	cases := map[string]func(){
		"Mul":    func() { Mul(NewMat(2, 2), NewMat(2, 3), NewMat(2, 2)) },
		"MulAH":  func() { MulAH(NewMat(2, 2), NewMat(3, 2), NewMat(2, 2)) },
		"MulBH":  func() { MulBH(NewMat(2, 2), NewMat(2, 2), NewMat(2, 3)) },
		"Trace":  func() { Trace(NewMat(2, 3)) },
		"Copy":   func() { NewMat(2, 2).Copy(NewMat(3, 3)) },
		"Block":  func() { Block(NewMat(2, 2), Identity(3), []int{0}) },
		"Factor": func() { NewEigen(3).Factorize(NewMat(2, 2), make([]float64, 3), NewMat(3, 3)) },
		"Exp":    func() { NewExponential(3).Exp(NewMat(3, 3), NewMat(2, 2)) },
	}
	for name, f := range cases {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic on a shape mismatch", name)
				}
			}()
			f()
		}()
	}
}
