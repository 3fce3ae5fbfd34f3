package holonomy

import (
	"fmt"
	"math"
)

// Eigen computes the eigendecomposition H = V Λ V† of a small complex
// Hermitian matrix. It is a reusable workspace: after NewEigen(n), every call
// of Factorize on an n×n matrix runs without allocating.
//
// # Algorithm
//
// The method is the classical two-stage one for dense Hermitian matrices
// (Golub and Van Loan, Matrix Computations, 4th ed., 2013, §8.3):
//
//  1. Householder reduction to tridiagonal form (Householder, J. ACM 5, 339
//     (1958)), H = Q T Q†, carried out with complex reflectors
//     I − β v v†. The sub-diagonal of T is complex; a diagonal unitary D
//     (accumulated phases, as in the EISPACK routine htridi: Smith et al.,
//     Matrix Eigensystem Routines — EISPACK Guide, 2nd ed., Springer 1976)
//     makes D†TD real symmetric with non-negative off-diagonal.
//  2. Implicit QL iteration with Wilkinson's shift on the real tridiagonal
//     matrix (Bowdler, Martin, Reinsch and Wilkinson, Numer. Math. 11, 293
//     (1968)), the real plane rotations being applied to the complex basis
//     QD. Wilkinson's shift makes the iteration globally convergent for
//     symmetric tridiagonal matrices (Wilkinson, Linear Algebra Appl. 1, 409
//     (1968)); it typically needs one to three iterations per eigenvalue.
//
// Why this method. Every transformation is unitary, so V is orthonormal to
// rounding whatever the multiplicities: exact degeneracies, the normal case
// for dark-state schemes, need no special treatment (unlike the real
// symmetric 2n×2n embedding through gonum's mat.EigenSym, which doubles every
// eigenvalue and needs a complex basis rebuilt from each doubled real
// eigenspace). The method is backward stable: the computed pairs are exact
// for H + E with ‖E‖ of order n·ε‖H‖, so ‖HV − VΛ‖ and ‖V†V − I‖ are a small
// multiple of ε‖H‖ and ε. A cyclic complex Jacobi method has the same
// stability and higher relative accuracy for tiny eigenvalues (Demmel and
// Veselić, SIAM J. Matrix Anal. Appl. 13, 1204 (1992)), but it costs several
// sweeps of O(n³) complex rotations: the cyclic Jacobi solver this type
// replaced was about three times slower for 4×4 and six times slower for
// 16×16 matrices, and factorisations sit in the inner loops of holonomy and
// propagation. Absolute accuracy ε‖H‖ is what those need. For 4×4 matrices
// the cost is dominated by the serial chain of square roots and divisions in
// the QL rotations (about 15 rotations for a random 4×4 matrix), not by
// arithmetic throughput.
//
// The input is scaled by a power of two (exact) so that its largest element
// lies in [½, 1), which keeps the squares in the rotations clear of overflow
// and underflow for any finite H.
//
// An Eigen is not safe for concurrent use; give each goroutine its own.
type Eigen struct {
	n    int
	a    []complex128 // working copy of H; Householder vectors below the sub-diagonal
	q    []complex128 // accumulated Householder product Q (first a scratch vector)
	p    []complex128 // Householder update vector
	sub  []complex128 // complex sub-diagonal of T
	beta []float64    // Householder factors; 0 means no reflection
	d    []float64    // diagonal of the real tridiagonal matrix, then eigenvalues
	off  []float64    // off-diagonal of the real tridiagonal matrix
	z    []float64    // eigenvectors as rows of 2n reals (re, im interleaved)
	perm []int        // ascending order of the eigenvalues
}

// NewEigen returns a workspace for n×n matrices.
func NewEigen(n int) *Eigen {
	if n <= 0 {
		panic("holonomy: NewEigen: n must be positive")
	}
	return &Eigen{
		n:    n,
		a:    make([]complex128, n*n),
		q:    make([]complex128, n*n),
		p:    make([]complex128, n),
		sub:  make([]complex128, n),
		beta: make([]float64, n),
		d:    make([]float64, n),
		off:  make([]float64, n),
		z:    make([]float64, 2*n*n),
		perm: make([]int, n),
	}
}

