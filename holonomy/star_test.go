package holonomy

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// starRandScheme returns a random star scheme of n levels: every level but
// the hub coupled to the hub by one channel of random orientation and
// factor (one level by two channels, which add), the computational levels
// all leaves but the last, which is the auxiliary level driven at the base
// point.
func starRandScheme(rng *rand.Rand, n int) (s *Scheme, hub, aux int) {
	s = &Scheme{Name: "star"}
	for i := 0; i < n; i++ {
		s.Levels = append(s.Levels, Level{Name: string(rune('a' + i))})
	}
	hub = rng.IntN(n)
	for k := 0; k < n; k++ {
		if k == hub {
			continue
		}
		f := 0.5 + 1.5*rng.Float64()
		ch := Channel{Name: "c" + s.Levels[k].Name, Lower: k, Upper: hub, Factor: f}
		if rng.IntN(2) == 0 {
			ch.Lower, ch.Upper = hub, k
		}
		s.Channels = append(s.Channels, ch)
		aux = k
	}
	c := s.Channels[0]
	c.Name += "2"
	c.Factor = 0.3
	s.Channels = append(s.Channels, c)
	for k := 0; k < n; k++ {
		if k != hub && k != aux {
			s.Computational = append(s.Computational, k)
		}
	}
	return s, hub, aux
}

// starRandLoop returns a smooth closed loop on the star scheme s: the
// channel to aux is driven at Ω(1 + 0.3·f(s)), the others at 0.8Ω·f(s),
// with random complex two-harmonic f vanishing at s = 0, so the
// computational levels are dark at the base point and the bright coupling
// stays above 0.4Ω.
func starRandLoop(rng *rand.Rand, s *Scheme, aux int) Loop {
	type harm struct{ a, b complex128 }
	coef := make([][2]harm, len(s.Channels))
	for c := range coef {
		for m := range coef[c] {
			coef[c][m] = harm{complex(rng.NormFloat64(), rng.NormFloat64()) / 3, complex(rng.NormFloat64(), rng.NormFloat64()) / 3}
		}
	}
	return func(x float64, p Point) {
		for c, ch := range s.Channels {
			var f complex128
			for m, h := range coef[c] {
				t := 2 * math.Pi * float64(m+1) * x
				f += h.a*complex(math.Sin(t), 0) + h.b*complex(1-math.Cos(t), 0)
			}
			if ch.Lower == aux || ch.Upper == aux {
				p.Drive[c] = complex(geoOmega, 0) * (1 + 0.3*f/complex(math.Max(1, cmplx.Abs(f)), 0))
			} else {
				p.Drive[c] = complex(0.8*geoOmega, 0) * f
			}
		}
	}
}

// TestDarkWilsonMatchesGeneral compares the closed-form dark basis of a
// star scheme with the general eigensolver path (an independent oracle:
// Householder reduction and warm Jacobi sweeps) on random loops of random
// star schemes with 3 to 7 levels. The discrete Wilson loop does not
// depend on the basis of each sample, so the two agree to rounding; the
// smallest gap is the bright coupling in one and an eigenvalue difference
// in the other.
func TestDarkWilsonMatchesGeneral(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 4096))
	for rep := 0; rep < 40; rep++ {
		n := 3 + rep%5
		s, _, aux := starRandScheme(rng, n)
		loop := starRandLoop(rng, s, aux)
		k := len(s.Computational)
		fast, gen := NewWilson(s), NewWilson(s)
		gen.noFast = true
		uf, ug := NewMat(k, k), NewMat(k, k)
		const pts = 512
		gf, errF := fast.Loop(loop, pts, uf)
		gg, errG := gen.Loop(loop, pts, ug)
		if errF != nil || errG != nil {
			t.Fatalf("rep %d (n=%d): fast %v, general %v", rep, n, errF, errG)
		}
		if !fast.fast || gen.fast {
			t.Fatalf("rep %d: closed form used: fast workspace %v, general %v", rep, fast.fast, gen.fast)
		}
		if d := FrobeniusDist(uf, ug); d > 1e-11 {
			t.Errorf("rep %d (n=%d): holonomies differ by %.2g", rep, n, d)
		}
		if e := UnitarityError(uf); e > 1e-12 {
			t.Errorf("rep %d: unitarity error %.2g", rep, e)
		}
		if math.Abs(gf.Min-gg.Min) > 1e-9*gg.Min || gf.At != gg.At {
			t.Errorf("rep %d: gap %.12g at %g, general %.12g at %g", rep, gf.Min, gf.At, gg.Min, gg.At)
		}
		if gf.Min < 0.4*geoOmega/2*0.3 {
			t.Errorf("rep %d: gap %.3g below the loop's bound", rep, gf.Min)
		}
		if rep%10 != 0 {
			continue
		}
		rf, errF := fast.Adaptive(loop, AdaptiveOptions{Tol: 1e-8, Extrapolate: true})
		rg, errG := gen.Adaptive(loop, AdaptiveOptions{Tol: 1e-8, Extrapolate: true})
		if errF != nil || errG != nil {
			t.Fatalf("rep %d adaptive: fast %v, general %v", rep, errF, errG)
		}
		if rf.Points != rg.Points || FrobeniusDist(rf.U, rg.U) > 1e-10 {
			t.Errorf("rep %d adaptive: %d vs %d points, distance %.2g", rep, rf.Points, rg.Points, FrobeniusDist(rf.U, rg.U))
		}
	}
}

