package holonomy

import (
	"fmt"
	"math"
)

// Exponential computes the exponential of a general complex square matrix by
// scaling and squaring with diagonal Padé approximants, following Higham,
// "The scaling and squaring method for the matrix exponential revisited",
// SIAM J. Matrix Anal. Appl. 26, 1179 (2005), Algorithm 2.3.
//
// With θ_m the bounds of Higham's Table 2.3 (quoted from memory; the tests
// check the accuracy they deliver), the degree m ∈ {3, 5, 7, 9} is
// the smallest with ‖A‖₁ ≤ θ_m; otherwise A is scaled by 2^−s so that
// ‖2^−s A‖₁ ≤ θ₁₃, the [13/13] approximant is evaluated and squared s times.
// In exact arithmetic the result is exp(A + E) with ‖E‖ ≤ 2^−53‖A‖ (the
// backward error bound behind θ_m); in floating point the relative error of
// exp(A) is a modest multiple of the unit roundoff times the condition of
// the exponential at A, which for skew-Hermitian and dissipative generators
// of quantum dynamics is of order ‖A‖. For skew-Hermitian A the diagonal
// Padé approximant is unitary in exact arithmetic.
//
// An Exponential is a reusable workspace: after NewExponential(n), Exp on
// n×n matrices does not allocate. It is not safe for concurrent use.
type Exponential struct {
	n                      int
	a, a2, a4, a6, a8      []complex128
	u, v, t                []complex128
	lastDegree, lastSquare int // degree and squarings of the last call, for tests
}

// NewExponential returns a workspace for the exponential of n×n matrices.
func NewExponential(n int) *Exponential {
	if n <= 0 {
		panic("holonomy: NewExponential: n must be positive")
	}
	m := func() []complex128 { return make([]complex128, n*n) }
	return &Exponential{n: n, a: m(), a2: m(), a4: m(), a6: m(), a8: m(), u: m(), v: m(), t: m()}
}

// Expm sets dst = exp(a) for a square complex matrix a. It allocates a
// workspace; hot loops should use an Exponential instead. dst may be a.
func Expm(dst, a *Mat) {
	mustSquare(a)
	NewExponential(a.R).Exp(dst, a)
}

// Padé degrees and the bounds θ_m on ‖A‖₁ for which the [m/m] approximant
// has backward error at most 2^−53 (Higham 2005, Table 2.3; values quoted
// from memory, their accuracy is checked by the tests).
var (
	padeDegrees = [...]int{3, 5, 7, 9, 13}
	padeTheta   = [...]float64{
		1.495585217958292e-2,
		2.539398330063230e-1,
		9.504178996162932e-1,
		2.097847961257068e0,
		5.371920351148152e0,
	}
	// padeCoef[m][j] = b_j = (2m−j)! m! / ((2m)! j! (m−j)!), the
	// coefficients of the numerator p_m(x) = Σ_j b_j x^j of the [m/m]
	// approximant (b_0 = 1; the denominator is p_m(−x)).
	padeCoef = func() (c [14][]float64) {
		for _, m := range padeDegrees {
			b := make([]float64, m+1)
			b[0] = 1
			for j := 0; j < m; j++ {
				b[j+1] = b[j] * float64(m-j) / float64((2*m-j)*(j+1))
			}
			c[m] = b
		}
		return c
	}()
	pade13 = padeCoef[13]
)

// Exp sets dst = exp(a). dst may be a. Exp does not allocate.
func (x *Exponential) Exp(dst, a *Mat) {
	n := x.n
	if a.R != n || a.C != n || dst.R != n || dst.C != n {
		panic(fmt.Sprintf("holonomy: Exponential.Exp: workspace %d, A %d×%d, dst %d×%d", n, a.R, a.C, dst.R, dst.C))
	}
	if n == 1 {
		// The scalar case needs no Padé approximant.
		dst.Data[0] = complexExp(a.Data[0])
		x.lastDegree, x.lastSquare = 0, 0
		return
	}
	M, N, s, ok := x.pade(a.Data)
	if !ok {
		nan := complex(math.NaN(), math.NaN())
		for i := range dst.Data {
			dst.Data[i] = nan
		}
		return
	}
	luSolve(M, N, n, n)
	// Square s times, ping-ponging between N and a spare buffer.
	src, tmp := N, x.t
	for ; s > 0; s-- {
		mulSq(tmp, src, src, n)
		src, tmp = tmp, src
	}
	copy(dst.Data, src)
}

