package optimize

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

// Reach names the set of gates that loops of a scheme on a control sphere
// can produce as holonomies, up to a global phase.
type Reach int

const (
	// ReachUnknown means the set was not decided; the search proceeds and
	// the achieved infidelity is the answer.
	ReachUnknown Reach = iota
	// ReachAll is every k×k unitary (up to a global phase). It is claimed
	// for complex loops of a star scheme (every channel joins its own lower
	// level to one shared upper level, as in the tripod) whose
	// computational levels form one degenerate dark cluster: the dark space
	// is the orthogonal complement of the bright state, and loops of it
	// generate all of U(k) (Duan, Cirac and Zoller, Science 292, 1695
	// (2001) for the tripod).
	ReachAll
	// ReachRotations is the real rotations SO(2) (up to a global phase):
	// with real drives the dark states are real vectors and the holonomy
	// of a loop on the sphere is a rotation exp(−iβσ_y) of the qubit pair.
	ReachRotations
	// ReachDiagonal is the diagonal gates: when the working subspace splits
	// into one-dimensional clusters the holonomy is Abelian,
	// diag(e^{iγ_1}, …, e^{iγ_k}), geometric phases only (Berry,
	// Proc. R. Soc. A 392, 45 (1984)).
	ReachDiagonal
	// ReachBlocks is block-diagonal gates over the degenerate clusters of
	// the working subspace (a necessary condition; which unitaries each
	// block reaches was not decided).
	ReachBlocks
)

// String describes the reachable set in words.
func (r Reach) String() string {
	switch r {
	case ReachAll:
		return "every unitary up to a global phase"
	case ReachRotations:
		return "real rotations exp(−iβσ_y) up to a global phase"
	case ReachDiagonal:
		return "diagonal gates (geometric phases only)"
	case ReachBlocks:
		return "block-diagonal gates over the degenerate clusters"
	}
	return "not decided"
}

// UnreachableError reports that the target gate lies outside what the
// scheme's loops can produce.
type UnreachableError struct {
	// Scheme is the scheme's name.
	Scheme string
	// Reach is the set the loops can produce.
	Reach Reach
	// BestInfidelity is the least infidelity any gate of that set has
	// with the target; Tolerance is what was asked for.
	BestInfidelity, Tolerance float64
	// Reason explains in words why the target is out of reach.
	Reason string
}

// Error returns the reason with the numbers.
func (e *UnreachableError) Error() string {
	return fmt.Sprintf("optimize: target gate cannot be made on scheme %q: %s; the closest reachable gate "+
		"has infidelity %.3g, above the requested %.3g", e.Scheme, e.Reason, e.BestInfidelity, e.Tolerance)
}

// Cluster is a set of computational levels that are degenerate at the base
// point: the holonomy acts within each cluster separately.
type Cluster struct {
	// Levels are indices into the scheme's Computational list.
	Levels []int
	// Energy is their common energy at the base point (unit scale).
	Energy float64
}