// TestDarkWilsonFallsBack: a detuning that switches on along the loop puts
// the dark pair off zero energy; the pass must leave the closed form and
// give the general path's result.
func TestDarkWilsonFallsBack(t *testing.T) {
	s := Tripod()
	det := func(x float64, p Point) {
		geoSmoothTripod(x, p)
		p.Detuning[3] = 0.2 * geoOmega * math.Pow(math.Sin(math.Pi*x), 2)
	}
	fast, gen := NewWilson(s), NewWilson(s)
	gen.noFast = true
	uf, ug := NewMat(2, 2), NewMat(2, 2)
	if _, err := fast.Loop(det, 256, uf); err != nil {
		t.Fatal(err)
	}
	if _, err := gen.Loop(det, 256, ug); err != nil {
		t.Fatal(err)
	}
	if fast.fast {
		t.Error("closed form kept on a detuned loop")
	}
	if d := FrobeniusDist(uf, ug); d != 0 {
		t.Errorf("fallback differs from the general path by %.2g", d)
	}
	// And the closed form on the resonant loop (a non-zero check that the
	// flag means something).
	if _, err := fast.Loop(geoSmoothTripod, 256, uf); err != nil || !fast.fast {
		t.Errorf("resonant tripod: closed form %v, error %v", fast.fast, err)
	}
}

// TestDarkBasis checks the closed-form dark basis against its definition
// and the spectrum against Eigen: columns 1 … n−2 orthonormal, zero on the
// hub and annihilated by H; the eigenvalues are −β, 0 (n−2 times), +β
// (Golub and Van Loan §8.6.1 for the one-column coupling matrix).
func TestDarkBasis(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for rep := 0; rep < 200; rep++ {
		n := 3 + rep%14
		hub := rng.IntN(n)
		var b [MaxLevels]complex128
		h := NewMat(n, n)
		for k := 0; k < n; k++ {
			if k == hub {
				continue
			}
			sc := math.Pow(10, -6*rng.Float64()*float64(rep%2)) // some tiny couplings
			b[k] = complex(sc*rng.NormFloat64(), sc*rng.NormFloat64())
			h.Set(k, hub, b[k])
			h.Set(hub, k, cmplx.Conj(b[k]))
		}
		v := NewMat(n, n)
		beta := darkBasis(&b, v.Data, n, hub)
		vals := make([]float64, n)
		NewEigen(n).Factorize(h, vals, NewMat(n, n))
		if math.Abs(vals[n-1]-beta) > 1e-14*beta || math.Abs(vals[0]+beta) > 1e-14*beta {
			t.Errorf("rep %d: β = %.17g, extreme eigenvalues %.17g, %.17g", rep, beta, vals[0], vals[n-1])
		}
		for i := 1; i < n-1; i++ {
			if math.Abs(vals[i]) > 1e-14*beta {
				t.Errorf("rep %d: eigenvalue %d is %.3g, not 0", rep, i, vals[i])
			}
		}
		for a := 1; a < n-1; a++ {
			if v.At(hub, a) != 0 {
				t.Errorf("rep %d: column %d has hub weight", rep, a)
			}
			for c := 1; c < n-1; c++ {
				var dot complex128
				for r := 0; r < n; r++ {
					dot += cmplx.Conj(v.At(r, a)) * v.At(r, c)
				}
				want := complex(0, 0)
				if a == c {
					want = 1
				}
				if cmplx.Abs(dot-want) > 1e-14 {
					t.Errorf("rep %d: ⟨v%d|v%d⟩ = %v", rep, a, c, dot)
				}
			}
			var hv float64 // ‖H v_a‖ / β
			for r := 0; r < n; r++ {
				var x complex128
				for c := 0; c < n; c++ {
					x += h.At(r, c) * v.At(c, a)
				}
				hv += sqmag(x)
			}
			if math.Sqrt(hv) > 1e-14*beta {
				t.Errorf("rep %d: ‖H v_%d‖ = %.3g β", rep, a, math.Sqrt(hv)/beta)
			}
		}
	}
}

