package holonomy

import (
	"errors"
	"fmt"
	"math"
)

// Loop is a closed loop in the control space of a scheme: it writes into p
// the control point at loop parameter s ∈ [0, 1]. The point arrives zeroed
// and shaped for the scheme (Scheme.NewPoint); Loop(0) and Loop(1) must
// give the same Hamiltonian. s = 0 is the base point, where the working
// subspace is chosen. A Loop should not allocate: it is called once per
// loop point.
type Loop func(s float64, p Point)

// Gap is the smallest sampled energy gap between the working subspace and
// the rest of the spectrum along a loop. Between a (near-)degenerate cluster
// of the working subspace and another cluster of it, the distance counts as
// a gap too, since the holonomy is taken cluster by cluster.
type Gap struct {
	// Min is the smallest gap in rad/s (+Inf when the working subspace is
	// the whole space and forms one cluster).
	Min float64
	// At is the loop parameter s ∈ [0, 1) where it occurs.
	At float64
}

// ErrOpenLoop is wrapped by the error returned for a loop whose end point
// has a different Hamiltonian from its base point.
var ErrOpenLoop = errors.New("holonomy: loop is not closed")

// ErrNotConverged is wrapped by the error Adaptive returns, together with
// its finest result, when MaxPoints is reached before the tolerance.
var ErrNotConverged = errors.New("holonomy: holonomy not converged")

// Wilson computes the holonomy of the working subspace of a level scheme
// around a closed loop in control space as a discrete Wilson loop.
//
// # Algorithm
//
// The working subspace is chosen at the base point s = 0 of the loop: the
// eigenstates of H with the largest weight on the computational levels,
// grouped into clusters of (near-)degenerate eigenvalues (eigenvalues closer
// than GapTol are one cluster). The holonomy is block diagonal over the
// clusters: a non-Abelian U(d) block for a d-fold degenerate cluster
// (Wilczek and Zee, Phys. Rev. Lett. 52, 2111 (1984)), a Berry phase e^{iγ}
// for a non-degenerate one (Berry, Proc. R. Soc. A 392, 45 (1984)).
//
// The loop is sampled at s_j = j/N, j = 0 … N−1. At every sample the
// eigenbasis V_j of each cluster is found (Eigen at the base point, then a
// warm-started Jacobi iteration from the previous basis), and the ordered
// product
//
//	U = W_N W_{N−1} ⋯ W_1,  W_j = polar(V_j† V_{j−1}),  V_N = V_0,
//
// is formed, where polar(M) is the unitary factor of the polar
// decomposition M = U P. This is the gauge-invariant discrete Wilson loop of
// lattice gauge theory (Wilson, Phys. Rev. D 10, 2445 (1974)) applied to the
// Wilczek–Zee connection; for one state it reduces to the discrete Berry
// phase γ = arg Π_j ⟨n_j|n_{j−1}⟩ (Resta, J. Phys.: Condens. Matter 12,
// R107 (2000), reference from memory), with the sign convention of the
// package documentation. Any choice of the bases V_j, in particular any
// phases the eigensolver returns, cancels in the product. Each factor is the map of the adiabatic transport
// from one sample to the next to first order; the method is symmetric
// (reversing the loop inverts every factor), so on a smooth loop the error
// falls as 1/N² with an even expansion in 1/N, which Adaptive exploits.
//
// Dark subspace of a star. When every channel touches one hub level (tripod,
// N-pod), the diagonal of H is zero and the working subspace chosen at the
// base point is the (n−2)-dimensional null space of H, that null space is
// the orthogonal complement of the bright state on the other levels
// (Morris and Shore, Phys. Rev. A 27, 906 (1983)); its basis at each sample
// is a Householder reflector's columns and the gap to the rest is exactly
// the bright coupling ‖b‖ (see darkBasis). The product is basis-independent,
// so this changes nothing but the cost; a sample with a non-zero diagonal
// sends the pass back to the general path.
//
// U is finally expressed in the computational basis: with Q the block of
// the chosen base-point eigenvectors on the computational levels and Q_u its
// unitary polar factor, the result is Q_u U Q_u†. When the working subspace
// at the base point lies in the span of the computational levels (for the
// tripod, a loop based where the qubit levels are dark), Q is unitary and
// this is exact; otherwise it identifies each computational state with the
// nearest state of the working subspace (see Diagnose).
//
// A Wilson is a reusable workspace: after NewWilson, Loop runs without
// allocating. It is not safe for concurrent use; the scheme must not change
// shape while the Wilson is in use.
type Wilson struct {
	// GapTol is the tolerance on the energy gap in rad/s: at the base point,
	// eigenvalues closer than GapTol form one cluster, and along the loop a
	// gap below GapTol is an error (*GapError). Zero means 1e-6 times the
	// spectral radius of H at the base point. To take a slightly split
	// group as one non-Abelian cluster (for example the tripod's dark pair
	// under a small two-photon detuning), set GapTol above the splitting.
	GapTol float64

	hub    int                   // hub level of a star scheme, else −1
	b      [MaxLevels]complex128 // star couplings at the current point
	noFast bool                  // tests: always take the general path
	fast   bool                  // the last pass used the closed-form dark basis

	s   *Scheme
	err error // invalid scheme
	tr  *tracker
	p   Point
	h1  *Mat // H at s = 1
	v0  *Mat // eigenvectors at the base point

	st       [3]stride
	w, u, pb []complex128 // k×k scratch
}

