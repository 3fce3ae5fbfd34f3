package holonomy

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// ErrNoSubspace is wrapped by the errors that report that no working
// subspace can be chosen at the base point of a loop (or the reference point
// of a surface): the computational levels lie in a degenerate eigenspace of
// the wrong dimension, or the eigenstates closest to them have too little
// weight on them.
var ErrNoSubspace = errors.New("holonomy: no working subspace")

// GapError reports that the energy gap between the working subspace and the
// rest of the spectrum fell below the tolerance somewhere on a loop or a
// surface. The working subspace is then not defined there, and neither is
// its holonomy (and no adiabatic evolution can follow it).
type GapError struct {
	// S is the loop parameter s ∈ [0, 1] of the smallest sampled gap; on a
	// surface it is the first surface parameter u.
	S float64
	// V is the second surface parameter v on a surface, NaN on a loop.
	V float64
	// Gap is the smallest sampled gap in rad/s.
	Gap float64
	// Tol is the tolerance in rad/s.
	Tol float64
}

// Error describes where the gap closed and how small it got.
func (e *GapError) Error() string {
	where := fmt.Sprintf("s = %.6g on the loop", e.S)
	if !math.IsNaN(e.V) {
		where = fmt.Sprintf("(u, v) = (%.6g, %.6g) on the surface", e.S, e.V)
	}
	return fmt.Sprintf("holonomy: the energy gap between the working subspace and the rest of the spectrum closes to %.3g rad/s (tolerance %.3g rad/s) at %s", e.Gap, e.Tol, where)
}

// SamplingError reports that the working subspace turned by more than 45°
// between two neighbouring samples of a loop, so that the discrete Wilson
// loop does not follow it. Either the loop needs more points, or an
// eigenvalue crosses the working subspace between the samples (a gap
// closing that the samples miss).
type SamplingError struct {
	// From and To are the loop parameters of the two samples.
	From, To float64
	// Overlap is the smallest singular value of the overlap matrix between
	// the two subspace bases, the cosine of the largest principal angle.
	Overlap float64
}

// Error describes the jump.
func (e *SamplingError) Error() string {
	return fmt.Sprintf("holonomy: the working subspace turns by %.0f° between s = %.6g and s = %.6g (more than 45°): sample the loop more finely, or an eigenvalue crosses the working subspace between these samples",
		math.Acos(math.Min(1, e.Overlap))*180/math.Pi, e.From, e.To)
}

// minOverlap2 is the smallest squared singular value of a neighbour overlap
// accepted as continuous: a principal angle below 45°.
const minOverlap2 = 0.5

// cluster is one group of (near-)degenerate eigenstates of the working
// subspace: sorted eigenvalue indices lo … lo+d−1, placed at rows and
// columns off … off+d−1 of the k×k holonomy.
type cluster struct{ lo, d, off int }

// tracker holds the working subspace of a scheme along a loop: the choice
// made at the base point, and the eigenbasis followed from point to point.
//
// The choice at the base point: the eigenvalues of H(R₀) are grouped into
// clusters of neighbours closer than the gap tolerance; each cluster is
// weighted by the mean weight of its eigenvectors on the computational
// levels, and the heaviest clusters are taken until they hold k states. The
// clusters keep their places in the ascending spectrum along the loop as long
// as the gap to the rest stays open, which the tracker checks at every point.
//
// From point to point the eigenbasis is followed by a warm-started cyclic
// Jacobi method: A = V†H V, where V is the previous eigenbasis, is nearly
// diagonal, and the complex Jacobi rotations (Golub and Van Loan, Matrix
// Computations, 4th ed., §8.5, after a phase change making the pivot real)
// converge quadratically from there: on a tripod loop of 4096 points two
// sweeps rotate and a third finds nothing left, several times cheaper than a
// factorisation from scratch. Every rotation is unitary, so V stays
// orthonormal to rounding, and the small rotation angle of the classical
// formula keeps each column continuous. The first point of every loop is
// factorised from scratch with Eigen.
type tracker struct {
	s    *Scheme
	n, k int
	comp []int

	eig  *Eigen
	h    *Mat // Hamiltonian at the current point
	v    *Mat // eigenvectors (columns) in ascending order of vals
	vals []float64
	a, t []complex128 // n×n scratch for the warm start

	steps  int       // warm steps since the last cold start
	cl     []cluster // chosen clusters, ascending energy
	gapTol float64   // tolerance in use, rad/s

	q   *Mat // k×k computational rows of the chosen base-point eigenvectors
	qu  *Mat // unitary polar factor of q
	pol *polarWork
}

