package holonomy

import (
	"fmt"
	"math"
)

// Surface is a two-parameter family of control points: it writes into p the
// control point at (u, v) ∈ [0, 1]². The point arrives zeroed and shaped for
// the scheme. The boundary of the unit square, walked counter-clockwise
// ((0,0) → (1,0) → (1,1) → (0,1) → (0,0)), is the loop the surface spans;
// with this orientation Stokes' theorem reads γ = ∬ F_uv du dv, where γ is the
// (summed) Berry phase of that loop. The surface is only evaluated inside
// the unit square.
type Surface func(u, v float64, p Point)

// Flux computes the Berry curvature of the working subspace over a surface in
// control space, its flux through the surface, and the Chern number of a
// closed surface.
//
// The working subspace is chosen at the corner (u, v) = (0, 0) exactly as
// Wilson chooses it at the base point of a loop, and is the same set of
// eigenvalue positions everywhere on the surface; the gap to the rest of the
// spectrum is checked at every point evaluated (*GapError).
//
// Curvature uses the sum-over-states formula of Berry, Proc. R. Soc. A 392,
// 45 (1984), eq. (10) (equation number from memory), summed over the
// working subspace S, which gives the trace of the non-Abelian curvature
// (Wilczek and Zee, Phys. Rev. Lett. 52, 2111 (1984)) and, for one state,
// the Abelian one:
//
//	Tr F_uv = −2 Im Σ_{a∈S} Σ_{m∉S} ⟨a|∂_u H|m⟩⟨m|∂_v H|a⟩ / (E_m − E_a)²,
//
// with A = i⟨n|∇n⟩ and F = ∂_u A_v − ∂_v A_u as in the package
// documentation. ∂H is taken by fourth-order central differences of the
// surface with step Step (one-sided near the edges of the unit square). Terms between two clusters of the working subspace
// cancel in the trace, so only the rest of the spectrum enters.
//
// Lattice and Chern use the lattice field strength of Fukui, Hatsugai and
// Suzuki, J. Phys. Soc. Jpn. 74, 1674 (2005): link variables
// det(V_b† V_a)/|det(V_b† V_a)| between neighbouring grid points, and for
// each plaquette the principal argument of the product of its four links,
// which is gauge invariant and, summed over a closed surface, exactly 2π
// times an integer. Their convention, A = ⟨n|∇n⟩ and c = (1/2πi)∑F, gives
// the opposite sign to the Chern number here, (1/2π)∬Tr F.
//
// A Flux is a reusable workspace; it is not safe for concurrent use.
type Flux struct {
	// GapTol is the gap tolerance in rad/s, as for Wilson.GapTol.
	GapTol float64
	// Step is the step in u and v of the fourth-order finite differences
	// of Curvature (zero means 2.5e-4).
	Step float64

	s    *Scheme
	err  error
	tr   *tracker
	p    Point
	hu   *Mat // ∂_u H
	hv   *Mat // ∂_v H
	htmp *Mat
	x, y []complex128 // n×n scratch
	ov   []complex128 // k×k overlap
	lu   []complex128 // k×k LU scratch
}

// NewFlux returns a curvature workspace for the scheme s. If s is not valid,
// the error of s.Validate is returned by every later call.
func NewFlux(s *Scheme) *Flux {
	f := &Flux{s: s}
	if err := s.Validate(); err != nil {
		f.err = fmt.Errorf("holonomy: invalid level scheme %q: %w", s.Name, err)
		return f
	}
	n, k := len(s.Levels), len(s.Computational)
	f.tr = newTracker(s)
	f.p = s.NewPoint()
	f.hu, f.hv, f.htmp = NewMat(n, n), NewMat(n, n), NewMat(n, n)
	f.x, f.y = make([]complex128, n*n), make([]complex128, n*n)
	f.ov, f.lu = make([]complex128, k*k), make([]complex128, k*k)
	return f
}

// eval writes H(surf(u, v)) into h.
func (f *Flux) eval(surf Surface, u, v float64, h *Mat) error {
	clear(f.p.Drive)
	clear(f.p.Detuning)
	surf(u, v, f.p)
	if err := f.s.CheckPoint(f.p); err != nil {
		return fmt.Errorf("holonomy: surface point (u, v) = (%.6g, %.6g): %w", u, v, err)
	}
	f.s.Hamiltonian(h, f.p)
	return nil
}

