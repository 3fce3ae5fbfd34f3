package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Eigen computes the eigendecomposition H = V Λ V† of a small complex
// Hermitian matrix with the cyclic complex Jacobi method.
//
// Jacobi rotations are used rather than the real-symmetric 2n×2n embedding
// through gonum's mat.EigenSym because (i) exact degeneracies — the normal
// case for dark-state schemes — need no special treatment: every rotation is
// unitary, so V stays orthonormal to rounding whatever the multiplicity, while
// the embedding doubles every eigenvalue and forces a re-orthonormalisation of
// a complex basis out of each doubled real eigenspace; (ii) for n ≤ 16 the
// method is fast and allocation-free with a reusable workspace; (iii) Jacobi
// is known to give eigenvalues with high relative accuracy
// (Demmel and Veselić, SIAM J. Matrix Anal. Appl. 13, 1204 (1992)).
// The rotation follows the classical Jacobi formulas (Golub and Van Loan,
// Matrix Computations, 4th ed., §8.5) after a diagonal phase change that
// makes the pivot element real.
//
// An Eigen is not safe for concurrent use; give each goroutine its own.
type Eigen struct {
	n int
	a []complex128 // working copy of H, row-major
}

// NewEigen returns a workspace for n×n matrices.
func NewEigen(n int) *Eigen {
	if n <= 0 {
		panic("holonomy: NewEigen: n must be positive")
	}
	return &Eigen{n: n, a: make([]complex128, n*n)}
}

// Factorize computes the eigenvalues of the Hermitian matrix h in ascending
// order into vals and the corresponding orthonormal eigenvectors as the
// columns of vecs. Only h is read; it is assumed Hermitian (the strict upper
// triangle and the real part of the diagonal define it). It does not allocate.
func (e *Eigen) Factorize(h *Mat, vals []float64, vecs *Mat) {
	n := e.n
	if h.R != n || h.C != n || vecs.R != n || vecs.C != n || len(vals) != n {
		panic(fmt.Sprintf("holonomy: Eigen.Factorize: workspace %d, H %d×%d, V %d×%d, %d values", n, h.R, h.C, vecs.R, vecs.C, len(vals)))
	}
	a := e.a
	var scale float64
	for i := 0; i < n; i++ {
		a[i*n+i] = complex(real(h.Data[i*n+i]), 0)
		for j := i + 1; j < n; j++ {
			v := h.Data[i*n+j]
			a[i*n+j] = v
			a[j*n+i] = cmplx.Conj(v)
		}
	}
	for _, v := range a {
		scale += real(v)*real(v) + imag(v)*imag(v)
	}
	vecs.SetIdentity()
	if n == 1 || scale == 0 {
		for i := 0; i < n; i++ {
			vals[i] = real(a[i*n+i])
		}
		return
	}
	tol := 1e-34 * scale // (1e-17)² relative, squared norms
	for sweep := 0; sweep < 64; sweep++ {
		var off float64
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				v := a[i*n+j]
				off += real(v)*real(v) + imag(v)*imag(v)
			}
		}
		if off <= tol {
			break
		}
		for p := 0; p < n-1; p++ {
			for q := p + 1; q < n; q++ {
				apq := a[p*n+q]
				r := cmplx.Abs(apq)
				if r == 0 {
					continue
				}
				app, aqq := real(a[p*n+p]), real(a[q*n+q])
				if sweep > 3 && r < 1e-18*(math.Abs(app)+math.Abs(aqq)) {
					a[p*n+q], a[q*n+p] = 0, 0
					continue
				}
				ph := apq / complex(r, 0) // e^{iα}
				theta := (aqq - app) / (2 * r)
				t := 1 / (math.Abs(theta) + math.Sqrt(theta*theta+1))
				if theta < 0 {
					t = -t
				}
				c := 1 / math.Sqrt(t*t+1)
				s := t * c
				cc := complex(c, 0)
				sph := complex(s, 0) * cmplx.Conj(ph) // s e^{-iα}
				cph := cc * cmplx.Conj(ph)            // c e^{-iα}
				// A ← A J with J = [[c, s], [−s e^{-iα}, c e^{-iα}]] on (p, q).
				for k := 0; k < n; k++ {
					akp, akq := a[k*n+p], a[k*n+q]
					a[k*n+p] = cc*akp - sph*akq
					a[k*n+q] = complex(s, 0)*akp + cph*akq
				}
				// A ← J† A.
				for k := 0; k < n; k++ {
					apk, aqk := a[p*n+k], a[q*n+k]
					a[p*n+k] = cc*apk - cmplx.Conj(sph)*aqk
					a[q*n+k] = complex(s, 0)*apk + cmplx.Conj(cph)*aqk
				}
				a[p*n+q], a[q*n+p] = 0, 0
				a[p*n+p] = complex(real(a[p*n+p]), 0)
				a[q*n+q] = complex(real(a[q*n+q]), 0)
				// V ← V J.
				v := vecs.Data
				for k := 0; k < n; k++ {
					vkp, vkq := v[k*n+p], v[k*n+q]
					v[k*n+p] = cc*vkp - sph*vkq
					v[k*n+q] = complex(s, 0)*vkp + cph*vkq
				}
			}
		}
	}
	for i := 0; i < n; i++ {
		vals[i] = real(a[i*n+i])
	}
	// Insertion sort, ascending, carrying the columns of V along.
	v := vecs.Data
	for i := 1; i < n; i++ {
		for j := i; j > 0 && vals[j] < vals[j-1]; j-- {
			vals[j], vals[j-1] = vals[j-1], vals[j]
			for k := 0; k < n; k++ {
				v[k*n+j], v[k*n+j-1] = v[k*n+j-1], v[k*n+j]
			}
		}
	}
}