func newTracker(s *Scheme) *tracker {
	n, k := len(s.Levels), len(s.Computational)
	return &tracker{
		s: s, n: n, k: k, comp: s.Computational,
		eig:  NewEigen(n),
		h:    NewMat(n, n),
		v:    NewMat(n, n),
		vals: make([]float64, n),
		a:    make([]complex128, n*n),
		t:    make([]complex128, n*n),
		cl:   make([]cluster, 0, n),
		q:    NewMat(k, k),
		qu:   NewMat(k, k),
		pol:  newPolarWork(k),
	}
}

// cold factorises t.h from scratch.
func (t *tracker) cold() {
	t.eig.Factorize(t.h, t.vals, t.v)
	t.steps = 0
}

// reorthEvery is the number of warm steps between re-orthonormalisations of
// the tracked basis. Each Jacobi rotation is unitary only to rounding, and
// the departures add up coherently along a loop (‖V†V − I‖ grew to 2e-11
// over 65536 points without this); Gram–Schmidt every 32 steps keeps it at
// rounding level for a cost of under one complex multiply-add per step and
// level.
const reorthEvery = 32

// reorthonormalize applies modified Gram–Schmidt to the columns of the
// n×n matrix v, which are orthonormal up to a small drift; the columns move
// by the size of the drift only.
func reorthonormalize(v []complex128, n int) {
	for j := 0; j < n; j++ {
		for i := 0; i < j; i++ {
			var d complex128 // ⟨v_i|v_j⟩
			for r := 0; r < n; r++ {
				d += conjg(v[r*n+i]) * v[r*n+j]
			}
			for r := 0; r < n; r++ {
				v[r*n+j] -= d * v[r*n+i]
			}
		}
		var s float64
		for r := 0; r < n; r++ {
			s += sqmag(v[r*n+j])
		}
		f := complex(1/math.Sqrt(s), 0)
		for r := 0; r < n; r++ {
			v[r*n+j] *= f
		}
	}
}

