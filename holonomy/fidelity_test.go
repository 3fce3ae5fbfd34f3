package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// dynEmbed returns the n×n unitary acting as g on the levels comp and as
// the identity on the others.
func dynEmbed(n int, comp []int, g *Mat) *Mat {
	u := Identity(n)
	for a, i := range comp {
		for b, j := range comp {
			u.Set(i, j, g.At(a, b))
		}
	}
	return u
}

// nielsenFidelity evaluates Nielsen's formula for the average fidelity of
// the unitary channel ρ ↦ UρU† against the target V (Nielsen, Phys. Lett. A
// 303, 249 (2002)):
//
//	F̄ = [Σ_j Tr(V U_j† V† 𝓔(U_j)) + d²] / (d²(d+1)),
//
// with {U_j} a unitary operator basis, Tr(U_j†U_k) = d δ_jk. The basis used
// is the Weyl (clock and shift) basis X^a Z^b, which for d = 2 is the Pauli
// basis up to phases.
func nielsenFidelity(u, v *Mat) float64 {
	d := u.R
	omega := cmplx.Exp(complex(0, 2*math.Pi/float64(d)))
	var sum complex128
	for a := 0; a < d; a++ {
		for b := 0; b < d; b++ {
			w := NewMat(d, d) // X^a Z^b: |k⟩ ↦ ω^{bk}|k+a⟩
			for k := 0; k < d; k++ {
				w.Set((k+a)%d, k, cmplx.Pow(omega, complex(float64(b*k), 0)))
			}
			e := dynNaiveMul(dynNaiveMul(u, w), dynAdjoint(u))                             // 𝓔(U_j)
			x := dynNaiveMul(dynNaiveMul(dynNaiveMul(v, dynAdjoint(w)), dynAdjoint(v)), e) // V U_j† V† 𝓔(U_j)
			sum += Trace(x)
		}
	}
	fd := float64(d)
	return (real(sum) + fd*fd) / (fd * fd * (fd + 1))
}

// TestGateFidelityNielsen: for unitary gates on the computational subspace
// GateFidelity equals Nielsen's operator-basis formula, for d = 2, 3, 4,
// random gates and targets, embedded in larger level schemes.
func TestGateFidelityNielsen(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	for _, d := range []int{2, 3, 4} {
		for rep := 0; rep < 10; rep++ {
			u := dynRandUnitary(rng, d)
			v := dynRandUnitary(rng, d)
			if rep == 0 {
				v = u.Clone() // perfect gate
			}
			want := nielsenFidelity(u, v)
			comp := []int{1, 3, 4, 0}[:d]
			full := dynEmbed(6, comp, u)
			// A global phase must not matter.
			for i := range full.Data {
				full.Data[i] *= cmplx.Exp(0.7i)
			}
			fid, leak := GateFidelity(full, comp, v)
			if math.Abs(fid-want) > 1e-13 || math.Abs(leak) > 1e-13 {
				t.Errorf("d=%d rep %d: F = %.15f leak %g, Nielsen %.15f", d, rep, fid, leak, want)
			}
			if rep == 0 && math.Abs(fid-1) > 1e-13 {
				t.Errorf("d=%d: perfect gate has F = %.15f", d, fid)
			}
		}
	}
}

// designStates returns a complex projective 2-design on C^d: for d = 2 the
// six Pauli eigenstates, for prime d the d(d+1) states of a complete set of
// mutually unbiased bases (standard basis and (1/√d)Σ_k ω^{ak²+bk}|k⟩),
// which form a 2-design (Klappenecker and Rötteler, Proc. IEEE ISIT 2005,
// p. 1740 (from memory)). Averages of |⟨ψ|M|ψ⟩|² over them equal the Haar
// average over pure states.
func designStates(d int) [][]complex128 {
	var out [][]complex128
	for k := 0; k < d; k++ {
		s := make([]complex128, d)
		s[k] = 1
		out = append(out, s)
	}
	omega := 2 * math.Pi / float64(d)
	for a := 0; a < d; a++ {
		for b := 0; b < d; b++ {
			s := make([]complex128, d)
			for k := 0; k < d; k++ {
				if d == 2 {
					// (|0⟩ + i^a (−1)^b |1⟩)/√2: the X (a = 0) and Y (a = 1) bases.
					s[k] = cmplx.Pow(1i, complex(float64(a*k), 0)) * complex(math.Pow(-1, float64(b*k))/math.Sqrt2, 0)
					continue
				}
				s[k] = cmplx.Exp(complex(0, omega*float64(a*k*k+b*k))) / complex(math.Sqrt(float64(d)), 0)
			}
			out = append(out, s)
		}
	}
	return out
}