// pade prepares exp(A) ≈ (M⁻¹N)^(2^s) for the n×n matrix a (n ≥ 2) by
// Higham's Algorithm 2.3: M = q_m(2^−s A) and N = p_m(2^−s A), the
// denominator and numerator of the [m/m] Padé approximant, are returned in
// workspace buffers (N is x.u, M is x.v). ok is false for a non-finite a.
func (x *Exponential) pade(a []complex128) (M, N []complex128, s int, ok bool) {
	n := x.n
	A := x.a
	copy(A, a[:n*n])
	norm := norm1Cols(A, n)
	if math.IsNaN(norm) || math.IsInf(norm, 0) {
		return nil, nil, 0, false
	}
	s = 0
	m := 13
	for i, th := range padeTheta[:4] {
		if norm <= th {
			m = padeDegrees[i]
			break
		}
	}
	if m == 13 && norm > padeTheta[4] {
		s = int(math.Ceil(math.Log2(norm / padeTheta[4])))
		f := complex(math.Ldexp(1, -s), 0)
		for i := range A {
			A[i] *= f
		}
	}
	x.lastDegree, x.lastSquare = m, s
	U, V, T := x.u, x.v, x.t
	A2, A4, A6, A8 := x.a2, x.a4, x.a6, x.a8
	mulSq(A2, A, A, n)
	switch m {
	case 3, 5, 7, 9:
		b := padeCoef[m]
		// T = Σ_{odd j} b_j A^{j−1}, V = Σ_{even j} b_j A^j.
		switch m {
		case 3:
			for i, x := range A2 {
				T[i] = rscale(b[3], x)
				V[i] = rscale(b[2], x)
			}
		case 5:
			mulSq(A4, A2, A2, n)
			for i, x := range A2 {
				y := A4[i]
				T[i] = rscale(b[3], x) + rscale(b[5], y)
				V[i] = rscale(b[2], x) + rscale(b[4], y)
			}
		default:
			mulSq(A4, A2, A2, n)
			mulSq(A6, A4, A2, n)
			if m == 9 {
				mulSq(A8, A6, A2, n)
			} else {
				for i := range A8 {
					A8[i] = 0
				}
			}
			for i, x := range A2 {
				y, z, w := A4[i], A6[i], A8[i]
				T[i] = rscale(b[3], x) + rscale(b[5], y) + rscale(b[7], z)
				V[i] = rscale(b[2], x) + rscale(b[4], y) + rscale(b[6], z)
				if m == 9 {
					T[i] += rscale(b[9], w)
					V[i] += rscale(b[8], w)
				}
			}
		}
		for i := 0; i < n; i++ {
			T[i*n+i] += complex(b[1], 0)
			V[i*n+i] += complex(b[0], 0)
		}
		mulSq(U, A, T, n)
	case 13:
		b := pade13
		mulSq(A4, A2, A2, n)
		mulSq(A6, A4, A2, n)
		// T = A6(b13 A6 + b11 A4 + b9 A2), then the low-order terms.
		for i := range A8 {
			A8[i] = rscale(b[13], A6[i]) + rscale(b[11], A4[i]) + rscale(b[9], A2[i])
		}
		mulSq(T, A6, A8, n)
		for i := range T {
			T[i] += rscale(b[7], A6[i]) + rscale(b[5], A4[i]) + rscale(b[3], A2[i])
		}
		for i := 0; i < n; i++ {
			T[i*n+i] += complex(b[1], 0)
		}
		mulSq(U, A, T, n)
		for i := range A8 {
			A8[i] = rscale(b[12], A6[i]) + rscale(b[10], A4[i]) + rscale(b[8], A2[i])
		}
		mulSq(V, A6, A8, n)
		for i := range V {
			V[i] += rscale(b[6], A6[i]) + rscale(b[4], A4[i]) + rscale(b[2], A2[i])
		}
		for i := 0; i < n; i++ {
			V[i*n+i] += complex(b[0], 0)
		}
	}
	// r_m(A) = q_m(A)⁻¹p_m(A) with q_m = V − U and p_m = V + U.
	for i := range V {
		v, u := V[i], U[i]
		V[i], U[i] = v-u, v+u
	}
	return V, U, s, true
}

// expHermitian sets w = exp(−iB) for a Hermitian B (full storage, n×n)
// with ‖B‖₁ ≤ norm ≤ θ₁₃; see padeHermitian. It does not allocate.
func (x *Exponential) expHermitian(w, B []complex128, norm float64) {
	m, _ := x.padeHermitian(w, B, norm)
	luSolve(m, w, x.n, x.n)
}