// choose picks the working subspace from the current eigendecomposition (the
// base point). gapTol ≤ 0 selects the default 1e-6 × spectral radius. where
// names the point in error messages ("base point", ...).
func (t *tracker) choose(gapTol float64, where string) error {
	n, k := t.n, t.k
	vals, v := t.vals, t.v.Data
	radius := math.Max(math.Abs(vals[0]), math.Abs(vals[n-1]))
	tol := gapTol
	if tol <= 0 {
		tol = 1e-6 * radius
	}
	t.gapTol = tol

	type group struct {
		lo, d int
		w     float64 // mean weight on the computational levels
	}
	var all [MaxLevels]group
	m := 0
	for i := 0; i < n; {
		j := i + 1
		for j < n && vals[j]-vals[j-1] <= tol {
			j++
		}
		var w float64
		for c := i; c < j; c++ {
			for _, r := range t.comp {
				x := v[r*n+c]
				w += real(x)*real(x) + imag(x)*imag(x)
			}
		}
		all[m] = group{lo: i, d: j - i, w: w / float64(j-i)}
		m++
		i = j
	}
	// Heaviest first (insertion sort; ties keep ascending energy).
	var ord [MaxLevels]int
	for i := 0; i < m; i++ {
		ord[i] = i
		for j := i; j > 0 && all[ord[j]].w > all[ord[j-1]].w; j-- {
			ord[j], ord[j-1] = ord[j-1], ord[j]
		}
	}
	dim, nc := 0, 0
	for nc < m && dim < k {
		dim += all[ord[nc]].d
		nc++
	}
	if dim != k {
		g := all[ord[nc-1]]
		return fmt.Errorf("%w: at the %s the computational levels %s overlap a %d-fold degenerate eigenvalue %.6g rad/s (eigenvalues closer than the gap tolerance %.3g rad/s count as degenerate), so no %d-state subspace can be told apart; lift the degeneracy there (a drive or a detuning) or change the computational levels",
			ErrNoSubspace, where, t.compNames(), g.d, vals[g.lo], tol, k)
	}
	if nc < m && all[ord[nc]].w > all[ord[nc-1]].w-1e-9 {
		a, b := all[ord[nc-1]], all[ord[nc]]
		return fmt.Errorf("%w: at the %s the eigenstates at %.6g rad/s and %.6g rad/s have the same weight %.3g on the computational levels %s, so the working subspace is ambiguous; start the loop where the computational levels are eigenstates",
			ErrNoSubspace, where, vals[a.lo], vals[b.lo], a.w, t.compNames())
	}
	// Chosen clusters in ascending energy.
	t.cl = t.cl[:0]
	for i := 0; i < nc; i++ {
		g := all[ord[i]]
		t.cl = append(t.cl, cluster{lo: g.lo, d: g.d})
	}
	for i := 1; i < len(t.cl); i++ {
		for j := i; j > 0 && t.cl[j].lo < t.cl[j-1].lo; j-- {
			t.cl[j], t.cl[j-1] = t.cl[j-1], t.cl[j]
		}
	}
	off := 0
	for i := range t.cl {
		t.cl[i].off = off
		off += t.cl[i].d
	}
	// Computational block of the chosen eigenvectors and its unitary factor.
	q := t.q.Data
	for a, r := range t.comp {
		for _, c := range t.cl {
			for b := 0; b < c.d; b++ {
				q[a*k+c.off+b] = v[r*n+c.lo+b]
			}
		}
	}
	if s2 := t.pol.factor(t.qu.Data, q, k); s2 < minOverlap2 {
		return fmt.Errorf("%w: at the %s the eigenstates closest to the computational levels %s keep only %.0f%% of their weight on them in the worst direction; start the loop where the computational levels are (nearly) eigenstates",
			ErrNoSubspace, where, t.compNames(), 100*s2)
	}
	return nil
}

// baseWeight returns the smallest squared singular value of the
// computational block at the base point (1 when the chosen eigenstates lie
// wholly in the computational span). Valid after choose.
func (t *tracker) baseWeight() float64 {
	return t.pol.minSV2(t.q.Data, t.k)
}

func (t *tracker) compNames() string {
	var b strings.Builder
	for i, r := range t.comp {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(t.s.Levels[r].Name)
	}
	return b.String()
}

// gap returns the smallest distance between a chosen cluster and its
// neighbours in the spectrum (+Inf if the clusters fill the spectrum).
func (t *tracker) gap() float64 {
	g := math.Inf(1)
	for _, c := range t.cl {
		if c.lo > 0 {
			g = math.Min(g, t.vals[c.lo]-t.vals[c.lo-1])
		}
		if hi := c.lo + c.d; hi < t.n {
			g = math.Min(g, t.vals[hi]-t.vals[hi-1])
		}
	}
	return g
}

