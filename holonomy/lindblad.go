package holonomy

import (
	"fmt"
	"math"
)

// Lindblad propagates density matrices, or whole quantum channels as
// superoperators, through piecewise-constant (zero-order-hold) Hamiltonians
// with level decay and pure dephasing, exactly per step: ρ' = exp(𝓛Δt) ρ.
//
// # Master equation
//
// With ħ = 1 the generator is
//
//	𝓛ρ = −i[H, ρ] − ½{Γ, ρ} + Σ_k D[L_k]ρ,   D[L]ρ = LρL† − ½{L†L, ρ},
//
// where Γ = Σ_k Γ_k|k⟩⟨k| holds the population loss rates Decay[k]: the
// population of level k leaks out of the modelled levels at rate Γ_k and is
// not returned (trace-decreasing, like spontaneous emission to levels outside
// the scheme). For pure states this is the non-Hermitian evolution
// ψ̇ = −i(H − iΓ/2)ψ of Propagator.StepDecay, so the two agree when there is
// no dephasing. Pure dephasing of level k at rate γ_k = Dephasing[k] uses the
// collapse operator L_k = √(2γ_k)|k⟩⟨k|. It leaves populations alone and
// makes a coherence ρ_ij (i ≠ j) decay at γ_i + γ_j; in particular a qubit
// coherence ρ_01 with only one of its two levels dephased decays as
// e^{−γ_φ t}, the usual pure-dephasing rate γ_φ = 1/T_φ (equivalently
// L = √(γ_φ/2) σ_z on the qubit). In components,
//
//	𝓛ρ = K ρ + ρ K† + D∘ρ + Σ_jumps r ρ_kk |m⟩⟨m|,
//	K = −i(H − iΓ/2),  D_ij = −(γ_i + γ_j)(1 − δ_ij),
//
// with ∘ the element-wise product. With every Jump's rates summing to
// Decay[From] the evolution is trace preserving.
//
// # Superoperators
//
// A superoperator S is an n²×n² matrix acting on ρ stored row-major:
// vec(ρ)[i·n + j] = ρ_ij, so column k·n + l of S is vec(𝓔(|k⟩⟨l|)). The
// identity channel is the n²×n² identity.
//
// # Algorithm
//
// exp(𝓛Δt) is applied to an operator X by its Taylor series with scaling
// (Al-Mohy and Higham, SIAM J. Sci. Comput. 33, 488 (2011), whose idea is
// followed with a simpler, rigorous stopping rule): with θ ≥ ‖𝓛Δt‖ bounded
// from the entries of K and D (in the 1-norm of vec X over its real and
// imaginary parts), Δt is split into s = ⌈θ⌉ sub-steps so that each has
// ‖𝓛δt‖ ≤ 1, and the series of each sub-step is summed until a term T_k
// falls below 2^−53 times the partial sum. Since ‖T_{k+j}‖ ≤ ‖T_k‖/(k+1)^j
// the neglected tail is below that term, so every step is exact to rounding.
// Only n×n products are formed, O(n³) per term, so a density-matrix step
// costs O(n³) rather than the O(n⁶) of an n²×n² exponential.
//
// A Lindblad is a reusable workspace; its step methods do not allocate. It is
// not safe for concurrent use.
type Lindblad struct {
	// Decay holds the population loss rate Γ_k ≥ 0 of every level in 1/s
	// (nil: none). It enters as −½{Γ, ρ}.
	Decay []float64
	// Dephasing holds the pure dephasing rate γ_k ≥ 0 of every level in
	// 1/s (nil: none), collapse operator √(2γ_k)|k⟩⟨k|.
	Dephasing []float64
	// Jumps holds the decay channels that return population to a
	// modelled level (nil: none; all decay leaves the model).
	Jumps []Jump

	n                     int
	k                     []complex128 // K δt for the current sub-step length
	d                     []float64    // D δt
	x, acc, term, next, t []complex128
	h                     *Mat
	subs                  int
	jr                    []float64 // Jumps[i].Rate δt for the current sub-step
}

// Jump is one decay channel of a Lindblad that returns population to a
// modelled level: collapse operator √Rate |To⟩⟨From|.
type Jump struct {
	// From and To are level indices; they must differ.
	From, To int
	// Rate is the transition rate in 1/s (≥ 0). It is part of, not in
	// addition to, Decay[From].
	Rate float64
}