// TestGateFidelityLeakyDesign: with leakage, F = ∫dψ |⟨ψ|M|ψ⟩|² over pure
// computational states, M = P U_target† U P (Pedersen, Møller and Mølmer,
// Phys. Lett. A 367, 47 (2007)); the integral is evaluated exactly
// as the average over a state 2-design. Random unitaries on 5 levels mix the
// computational levels with the rest.
func TestGateFidelityLeakyDesign(t *testing.T) {
	rng := rand.New(rand.NewPCG(53, 54))
	for _, d := range []int{2, 3} {
		states := designStates(d)
		if d == 2 && len(states) != 6 || d == 3 && len(states) != 12 {
			t.Fatalf("d=%d: %d design states", d, len(states))
		}
		for rep := 0; rep < 10; rep++ {
			u := dynRandUnitary(rng, 5)
			target := dynRandUnitary(rng, d)
			comp := []int{0, 2, 4}[:d]
			if rep%3 == 0 { // mostly inside the subspace: a small leak
				u = dynEmbed(5, comp, target)
				p := NewPropagator(5)
				p.Step(u, dynRandHermitian(rng, 5, 0.1), 1)
			}
			var avg, norm float64
			for _, psi := range states {
				// ⟨ψ|T† B|ψ⟩ with B the computational block of u.
				var amp complex128
				for a := 0; a < d; a++ {
					for b := 0; b < d; b++ {
						var tb complex128 // (T†B)_ab
						for c := 0; c < d; c++ {
							tb += cmplx.Conj(target.At(c, a)) * u.At(comp[c], comp[b])
						}
						amp += cmplx.Conj(psi[a]) * tb * psi[b]
					}
				}
				avg += dynSqAbs(amp)
			}
			avg /= float64(len(states))
			for a := 0; a < d; a++ {
				for b := 0; b < d; b++ {
					norm += dynSqAbs(u.At(comp[a], comp[b]))
				}
			}
			fid, leak := GateFidelity(u, comp, target)
			if math.Abs(fid-avg) > 1e-13 {
				t.Errorf("d=%d rep %d: F = %.15f, 2-design average %.15f", d, rep, fid, avg)
			}
			if math.Abs(leak-(1-norm/float64(d))) > 1e-13 || leak < -1e-15 {
				t.Errorf("d=%d rep %d: leak %g", d, rep, leak)
			}
		}
	}
}

// TestGateFidelityWorked: worked examples. A swap of computational level 1
// with a non-computational level leaves B = diag(1, 0): Tr(B†B) = 1,
// |Tr M|² = 1, so F = (1 + 1)/6 = 1/3 and leakage 1/2. An X gate measured
// against the identity: Tr M = 0, F = 2/6 = 1/3, no leakage.
func TestGateFidelityWorked(t *testing.T) {
	swap := NewMat(3, 3)
	swap.Set(0, 0, 1)
	swap.Set(1, 2, 1)
	swap.Set(2, 1, 1)
	fid, leak := GateFidelity(swap, []int{0, 1}, Identity(2))
	if math.Abs(fid-1.0/3) > 1e-15 || math.Abs(leak-0.5) > 1e-15 {
		t.Errorf("swap out: F = %g, leak %g; want 1/3, 1/2", fid, leak)
	}
	x := NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	fid, leak = GateFidelity(x, []int{0, 1}, Identity(2))
	if math.Abs(fid-1.0/3) > 1e-15 || leak != 0 {
		t.Errorf("X vs identity: F = %g, leak %g; want 1/3, 0", fid, leak)
	}
	if a := testing.AllocsPerRun(10, func() { GateFidelity(x, []int{0, 1}, x) }); a != 0 {
		t.Errorf("GateFidelity allocates %v", a)
	}
}

func ExampleGateFidelity() {
	// A perfect X gate, then an X gate that leaves 10% of the population of
	// each qubit level in an auxiliary level a (levels: 0, 1, a).
	x := NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	fid, leak := GateFidelity(NewMatFrom(2, 2, []complex128{0, 1, 1, 0}), []int{0, 1}, x)
	fmt.Printf("perfect: F = %.4f, leakage = %.4f\n", fid, leak)
	c, s := complex(math.Sqrt(0.9), 0), complex(math.Sqrt(0.1), 0)
	u := NewMatFrom(3, 3, []complex128{
		0, c, s,
		c, 0, s,
		s, s, 0,
	})
	fid, leak = GateFidelity(u, []int{0, 1}, x)
	fmt.Printf("leaky:   F = %.4f, leakage = %.4f\n", fid, leak)
	// Output:
	// perfect: F = 1.0000, leakage = 0.0000
	// leaky:   F = 0.9000, leakage = 0.1000
}