// BaseClusters checks the base point of sp on sc and returns the clusters
// of the working subspace there. It fails if a computational level is
// coupled to another level at the base point, or is degenerate with a
// level outside the computational set (no gap).
func BaseClusters(sc *holonomy.Scheme, sp *Sphere) ([]Cluster, error) {
	if err := sc.Validate(); err != nil {
		return nil, fmt.Errorf("optimize: %w", err)
	}
	n := sc.Dim()
	p := sc.NewPoint()
	sp.Point(sp.Base, p)
	h := holonomy.NewMat(n, n)
	sc.Hamiltonian(h, p)
	var scale float64
	for _, v := range h.Data {
		scale = math.Max(scale, cmplx.Abs(v))
	}
	tol := 1e-9 * math.Max(1, scale)
	isComp := make([]bool, n)
	for _, c := range sc.Computational {
		isComp[c] = true
	}
	for _, c := range sc.Computational {
		for j := 0; j < n; j++ {
			if j != c && cmplx.Abs(h.At(c, j)) > tol {
				return nil, fmt.Errorf("optimize: scheme %q: at the base point the computational level %q is coupled to %q, "+
					"so the working subspace does not start on the computational levels", sc.Name, sc.Levels[c].Name, sc.Levels[j].Name)
			}
		}
	}
	// The rest of the spectrum: eigenvalues of the non-computational block.
	var rest []int
	for j := 0; j < n; j++ {
		if !isComp[j] {
			rest = append(rest, j)
		}
	}
	m := len(rest)
	vals := make([]float64, m)
	if m > 0 {
		sub := holonomy.NewMat(m, m)
		for a, i := range rest {
			for b, j := range rest {
				sub.Set(a, b, h.At(i, j))
			}
		}
		holonomy.NewEigen(m).Factorize(sub, vals, holonomy.NewMat(m, m))
	}
	for _, c := range sc.Computational {
		e := real(h.At(c, c))
		for _, v := range vals {
			if math.Abs(v-e) <= tol {
				return nil, fmt.Errorf("optimize: scheme %q: at the base point the computational level %q (energy %.3g) "+
					"is degenerate with a state outside the computational levels; the working subspace has no gap", sc.Name, sc.Levels[c].Name, e)
			}
		}
	}
	var cl []Cluster
	for i, c := range sc.Computational {
		e := real(h.At(c, c))
		found := false
		for j := range cl {
			if math.Abs(cl[j].Energy-e) <= tol {
				cl[j].Levels = append(cl[j].Levels, i)
				found = true
				break
			}
		}
		if !found {
			cl = append(cl, Cluster{Levels: []int{i}, Energy: e})
		}
	}
	return cl, nil
}

// Reachability decides whether loops of sc on the sphere sp can produce
// the target (k×k, k = len(sc.Computational)) to within infidelity tol,
// before any search. It returns the reachable set and, when the target is
// out of it, an *UnreachableError saying why and how far. Errors of other
// kinds report a bad base point or target.
//
// The holonomy is block-diagonal over the clusters of the working subspace
// (BaseClusters), so a target with weight outside those blocks is refused
// for every scheme; with one-dimensional clusters (a spin-½ or any
// nondegenerate working subspace) only diagonal gates remain. Real drive
// spheres give only rotations exp(−iβσ_y) of a two-level dark cluster.
// Complex loops of a star scheme with one dark cluster reach every gate.
func Reachability(sc *holonomy.Scheme, sp *Sphere, target *holonomy.Mat, tol float64) (Reach, error) {
	k := len(sc.Computational)
	if err := checkTarget(target, k); err != nil {
		return ReachUnknown, err
	}
	cl, err := BaseClusters(sc, sp)
	if err != nil {
		return ReachUnknown, err
	}
	// Best fidelity over block-unitary gates: max |Tr(D†T)| = Σ_b ‖T_b‖_*
	// (nuclear norms of the diagonal blocks), and Tr(M†M) = k.
	var nuc float64
	for _, c := range cl {
		nuc += nuclearNorm(target, c.Levels)
	}
	blockInf := 1 - (float64(k)+nuc*nuc)/float64(k*(k+1))
	if blockInf < 0 {
		blockInf = 0
	}
	reach := ReachBlocks
	if len(cl) == k {
		reach = ReachDiagonal
	}
	if blockInf > tol {
		return reach, &UnreachableError{Scheme: sc.Name, Reach: reach, BestInfidelity: blockInf, Tolerance: tol,
			Reason: blockReason(sc, sp, cl, target)}
	}
	switch {
	case len(cl) == k && sp.Kind != RealDriveSphere:
		return ReachDiagonal, nil
	case len(cl) == 1 && sp.Kind == RealDriveSphere && k == 2:
		inf := rotationInfidelity(target)
		if inf > tol {
			return ReachRotations, &UnreachableError{Scheme: sc.Name, Reach: ReachRotations, BestInfidelity: inf, Tolerance: tol,
				Reason: "with real drives the dark states stay real, so a loop gives only a real rotation " +
					"exp(−iβσ_y) of the qubit pair (times a global phase); the target is not of that form"}
		}
		return ReachRotations, nil
	case len(cl) == 1 && sp.Kind == DriveSphere && isStar(sc):
		return ReachAll, nil
	}
	return ReachUnknown, nil
}

