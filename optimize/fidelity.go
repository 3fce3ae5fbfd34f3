package optimize

import (
	"fmt"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
)

// Infidelity returns 1 − F for the k×k matrix u (a holonomy or the
// computational block of a propagator) against the k×k unitary target, with
// the average gate fidelity of Pedersen, Møller and Mølmer,
// Phys. Lett. A 367, 47 (2007):
//
//	F = (Tr(M†M) + |Tr M|²) / (k(k+1)),  M = target†·u.
//
// A global phase of u does not change F. It does not allocate.
func Infidelity(u, target *holonomy.Mat) float64 {
	if u.R != u.C || target.R != target.C || u.R != target.R {
		panic(fmt.Sprintf("optimize: Infidelity: %d×%d against %d×%d", u.R, u.C, target.R, target.C))
	}
	k := u.R
	// For unitary target, Tr(M†M) = ‖u‖²_F and Tr M = Σ conj(T_ij) u_ij.
	var tr complex128
	var norm float64
	for i, v := range u.Data {
		tr += cmplx.Conj(target.Data[i]) * v
		norm += real(v)*real(v) + imag(v)*imag(v)
	}
	f := (norm + real(tr)*real(tr) + imag(tr)*imag(tr)) / float64(k*(k+1))
	return 1 - f
}

// unitarityError returns ‖t†t − I‖_F.
func unitarityError(t *holonomy.Mat) float64 { return holonomy.UnitarityError(t) }

// checkTarget reports whether target is a k×k unitary.
func checkTarget(target *holonomy.Mat, k int) error {
	if target == nil {
		return fmt.Errorf("optimize: no target gate given")
	}
	if target.R != k || target.C != k {
		return fmt.Errorf("optimize: target gate is %d×%d but the scheme has %d computational levels", target.R, target.C, k)
	}
	if e := unitarityError(target); e > 1e-9 {
		return fmt.Errorf("optimize: target gate is not unitary: ‖T†T − I‖ = %.3g (tolerance 1e-9)", e)
	}
	return nil
}