// padeHermitian prepares exp(−iB) ≈ M⁻¹N for a Hermitian B (full storage,
// n×n) with ‖B‖₁ ≤ norm ≤ θ₁₃, by the [m/m] Padé approximant of Higham's
// Algorithm 2.3 without squaring: it returns M (workspace) and writes N
// into w. Every matrix formed is a real polynomial in B and hence Hermitian,
// so only upper triangles are computed. With A = −iB, A^{2k} = (−1)^k B^{2k};
// U = A·T = −i B T and V are as in Exp, M = V + iBT and N = V − iBT = M†,
// so that M⁻¹N is unitary in exact arithmetic. It does not allocate.
func (x *Exponential) padeHermitian(w, B []complex128, norm float64) (M []complex128, N []complex128) {
	n := x.n
	m := 13
	for i, th := range padeTheta[:4] {
		if norm <= th {
			m = padeDegrees[i]
			break
		}
	}
	x.lastDegree, x.lastSquare = m, 0
	b := padeCoef[m]
	B2, B4, B6, B8 := x.a2, x.a4, x.a6, x.a8
	T, V, P := x.t, x.v, x.u
	mulHerm(B2, B, B, n)
	switch m {
	case 3:
		for i, y := range B2 {
			T[i] = rscale(-b[3], y)
			V[i] = rscale(-b[2], y)
		}
	case 5:
		mulHerm(B4, B2, B2, n)
		for i, y := range B2 {
			z := B4[i]
			T[i] = rscale(-b[3], y) + rscale(b[5], z)
			V[i] = rscale(-b[2], y) + rscale(b[4], z)
		}
	case 7:
		mulHerm(B4, B2, B2, n)
		mulHerm(B6, B4, B2, n)
		for i, y := range B2 {
			z, u := B4[i], B6[i]
			T[i] = rscale(-b[3], y) + rscale(b[5], z) + rscale(-b[7], u)
			V[i] = rscale(-b[2], y) + rscale(b[4], z) + rscale(-b[6], u)
		}
	case 9:
		mulHerm(B4, B2, B2, n)
		mulHerm(B6, B4, B2, n)
		mulHerm(B8, B4, B4, n)
		for i, y := range B2 {
			z, u, v := B4[i], B6[i], B8[i]
			T[i] = rscale(-b[3], y) + rscale(b[5], z) + rscale(-b[7], u) + rscale(b[9], v)
			V[i] = rscale(-b[2], y) + rscale(b[4], z) + rscale(-b[6], u) + rscale(b[8], v)
		}
	case 13:
		mulHerm(B4, B2, B2, n)
		mulHerm(B6, B4, B2, n)
		// T = B6(b13 B6 − b11 B4 + b9 B2) − b7 B6 + b5 B4 − b3 B2 + b1,
		// V = B6(b12 B6 − b10 B4 + b8 B2) − b6 B6 + b4 B4 − b2 B2 + b0.
		for i, y := range B2 {
			z, u := B4[i], B6[i]
			B8[i] = rscale(b[13], u) + rscale(-b[11], z) + rscale(b[9], y)
			P[i] = rscale(b[12], u) + rscale(-b[10], z) + rscale(b[8], y)
		}
		mulHerm(T, B6, B8, n)
		mulHerm(V, B6, P, n)
		for i, y := range B2 {
			z, u := B4[i], B6[i]
			T[i] += rscale(-b[7], u) + rscale(b[5], z) + rscale(-b[3], y)
			V[i] += rscale(-b[6], u) + rscale(b[4], z) + rscale(-b[2], y)
		}
	}
	for i := 0; i < n; i++ {
		T[i*n+i] += complex(b[1], 0)
		V[i*n+i] += complex(b[0], 0)
	}
	mulHerm(P, B, T, n) // BT
	// M = V + iBT into V, N = V − iBT into w.
	w = w[:n*n]
	for i, y := range P {
		iy := complex(-imag(y), real(y))
		v := V[i]
		V[i], w[i] = v+iy, v-iy
	}
	return V, w
}