func blockReason(sc *holonomy.Scheme, sp *Sphere, cl []Cluster, target *holonomy.Mat) string {
	k := target.R
	in := make([]int, k)
	for b, c := range cl {
		for _, i := range c.Levels {
			in[i] = b
		}
	}
	var off float64
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			if in[i] != in[j] {
				v := target.At(i, j)
				off += real(v)*real(v) + imag(v)*imag(v)
			}
		}
	}
	off /= float64(k)
	var parts []string
	for _, c := range cl {
		var names []string
		for _, i := range c.Levels {
			names = append(names, sc.Levels[sc.Computational[i]].Name)
		}
		parts = append(parts, fmt.Sprintf("{%s} at %.3g", strings.Join(names, ", "), c.Energy))
	}
	what := "loop"
	if sp.Kind == FieldSphere {
		what = "field-direction loop"
	}
	if len(cl) == k {
		return fmt.Sprintf("the computational levels are non-degenerate at the base point (energies %s, unit scale), so a %s of %s gives only diagonal gates diag(e^{iγ_1}, …) of geometric phases; "+
			"the target has off-diagonal weight %.3g (share of Σ|T_ij|² off the diagonal)",
			strings.Join(parts, "; "), what, sc.Name, off)
	}
	return fmt.Sprintf("the working subspace splits at the base point into degenerate clusters %s, and the holonomy "+
		"does not mix clusters; the target has weight %.3g (share of Σ|T_ij|²) between clusters",
		strings.Join(parts, "; "), off)
}

// nuclearNorm returns the sum of singular values of the block of t on the
// given rows and columns.
func nuclearNorm(t *holonomy.Mat, idx []int) float64 {
	m := len(idx)
	if m == 1 {
		return cmplx.Abs(t.At(idx[0], idx[0]))
	}
	b := holonomy.NewMat(m, m)
	for a, i := range idx {
		for c, j := range idx {
			b.Set(a, c, t.At(i, j))
		}
	}
	g := holonomy.NewMat(m, m)
	holonomy.MulAH(g, b, b)
	vals := make([]float64, m)
	holonomy.NewEigen(m).Factorize(g, vals, holonomy.NewMat(m, m))
	var s float64
	for _, v := range vals {
		s += math.Sqrt(math.Max(0, v))
	}
	return s
}

// rotationInfidelity returns the least infidelity of e^{iα}R(β) against
// the 2×2 target t over α and β, with R(β) = cos β I + sin β G and
// G = [[0, −1], [1, 0]]: the maximum over β of |cos β t1 + sin β t2|²,
// t1 = Tr t, t2 = Tr(G†t) = t10 − t01, is the largest eigenvalue of a
// real symmetric 2×2 matrix.
func rotationInfidelity(t *holonomy.Mat) float64 {
	t1 := t.At(0, 0) + t.At(1, 1)
	t2 := t.At(1, 0) - t.At(0, 1)
	a := real(t1)*real(t1) + imag(t1)*imag(t1)
	b := real(t2)*real(t2) + imag(t2)*imag(t2)
	c := real(t1 * cmplx.Conj(t2))
	lmax := (a+b)/2 + math.Sqrt((a-b)*(a-b)/4+c*c)
	inf := 1 - (2+lmax)/6
	if inf < 0 {
		inf = 0
	}
	return inf
}

// isStar reports whether every channel of sc shares one common
// non-computational level and joins it to distinct other levels.
func isStar(sc *holonomy.Scheme) bool {
	count := make(map[int]int)
	for _, ch := range sc.Channels {
		count[ch.Lower]++
		count[ch.Upper]++
	}
	var hubs []int
	for l, c := range count {
		if c == len(sc.Channels) {
			hubs = append(hubs, l)
		}
	}
	sort.Ints(hubs)
	for _, hub := range hubs {
		comp := false
		for _, c := range sc.Computational {
			comp = comp || c == hub
		}
		if comp {
			continue
		}
		seen := make(map[int]bool)
		ok := true
		for _, ch := range sc.Channels {
			o := ch.Lower
			if o == hub {
				o = ch.Upper
			}
			if seen[o] {
				ok = false
			}
			seen[o] = true
		}
		if ok {
			return true
		}
	}
	return false
}