// warm diagonalises t.h starting from the eigenbasis in t.v.
func (t *tracker) warm() {
	n := t.n
	h, v, a, tm := t.h.Data[:n*n], t.v.Data[:n*n], t.a[:n*n], t.t[:n*n]
	// tm = H V (H is sparse for most schemes).
	for i := 0; i < n; i++ {
		row := tm[i*n : i*n+n]
		clear(row)
		for r := 0; r < n; r++ {
			hir := h[i*n+r]
			if hir == 0 {
				continue
			}
			vr := v[r*n : r*n+n]
			for j, x := range vr {
				row[j] += hir * x
			}
		}
	}
	// A = V† tm, upper triangle, mirrored.
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			var s complex128
			for r := 0; r < n; r++ {
				x := v[r*n+i]
				s += complex(real(x), -imag(x)) * tm[r*n+j]
			}
			a[i*n+j] = s
			a[j*n+i] = complex(real(s), -imag(s))
		}
		a[i*n+i] = complex(real(a[i*n+i]), 0)
	}
	jacobiWarm(a, v, n)
	if t.steps++; t.steps%reorthEvery == 0 {
		reorthonormalize(v, n)
	}
	vals := t.vals
	for i := 0; i < n; i++ {
		vals[i] = real(a[i*n+i])
	}
	sortEigenColumns(vals, v, n)
}

// maxSweeps bounds the warm-started Jacobi sweeps; two or three are usual.
const maxSweeps = 40

// jacobiWarm diagonalises the Hermitian n×n matrix a (full storage) by cyclic
// complex Jacobi rotations, accumulating them into the columns of v. A pivot
// below 1e-17‖A‖_F is set to zero without rotating; the sweeps stop when a
// sweep needs no rotation.
//
// The rotation for pivot a_pq = r e^{iα} and Δ = a_qq − a_pp is
// J = [[c, s e^{iα}], [−s e^{−iα}, c]] on (p, q) with t = s/c the smaller
// root of t² + 2(Δ/2r)t − 1 = 0 (Golub and Van Loan, §8.5, after the phase
// change diag(1, e^{iα})). It is computed without r itself: t/r =
// sgn(Δ)·2/(|Δ| + √(Δ² + 4r²)), c = (1 + t²)^{−1/2}, s e^{iα} = c (t/r) a_pq.
// For 4r² ≤ 1e-4 Δ² (every pair but near-degenerate ones, from a warm
// start) the series t/r = Σ C_j (−x)^j / Δ, x = r²/Δ², with the Catalan
// numbers C_j = 1, 1, 2, 5, 14, and c = 1 − t²/2 + 3t⁴/8 − 5t⁶/16 are exact
// to rounding (the first terms left out are below 1e-19) and avoid the
// square roots.
func jacobiWarm(a, v []complex128, n int) {
	var norm2 float64
	for _, x := range a[:n*n] {
		norm2 += real(x)*real(x) + imag(x)*imag(x)
	}
	tiny2 := 1e-34 * norm2
	for sweep := 0; sweep < maxSweeps; sweep++ {
		rotated := false
		for p := 0; p < n-1; p++ {
			for q := p + 1; q < n; q++ {
				apq := a[p*n+q]
				r2 := real(apq)*real(apq) + imag(apq)*imag(apq)
				if r2 <= tiny2 {
					a[p*n+q], a[q*n+p] = 0, 0
					continue
				}
				rotated = true
				app, aqq := real(a[p*n+p]), real(a[q*n+q])
				delta := aqq - app
				d2 := delta * delta
				var tor, c float64 // t/r and cos
				if 4*r2 <= 1e-4*d2 {
					qi := 1 / delta
					x := r2 * qi * qi // ≤ 2.5e-5
					g := 1 - x*(1-x*(2-x*(5-14*x)))
					tor = qi * g
					t2 := g * g * x
					c = 1 - t2*(0.5-t2*(0.375-t2*0.3125))
				} else {
					tor = 2 / (math.Abs(delta) + math.Sqrt(d2+4*r2))
					if delta < 0 {
						tor = -tor
					}
					c = 1 / math.Sqrt(1+tor*tor*r2)
				}
				// z = s e^{iα} = c (t/r) a_pq.
				zr, zi := c*tor*real(apq), c*tor*imag(apq)
				// Columns p, q of A (rows by Hermitian symmetry), k ≠ p, q:
				// a_kp ← c a_kp − z̄ a_kq, a_kq ← z a_kp + c a_kq.
				for k := 0; k < n; k++ {
					if k == p || k == q {
						continue
					}
					x, y := a[k*n+p], a[k*n+q]
					xr, xi, yr, yi := real(x), imag(x), real(y), imag(y)
					npr, npi := c*xr-(zr*yr+zi*yi), c*xi-(zr*yi-zi*yr)
					nqr, nqi := zr*xr-zi*xi+c*yr, zr*xi+zi*xr+c*yi
					a[k*n+p], a[k*n+q] = complex(npr, npi), complex(nqr, nqi)
					a[p*n+k], a[q*n+k] = complex(npr, -npi), complex(nqr, -nqi)
				}
				tr2 := tor * r2 // t r
				a[p*n+p] = complex(app-tr2, 0)
				a[q*n+q] = complex(aqq+tr2, 0)
				a[p*n+q], a[q*n+p] = 0, 0
				for k := 0; k < n; k++ {
					x, y := v[k*n+p], v[k*n+q]
					xr, xi, yr, yi := real(x), imag(x), real(y), imag(y)
					v[k*n+p] = complex(c*xr-(zr*yr+zi*yi), c*xi-(zr*yi-zi*yr))
					v[k*n+q] = complex(zr*xr-zi*xi+c*yr, zr*xi+zi*xr+c*yi)
				}
			}
		}
		if !rotated {
			return
		}
	}
}