// prepare chooses the working subspace at (0, 0).
func (f *Flux) prepare(surf Surface) error {
	if f.err != nil {
		return f.err
	}
	if err := f.eval(surf, 0, 0, f.tr.h); err != nil {
		return err
	}
	f.tr.cold()
	return f.tr.choose(f.GapTol, "surface corner (u, v) = (0, 0)")
}

// at factorises H at (u, v) and checks the gap.
func (f *Flux) at(surf Surface, u, v float64) error {
	if err := f.eval(surf, u, v, f.tr.h); err != nil {
		return err
	}
	f.tr.cold()
	if g := f.tr.gap(); g < f.tr.gapTol {
		return &GapError{S: u, V: v, Gap: g, Tol: f.tr.gapTol}
	}
	return nil
}

// Curvature returns Tr F_uv of the working subspace at (u, v), in radians
// per unit area of the (u, v) square.
func (f *Flux) Curvature(surf Surface, u, v float64) (float64, error) {
	if err := f.prepare(surf); err != nil {
		return 0, err
	}
	return f.curvature(surf, u, v)
}

func (f *Flux) curvature(surf Surface, u, v float64) (float64, error) {
	if err := f.deriv(surf, u, v, true, f.hu); err != nil {
		return 0, err
	}
	if err := f.deriv(surf, u, v, false, f.hv); err != nil {
		return 0, err
	}
	if err := f.at(surf, u, v); err != nil {
		return 0, err
	}
	tr := f.tr
	n := tr.n
	vm := tr.v.Data
	// x = V† Hu V, y = V† Hv V.
	f.project(f.x, f.hu.Data, vm, n)
	f.project(f.y, f.hv.Data, vm, n)
	in := func(m int) bool {
		for _, c := range tr.cl {
			if m >= c.lo && m < c.lo+c.d {
				return true
			}
		}
		return false
	}
	var sum float64
	for _, c := range tr.cl {
		for a := c.lo; a < c.lo+c.d; a++ {
			for m := 0; m < n; m++ {
				if in(m) {
					continue
				}
				de := tr.vals[m] - tr.vals[a]
				sum += imag(f.x[a*n+m]*f.y[m*n+a]) / (de * de)
			}
		}
	}
	return -2 * sum, nil
}

// project sets dst = V† h V.
func (f *Flux) project(dst, h, v []complex128, n int) {
	t := f.htmp.Data
	mulSmall(t, h, v, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			var s complex128
			for r := 0; r < n; r++ {
				s += conjg(v[r*n+i]) * t[r*n+j]
			}
			dst[i*n+j] = s
		}
	}
}

// deriv writes ∂H/∂u (alongU) or ∂H/∂v at (u, v) into dst by fourth-order
// differences, central inside the unit square and one-sided within two steps
// of its edges.
func (f *Flux) deriv(surf Surface, u, v float64, alongU bool, dst *Mat) error {
	d := f.Step
	if d == 0 {
		d = 2.5e-4
	}
	x := v
	if alongU {
		x = u
	}
	var offs []float64
	var coef []float64
	switch {
	case x-2*d >= 0 && x+2*d <= 1:
		offs, coef = central4[:], central4c[:]
	case x-2*d < 0:
		offs, coef = forward4[:], forward4c[:]
	default:
		offs, coef = backward4[:], backward4c[:]
	}
	h := f.htmp
	dst.Zero()
	for i, o := range offs {
		a, b := u, v
		if alongU {
			a = x + o*d
		} else {
			b = x + o*d
		}
		if err := f.eval(surf, a, b, h); err != nil {
			return err
		}
		c := complex(coef[i]/(12*d), 0)
		for l, e := range h.Data {
			dst.Data[l] += c * e
		}
	}
	return nil
}

// Fourth-order difference stencils for the first derivative (offsets in
// steps, coefficients × 12 step).
var (
	central4   = [4]float64{-2, -1, 1, 2}
	central4c  = [4]float64{1, -8, 8, -1}
	forward4   = [5]float64{0, 1, 2, 3, 4}
	forward4c  = [5]float64{-25, 48, -36, 16, -3}
	backward4  = [5]float64{0, -1, -2, -3, -4}
	backward4c = [5]float64{25, -48, 36, -16, 3}
)