// stride accumulates the Wilson loop over every step-th sample.
type stride struct {
	step  int
	vlast *Mat         // eigenvectors at the previous sample of this stride
	slast float64      // its loop parameter
	prod  []complex128 // k×k block-diagonal product
	jump  *SamplingError
	jbuf  SamplingError
}

// NewWilson returns a Wilson-loop workspace for the scheme s. If s is not
// valid, the error of s.Validate is returned by every later call.
func NewWilson(s *Scheme) *Wilson {
	w := &Wilson{s: s}
	if err := s.Validate(); err != nil {
		w.err = fmt.Errorf("holonomy: invalid level scheme %q: %w", s.Name, err)
		return w
	}
	n, k := len(s.Levels), len(s.Computational)
	w.tr = newTracker(s)
	w.hub = schemeHub(s)
	w.p = s.NewPoint()
	w.h1 = NewMat(n, n)
	w.v0 = NewMat(n, n)
	for i := range w.st {
		w.st[i] = stride{step: 1 << i, vlast: NewMat(n, n), prod: make([]complex128, k*k)}
	}
	w.w = make([]complex128, k*k)
	w.u = make([]complex128, k*k)
	w.pb = make([]complex128, k*k)
	return w
}

// K returns the dimension k of the holonomy, the number of computational
// levels.
func (w *Wilson) K() int { return len(w.s.Computational) }

// Loop computes the holonomy of the working subspace around loop sampled at
// n points s = j/n (the loop is closed back to s = 0) and writes it into
// dst, k×k in the computational basis at the base point (k = number of
// computational levels; for k = 1, dst holds e^{iγ} with γ the Berry phase).
// It returns the smallest sampled gap. It does not allocate unless it
// returns an error.
//
// Errors: the scheme is invalid; the loop is not closed (ErrOpenLoop) or
// gives non-finite controls; no working subspace at the base point
// (ErrNoSubspace); the gap closes below GapTol (*GapError, reporting the
// smallest sampled gap and where); the subspace jumps between samples
// (*SamplingError). Loop panics if n < 4 or dst is not k×k.
func (w *Wilson) Loop(loop Loop, n int, dst *Mat) (Gap, error) {
	if w.err != nil {
		return Gap{}, w.err
	}
	k := w.tr.k
	if dst.R != k || dst.C != k {
		panic(fmt.Sprintf("holonomy: Wilson.Loop: destination is %d×%d, want %d×%d", dst.R, dst.C, k, k))
	}
	if n < 4 {
		panic("holonomy: Wilson.Loop: need at least 4 loop points")
	}
	g, err := w.pass(loop, n, 1)
	if err != nil {
		return g, err
	}
	if j := w.st[0].jump; j != nil {
		return g, j
	}
	w.output(dst.Data, w.st[0].prod)
	return g, nil
}

// eval writes H(loop(s)) into h.
func (w *Wilson) eval(loop Loop, s float64, h *Mat) error {
	if err := w.point(loop, s); err != nil {
		return err
	}
	w.s.Hamiltonian(h, w.p)
	return nil
}

// point sets w.p to loop(s) and checks that it is finite.
func (w *Wilson) point(loop Loop, s float64) error {
	clear(w.p.Drive)
	clear(w.p.Detuning)
	loop(s, w.p)
	// x − x is 0 for finite x and NaN for ±Inf and NaN.
	var z float64
	for _, d := range w.p.Drive {
		z += (real(d) - real(d)) + (imag(d) - imag(d))
	}
	for _, d := range w.p.Detuning {
		z += d - d
	}
	if z != 0 {
		return w.badPoint(s)
	}
	return nil
}

func (w *Wilson) badPoint(s float64) error {
	return fmt.Errorf("holonomy: loop gives a non-finite control at s = %.6g: %w", s, w.s.CheckPoint(w.p))
}