// TestStarCouplings: the couplings read from the control point equal the
// entries ⟨k|H|hub⟩ of Scheme.Hamiltonian bit for bit, and a detuning
// anywhere (static or controlled) is reported.
func TestStarCouplings(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for rep := 0; rep < 50; rep++ {
		n := 3 + rep%6
		s, hub, _ := starRandScheme(rng, n)
		if got := schemeHub(s); got != hub {
			t.Fatalf("rep %d: hub %d, want %d", rep, got, hub)
		}
		p := s.NewPoint()
		for c := range p.Drive {
			p.Drive[c] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		h := NewMat(n, n)
		s.Hamiltonian(h, p)
		var b [MaxLevels]complex128
		if !starCouplings(s, p, hub, &b) {
			t.Fatalf("rep %d: resonant point reported detuned", rep)
		}
		for k := 0; k < n; k++ {
			if b[k] != h.At(k, hub) {
				t.Errorf("rep %d: b[%d] = %v, H = %v", rep, k, b[k], h.At(k, hub))
			}
		}
		p.Detuning[rng.IntN(n)] = 1e-9
		if starCouplings(s, p, hub, &b) {
			t.Errorf("rep %d: controlled detuning not seen", rep)
		}
		p.Detuning = nil
		s.Levels[rng.IntN(n)].Detuning = -3
		if starCouplings(s, p, hub, &b) {
			t.Errorf("rep %d: static detuning not seen", rep)
		}
	}
	if schemeHub(Spin(3, 0)) != -1 {
		t.Error("a spin ladder has no hub")
	}
}

// TestStarStep compares the closed-form star exponential of Step with
// exp(−iHt) from the eigendecomposition (expmByEigen) on random star
// Hamiltonians: 2 to 12 levels, any hub, one-photon detunings Δ from zero
// to far above the couplings, a common leaf detuning, couplings down to
// 1e-9 of Δ (where a division by β would lose everything), and steps from
// ‖H‖dt = 1e-3 to 300. Both sides are unitary; the bound is
// 1e-13·max(1, ‖H‖dt), as for TestExpmHermitian.
func TestStarStep(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for rep := 0; rep < 300; rep++ {
		n := 2 + rep%11
		hub := rng.IntN(n)
		h := NewMat(n, n)
		scB := math.Pow(10, -9*rng.Float64()*float64(rep%3/2))
		for k := 0; k < n; k++ {
			if k != hub && (k == (hub+1)%n || rng.IntN(4) > 0) {
				v := complex(scB*rng.NormFloat64(), scB*rng.NormFloat64())
				h.Set(k, hub, v)
				h.Set(hub, k, cmplx.Conj(v))
			}
		}
		var delta, dg float64
		switch rep % 4 {
		case 1:
			delta = rng.NormFloat64()
		case 2:
			delta = 50 * rng.NormFloat64()
		case 3:
			delta, dg = rng.NormFloat64(), rng.NormFloat64()
		}
		for k := 0; k < n; k++ {
			h.Set(k, k, complex(dg, 0))
		}
		h.Set(hub, hub, complex(dg+delta, 0))
		if starHub(h.Data, n) < 0 {
			t.Fatalf("rep %d: star form not recognised", rep)
		}
		dt := math.Pow(10, -3+5*rng.Float64())
		u0 := dynRandUnitary(rng, n)
		u := u0.Clone()
		NewPropagator(n).Step(u, h, dt)
		want := NewMat(n, n)
		Mul(want, expmByEigen(h, dt), u0)
		norm := FrobeniusNorm(h) * dt
		if d := FrobeniusDist(u, want); d > 1e-13*math.Max(1, norm) {
			t.Errorf("rep %d: n=%d Δ=%.3g β-scale %.1g ‖H‖dt=%.3g: error %.3g", rep, n, delta, scB, norm, d)
		}
	}
	// Not a star: a coupling between two leaves, or unequal leaf detunings.
	h := NewMat(4, 4)
	h.Set(0, 3, 1)
	h.Set(1, 3, 1)
	h.Set(0, 1, 0.5)
	if starHub(h.Data, 4) >= 0 {
		t.Error("a triangle taken for a star")
	}
	h.Set(0, 1, 0)
	h.Set(2, 2, 0.1)
	if starHub(h.Data, 4) >= 0 {
		t.Error("unequal leaf detunings taken for a star")
	}
	// The odd diagonal entry names the hub: level 0 here, but the
	// couplings meet at level 3.
	h.Set(2, 2, 0)
	h.Set(0, 0, 0.3)
	if starHub(h.Data, 4) >= 0 {
		t.Error("a detuned leaf taken for the hub")
	}
	h.Set(0, 0, 0)
	h.Set(3, 3, 0.3)
	if got := starHub(h.Data, 4); got != 3 {
		t.Errorf("hub %d, want 3", got)
	}
}