// NewLindblad returns a workspace for n levels with the given decay and
// dephasing rates (1/s, one per level, or nil for none). The slices are
// copied into the Decay and Dephasing fields.
func NewLindblad(n int, decay, dephasing []float64) *Lindblad {
	if n <= 0 {
		panic("holonomy: NewLindblad: n must be positive")
	}
	if (decay != nil && len(decay) != n) || (dephasing != nil && len(dephasing) != n) {
		panic(fmt.Sprintf("holonomy: NewLindblad: %d levels, %d decay and %d dephasing rates", n, len(decay), len(dephasing)))
	}
	l := &Lindblad{n: n, k: make([]complex128, n*n), d: make([]float64, n*n), h: NewMat(n, n)}
	if decay != nil {
		l.Decay = append([]float64(nil), decay...)
	}
	if dephasing != nil {
		l.Dephasing = append([]float64(nil), dephasing...)
	}
	for _, p := range []*[]complex128{&l.x, &l.acc, &l.term, &l.next, &l.t} {
		*p = make([]complex128, n*n)
	}
	return l
}

// rates returns Γ_k and γ_k, zero for nil fields (lengths are checked by
// check).
func (l *Lindblad) rates(k int) (gamma, phi float64) {
	if l.Decay != nil {
		gamma = l.Decay[k]
	}
	if l.Dephasing != nil {
		phi = l.Dephasing[k]
	}
	return gamma, phi
}

// check panics on shape mismatches and on negative or NaN rates, which the
// callers must have rejected as input errors.
func (l *Lindblad) check(h *Mat, what string) {
	n := l.n
	if h.R != n || h.C != n || (l.Decay != nil && len(l.Decay) != n) || (l.Dephasing != nil && len(l.Dephasing) != n) {
		panic(fmt.Sprintf("holonomy: Lindblad.%s: %d levels, H %d×%d, %d decay and %d dephasing rates", what, n, h.R, h.C, len(l.Decay), len(l.Dephasing)))
	}
	for k := 0; k < n; k++ {
		if g, p := l.rates(k); !(g >= 0 && p >= 0) {
			panic(fmt.Sprintf("holonomy: Lindblad.%s: level %d has decay %g and dephasing %g; rates must be non-negative", what, k, g, p))
		}
	}
	for _, j := range l.Jumps {
		if j.From < 0 || j.From >= n || j.To < 0 || j.To >= n || j.From == j.To || !(j.Rate >= 0) || math.IsInf(j.Rate, 0) {
			panic(fmt.Sprintf("holonomy: Lindblad.%s: jump %d→%d at rate %g in %d levels", what, j.From, j.To, j.Rate, n))
		}
	}
}

// Generator writes into dst the n²×n² matrix of 𝓛 for the Hermitian
// Hamiltonian h (rad/s; upper triangle and real diagonal read), in the
// row-major vectorisation described on Lindblad:
//
//	𝓛_{(ij),(kl)} = K_ik δ_jl + δ_ik conj(K_jl) + D_ij δ_ik δ_jl.
//
// It is meant for analysis and tests; the step methods never form it.
func (l *Lindblad) Generator(dst, h *Mat) {
	l.check(h, "Generator")
	n := l.n
	if dst.R != n*n || dst.C != n*n {
		panic(fmt.Sprintf("holonomy: Lindblad.Generator: dst %d×%d, want %d×%d", dst.R, dst.C, n*n, n*n))
	}
	l.prepare(h, 1, false)
	dst.Zero()
	N := n * n
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			row := (i*n + j) * N
			for k := 0; k < n; k++ {
				dst.Data[row+k*n+j] += l.k[i*n+k]
			}
			for m := 0; m < n; m++ {
				dst.Data[row+i*n+m] += cconj(l.k[j*n+m])
			}
			dst.Data[row+i*n+j] += complex(l.d[i*n+j], 0)
		}
	}
	for _, j := range l.Jumps {
		dst.Data[(j.To*n+j.To)*N+j.From*n+j.From] += complex(j.Rate, 0)
	}
}