// pass runs the loop once with n points, accumulating the Wilson products of
// strides 1, 2, … up to ns (n must be divisible by the largest stride).
//
// When the scheme is a star (every channel touches one hub level), the
// working subspace chosen at the base point is the whole dark subspace and
// the diagonal of H is zero there, the dark basis and the exact gap at each
// later sample come from the closed form of darkBasis instead of a warm
// eigensolver step. If a later sample has a non-zero diagonal (a detuning),
// the pass starts again on the general path.
func (w *Wilson) pass(loop Loop, n, ns int) (Gap, error) {
	w.fast = !w.noFast && w.hub >= 0
	g, ok, err := w.sweep(loop, n, ns)
	if !ok {
		w.fast = false
		g, _, err = w.sweep(loop, n, ns)
	}
	return g, err
}

// start evaluates the base point, checks that the loop is closed, chooses
// the working subspace and resets the strides.
func (w *Wilson) start(loop Loop, ns int) error {
	tr := w.tr
	// Closure: H(1) = H(0) to 1e-9 of the loop's scale, max ‖H‖ at s = 0, ½, 1.
	if err := w.eval(loop, 0.5, tr.h); err != nil {
		return err
	}
	scale := FrobeniusNorm(tr.h)
	if err := w.eval(loop, 1, w.h1); err != nil {
		return err
	}
	if err := w.eval(loop, 0, tr.h); err != nil {
		return err
	}
	scale = math.Max(scale, math.Max(FrobeniusNorm(w.h1), FrobeniusNorm(tr.h)))
	if d := FrobeniusDist(w.h1, tr.h); d > 1e-9*scale {
		return fmt.Errorf("%w: ‖H(1) − H(0)‖ = %.3g rad/s against a loop scale ‖H‖ = %.3g rad/s", ErrOpenLoop, d, scale)
	}
	tr.cold()
	if err := tr.choose(w.GapTol, "base point (s = 0)"); err != nil {
		return err
	}
	for i := 0; i < ns; i++ {
		st := &w.st[i]
		st.vlast.Copy(tr.v)
		st.slast = 0
		st.jump = nil
		setIdentity(st.prod, tr.k)
	}
	w.v0.Copy(tr.v)
	return nil
}

// darkChosen reports whether the working subspace just chosen is the whole
// dark subspace of a star Hamiltonian with zero diagonal.
func (w *Wilson) darkChosen() bool {
	tr := w.tr
	n := tr.n
	if len(tr.cl) != 1 || tr.cl[0].lo != 1 || tr.cl[0].d != n-2 {
		return false
	}
	for i := 0; i < n; i++ {
		if tr.h.Data[i*n+i] != 0 {
			return false
		}
	}
	return true
}

// sweep is one pass, with the closed-form dark basis if w.fast and the
// working subspace allows it (w.fast then stays true); ok is false if it must be run again without.
func (w *Wilson) sweep(loop Loop, n, ns int) (gap Gap, ok bool, err error) {
	tr := w.tr
	if err := w.start(loop, ns); err != nil {
		return Gap{}, true, err
	}
	w.fast = w.fast && w.darkChosen()
	fast := w.fast
	gap = Gap{Min: tr.gap(), At: 0}
	for j := 1; j < n; j++ {
		s := float64(j) / float64(n)
		if err := w.point(loop, s); err != nil {
			return gap, true, err
		}
		var g float64
		if fast {
			if !starCouplings(w.s, w.p, w.hub, &w.b) {
				return gap, false, nil
			}
			g = darkBasis(&w.b, tr.v.Data, tr.n, w.hub)
		} else {
			w.s.Hamiltonian(tr.h, w.p)
			tr.warm()
			g = tr.gap()
		}
		if g < gap.Min {
			gap = Gap{Min: g, At: s}
		}
		for i := 0; i < ns; i++ {
			st := &w.st[i]
			if j%st.step != 0 {
				continue
			}
			w.accumulate(st, tr.v, s)
			st.vlast.Copy(tr.v)
			st.slast = s
		}
	}
	for i := 0; i < ns; i++ {
		w.accumulate(&w.st[i], w.v0, 1)
	}
	if gap.Min < tr.gapTol {
		return gap, true, &GapError{S: gap.At, V: math.NaN(), Gap: gap.Min, Tol: tr.gapTol}
	}
	return gap, true, nil
}