// Integral returns the flux ∬ Tr F_uv du dv of the working subspace through
// the surface by tensor-product Gauss–Legendre quadrature with order nodes
// in each direction (order from 1 to 200). For a smooth surface whose
// boundary loop has no corners the error falls faster than any power of
// 1/order; by Stokes' theorem the result is the summed Berry phase of the
// boundary loop (the argument of det U of Wilson.Loop), not reduced mod 2π.
func (f *Flux) Integral(surf Surface, order int) (float64, error) {
	if order < 1 || order > 200 {
		return 0, fmt.Errorf("holonomy: flux integral: quadrature order %d outside 1 to 200", order)
	}
	if err := f.prepare(surf); err != nil {
		return 0, err
	}
	x, w := gaussLegendre(order)
	var sum float64
	for i, u := range x {
		for j, v := range x {
			c, err := f.curvature(surf, u, v)
			if err != nil {
				return 0, err
			}
			sum += w[i] * w[j] * c
		}
	}
	return sum, nil
}

// gaussLegendre returns the nodes and weights of n-point Gauss–Legendre
// quadrature on [0, 1], found by Newton's method on the three-term
// recurrence of the Legendre polynomials (Abramowitz and Stegun, Handbook of
// Mathematical Functions, 1964, 25.4.29; from memory).
func gaussLegendre(n int) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	for i := 0; i < (n+1)/2; i++ {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for it := 0; it < 100; it++ {
			p0, p1 := 1.0, 0.0
			for j := 1; j <= n; j++ {
				p0, p1 = ((2*float64(j)-1)*z*p0-(float64(j)-1)*p1)/float64(j), p0
			}
			dp = float64(n) * (z*p0 - p1) / (z*z - 1)
			dz := p0 / dp
			z -= dz
			if math.Abs(dz) < 1e-16 {
				break
			}
		}
		wt := 2 / ((1 - z*z) * dp * dp)
		x[i], x[n-1-i] = (1-z)/2, (1+z)/2
		w[i], w[n-1-i] = wt/2, wt/2
	}
	return x, w
}

// Lattice returns the flux of the working subspace through the surface as
// the sum of the lattice field strengths of Fukui, Hatsugai and Suzuki on a
// grid of nu × nv plaquettes (u = i/nu, v = j/nv, edges included). On a
// fine enough grid it equals Integral up to O(1/nu² + 1/nv²); it is exactly
// the argument of det U of the boundary loop sampled on the grid, modulo 2π.
// A plaquette with a field strength above π/2, or a link whose overlap has a
// singular value below 1/√2, is an error (grid too coarse).
func (f *Flux) Lattice(surf Surface, nu, nv int) (float64, error) {
	return f.lattice(surf, nu, nv, false)
}

// Chern returns the Chern number (1/2π)∬ Tr F of the working subspace over a
// closed surface: v is periodic (v = 0 and v = 1 are the same points) and
// the edges u = 0 and u = 1 are either single points (a sphere, as in
// polar angle u and azimuth v) or the same loop (a torus). It uses the
// lattice field strength of Fukui, Hatsugai and Suzuki on nu × nv
// plaquettes, whose sum over a closed surface is an integer multiple of 2π
// for any grid and the Chern number once the grid resolves the curvature.
// It is an error if the sum is not within 1e-6 of a multiple of 2π (the
// surface is not closed) or the grid is too coarse (see Lattice).
func (f *Flux) Chern(surf Surface, nu, nv int) (int, error) {
	sum, err := f.lattice(surf, nu, nv, true)
	if err != nil {
		return 0, err
	}
	c := sum / (2 * math.Pi)
	r := math.Round(c)
	if math.Abs(c-r) > 1e-6 {
		return 0, fmt.Errorf("holonomy: Chern number: the lattice flux is %.9g × 2π, not a whole multiple: the surface is not closed (v must be periodic, and the edges u = 0 and u = 1 points or the same loop)", c)
	}
	return int(r), nil
}