// prepare fills K δt and D δt for a step dt, split into sub-steps when split
// is set so that each has ‖𝓛δt‖ ≤ 1 (see Lindblad).
func (l *Lindblad) prepare(h *Mat, dt float64, split bool) {
	n := l.n
	hermitianTimesMinusI(l.k, h.Data, n, dt)
	var dmax float64
	for i := 0; i < n; i++ {
		gi, pi := l.rates(i)
		for j := 0; j < n; j++ {
			if i != j {
				_, pj := l.rates(j)
				x := -(pi + pj) * dt
				l.d[i*n+j] = x
				dmax = max(dmax, math.Abs(x))
			} else {
				l.d[i*n+j] = 0
			}
		}
		l.k[i*n+i] -= complex(gi*dt/2, 0)
	}
	l.subs = 1
	// The jumps' 1-norm: the largest total rate out of one level.
	var jmax float64
	if len(l.Jumps) > 0 {
		if cap(l.jr) < len(l.Jumps) {
			l.jr = make([]float64, len(l.Jumps)) // once per Jumps length
		}
		l.jr = l.jr[:len(l.Jumps)]
		for i, j := range l.Jumps {
			l.jr[i] = j.Rate * dt
			var out float64
			for _, o := range l.Jumps {
				if o.From == j.From {
					out += o.Rate * math.Abs(dt)
				}
			}
			jmax = max(jmax, out)
		}
	} else {
		l.jr = l.jr[:0]
	}
	if !split {
		return
	}
	theta := 2*norm1Cols(l.k, n) + dmax + jmax
	if theta > 1 {
		s := math.Ceil(theta)
		if s > 1<<30 || math.IsNaN(s) {
			panic(fmt.Sprintf("holonomy: Lindblad: ‖𝓛Δt‖ ≈ %g is not a usable step", theta))
		}
		l.subs = int(s)
		f := 1 / s
		for i := range l.k {
			l.k[i] *= complex(f, 0)
			l.d[i] *= f
		}
		for i := range l.jr {
			l.jr[i] *= f
		}
	}
}

// apply sets x ← exp(𝓛Δt) x for the prepared step (x is n×n, row-major).
func (l *Lindblad) apply(x []complex128) {
	n := l.n
	const maxTerms = 60
	acc, term, next, t := l.acc, l.term, l.next, l.t
	for s := 0; s < l.subs; s++ {
		copy(acc, x)
		copy(term, x)
		for k := 1; k <= maxTerms; k++ {
			// next = (K·term + term·K† + D∘term)/k.
			mulSq(next, l.k, term, n)
			mulSqBH(t, term, l.k, n)
			for i, j := range l.Jumps {
				t[j.To*n+j.To] += rscale(l.jr[i], term[j.From*n+j.From])
			}
			f := 1 / float64(k)
			var tn, an float64
			for i, v := range next {
				v = rscale(f, v+t[i]+rscale(l.d[i], term[i]))
				next[i] = v
				a := acc[i] + v
				acc[i] = a
				tn += math.Abs(real(v)) + math.Abs(imag(v))
				an += math.Abs(real(a)) + math.Abs(imag(a))
			}
			term, next = next, term
			if tn <= 0x1p-53*an {
				break
			}
		}
		copy(x, acc)
	}
}

// Step sets ρ ← exp(𝓛 dt) ρ for the Hermitian Hamiltonian h (rad/s; only
// its upper triangle and real diagonal are read) held for dt seconds. rho is n×n (any operator, not only a density
// matrix). Step does not allocate.
func (l *Lindblad) Step(rho, h *Mat, dt float64) {
	l.check(h, "Step")
	if rho.R != l.n || rho.C != l.n {
		panic(fmt.Sprintf("holonomy: Lindblad.Step: ρ is %d×%d, want %d×%d", rho.R, rho.C, l.n, l.n))
	}
	l.prepare(h, dt, true)
	l.apply(rho.Data)
}

// StepSuper sets S ← exp(𝓛 dt)·S for an n²×n² superoperator S (see
// Lindblad for the vectorisation): the channel of one zero-order-hold step
// composed after S. StepSuper does not allocate.
func (l *Lindblad) StepSuper(s, h *Mat, dt float64) {
	l.check(h, "StepSuper")
	n := l.n
	N := n * n
	if s.R != N || s.C != N {
		panic(fmt.Sprintf("holonomy: Lindblad.StepSuper: S is %d×%d, want %d×%d", s.R, s.C, N, N))
	}
	l.prepare(h, dt, true)
	x := l.x
	for c := 0; c < N; c++ {
		for r := range x {
			x[r] = s.Data[r*N+c]
		}
		l.apply(x)
		for r, v := range x {
			s.Data[r*N+c] = v
		}
	}
}

