// Package holonomytest provides the matrix helpers that tests of every
// loopgate package share: Haar-random qubit unitaries and the distance
// between two gates up to a global phase.
//
// It is a plain (not internal) package because the tests that use it sit
// in several top-level packages (holonomy, optimize, design, waveform) and
// the repository has no shared top-level folder an internal package could
// live under; like net/http/httptest it is meant for tests only.
package holonomytest

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"github.com/loopgate/loopgate/holonomy"
)

// RandomQubitUnitary returns a Haar-random 2×2 unitary (Mezzadri, Notices
// AMS 54, 592 (2007): orthonormalise a complex Gaussian matrix; the phases
// Gram–Schmidt leaves on the diagonal of R are already those the Haar
// measure needs, since the column norms are real and positive).
func RandomQubitUnitary(rng *rand.Rand) *holonomy.Mat {
	g := func() complex128 { return complex(rng.NormFloat64(), rng.NormFloat64()) }
	a, b, c, d := g(), g(), g(), g()
	// Gram–Schmidt on the columns (a, c), (b, d).
	n1 := math.Sqrt(real(a*cmplx.Conj(a) + c*cmplx.Conj(c)))
	a, c = a/complex(n1, 0), c/complex(n1, 0)
	p := cmplx.Conj(a)*b + cmplx.Conj(c)*d
	b, d = b-p*a, d-p*c
	n2 := math.Sqrt(real(b*cmplx.Conj(b) + d*cmplx.Conj(d)))
	b, d = b/complex(n2, 0), d/complex(n2, 0)
	return holonomy.NewMatFrom(2, 2, []complex128{a, b, c, d})
}

// PhaseDistance returns min over global phases χ of ‖a − e^{iχ}b‖_F: the
// distance between two gates that differ only by a global phase is zero.
// The minimum is at e^{iχ} = ⟨b, a⟩/|⟨b, a⟩| with ⟨b, a⟩ = Tr(b†a).
func PhaseDistance(a, b *holonomy.Mat) float64 {
	var ip complex128
	for i, v := range a.Data {
		ip += cmplx.Conj(b.Data[i]) * v
	}
	ph := complex(1, 0)
	if cmplx.Abs(ip) > 0 {
		ph = ip / complex(cmplx.Abs(ip), 0)
	}
	var s float64
	for i, v := range a.Data {
		d := v - ph*b.Data[i]
		s += real(d)*real(d) + imag(d)*imag(d)
	}
	return math.Sqrt(s)
}
