package holonomy

import (
	"math"
	"math/bits"
)

// Closed forms for star-shaped coupling graphs.
//
// A Hamiltonian has the star form when every coupling touches one hub level
// h and all other levels (the leaves) share one diagonal entry δ_g:
//
//	H = δ_g I + Δ|h⟩⟨h| + Σ_k (b_k|k⟩⟨h| + b̄_k|h⟩⟨k|),  b_k = ⟨k|H|h⟩,
//
// with Δ = H_hh − δ_g. The tripod, the Λ scheme and every N-pod driven on
// two-photon resonance have it. The coupling graph is bipartite with one
// level on one side, so the Morris–Shore transformation (Morris and Shore,
// Phys. Rev. A 27, 906 (1983)) splits it into one two-level system — the hub
// and the bright state |B⟩ = Σ_k b_k|k⟩/β, β = ‖b‖ — and n − 2 dark states
// orthogonal to |B⟩ on the leaves, decoupled at energy δ_g. The spectrum of
// the Jordan–Wielandt form [[0, C†], [C, 0]] is ±σ_i(C) plus zeros (Golub
// and Van Loan, Matrix Computations, 4th ed., §8.6.1); here C = b is one
// column, so with Δ = δ_g = 0 the eigenvalues are −β, 0 (n − 2 times), +β,
// and β is the exact gap of the dark subspace.
//
// Both closed forms below need no eigensolver: the dark basis is the
// complement of one vector (a complex Householder reflector, Golub and Van
// Loan §5.1.13), and the exponential needs the 2×2 block only.

// schemeHub returns the level that every channel of s touches, or −1 if
// there is none (or s has fewer than three levels).
func schemeHub(s *Scheme) int {
	if len(s.Levels) < 3 || len(s.Channels) == 0 {
		return -1
	}
	for _, cand := range [2]int{s.Channels[0].Upper, s.Channels[0].Lower} {
		ok := true
		for _, c := range s.Channels {
			if c.Upper != cand && c.Lower != cand {
				ok = false
				break
			}
		}
		if ok {
			return cand
		}
	}
	return -1
}

// darkBasis writes an orthonormal basis of the dark subspace of the n×n
// star Hamiltonian with hub level hub, zero diagonal and couplings
// b_k = ⟨k|H|hub⟩ (b_hub = 0), into columns 1 … n−2 of the n×n matrix v, and
// returns the gap β = ‖b‖ to the bright pair ±β. For β = 0 the gap is 0 and
// v is left as it was. It does not allocate.
//
// The basis is the columns j ≠ p of the Householder reflector
// P = I − w w†/(1 + |u_p|), w = u + e^{i arg u_p} e_p, u = b/β, p the
// largest component of u: P is unitary and Hermitian and maps u to a
// multiple of e_p, so its other columns are orthonormal and orthogonal to
// u. Choosing the largest component keeps 1 + |u_p| ≥ 1 + 1/√(n−1).
func darkBasis(b *[MaxLevels]complex128, v []complex128, n, hub int) float64 {
	var b2, big float64
	p := -1
	for k := 0; k < n; k++ {
		m := sqmag(b[k])
		b2 += m
		if m > big {
			big, p = m, k
		}
	}
	if p < 0 {
		return 0
	}
	beta := math.Sqrt(b2)
	inv := 1 / beta
	up := math.Sqrt(big) * inv // |u_p|
	// w = u + α e_p with α = u_p/|u_p|: w_p = u_p (1 + 1/|u_p|).
	var w [MaxLevels]complex128
	for k := 0; k < n; k++ {
		w[k] = complex(real(b[k])*inv, imag(b[k])*inv)
	}
	w[p] *= complex(1+1/up, 0)
	f := 1 / (1 + up)
	col := 1
	for j := 0; j < n; j++ {
		if j == hub || j == p {
			continue
		}
		cw := complex(real(w[j])*f, -imag(w[j])*f) // conj(w_j)/(1+|u_p|)
		for r := 0; r < n; r++ {
			v[r*n+col] = -w[r] * cw
		}
		v[j*n+col]++
		col++
	}
	return beta
}

// starCouplings writes b_k = ⟨k|H(p)|hub⟩ of the star scheme s at point p
// into b (b_hub = 0), with the arithmetic of Scheme.Hamiltonian, and reports
// whether the diagonal of H(p) is zero (static plus controlled detunings).
func starCouplings(s *Scheme, p Point, hub int, b *[MaxLevels]complex128) bool {
	for k, l := range s.Levels {
		d := l.Detuning
		if p.Detuning != nil {
			d += p.Detuning[k]
		}
		if d != 0 {
			return false
		}
	}
	clear(b[:len(s.Levels)])
	for c, ch := range s.Channels {
		v := p.Drive[c] * complex(ch.Factor/2, 0)
		if ch.Lower == hub {
			b[ch.Upper] += v // ⟨upper|H|lower⟩ = v
		} else {
			b[ch.Lower] += conjg(v)
		}
	}
	return true
}