func (f *Flux) lattice(surf Surface, nu, nv int, periodicV bool) (float64, error) {
	if nu < 1 || nv < 2 {
		return 0, fmt.Errorf("holonomy: lattice flux: need at least 1 × 2 plaquettes, have %d × %d", nu, nv)
	}
	if err := f.prepare(surf); err != nil {
		return 0, err
	}
	tr := f.tr
	n, k := tr.n, tr.k
	cols := nv + 1
	if periodicV {
		cols = nv
	}
	// Two rows of chosen eigenvectors, n×k each (column-major by state).
	prev := make([]complex128, cols*n*k)
	cur := make([]complex128, cols*n*k)
	store := func(row []complex128, j int) {
		b := row[j*n*k : (j+1)*n*k]
		for _, c := range tr.cl {
			for a := 0; a < c.d; a++ {
				for r := 0; r < n; r++ {
					b[(c.off+a)*n+r] = tr.v.Data[r*n+c.lo+a]
				}
			}
		}
	}
	// link returns det(to† from)/|det(to† from)| and the smallest squared
	// singular value of the overlap.
	link := func(to, from []complex128) (complex128, float64) {
		for a := 0; a < k; a++ {
			for b := 0; b < k; b++ {
				var s complex128
				for r := 0; r < n; r++ {
					s += conjg(to[a*n+r]) * from[b*n+r]
				}
				f.ov[a*k+b] = s
			}
		}
		s2 := tr.pol.minSV2(f.ov, k)
		d := detSmall(f.ov, f.lu, k)
		if d == 0 {
			return 0, 0
		}
		return d / complex(math.Sqrt(sqmag(d)), 0), s2
	}
	vec := func(row []complex128, j int) []complex128 {
		if periodicV {
			j %= nv
		}
		return row[j*n*k : (j+1)*n*k]
	}
	fill := func(row []complex128, i int) error {
		u := float64(i) / float64(nu)
		for j := 0; j < cols; j++ {
			if err := f.at(surf, u, float64(j)/float64(nv)); err != nil {
				return err
			}
			store(row, j)
		}
		return nil
	}
	if err := fill(prev, 0); err != nil {
		return 0, err
	}
	var sum float64
	for i := 0; i < nu; i++ {
		if err := fill(cur, i+1); err != nil {
			return 0, err
		}
		for j := 0; j < nv; j++ {
			where := func() string {
				return fmt.Sprintf("near (u, v) = (%.4g, %.4g)", float64(i)/float64(nu), float64(j)/float64(nv))
			}
			c0, c1, c2, c3 := vec(prev, j), vec(cur, j), vec(cur, j+1), vec(prev, j+1)
			l01, s01 := link(c1, c0) // 0 → 1
			l12, s12 := link(c2, c1) // 1 → 2
			l23, s23 := link(c3, c2) // 2 → 3
			l30, s30 := link(c0, c3) // 3 → 0
			if s2 := min(s01, s12, s23, s30); s2 < minOverlap2 {
				return 0, fmt.Errorf("holonomy: lattice flux: the working subspace turns by %.0f° across a link %s (more than 45°): use a finer grid, or an eigenvalue crosses the working subspace there",
					math.Acos(math.Sqrt(s2))*180/math.Pi, where())
			}
			w := l01 * l12 * l23 * l30
			ph := math.Atan2(imag(w), real(w))
			if math.Abs(ph) > math.Pi/2 {
				return 0, fmt.Errorf("holonomy: lattice flux: the plaquette %s carries a field strength of %.3g rad (more than π/2): use a finer grid", where(), ph)
			}
			sum += ph
		}
		prev, cur = cur, prev
	}
	return sum, nil
}

// detSmall returns the determinant of the d×d row-major matrix m by LU
// decomposition with partial pivoting in the scratch lu.
func detSmall(m, lu []complex128, d int) complex128 {
	copy(lu, m[:d*d])
	det := complex(1, 0)
	for c := 0; c < d; c++ {
		p, best := c, sqmag(lu[c*d+c])
		for r := c + 1; r < d; r++ {
			if a := sqmag(lu[r*d+c]); a > best {
				p, best = r, a
			}
		}
		if best == 0 {
			return 0
		}
		if p != c {
			for j := 0; j < d; j++ {
				lu[c*d+j], lu[p*d+j] = lu[p*d+j], lu[c*d+j]
			}
			det = -det
		}
		piv := lu[c*d+c]
		det *= piv
		for r := c + 1; r < d; r++ {
			l := lu[r*d+c] / piv
			for j := c + 1; j < d; j++ {
				lu[r*d+j] -= l * lu[c*d+j]
			}
		}
	}
	return det
}