// mulHerm sets dst = a·b for commuting Hermitian n×n matrices a and b,
// whose product is Hermitian: it computes the upper triangle and mirrors it
// (the 4×4 kernel also reads only the upper triangle of b). dst must not
// share storage with a or b.
func mulHerm(dst, a, b []complex128, n int) {
	if n == 4 {
		mulHerm4(dst, a, b)
		return
	}
	dst, a, b = dst[:n*n], a[:n*n], b[:n*n]
	for i := 0; i < n; i++ {
		arow := a[i*n : i*n+n]
		for j := i; j < n; j++ {
			var s complex128
			for k, x := range arow {
				s += x * b[k*n+j]
			}
			if j == i {
				s = complex(real(s), 0)
			}
			dst[i*n+j] = s
			dst[j*n+i] = complex(real(s), -imag(s))
		}
	}
}

// mulHerm4 is mulHerm for n = 4, unrolled.
func mulHerm4(dst, a, b []complex128) {
	dst, a, b = dst[:16:16], a[:16:16], b[:16:16]
	b00, b01, b02, b03 := b[0], b[1], b[2], b[3]
	b11, b12, b13 := b[5], b[6], b[7]
	b22, b23 := b[10], b[11]
	b33 := b[15]
	// Lower triangle of b from the upper by Hermitian symmetry (b is
	// Hermitian here).
	b10, b20, b30 := cconj(b01), cconj(b02), cconj(b03)
	b21, b31 := cconj(b12), cconj(b13)
	b32 := cconj(b23)
	a0, a1, a2, a3 := a[0], a[1], a[2], a[3]
	d00 := a0*b00 + a1*b10 + a2*b20 + a3*b30
	d01 := a0*b01 + a1*b11 + a2*b21 + a3*b31
	d02 := a0*b02 + a1*b12 + a2*b22 + a3*b32
	d03 := a0*b03 + a1*b13 + a2*b23 + a3*b33
	a0, a1, a2, a3 = a[4], a[5], a[6], a[7]
	d11 := a0*b01 + a1*b11 + a2*b21 + a3*b31
	d12 := a0*b02 + a1*b12 + a2*b22 + a3*b32
	d13 := a0*b03 + a1*b13 + a2*b23 + a3*b33
	a0, a1, a2, a3 = a[8], a[9], a[10], a[11]
	d22 := a0*b02 + a1*b12 + a2*b22 + a3*b32
	d23 := a0*b03 + a1*b13 + a2*b23 + a3*b33
	a0, a1, a2, a3 = a[12], a[13], a[14], a[15]
	d33 := a0*b03 + a1*b13 + a2*b23 + a3*b33
	dst[0], dst[5], dst[10], dst[15] = complex(real(d00), 0), complex(real(d11), 0), complex(real(d22), 0), complex(real(d33), 0)
	dst[1], dst[4] = d01, cconj(d01)
	dst[2], dst[8] = d02, cconj(d02)
	dst[3], dst[12] = d03, cconj(d03)
	dst[6], dst[9] = d12, cconj(d12)
	dst[7], dst[13] = d13, cconj(d13)
	dst[11], dst[14] = d23, cconj(d23)
}

// norm1Cols returns an upper bound on the 1-norm (maximum absolute column
// sum) of the n×n matrix a, at most √2 times too large: it sums
// |Re a_ij| + |Im a_ij| ≥ |a_ij|. An over-estimate only selects a higher
// Padé degree or one more squaring, never a less accurate approximant.
func norm1Cols(a []complex128, n int) float64 {
	var best float64
	for j := 0; j < n; j++ {
		var s float64
		for i := j; i < n*n; i += n {
			v := a[i]
			s += math.Abs(real(v)) + math.Abs(imag(v))
		}
		if s > best || math.IsNaN(s) {
			best = s
		}
	}
	return best
}

// mulSq sets dst = a·b for n×n row-major matrices; dst must not share
// storage with a or b.
func mulSq(dst, a, b []complex128, n int) {
	if n == 4 {
		mul4(dst, a, b)
		return
	}
	dst = dst[:n*n]
	a = a[:n*n]
	b = b[:n*n]
	for i := 0; i < n; i++ {
		row := dst[i*n : i*n+n]
		arow := a[i*n : i*n+n]
		for j := range row {
			row[j] = 0
		}
		for k, aik := range arow {
			brow := b[k*n : k*n+n]
			brow = brow[:len(row)]
			for j, bkj := range brow {
				row[j] += aik * bkj
			}
		}
	}
}