// maxQLIter bounds the QL iterations spent on one eigenvalue. Wilkinson's
// shift converges in a handful; the bound only guarantees termination for
// non-finite input.
const maxQLIter = 64

// Factorize computes the eigenvalues of the Hermitian matrix h in ascending
// order into vals and the corresponding orthonormal eigenvectors as the
// columns of vecs. Only the upper triangle and the real part of the diagonal
// of h are read (h is taken to be Hermitian). vecs must not share storage
// with h. If h has a non-finite element, vals and vecs are filled with NaN.
// Factorize does not allocate.
func (e *Eigen) Factorize(h *Mat, vals []float64, vecs *Mat) {
	n := e.n
	if h.R != n || h.C != n || vecs.R != n || vecs.C != n || len(vals) != n {
		panic(fmt.Sprintf("holonomy: Eigen.Factorize: workspace %d, H %d×%d, V %d×%d, %d values", n, h.R, h.C, vecs.R, vecs.C, len(vals)))
	}
	a := e.a
	hd := h.Data[:n*n]
	var amax float64
	for i := 0; i < n; i++ {
		di := real(hd[i*n+i])
		a[i*n+i] = complex(di, 0)
		amax = max(amax, math.Abs(di))
		for j := i + 1; j < n; j++ {
			v := hd[i*n+j]
			a[i*n+j] = v
			a[j*n+i] = complex(real(v), -imag(v))
			amax = max(amax, math.Abs(real(v)), math.Abs(imag(v)))
		}
	}
	vd := vecs.Data[:n*n]
	if math.IsNaN(amax) || math.IsInf(amax, 0) {
		for i := range vals {
			vals[i] = math.NaN()
		}
		nan := complex(math.NaN(), math.NaN())
		for i := range vd {
			vd[i] = nan
		}
		return
	}
	if amax == 0 || n == 1 {
		for i := range vd {
			vd[i] = 0
		}
		for i := 0; i < n; i++ {
			vals[i] = real(a[i*n+i])
			vd[i*n+i] = 1
		}
		return
	}
	_, exp := math.Frexp(amax) // amax·2^−exp ∈ [½, 1)
	if exp != 0 {
		if exp > -1000 && exp < 1000 {
			f := math.Ldexp(1, -exp)
			for i, v := range a {
				a[i] = rscale(f, v)
			}
		} else {
			for i, v := range a {
				a[i] = complex(math.Ldexp(real(v), -exp), math.Ldexp(imag(v), -exp))
			}
		}
	}
	e.tridiagonalize()
	e.ql()
	d, perm, z := e.d, e.perm[:n], e.z
	for i := range perm {
		perm[i] = i
	}
	for i := 0; i < n-1; i++ { // selection sort of the indices
		k := i
		for j := i + 1; j < n; j++ {
			if d[perm[j]] < d[perm[k]] {
				k = j
			}
		}
		perm[i], perm[k] = perm[k], perm[i]
	}
	for j, pj := range perm {
		vals[j] = math.Ldexp(d[pj], exp)
		row := z[2*n*pj : 2*n*(pj+1)]
		for r := 0; r < n; r++ {
			vd[r*n+j] = complex(row[2*r], row[2*r+1])
		}
	}
}