// accumulate multiplies the product of st by the unitary factors of the
// overlaps between the cluster bases in st.vlast and vnew.
func (w *Wilson) accumulate(st *stride, vnew *Mat, s float64) {
	tr := w.tr
	n, k := tr.n, tr.k
	vn, vo := vnew.Data, st.vlast.Data
	for _, c := range tr.cl {
		d := c.d
		if d == 2 {
			w.accumulate2(st, vn, vo, c, s)
			continue
		}
		wm, um := w.w[:d*d], w.u[:d*d]
		for a := 0; a < d; a++ {
			for b := 0; b < d; b++ {
				var sum complex128
				ca, cb := c.lo+a, c.lo+b
				for r := 0; r < n; r++ {
					x := vn[r*n+ca]
					sum += complex(real(x), -imag(x)) * vo[r*n+cb]
				}
				wm[a*d+b] = sum
			}
		}
		if s2 := tr.pol.factor(um, wm, d); s2 < minOverlap2 && st.jump == nil {
			st.jbuf = SamplingError{From: st.slast, To: s, Overlap: math.Sqrt(s2)}
			st.jump = &st.jbuf
		}
		// Block ← U · block.
		pb := w.pb[:d*d]
		for a := 0; a < d; a++ {
			for b := 0; b < d; b++ {
				pb[a*d+b] = st.prod[(c.off+a)*k+c.off+b]
			}
		}
		mulSmall(wm, um, pb, d)
		for a := 0; a < d; a++ {
			for b := 0; b < d; b++ {
				st.prod[(c.off+a)*k+c.off+b] = wm[a*d+b]
			}
		}
	}
}

// accumulate2 is accumulate for one cluster of two states, unrolled.
func (w *Wilson) accumulate2(st *stride, vn, vo []complex128, c cluster, s float64) {
	n, k := w.tr.n, w.tr.k
	var m00, m01, m10, m11 complex128
	a, b := c.lo, c.lo+1
	for r := 0; r < n; r++ {
		na, nb := conjg(vn[r*n+a]), conjg(vn[r*n+b])
		oa, ob := vo[r*n+a], vo[r*n+b]
		m00 += na * oa
		m01 += na * ob
		m10 += nb * oa
		m11 += nb * ob
	}
	wm, um := w.w[:4], w.u[:4]
	wm[0], wm[1], wm[2], wm[3] = m00, m01, m10, m11
	if s2 := w.tr.pol.factor(um, wm, 2); s2 < minOverlap2 && st.jump == nil {
		st.jbuf = SamplingError{From: st.slast, To: s, Overlap: math.Sqrt(s2)}
		st.jump = &st.jbuf
	}
	// Block ← U · block.
	i0, i1 := c.off*k+c.off, (c.off+1)*k+c.off
	p00, p01, p10, p11 := st.prod[i0], st.prod[i0+1], st.prod[i1], st.prod[i1+1]
	st.prod[i0] = um[0]*p00 + um[1]*p10
	st.prod[i0+1] = um[0]*p01 + um[1]*p11
	st.prod[i1] = um[2]*p00 + um[3]*p10
	st.prod[i1+1] = um[2]*p01 + um[3]*p11
}

// output writes Q_u P Q_u† into dst (k×k, row-major).
func (w *Wilson) output(dst, prod []complex128) {
	k := w.tr.k
	qu := w.tr.qu.Data
	t := w.u[:k*k]
	mulSmall(t, qu, prod, k)
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			var s complex128
			for l := 0; l < k; l++ {
				s += t[i*k+l] * conjg(qu[j*k+l])
			}
			dst[i*k+j] = s
		}
	}
}

func setIdentity(m []complex128, k int) {
	clear(m[:k*k])
	for i := 0; i < k; i++ {
		m[i*k+i] = 1
	}
}

// AdaptiveOptions control Wilson.Adaptive.
type AdaptiveOptions struct {
	// Points is the first number of loop points, rounded up to a multiple
	// of 4 (zero means 64). Make it a multiple of 4 times the number of
	// smooth pieces of a loop with corners, so that samples fall on the
	// corners at every refinement.
	Points int
	// MaxPoints bounds the number of loop points (zero means 65536).
	MaxPoints int
	// Tol is the requested error estimate in the Frobenius norm (zero means
	// 1e-9).
	Tol float64
	// Extrapolate applies Richardson extrapolation to the N- and N/2-point
	// results, U_R = polar((4U_N − U_{N/2})/3), cancelling the 1/N² term of
	// the error on smooth loops (or loops sampled on their corners).
	Extrapolate bool
}