// luSolve overwrites the n×c matrix b with the solution X of a X = b for
// the n×n matrix a (both row-major), by LU factorisation with partial
// pivoting; a is destroyed. A singular a gives non-finite results.
func luSolve(a, b []complex128, n, c int) {
	if n == 4 && c == 4 {
		luSolve4(a, b)
		return
	}
	a, b = a[:n*n], b[:n*c]
	for k := 0; k < n; k++ {
		p, best := k, -1.0
		for i := k; i < n; i++ {
			v := a[i*n+k]
			if m := real(v)*real(v) + imag(v)*imag(v); m > best {
				best, p = m, i
			}
		}
		if p != k {
			ka, pa := a[k*n+k:k*n+n], a[p*n+k:p*n+n]
			for j := range ka {
				ka[j], pa[j] = pa[j], ka[j]
			}
			kb, pb := b[k*c:k*c+c], b[p*c:p*c+c]
			for j := range kb {
				kb[j], pb[j] = pb[j], kb[j]
			}
		}
		piv := a[k*n+k]
		inv := complex(real(piv)/best, -imag(piv)/best) // 1/piv
		a[k*n+k] = inv                                  // kept for the back substitution
		krow := a[k*n+k+1 : k*n+n]
		brow := b[k*c : k*c+c]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * inv
			irow := a[i*n+k+1 : i*n+n]
			irow = irow[:len(krow)]
			for j, v := range krow {
				irow[j] -= l * v
			}
			ib := b[i*c : i*c+c]
			ib = ib[:len(brow)]
			for j, v := range brow {
				ib[j] -= l * v
			}
		}
	}
	for k := n - 1; k >= 0; k-- {
		brow := b[k*c : k*c+c]
		arow := a[k*n : k*n+n]
		for j := k + 1; j < n; j++ {
			l := arow[j]
			jrow := b[j*c : j*c+c]
			jrow = jrow[:len(brow)]
			for q, v := range jrow {
				brow[q] -= l * v
			}
		}
		inv := arow[k]
		for q := range brow {
			brow[q] *= inv
		}
	}
}

// luSolve4 is luSolve for n = c = 4 with the row operations unrolled.
func luSolve4(a, b []complex128) {
	a, b = a[:16:16], b[:16:16]
	var inv [4]complex128
	for k := 0; k < 4; k++ {
		p, best := k, -1.0
		for i := k; i < 4; i++ {
			v := a[i*4+k]
			if m := real(v)*real(v) + imag(v)*imag(v); m > best {
				best, p = m, i
			}
		}
		if p != k {
			ka, pa := (*[4]complex128)(a[k*4:k*4+4]), (*[4]complex128)(a[p*4:p*4+4])
			*ka, *pa = *pa, *ka
			kb, pb := (*[4]complex128)(b[k*4:k*4+4]), (*[4]complex128)(b[p*4:p*4+4])
			*kb, *pb = *pb, *kb
		}
		piv := a[k*4+k]
		iv := complex(real(piv)/best, -imag(piv)/best)
		inv[k] = iv
		ka := (*[4]complex128)(a[k*4 : k*4+4])
		kb := (*[4]complex128)(b[k*4 : k*4+4])
		for i := k + 1; i < 4; i++ {
			ia := (*[4]complex128)(a[i*4 : i*4+4])
			ib := (*[4]complex128)(b[i*4 : i*4+4])
			l := ia[k] * iv
			// Columns left of k+1 of a are not read again; updating them all
			// keeps the loop branch-free.
			ia[0] -= l * ka[0]
			ia[1] -= l * ka[1]
			ia[2] -= l * ka[2]
			ia[3] -= l * ka[3]
			ib[0] -= l * kb[0]
			ib[1] -= l * kb[1]
			ib[2] -= l * kb[2]
			ib[3] -= l * kb[3]
		}
	}
	for k := 3; k >= 0; k-- {
		kb := (*[4]complex128)(b[k*4 : k*4+4])
		for j := k + 1; j < 4; j++ {
			l := a[k*4+j]
			jb := (*[4]complex128)(b[j*4 : j*4+4])
			kb[0] -= l * jb[0]
			kb[1] -= l * jb[1]
			kb[2] -= l * jb[2]
			kb[3] -= l * jb[3]
		}
		iv := inv[k]
		kb[0] *= iv
		kb[1] *= iv
		kb[2] *= iv
		kb[3] *= iv
	}
}

// rscale returns the complex number y scaled by the real c (two real
// multiplications instead of a complex product).
func rscale(c float64, y complex128) complex128 { return complex(c*real(y), c*imag(y)) }

// complexExp returns e^z.
func complexExp(z complex128) complex128 {
	s, c := math.Sincos(imag(z))
	r := math.Exp(real(z))
	return complex(r*c, r*s)
}