// Sequence sets S ← S_N ⋯ S_1·S for the zero-order-hold sequence points on
// scheme sch, each held for dt seconds, where S_k = exp(𝓛_k dt) with the
// Hamiltonian sch.Hamiltonian(points[k]) and the rates of l (the level decay
// fields of sch are not read: pass them to NewLindblad). Start from the
// n²×n² identity to obtain the channel of the whole sequence, then use
// ChannelFidelity. Sequence does not allocate.
func (l *Lindblad) Sequence(s *Mat, sch *Scheme, points []Point, dt float64) {
	n := l.n
	if sch.Dim() != n {
		panic(fmt.Sprintf("holonomy: Lindblad.Sequence: %d levels, scheme has %d", n, sch.Dim()))
	}
	for _, p := range points {
		sch.Hamiltonian(l.h, p)
		l.StepSuper(s, l.h, dt)
	}
}

// ChannelFidelity returns the average gate fidelity, with leakage, of the
// channel 𝓔 with n²×n² superoperator s (vectorisation as on Lindblad) as an
// implementation of the d×d unitary target on the computational levels comp,
// and the leakage. For a Kraus decomposition 𝓔(ρ) = Σ_k A_k ρ A_k† and
// M_k = P U_t† A_k P it is the Kraus form of Pedersen, Møller and Mølmer,
// Phys. Lett. A 367, 47 (2007):
//
//	F = Σ_k [Tr(M_k†M_k) + |Tr M_k|²] / (d(d+1)),  leak = 1 − Σ_k Tr(M_k†M_k)/d,
//
// which is linear in 𝓔 and so needs no Kraus operators. Writing |a⟩ for the
// computational levels and B_k = P A_k P,
//
//	Σ_k |Tr M_k|² = Σ_k Σ_ab ⟨a|U_t†B_k|a⟩⟨b|B_k†U_t|b⟩
//	             = Σ_ab ⟨a| U_t† 𝓔(|a⟩⟨b|) U_t |b⟩,
//	Σ_k Tr(M_k†M_k) = Σ_k Tr(B_k†B_k) = Σ_ab Σ_k |⟨b|A_k|a⟩|²
//	             = Σ_ab ⟨b| 𝓔(|a⟩⟨a|) |b⟩,
//
// using U_t U_t† = 1 on the subspace; 𝓔(|a⟩⟨b|) is column a·n + b of s.
// For a unitary channel ρ ↦ UρU† it equals GateFidelity(U, comp, target).
// ChannelFidelity does not allocate.
func ChannelFidelity(s *Mat, n int, comp []int, target *Mat) (fid, leak float64) {
	d := len(comp)
	N := n * n
	if s.R != N || s.C != N || target.R != d || target.C != d || d == 0 {
		panic(fmt.Sprintf("holonomy: ChannelFidelity: S %d×%d for %d levels, %d computational levels, target %d×%d", s.R, s.C, n, d, target.R, target.C))
	}
	for _, i := range comp {
		if i < 0 || i >= n {
			panic(fmt.Sprintf("holonomy: ChannelFidelity: computational level %d of %d", i, n))
		}
	}
	T := target.Data
	var norm2 float64
	var tr2 complex128
	for a, ia := range comp {
		for b, ib := range comp {
			col := ia*n + ib
			// Σ_cd conj(T_ca) 𝓔(|a⟩⟨b|)_cd T_db.
			for c, ic := range comp {
				tca := cconj(T[c*d+a])
				for e, ie := range comp {
					tr2 += tca * s.Data[(ic*n+ie)*N+col] * T[e*d+b]
				}
			}
			norm2 += real(s.Data[(ib*n+ib)*N+ia*n+ia])
		}
	}
	fd := float64(d)
	fid = (norm2 + real(tr2)) / (fd * (fd + 1))
	leak = 1 - norm2/fd
	return fid, leak
}