// starStep sets u ← exp(−i h dt) u when the Hermitian n×n matrix h (upper
// triangle and real diagonal read) has the star form, and reports whether it
// did. It does not allocate.
//
// In the basis (|h⟩, |B⟩) the generator minus δ_g is [[Δ, β], [β, 0]] with
// eigenvalues λ_a = Δ/2 + sgn(Δ)Ω and λ_b = −β²/λ_a, Ω = (Δ²/4 + β²)^{1/2}
// (λ_b in this form has no cancellation), and eigenvectors ∝ (λ, β). With
// E_λ = e^{−iλdt} − 1 = −2 sin(λdt/2)(sin(λdt/2) + i cos(λdt/2)) and
// C_hh, C_hB, C_BB = Σ_λ E_λ (λ², λ, 1)/(λ² + β²), every column becomes
//
//	u_h ← g (u_h + C_hh u_h + C_hB x),  u_k ← g (u_k + b_k (C_hB u_h + C_BB x)),
//
// where x = Σ_k b̄_k u_k and g = e^{−iδ_g dt}; the dark part is untouched. No
// term divides by β, so the form stays exact to rounding as β → 0.
func starStep(u *Mat, h []complex128, n int, dt float64) bool {
	hub := starHub(h, n)
	if hub < 0 {
		return false
	}
	// Leaves in order, their couplings b and conjugates.
	var lv [MaxLevels - 1]int
	var b, cb [MaxLevels - 1]complex128
	var b2 float64
	m := 0
	for k := 0; k < n; k++ {
		if k == hub {
			continue
		}
		var x complex128
		if k < hub {
			x = h[k*n+hub]
		} else {
			x = conjg(h[hub*n+k])
		}
		lv[m], b[m], cb[m] = k, x, conjg(x)
		b2 += sqmag(x)
		m++
	}
	leaf := 0
	if hub == 0 {
		leaf = 1
	}
	dg := real(h[leaf*n+leaf])
	delta := real(h[hub*n+hub]) - dg
	half := delta / 2
	om := math.Sqrt(half*half + b2)
	la := half + om
	if delta < 0 {
		la = half - om
	}
	var chh, chb, cbb complex128
	if la != 0 {
		lb := -b2 / la
		sa, ca := math.Sincos(la * dt / 2)
		sb, cb := -sa, ca // λ_b = −λ_a when Δ = 0
		if delta != 0 {
			sb, cb = math.Sincos(lb * dt / 2)
		}
		for i, l := range [2]float64{la, lb} {
			s, c := sa, ca
			if i == 1 {
				s, c = sb, cb
			}
			den := l*l + b2
			if den == 0 {
				continue
			}
			f := -2 * s / den
			e := complex(f*s, f*c)
			chh += e * complex(l*l, 0)
			chb += e * complex(l, 0)
			cbb += e
		}
	}
	cols, d := u.C, u.Data
	for j := 0; j < cols; j++ {
		y := d[hub*cols+j]
		var x complex128
		for i, k := range lv[:m] {
			x += cb[i] * d[k*cols+j]
		}
		t := chb*y + cbb*x
		for i, k := range lv[:m] {
			d[k*cols+j] += b[i] * t
		}
		d[hub*cols+j] = y + chh*y + chb*x
	}
	if dg != 0 {
		s, c := math.Sincos(dg * dt)
		g := complex(c, -s)
		for i := range d[:n*cols] {
			d[i] *= g
		}
	}
	return true
}

// starHub returns the hub of the Hermitian n×n matrix h (upper triangle and
// real diagonal read) if h has the star form with at least one coupling,
// else −1. The diagonal is read first: unless all its entries are equal,
// the hub must be the one level whose entry differs, and a matrix with
// two or more odd entries is refused after n comparisons. Otherwise one
// pass over the upper triangle keeps, as a bit set, the levels that every
// non-zero coupling touches.
func starHub(h []complex128, n int) int {
	d0 := real(h[0])
	hub, odd := -1, 0
	for i := 1; i < n; i++ {
		if real(h[i*n+i]) != d0 {
			hub = i
			odd++
		}
	}
	switch {
	case odd == n-1 && n > 2:
		// Level 0 is the odd one if the others agree.
		d1 := real(h[n+1])
		for i := 2; i < n; i++ {
			if real(h[i*n+i]) != d1 {
				return -1
			}
		}
		hub = 0
	case odd > 1:
		return -1
	}
	cand := uint32(1)<<n - 1
	if hub >= 0 {
		cand = 1 << hub
	}
	coupled := false
	for i := 0; i < n; i++ {
		row := h[i*n : i*n+n]
		for j := i + 1; j < n; j++ {
			if row[j] != 0 {
				cand &= 1<<i | 1<<j
				coupled = true
			}
		}
	}
	if !coupled || cand == 0 {
		return -1
	}
	return bits.TrailingZeros32(cand)
}
