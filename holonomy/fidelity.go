package holonomy

import (
	"fmt"
	"math/cmplx"
)

// GateFidelity returns the average gate fidelity, with leakage, of the full
// n×n propagator u as an implementation of the d×d target gate on the
// computational levels comp (d = len(comp)), and the leakage:
//
//	F = (Tr(M†M) + |Tr M|²) / (d(d+1)),  M = P U_target† U P,
//	leak = 1 − Tr(M†M)/d,
//
// where P projects on the computational levels (Pedersen, Møller and
// Mølmer, Phys. Lett. A 367, 47 (2007)).
// F is the fidelity averaged over pure initial states of the computational
// subspace. For a u that maps the computational subspace unitarily onto
// itself, Tr(M†M) = d and F reduces to Nielsen's (d + |Tr M|²)/(d(d+1))
// (Nielsen, Phys. Lett. A 303, 249 (2002)). A global phase of u does not
// matter. u may be non-unitary (lossy propagation); the target should be
// unitary. GateFidelity does not allocate.
func GateFidelity(u *Mat, comp []int, target *Mat) (fid, leak float64) {
	d := len(comp)
	if u.R != u.C || target.R != d || target.C != d || d == 0 {
		panic(fmt.Sprintf("holonomy: GateFidelity: U %d×%d, %d computational levels, target %d×%d", u.R, u.C, d, target.R, target.C))
	}
	for _, i := range comp {
		if i < 0 || i >= u.R {
			panic(fmt.Sprintf("holonomy: GateFidelity: computational level %d of %d", i, u.R))
		}
	}
	// With B = P U P (d×d): Tr(M†M) = Tr(B†B) since U_target is unitary,
	// and Tr M = Σ_ab conj(T_ba) B_ba.
	var norm2 float64
	var tr complex128
	for a, i := range comp {
		for b, j := range comp {
			x := u.At(i, j)
			norm2 += real(x)*real(x) + imag(x)*imag(x)
			tr += cconj(target.Data[a*d+b]) * x
		}
	}
	fd := float64(d)
	at := cmplx.Abs(tr)
	fid = (norm2 + at*at) / (fd * (fd + 1))
	leak = 1 - norm2/fd
	return fid, leak
}

// BlockInfidelity returns 1 − F for the k×k matrix u (a holonomy or the
// computational block of a propagator) against the k×k unitary target, with
// the average gate fidelity of Pedersen, Møller and Mølmer,
// Phys. Lett. A 367, 47 (2007):
//
//	F = (Tr(M†M) + |Tr M|²) / (k(k+1)),  M = target†·u.
//
// It is GateFidelity with every level computational, written out for the
// search loops. A global phase of u does not change F. It does not allocate.
func BlockInfidelity(u, target *Mat) float64 {
	if u.R != u.C || target.R != target.C || u.R != target.R {
		panic(fmt.Sprintf("holonomy: BlockInfidelity: %d×%d against %d×%d", u.R, u.C, target.R, target.C))
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
