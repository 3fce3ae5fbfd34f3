package holonomy

import (
	"fmt"
	"math"
)

// Propagator propagates state vectors or propagators through
// piecewise-constant (zero-order-hold) Hamiltonians exactly:
// U = Π_k exp(−i H_k Δt), with an optional non-Hermitian loss term.
//
// Each step is the matrix exponential of the constant generator, exact to
// rounding: Step (Hermitian H) uses the closed form of a star-shaped
// coupling graph where H has that form (Morris and Shore, Phys. Rev. A 27,
// 906 (1983); see starStep), else a diagonal Padé approximant of
// Exponential (Higham, SIAM J. Matrix Anal. Appl. 26, 1179 (2005)) for
// ordinary steps and the eigendecomposition H = VΛV† of Eigen for very long
// ones; StepDecay (non-Hermitian H − iΓ/2) uses Exponential with scaling and
// squaring. Nothing is approximated by splitting or time stepping: for a
// zero-order-hold waveform the product of steps is the exact propagator.
//
// A Propagator is a reusable workspace; its step methods do not allocate.
// It is not safe for concurrent use.
type Propagator struct {
	n    int
	eig  *Eigen
	exp  *Exponential
	vals []float64
	v    *Mat
	w    *Mat
	t    Mat          // n×c scratch; its Data is a prefix of tbuf
	tbuf []complex128 // storage for t
	h    *Mat
	gam  []float64
}

// NewPropagator returns a propagation workspace for n levels.
func NewPropagator(n int) *Propagator {
	return &Propagator{
		n:    n,
		eig:  NewEigen(n),
		exp:  NewExponential(n),
		vals: make([]float64, n),
		v:    NewMat(n, n),
		w:    NewMat(n, n),
		tbuf: make([]complex128, n*n),
		h:    NewMat(n, n),
		gam:  make([]float64, n),
	}
}

// Step sets u ← exp(−i h dt)·u for the Hermitian n×n matrix h (rad/s) and
// step dt (s). u is n×c: a propagator (c = n) or a set of c state vectors as
// columns. Only the upper triangle and the real diagonal of h are read.
//
// The exponential is exact to rounding by one of three methods, whichever
// is cheapest. When h has the star form of a Morris–Shore two-level system
// plus dark states (every coupling touches one level and the other levels
// share one diagonal entry: the tripod or Λ on two-photon resonance), a
// closed form costs O(n) per column (see starStep). Otherwise, for ‖h‖₁|dt| ≤ θ₁₃ = 5.37 (Higham 2005; every realistic
// zero-order-hold step) the diagonal Padé approximant of Exponential without
// squaring, which is unitary in exact arithmetic for the skew-Hermitian
// −ih dt; for larger steps the eigendecomposition h = VΛV† of Eigen,
// exp(−ih dt) = V e^{−iΛdt} V†, whose cost does not grow with ‖h‖dt.
// Step does not allocate (except once when u has more than n columns).
func (p *Propagator) Step(u, h *Mat, dt float64) {
	n := p.n
	if h.R != n || h.C != n || u.R != n {
		panic(fmt.Sprintf("holonomy: Propagator.Step: workspace %d, H %d×%d, u %d×%d", n, h.R, h.C, u.R, u.C))
	}
	hd := h.Data[:n*n]
	if starStep(u, hd, n, dt) {
		return
	}
	// B = h dt in full Hermitian storage, and the 1-norm bound of Exp.
	b := p.v.Data[:n*n]
	for i := 0; i < n; i++ {
		b[i*n+i] = complex(real(hd[i*n+i])*dt, 0)
		for j := i + 1; j < n; j++ {
			v := hd[i*n+j]
			x := complex(real(v)*dt, imag(v)*dt)
			b[i*n+j] = x
			b[j*n+i] = complex(real(x), -imag(x))
		}
	}
	t := p.tmpFor(u)
	if norm := norm1Cols(b, n); norm <= padeTheta[4] {
		// exp(−ih dt) ≈ M⁻¹N (N in p.w): u ← M⁻¹(N u), which for state
		// vectors (few columns) is cheaper than forming M⁻¹N and for
		// propagators costs the same.
		m, _ := p.exp.padeHermitian(p.w.Data, b, norm)
		Mul(t, p.w, u)
		luSolve(m, t.Data, n, u.C)
		u.Copy(t)
		return
	}
	p.stepEigen(u, h, dt, t)
}

// stepEigen is Step by eigendecomposition: u ← V e^{−iΛdt} V† u.
func (p *Propagator) stepEigen(u, h *Mat, dt float64, t *Mat) {
	p.eig.Factorize(h, p.vals, p.v)
	MulAH(t, p.v, u)
	c := u.C
	for i, l := range p.vals {
		s, co := math.Sincos(l * dt)
		ph := complex(co, -s)
		row := t.Data[i*c : i*c+c]
		for j := range row {
			row[j] *= ph
		}
	}
	Mul(u, p.v, t)
}