// tridiagonalize reduces the (scaled) Hermitian matrix in e.a to real
// symmetric tridiagonal form, leaving the diagonal in e.d, the off-diagonal in
// e.off and the basis Q·D, one column per row, in e.z.
func (e *Eigen) tridiagonalize() {
	n := e.n
	a, p, sub, beta := e.a[:n*n], e.p[:n], e.sub[:n], e.beta[:n]
	v := e.q[:n] // Householder vector, copied out of column k for locality
	for k := 0; k < n-2; k++ {
		m := n - k - 1
		vk := v[:m]
		for r := range vk {
			vk[r] = a[(k+1+r)*n+k]
		}
		x0 := vk[0]
		var sigma float64
		for _, x := range vk[1:] {
			sigma += real(x)*real(x) + imag(x)*imag(x)
		}
		if sigma == 0 {
			beta[k] = 0
			sub[k] = x0
			continue
		}
		ax0 := math.Sqrt(real(x0)*real(x0) + imag(x0)*imag(x0))
		alpha := math.Sqrt(ax0*ax0 + sigma)
		phase := complex(1, 0)
		if ax0 != 0 {
			phase = complex(real(x0)/ax0, imag(x0)/ax0)
		}
		// v = x + phase·α e₁, kept in column k below the diagonal;
		// (I − β v v†) x = −phase·α e₁.
		vk[0] = phase * complex(ax0+alpha, 0)
		a[(k+1)*n+k] = vk[0]
		b := 1 / (alpha * (alpha + ax0))
		beta[k] = b
		sub[k] = -phase * complex(alpha, 0)
		// p = β B v for the trailing block B, then w = p − (β/2)(v†p) v and
		// B ← B − v w† − w v†.
		pk := p[:m]
		var vp float64
		for r := range pk {
			row := a[(k+1+r)*n+k+1 : (k+2+r)*n]
			row = row[:len(vk)]
			var s complex128
			for c, x := range vk {
				s += row[c] * x
			}
			s *= complex(b, 0)
			pk[r] = s
			x := vk[r]
			vp += real(x)*real(s) + imag(x)*imag(s) // Re(v̄ s)
		}
		kk := complex(b*vp/2, 0)
		for r, x := range vk {
			pk[r] -= kk * x
		}
		for r, vr := range vk {
			wr := pk[r]
			row := a[(k+1+r)*n+k+1 : (k+2+r)*n]
			row = row[:len(vk)]
			for c, vc := range vk {
				wc := pk[c]
				row[c] -= vr*complex(real(wc), -imag(wc)) + wr*complex(real(vc), -imag(vc))
			}
		}
	}
	if n >= 2 {
		sub[n-2] = a[(n-1)*n+n-2]
	}
	d := e.d[:n]
	for i := range d {
		d[i] = real(a[i*n+i])
	}
	// Q = H₀H₁…H_{n−3} by backward accumulation, built transposed
	// (qt[j*n+r] = Q_rj) so that the final copy to z runs along rows.
	qt := e.q[:n*n]
	for i := range qt {
		qt[i] = 0
	}
	for i := 0; i < n; i++ {
		qt[i*n+i] = 1
	}
	for k := n - 3; k >= 0; k-- {
		b := complex(beta[k], 0)
		if b == 0 {
			continue
		}
		// Column c of Q (row c of qt) ← (I − β v v†) column c.
		for c := k + 1; c < n; c++ {
			row := qt[c*n+k+1 : c*n+n]
			var s complex128
			for r := range row {
				x := a[(k+1+r)*n+k]
				s += complex(real(x), -imag(x)) * row[r]
			}
			s *= b
			for r := range row {
				row[r] -= a[(k+1+r)*n+k] * s
			}
		}
	}
	// D = diag(ph) with ph₀ = 1, ph_{k+1} = ph_k·sub_k/|sub_k| makes D†TD
	// real with off-diagonal |sub_k|. Rows of z are the columns of Q·D.
	off, z := e.off[:n], e.z[:2*n*n]
	ph := complex(1, 0)
	for j := 0; j < n; j++ {
		row := z[2*n*j : 2*n*(j+1)]
		qrow := qt[j*n : j*n+n]
		if j == 0 {
			for r, x := range qrow {
				row[2*r], row[2*r+1] = real(x), imag(x)
			}
		} else {
			for r, x := range qrow {
				y := x * ph
				row[2*r], row[2*r+1] = real(y), imag(y)
			}
		}
		if j < n-1 {
			s := sub[j]
			as := math.Sqrt(real(s)*real(s) + imag(s)*imag(s))
			off[j] = as
			if as != 0 {
				ph *= complex(real(s)/as, imag(s)/as)
			}
		}
	}
	off[n-1] = 0
}

