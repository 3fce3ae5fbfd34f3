package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// spectrum is a workspace for the eigendecomposition of H and for the
// adiabatic couplings between the working states and the rest. It does not
// allocate after construction.
type spectrum struct {
	n, k int
	comp []int
	eig  *holonomy.Eigen
	vals []float64
	v    *holonomy.Mat // eigenvectors in columns, ascending eigenvalues
	tmp  *holonomy.Mat
	d    *holonomy.Mat // V† ∂H V

	// work holds the working clusters as half-open ranges [lo, hi) of
	// sorted eigenvalue indices.
	work  [][2]int
	group [][2]int // scratch for choose
	taken []bool
}

func newSpectrum(s *holonomy.Scheme) *spectrum {
	n := s.Dim()
	return &spectrum{
		n: n, k: len(s.Computational), comp: s.Computational,
		eig:   holonomy.NewEigen(n),
		vals:  make([]float64, n),
		v:     holonomy.NewMat(n, n),
		tmp:   holonomy.NewMat(n, n),
		d:     holonomy.NewMat(n, n),
		work:  make([][2]int, 0, n),
		group: make([][2]int, 0, n),
		taken: make([]bool, n),
	}
}

// factor diagonalises h.
func (sp *spectrum) factor(h *holonomy.Mat) { sp.eig.Factorize(h, sp.vals, sp.v) }

// tol returns the degeneracy and gap tolerance: 1e-6 × spectral radius,
// the default of the holonomy engine.
func (sp *spectrum) tol() float64 {
	return 1e-6 * math.Max(math.Abs(sp.vals[0]), math.Abs(sp.vals[sp.n-1]))
}

// choose picks the working clusters at the current point: eigenvalues
// closer than tol are grouped, every group is weighted by the mean weight
// of its eigenvectors on the computational levels, and the heaviest groups
// are taken until they hold k states. It fails when that cannot be done
// with whole groups or when the chosen states have less than half their
// weight on the computational levels.
func (sp *spectrum) choose() error {
	n, tol := sp.n, sp.tol()
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
			return fmt.Errorf("the computational levels are degenerate with other states (a group of %d degenerate states where %d are needed): %w", r[1]-r[0], sp.k-count, holonomy.ErrNoSubspace)
		}
		sp.taken[best] = true
		sp.work = append(sp.work, r)
		count += r[1] - r[0]
		wsum += bw * float64(r[1]-r[0])
	}
	if wsum/float64(sp.k) < 0.5 {
		return fmt.Errorf("the eigenstates closest to the computational levels have only %.2f of their weight on them: %w", wsum/float64(sp.k), holonomy.ErrNoSubspace)
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
func (sp *spectrum) weight(r [2]int) float64 {
	var w float64
	for i := r[0]; i < r[1]; i++ {
		for _, c := range sp.comp {
			x := sp.v.Data[c*sp.n+i]
			w += real(x)*real(x) + imag(x)*imag(x)
		}
	}
	return w / float64(r[1]-r[0])
}

// coupling returns, for the current eigendecomposition and working
// clusters, κ = max over working clusters C and states j outside C of
// ‖P_C ∂H|j⟩‖/(E_C − E_j)², and the smallest gap |E_C − E_j|. Couplings
// below thr are treated as zero. When a state j outside C is within the
// degeneracy tolerance of C while coupled to it, κ is +Inf.
func (sp *spectrum) coupling(dh *holonomy.Mat, thr float64) (kappa, gap float64) {
	holonomy.MulAH(sp.tmp, sp.v, dh)
	holonomy.Mul(sp.d, sp.tmp, sp.v)
	n, tol := sp.n, sp.tol()
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