// AdaptiveHolonomy is a converged holonomy, the result of Wilson.Adaptive.
type AdaptiveHolonomy struct {
	// U is the k×k holonomy in the computational basis at the base point.
	U *Mat
	// Points is the number of loop points of the final refinement.
	Points int
	// ErrorEstimate is the Frobenius distance between the final result and
	// the one from half as many points (both extrapolated when
	// Extrapolate is set). In the asymptotic regime it overestimates the
	// error of U, by about 3× without extrapolation (error ∝ 1/N²) and
	// about 15× with it (∝ 1/N⁴).
	ErrorEstimate float64
	// Gap is the smallest sampled gap of the final refinement.
	Gap Gap
	// Findings are the diagnostics of Diagnose for this loop.
	Findings []Finding
}

// Adaptive computes the holonomy of loop to a requested accuracy: from
// opt.Points points it doubles the number of loop points until the result
// differs from the one with half as many points by at most opt.Tol (see
// AdaptiveOptions.Extrapolate), and attaches the findings of Diagnose (run
// with at most 512 loop points).
// Every refinement samples the loop once; the N/2- (and N/4-) point products
// come from every second (fourth) sample of the same pass.
//
// A *SamplingError at some refinement is retried with twice the points.
// If MaxPoints is reached first, Adaptive returns its finest result together
// with an error wrapping ErrNotConverged. Other errors are those of Loop.
func (w *Wilson) Adaptive(loop Loop, opt AdaptiveOptions) (*AdaptiveHolonomy, error) {
	if w.err != nil {
		return nil, w.err
	}
	if opt.Points == 0 {
		opt.Points = 64
	}
	if opt.MaxPoints == 0 {
		opt.MaxPoints = 1 << 16
	}
	if opt.Tol == 0 {
		opt.Tol = 1e-9
	}
	if opt.Points < 8 || opt.MaxPoints < opt.Points || !(opt.Tol > 0) {
		return nil, fmt.Errorf("holonomy: adaptive Wilson loop: need 8 ≤ Points ≤ MaxPoints and Tol > 0, have Points %d, MaxPoints %d, Tol %g", opt.Points, opt.MaxPoints, opt.Tol)
	}
	k := w.tr.k
	ns := 2
	if opt.Extrapolate {
		ns = 3
	}
	var u [3]*Mat
	for i := range u {
		u[i] = NewMat(k, k)
	}
	r1, r2, tmp := NewMat(k, k), NewMat(k, k), NewMat(k, k)
	m := (opt.Points + 3) / 4 * 4
	for {
		gap, err := w.pass(loop, m, ns)
		if err != nil {
			return nil, fmt.Errorf("%w (with %d loop points)", err, m)
		}
		var jump *SamplingError
		for i := 0; i < ns; i++ {
			if w.st[i].jump != nil {
				jump = w.st[i].jump
			}
		}
		if jump != nil {
			if 2*m <= opt.MaxPoints {
				m *= 2
				continue
			}
			j := *jump
			return nil, fmt.Errorf("%w (with %d loop points, at most %d allowed)", &j, m, opt.MaxPoints)
		}
		for i := 0; i < ns; i++ {
			w.output(u[i].Data, w.st[i].prod)
		}
		res := &AdaptiveHolonomy{Points: m, Gap: gap}
		if opt.Extrapolate {
			richardson(w.tr.pol, r1, u[0], u[1], tmp)
			richardson(w.tr.pol, r2, u[1], u[2], tmp)
			res.U, res.ErrorEstimate = r1.Clone(), FrobeniusDist(r1, r2)
		} else {
			res.U, res.ErrorEstimate = u[0].Clone(), FrobeniusDist(u[0], u[1])
		}
		if res.ErrorEstimate <= opt.Tol {
			f, err := w.Diagnose(loop, min(m, diagnosePoints))
			if err != nil {
				return nil, err
			}
			res.Findings = f
			return res, nil
		}
		if 2*m > opt.MaxPoints {
			f, _ := w.Diagnose(loop, min(m, diagnosePoints))
			res.Findings = f
			return res, fmt.Errorf("%w: error estimate %.3g above tolerance %.3g with %d loop points (MaxPoints %d)", ErrNotConverged, res.ErrorEstimate, opt.Tol, m, opt.MaxPoints)
		}
		m *= 2
	}
}

// diagnosePoints bounds the loop points Adaptive gives Diagnose.
const diagnosePoints = 512

// richardson sets dst = polar((4 fine − coarse)/3).
func richardson(p *polarWork, dst, fine, coarse, tmp *Mat) {
	for i := range tmp.Data {
		tmp.Data[i] = (4*fine.Data[i] - coarse.Data[i]) / 3
	}
	p.factor(dst.Data, tmp.Data, dst.R)
}