// sortEigenColumns sorts vals ascending, carrying the columns of the n×n matrix v.
func sortEigenColumns(vals []float64, v []complex128, n int) {
	for i := 1; i < n; i++ {
		for j := i; j > 0 && vals[j] < vals[j-1]; j-- {
			vals[j], vals[j-1] = vals[j-1], vals[j]
			for r := 0; r < n; r++ {
				v[r*n+j], v[r*n+j-1] = v[r*n+j-1], v[r*n+j]
			}
		}
	}
}

// polarWork computes unitary polar factors of small square matrices without
// allocating: M = U P with U unitary and P = (M†M)^{1/2} positive.
// 1×1 and 2×2 use closed forms; for d ≥ 3, U = M (M†M)^{−1/2} through the
// eigendecomposition of M†M (Higham, Functions of Matrices, SIAM 2008, ch. 8).
// The closed form for d = 2 is U = (M + e^{i arg det M} adj(M)†)/(σ₁+σ₂)
// with σ₁+σ₂ = (‖M‖²_F + 2|det M|)^{1/2}: |det M| M^{−†} has the singular
// values swapped, so the sum has both equal to σ₁+σ₂.
type polarWork struct {
	eig        []*Eigen // by dimension, for d ≥ 3
	g, y, z, m []complex128
	lam        []float64
	gm, ym     *Mat
}

func newPolarWork(kmax int) *polarWork {
	p := &polarWork{eig: make([]*Eigen, kmax+1)}
	for d := 3; d <= kmax; d++ {
		p.eig[d] = NewEigen(d)
	}
	if kmax >= 3 {
		p.g = make([]complex128, kmax*kmax)
		p.y = make([]complex128, kmax*kmax)
		p.z = make([]complex128, kmax*kmax)
		p.lam = make([]float64, kmax)
		p.gm = &Mat{}
		p.ym = &Mat{}
	}
	return p
}