// ql diagonalises the real symmetric tridiagonal matrix (e.d, e.off) by the
// implicit QL method with Wilkinson's shift, rotating the rows of e.z.
func (e *Eigen) ql() {
	n := e.n
	d, off, z := e.d[:n], e.off[:n], e.z
	const eps = 0x1p-52
	const tiny = 0x1p-1000 // the scaled matrix has norm of order one
	w := 2 * n
	for l := 0; l < n; l++ {
		for iter := 0; ; iter++ {
			m := l
			for ; m < n-1; m++ {
				am := math.Abs(off[m])
				if am <= eps*(math.Abs(d[m])+math.Abs(d[m+1])) || am <= tiny {
					break
				}
			}
			if m == l {
				break
			}
			if iter == maxQLIter {
				off[l] = 0
				break
			}
			if m == l+1 {
				// A 2×2 block: diagonalise it in closed form with one
				// Jacobi rotation (Golub and Van Loan, §8.5.2).
				qlRot2(d, off, z, l, w)
				continue
			}
			// Shift: the eigenvalue of the leading 2×2 block closer to d_l.
			g := (d[l+1] - d[l]) / (2 * off[l])
			var r float64
			if math.Abs(g) < 0x1p500 {
				r = math.Sqrt(g*g + 1)
			} else {
				r = math.Abs(g)
			}
			if g < 0 {
				r = -r
			}
			g = d[m] - d[l] + off[l]/(g+r)
			s, c, p := 1.0, 1.0, 0.0
			split := false
			for i := m - 1; i >= l; i-- {
				f := s * off[i]
				b := c * off[i]
				r = math.Sqrt(f*f + g*g)
				if r < 0x1p-500 {
					r = math.Hypot(f, g)
				}
				off[i+1] = r
				if r == 0 { // the matrix splits: deflate and restart
					d[i+1] -= p
					off[m] = 0
					split = true
					break
				}
				ir := 1 / r
				s, c = f*ir, g*ir
				g = d[i+1] - p
				r = (d[i]-g)*s + 2*c*b
				p = s * r
				d[i+1] = g + p
				g = c*r - b
				zi := z[w*i : w*i+w]
				zj := z[w*(i+1) : w*(i+1)+w]
				for k, x := range zi {
					y := zj[k]
					zj[k] = s*x + c*y
					zi[k] = c*x - s*y
				}
			}
			if split {
				continue
			}
			d[l] -= p
			off[l] = g
			off[m] = 0
		}
	}
}

// qlRot2 diagonalises the 2×2 block [[d_l, e_l], [e_l, d_{l+1}]] of the real
// tridiagonal matrix by one Jacobi rotation and applies it to rows l, l+1 of
// z (row length w).
func qlRot2(d, off, z []float64, l, w int) {
	a, b, c := d[l], off[l], d[l+1]
	theta := (c - a) / (2 * b)
	var t float64
	if math.Abs(theta) < 0x1p500 {
		t = 1 / (math.Abs(theta) + math.Sqrt(theta*theta+1))
	} else {
		t = 0.5 / math.Abs(theta)
	}
	if theta < 0 {
		t = -t
	}
	cs := 1 / math.Sqrt(t*t+1)
	sn := t * cs
	d[l] = a - t*b
	d[l+1] = c + t*b
	off[l] = 0
	zi := z[w*l : w*l+w]
	zj := z[w*(l+1) : w*(l+1)+w]
	for k, x := range zi {
		y := zj[k]
		zi[k] = cs*x - sn*y
		zj[k] = sn*x + cs*y
	}
}