// StepDecay sets u ← exp(−i (h − iΓ/2) dt)·u, where Γ = diag(decay) holds
// the population loss rate of every level (1/s) and h is Hermitian (rad/s).
// An amplitude on level k then decays as e^{−Γ_k t/2}, its population as
// e^{−Γ_k t}; the lost norm is leakage out of the modelled levels
// (spontaneous emission to elsewhere). As in Step, only the upper triangle
// and the real diagonal of h are read. StepDecay does not allocate.
func (p *Propagator) StepDecay(u, h *Mat, decay []float64, dt float64) {
	n := p.n
	if h.R != n || h.C != n || u.R != n || len(decay) != n {
		panic(fmt.Sprintf("holonomy: Propagator.StepDecay: workspace %d, H %d×%d, u %d×%d, %d decay rates", n, h.R, h.C, u.R, u.C, len(decay)))
	}
	a := p.w
	hermitianTimesMinusI(a.Data, h.Data, n, dt)
	for k, g := range decay {
		a.Data[k*n+k] -= complex(g*dt/2, 0)
	}
	t := p.tmpFor(u)
	if n > 1 {
		m, nn, s, ok := p.exp.pade(a.Data)
		if ok && s == 0 {
			// exp ≈ M⁻¹N without squaring: u ← M⁻¹(N u).
			num := Mat{R: n, C: n, Data: nn}
			Mul(t, &num, u)
			luSolve(m, t.Data, n, u.C)
			u.Copy(t)
			return
		}
	}
	p.exp.Exp(a, a)
	t.Copy(u)
	Mul(u, a, t)
}

// hermitianTimesMinusI sets a = −i h dt for the Hermitian n×n matrix h
// given by its upper triangle and real diagonal.
func hermitianTimesMinusI(a, h []complex128, n int, dt float64) {
	a, h = a[:n*n], h[:n*n]
	for i := 0; i < n; i++ {
		a[i*n+i] = complex(0, -real(h[i*n+i])*dt)
		for j := i + 1; j < n; j++ {
			v := h[i*n+j]
			x := complex(imag(v)*dt, -real(v)*dt) // −i h_ij dt
			a[i*n+j] = x
			a[j*n+i] = complex(-real(x), imag(x)) // −conj(x)
		}
	}
}

// tmpFor returns an n×c scratch matrix shaped like u; it allocates only
// when u has more columns than any u before (and n).
func (p *Propagator) tmpFor(u *Mat) *Mat {
	k := p.n * u.C
	if k > cap(p.tbuf) {
		p.tbuf = make([]complex128, k)
	}
	p.t = Mat{R: p.n, C: u.C, Data: p.tbuf[:k]}
	return &p.t
}

// Sequence multiplies u from the left by the propagator of the
// zero-order-hold sequence points (each held for dt seconds) on scheme s:
// u ← U_N ⋯ U_1·u with U_k = exp(−i(H(points[k]) − iΓ/2)dt), where H is
// s.Hamiltonian and Γ_k = s.Levels[k].Decay. Without decay every step is
// unitary (Step); with decay it is StepDecay. Start from u = I to obtain the
// full propagator; Block extracts its computational block. Sequence does not
// allocate.
func (p *Propagator) Sequence(u *Mat, s *Scheme, points []Point, dt float64) {
	n := p.n
	if s.Dim() != n {
		panic(fmt.Sprintf("holonomy: Propagator.Sequence: workspace %d, scheme %d levels", n, s.Dim()))
	}
	lossy := false
	for k, l := range s.Levels {
		p.gam[k] = l.Decay
		if l.Decay != 0 {
			lossy = true
		}
	}
	for _, pt := range points {
		s.Hamiltonian(p.h, pt)
		if lossy {
			p.StepDecay(u, p.h, p.gam, dt)
		} else {
			p.Step(u, p.h, dt)
		}
	}
}

// PropagateZOH returns the full n×n propagator U = U_N ⋯ U_1 of the
// zero-order-hold sequence points, each held for dt seconds, on scheme s,
// including the level decay of s as non-Hermitian loss (see
// Propagator.Sequence). It allocates its workspace and result.
func PropagateZOH(s *Scheme, points []Point, dt float64) *Mat {
	n := s.Dim()
	u := Identity(n)
	NewPropagator(n).Sequence(u, s, points, dt)
	return u
}

// Block sets dst (d×d) to the block of u on the given levels:
// dst_ab = u_{levels[a], levels[b]}. With levels = the computational levels
// of a scheme and u a full propagator it gives the computational block P U P.
func Block(dst, u *Mat, levels []int) {
	d := len(levels)
	if dst.R != d || dst.C != d {
		panic(fmt.Sprintf("holonomy: Block: %d levels into %d×%d", d, dst.R, dst.C))
	}
	for a, i := range levels {
		for b, j := range levels {
			dst.Data[a*d+b] = u.At(i, j)
		}
	}
}
