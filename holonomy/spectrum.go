package holonomy

import (
	"fmt"
	"math"
)

// Spectrum is a workspace for the eigendecomposition of H along a path in
// control space and for the adiabaticity ratio between the working states
// and the rest (AdiabaticRatio). It is the one home of that ratio: the
// timing, the verification and the loop check all use it. It does not
// allocate after NewSpectrum.
type Spectrum struct {
	n, k int
	comp []int
	eig  *Eigen
	vals []float64
	v    *Mat // eigenvectors in columns, ascending eigenvalues
	tmp  *Mat
	d    *Mat // V† ∂H V

	// work holds the working clusters as half-open ranges [lo, hi) of
	// sorted eigenvalue indices.
	work  [][2]int
	group [][2]int // scratch for ChooseWorking
	taken []bool
}

// NewSpectrum returns a workspace for the Hamiltonians of s.
func NewSpectrum(s *Scheme) *Spectrum {
	n := s.Dim()
	return &Spectrum{
		n: n, k: len(s.Computational), comp: s.Computational,
		eig:   NewEigen(n),
		vals:  make([]float64, n),
		v:     NewMat(n, n),
		tmp:   NewMat(n, n),
		d:     NewMat(n, n),
		work:  make([][2]int, 0, n),
		group: make([][2]int, 0, n),
		taken: make([]bool, n),
	}
}

// Factorize diagonalises h.
func (sp *Spectrum) Factorize(h *Mat) { sp.eig.Factorize(h, sp.vals, sp.v) }

// Values returns the eigenvalues of the last Factorize in ascending order
// (the workspace's slice; do not modify it).
func (sp *Spectrum) Values() []float64 { return sp.vals }

// Working returns the working clusters as half-open ranges [lo, hi) of
// indices into Values, in ascending order (the workspace's slice).
func (sp *Spectrum) Working() [][2]int { return sp.work }

// SetWorking sets the working clusters, e.g. to follow the clusters chosen
// at one point by their places in the spectrum.
func (sp *Spectrum) SetWorking(w [][2]int) { sp.work = append(sp.work[:0], w...) }

// InEigenbasis returns V†·dh·V for the eigenvectors V of the last
// Factorize, in the workspace (overwritten by the next call).
func (sp *Spectrum) InEigenbasis(dh *Mat) *Mat {
	MulAH(sp.tmp, sp.v, dh)
	Mul(sp.d, sp.tmp, sp.v)
	return sp.d
}

// Tol returns the degeneracy and gap tolerance: 1e-6 × spectral radius,
// the default of the holonomy engine.
func (sp *Spectrum) Tol() float64 {
	return 1e-6 * math.Max(math.Abs(sp.vals[0]), math.Abs(sp.vals[sp.n-1]))
}

// ChooseWorking picks the working clusters at the current point: eigenvalues
// closer than tol are grouped, every group is weighted by the mean weight
// of its eigenvectors on the computational levels, and the heaviest groups
// are taken until they hold k states. It fails when that cannot be done
// with whole groups or when the chosen states have less than half their
// weight on the computational levels.
func (sp *Spectrum) ChooseWorking() error {
	n, tol := sp.n, sp.Tol()
	sp.group = sp.group[:0]
	lo := 0
	for i := 1; i <= n; i++ {
		if i == n || sp.vals[i]-sp.vals[i-1] > tol {
			sp.group = append(sp.group, [2]int{lo, i})
			lo = i
		}
	}
	for i := range sp.taken {
		sp.taken[i] = false
	}
	sp.work = sp.work[:0]
	count := 0
	var wsum float64
	for count < sp.k {
		best, bw := -1, -1.0
		for g, r := range sp.group {
			if sp.taken[g] {
				continue
			}
			if w := sp.weight(r); w > bw {
				best, bw = g, w
			}
		}
		r := sp.group[best]
		if count+r[1]-r[0] > sp.k {
			return fmt.Errorf("the computational levels are degenerate with other states (a group of %d degenerate states where %d are needed): %w", r[1]-r[0], sp.k-count, ErrNoSubspace)
		}
		sp.taken[best] = true
		sp.work = append(sp.work, r)
		count += r[1] - r[0]
		wsum += bw * float64(r[1]-r[0])
	}
	if wsum/float64(sp.k) < 0.5 {
		return fmt.Errorf("the eigenstates closest to the computational levels have only %.2f of their weight on them: %w", wsum/float64(sp.k), ErrNoSubspace)
	}
	// Keep the clusters in ascending order.
	for i := 1; i < len(sp.work); i++ {
		for j := i; j > 0 && sp.work[j][0] < sp.work[j-1][0]; j-- {
			sp.work[j], sp.work[j-1] = sp.work[j-1], sp.work[j]
		}
	}
	return nil
}

// weight returns the mean weight on the computational levels of the
// eigenvectors in r.
func (sp *Spectrum) weight(r [2]int) float64 {
	var w float64
	for i := r[0]; i < r[1]; i++ {
		for _, c := range sp.comp {
			x := sp.v.Data[c*sp.n+i]
			w += real(x)*real(x) + imag(x)*imag(x)
		}
	}
	return w / float64(r[1]-r[0])
}

// AdiabaticRatio returns, for the current eigendecomposition and working
// clusters, the adiabaticity ratio κ = max over working clusters C and states j outside C of
// ‖P_C ∂H|j⟩‖/(E_C − E_j)², and the smallest gap |E_C − E_j|. Couplings
// below thr are treated as zero. When a state j outside C is within the
// degeneracy tolerance of C while coupled to it, κ is +Inf.
func (sp *Spectrum) AdiabaticRatio(dh *Mat, thr float64) (kappa, gap float64) {
	sp.InEigenbasis(dh)
	n, tol := sp.n, sp.Tol()
	gap = math.Inf(1)
	for _, r := range sp.work {
		var ec float64
		for i := r[0]; i < r[1]; i++ {
			ec += sp.vals[i]
		}
		ec /= float64(r[1] - r[0])
		for j := 0; j < n; j++ {
			if j >= r[0] && j < r[1] {
				continue
			}
			de := math.Abs(ec - sp.vals[j])
			if de < gap {
				gap = de
			}
			var num float64
			for m := r[0]; m < r[1]; m++ {
				x := sp.d.Data[m*n+j]
				num += real(x)*real(x) + imag(x)*imag(x)
			}
			num = math.Sqrt(num)
			if num <= thr {
				continue
			}
			if de <= tol {
				kappa = math.Inf(1)
				continue
			}
			if q := num / (de * de); q > kappa {
				kappa = q
			}
		}
	}
	return kappa, gap
}