// factor writes the unitary polar factor of the d×d row-major matrix m into
// dst (which must not overlap m) and returns the smallest squared singular
// value of m. If that is zero, dst is set to the identity.
func (p *polarWork) factor(dst, m []complex128, d int) float64 {
	switch d {
	case 1:
		x := m[0]
		r2 := real(x)*real(x) + imag(x)*imag(x)
		if r2 == 0 {
			dst[0] = 1
			return 0
		}
		r := math.Sqrt(r2)
		dst[0] = complex(real(x)/r, imag(x)/r)
		return r2
	case 2:
		a, b, c, e := m[0], m[1], m[2], m[3]
		det := a*e - b*c
		ad := math.Sqrt(sqmag(det)) // entries are O(1): no overflow
		f2 := sqmag(a) + sqmag(b) + sqmag(c) + sqmag(e)
		if ad == 0 {
			dst[0], dst[1], dst[2], dst[3] = 1, 0, 0, 1
			return 0
		}
		ph := complex(real(det)/ad, imag(det)/ad)
		sum := math.Sqrt(f2 + 2*ad)
		inv := complex(1/sum, 0)
		dst[0] = (a + ph*conjg(e)) * inv
		dst[1] = (b - ph*conjg(c)) * inv
		dst[2] = (c - ph*conjg(b)) * inv
		dst[3] = (e + ph*conjg(a)) * inv
		smax2 := (f2 + math.Sqrt(math.Max(0, f2*f2-4*ad*ad))) / 2
		return ad * ad / smax2
	}
	g, y, z := p.g[:d*d], p.y[:d*d], p.z[:d*d]
	lam := p.lam[:d]
	p.gram(g, m, d)
	*p.gm = Mat{R: d, C: d, Data: g}
	*p.ym = Mat{R: d, C: d, Data: y}
	p.eig[d].Factorize(p.gm, lam, p.ym)
	if !(lam[0] > 0) {
		for i := range dst[:d*d] {
			dst[i] = 0
		}
		for i := 0; i < d; i++ {
			dst[i*d+i] = 1
		}
		return math.Max(0, lam[0])
	}
	// z = Y diag(λ^{−1/2}) Y†, dst = M z.
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			var s complex128
			for l := 0; l < d; l++ {
				s += y[i*d+l] * complex(1/math.Sqrt(lam[l]), 0) * conjg(y[j*d+l])
			}
			z[i*d+j] = s
		}
	}
	mulSmall(dst, m, z, d)
	return lam[0]
}

// minSV2 returns the smallest squared singular value of the d×d matrix m.
func (p *polarWork) minSV2(m []complex128, d int) float64 {
	switch d {
	case 1:
		return sqmag(m[0])
	case 2:
		det := m[0]*m[3] - m[1]*m[2]
		ad2 := sqmag(det)
		f2 := sqmag(m[0]) + sqmag(m[1]) + sqmag(m[2]) + sqmag(m[3])
		smax2 := (f2 + math.Sqrt(math.Max(0, f2*f2-4*ad2))) / 2
		if smax2 == 0 {
			return 0
		}
		return ad2 / smax2
	}
	g, y := p.g[:d*d], p.y[:d*d]
	lam := p.lam[:d]
	p.gram(g, m, d)
	*p.gm = Mat{R: d, C: d, Data: g}
	*p.ym = Mat{R: d, C: d, Data: y}
	p.eig[d].Factorize(p.gm, lam, p.ym)
	return math.Max(0, lam[0])
}

// gram sets g = m†m for d×d row-major m.
func (p *polarWork) gram(g, m []complex128, d int) {
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			var s complex128
			for l := 0; l < d; l++ {
				s += conjg(m[l*d+i]) * m[l*d+j]
			}
			g[i*d+j] = s
		}
	}
}

// matMul sets dst = a b for d×d row-major matrices; dst must not overlap.
func mulSmall(dst, a, b []complex128, d int) {
	for i := 0; i < d; i++ {
		row := dst[i*d : i*d+d]
		clear(row)
		for l := 0; l < d; l++ {
			x := a[i*d+l]
			if x == 0 {
				continue
			}
			br := b[l*d : l*d+d]
			for j, y := range br {
				row[j] += x * y
			}
		}
	}
}

func conjg(x complex128) complex128 { return complex(real(x), -imag(x)) }

func sqmag(x complex128) float64 { return real(x)*real(x) + imag(x)*imag(x) }
