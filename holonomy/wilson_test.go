package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// geoOmega is a typical Rabi frequency, 2π × 1 MHz in rad/s.
const geoOmega = 2 * math.Pi * 1e6

// geoCone is the loop of Berry (1984): a field of fixed magnitude whose
// direction circles the cone of polar angle theta, turns times, starting at
// azimuth 0.
func geoCone(theta float64, turns int) Loop {
	return func(s float64, p Point) { SpinPoint(p, geoOmega, theta, 2*math.Pi*float64(turns)*s) }
}

// geoSector is the loop θ: 0 → θ₀ at φ = 0, φ: 0 → φ₀ at θ₀, θ: θ₀ → 0 at
// φ₀ in angle space, each leg taking a third of the loop parameter, so that
// samples fall on the corners when the number of points is a multiple of 3.
// set writes the control point for the angles.
func geoSector(th0, ph0 float64, set func(p Point, th, ph float64)) Loop {
	return func(s float64, p Point) {
		var th, ph float64
		switch {
		case s <= 1.0/3:
			th, ph = th0*3*s, 0
		case s <= 2.0/3:
			th, ph = th0, ph0*(3*s-1)
		default:
			th, ph = th0*(3-3*s), ph0
		}
		set(p, th, ph)
	}
}

// geoTripodDCZ sets the real couplings of Duan, Cirac and Zoller (2001).
func geoTripodDCZ(p Point, th, ph float64) { TripodPoint(p, geoOmega, th, ph) }

// geoTripodPhase sets Ω₀ = 0, Ω₁ = Ω sinθ e^{iφ}, Ω_a = Ω cosθ (Duan, Cirac
// and Zoller 2001, the phase gate).
func geoTripodPhase(p Point, th, ph float64) {
	p.Drive[0] = 0
	p.Drive[1] = cmplx.Rect(geoOmega*math.Sin(th), ph)
	p.Drive[2] = complex(geoOmega*math.Cos(th), 0)
}

func geoRotation(al float64) *Mat {
	c, s := math.Cos(al), math.Sin(al)
	return NewMatFrom(2, 2, []complex128{complex(c, 0), complex(-s, 0), complex(s, 0), complex(c, 0)})
}

// geoExpect returns ⟨a|U|b⟩ for vectors a, b.
func geoExpect(u *Mat, a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		for j := range b {
			s += cmplx.Conj(a[i]) * u.At(i, j) * b[j]
		}
	}
	return s
}

func TestBerryPhaseSpinHalfCone(t *testing.T) {
	// Berry, Proc. R. Soc. A 392, 45 (1984), the spin example: a spin in the
	// state m along a field whose direction circles a cone of solid angle
	// Ω(C) = 2π(1 − cos θ) acquires γ_m = −m Ω(C); for spin-½ aligned with
	// the field, γ = −π(1 − cos θ), and +π(1 − cos θ) anti-aligned.
	for _, th := range []float64{0.2, 0.7, 1.3, 2.0, 2.8} {
		gp := -math.Pi * (1 - math.Cos(th))
		// Both levels computational: two one-state clusters, U = Σ e^{iγ±}|n±⟩⟨n±|.
		w := NewWilson(Spin(1, 0, 1))
		res, err := w.Adaptive(geoCone(th, 1), AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
		if err != nil {
			t.Fatalf("θ=%g: %v", th, err)
		}
		c, s := math.Cos(th/2), math.Sin(th/2)
		up := []complex128{complex(c, 0), complex(s, 0)}  // along n at φ = 0
		dn := []complex128{complex(-s, 0), complex(c, 0)} // against n
		for _, chk := range []struct {
			name string
			got  complex128
			want complex128
		}{
			{"aligned", geoExpect(res.U, up, up), cmplx.Exp(complex(0, gp))},
			{"anti-aligned", geoExpect(res.U, dn, dn), cmplx.Exp(complex(0, -gp))},
			{"mixing", geoExpect(res.U, dn, up), 0},
		} {
			if d := cmplx.Abs(chk.got - chk.want); d > 1e-9 {
				t.Errorf("θ=%g %s: got %v want %v (|Δ| = %.2g)", th, chk.name, chk.got, chk.want, d)
			} else {
				t.Logf("θ=%.1f %s: |Δ| = %.1e (%d points)", th, chk.name, d, res.Points)
			}
		}
		if math.Abs(res.Gap.Min-geoOmega) > 1e-6*geoOmega {
			t.Errorf("θ=%g: gap %g, want ω = %g", th, res.Gap.Min, geoOmega)
		}
		// Only |m=+½⟩ computational (k = 1) while it is the heavier one.
		if th < math.Pi/2 {
			w1 := NewWilson(Spin(1, 0))
			r1, err := w1.Adaptive(geoCone(th, 1), AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
			if err != nil {
				t.Fatal(err)
			}
			if d := cmplx.Abs(r1.U.Data[0] - cmplx.Exp(complex(0, gp))); d > 1e-9 {
				t.Errorf("θ=%g k=1: U = %v, want e^{iγ}, γ = %g", th, r1.U.Data[0], gp)
			}
		}
	}
}

func TestBerryPhaseSpinOne(t *testing.T) {
	// Berry (1984): γ_m = −m Ω(C); for spin 1, m = +1 gets twice the spin-½
	// phase, −2π(1 − cos θ), m = 0 none and m = −1 the opposite.
	for _, th := range []float64{0.3, 0.9, 1.7} {
		om := 2 * math.Pi * (1 - math.Cos(th))
		sc := Spin(2, 0, 1, 2)
		w := NewWilson(sc)
		res, err := w.Adaptive(geoCone(th, 1), AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
		if err != nil {
			t.Fatalf("θ=%g: %v", th, err)
		}
		// Eigenstates |n, m⟩ at the base point, from H = ω n·S.
		p := sc.NewPoint()
		SpinPoint(p, geoOmega, th, 0)
		h, v, vals := NewMat(3, 3), NewMat(3, 3), make([]float64, 3)
		sc.Hamiltonian(h, p)
		NewEigen(3).Factorize(h, vals, v)
		for i, m := range []float64{-1, 0, 1} { // ascending energy ωm
			col := []complex128{v.At(0, i), v.At(1, i), v.At(2, i)}
			got := geoExpect(res.U, col, col)
			want := cmplx.Exp(complex(0, -m*om))
			if d := cmplx.Abs(got - want); d > 1e-9 {
				t.Errorf("θ=%g m=%g: ⟨n,m|U|n,m⟩ = %v, want %v", th, m, got, want)
			}
		}
		if th < 1 { // k = 1 with m = +1 alone
			r1, err := NewWilson(Spin(2, 0)).Adaptive(geoCone(th, 1), AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
			if err != nil {
				t.Fatal(err)
			}
			if d := cmplx.Abs(r1.U.Data[0] - cmplx.Exp(complex(0, -om))); d > 1e-9 {
				t.Errorf("θ=%g m=+1 alone: %v, want phase %g", th, r1.U.Data[0], -om)
			} else {
				t.Logf("θ=%.1f spin-1 m=+1: |Δ| = %.1e", th, d)
			}
		}
	}
}

func TestSpinHalfBothLevelsFromPole(t *testing.T) {
	// Berry (1984) for both states of a spin-½ carried around the sector
	// loop from the north pole, where the eigenstates are the computational
	// levels: U = diag(e^{−iΩ/2}, e^{+iΩ/2}) with the enclosed solid angle
	// Ω = (1 − cos θ₀)φ₀ — geometric phases only.
	for _, a := range [][2]float64{{0.8, 1.1}, {2.2, 4}} {
		sol := (1 - math.Cos(a[0])) * a[1]
		loop := geoSector(a[0], a[1], func(p Point, th, ph float64) { SpinPoint(p, geoOmega, th, ph) })
		res, err := NewWilson(Spin(1, 0, 1)).Adaptive(loop, AdaptiveOptions{Points: 48, Tol: 1e-11, Extrapolate: true})
		if err != nil {
			t.Fatal(err)
		}
		want := NewMatFrom(2, 2, []complex128{cmplx.Exp(complex(0, -sol/2)), 0, 0, cmplx.Exp(complex(0, sol/2))})
		if d := FrobeniusDist(res.U, want); d > 1e-9 {
			t.Errorf("%v: U =\n%vwant\n%v", a, res.U, want)
		}
	}
}

func TestDCZTripodRealCouplings(t *testing.T) {
	// Duan, Cirac and Zoller, Science 292, 1695 (2001): with real couplings
	// Ω₀ = Ω sinθ cosφ, Ω₁ = Ω sinθ sinφ, Ω_a = Ω cosθ, the loop
	// θ: 0→θ₀ (φ = 0), φ: 0→φ₀ (θ = θ₀), θ: θ₀→0 (φ = φ₀) rotates the qubit
	// by the enclosed solid angle α = (1 − cos θ₀)φ₀. Derived with the
	// connection A_φ = cos θ σ_y of the dark states D₁ = cosθ(cosφ|0⟩ +
	// sinφ|1⟩) − sinθ|a⟩, D₂ = −sinφ|0⟩ + cosφ|1⟩ and the package sign
	// convention: |0⟩ → cos α|0⟩ + sin α|1⟩.
	w := NewWilson(Tripod())
	for _, a := range [][2]float64{{math.Pi / 3, math.Pi / 2}, {1.2, 2.5}, {0.4, 0.7}, {math.Pi / 2, math.Pi / 4}} {
		al := (1 - math.Cos(a[0])) * a[1]
		res, err := w.Adaptive(geoSector(a[0], a[1], geoTripodDCZ), AdaptiveOptions{Points: 48, Tol: 1e-10, Extrapolate: true})
		if err != nil {
			t.Fatalf("%v: %v", a, err)
		}
		d := FrobeniusDist(res.U, geoRotation(al))
		if d > 1e-8 {
			t.Errorf("(θ₀, φ₀) = %v: U =\n%vwant rotation by %g (‖ΔU‖ = %.2g)", a, res.U, al, d)
		}
		t.Logf("(θ₀, φ₀) = (%.3f, %.3f): ‖U − R(α)‖ = %.1e with %d points (estimate %.1e)", a[0], a[1], d, res.Points, res.ErrorEstimate)
		if math.Abs(res.Gap.Min-geoOmega/2) > 1e-6*geoOmega {
			t.Errorf("gap %g, want Ω/2", res.Gap.Min)
		}
	}
}

func TestDCZTripodPhaseGate(t *testing.T) {
	// Duan, Cirac and Zoller (2001): with Ω₀ = 0, Ω₁ = Ω sinθ e^{iφ},
	// Ω_a = Ω cosθ, the same loop leaves |0⟩ alone and gives |1⟩ the phase
	// −φ₀ sin²θ₀ (magnitude φ₀ sin²θ₀; the sign from A_φ = −sin²θ for the
	// dark state cosθ|1⟩ − sinθ e^{iφ}|a⟩ and the package convention).
	w := NewWilson(Tripod())
	for _, a := range [][2]float64{{math.Pi / 3, math.Pi / 2}, {1.2, 2.5}, {0.5, 5}} {
		ph := -a[1] * math.Pow(math.Sin(a[0]), 2)
		res, err := w.Adaptive(geoSector(a[0], a[1], geoTripodPhase), AdaptiveOptions{Points: 48, Tol: 1e-10, Extrapolate: true})
		if err != nil {
			t.Fatalf("%v: %v", a, err)
		}
		want := NewMatFrom(2, 2, []complex128{1, 0, 0, cmplx.Exp(complex(0, ph))})
		d := FrobeniusDist(res.U, want)
		if d > 1e-8 {
			t.Errorf("(θ₀, φ₀) = %v: U =\n%vwant diag(1, e^{%gi})", a, res.U, ph)
		}
		t.Logf("(θ₀, φ₀) = (%.3f, %.3f): ‖U − diag(1, e^{iγ})‖ = %.1e with %d points", a[0], a[1], d, res.Points)
	}
}

// geoSmoothTripod is a smooth loop with complex drives and no symmetry.
func geoSmoothTripod(s float64, p Point) {
	x := 2 * math.Pi * s
	sx := math.Sin(x / 2)
	th := 1.1 * sx * sx
	ph := 0.4*math.Sin(x) + 0.9*(1-math.Cos(x))
	p.Drive[0] = cmplx.Rect(geoOmega*math.Sin(th)*math.Cos(ph), 0.3*math.Sin(x))
	p.Drive[1] = cmplx.Rect(geoOmega*math.Sin(th)*math.Sin(ph), 0.5*(1-math.Cos(x)))
	p.Drive[2] = complex(geoOmega*math.Cos(th), 0)
}

func TestWilsonConvergenceOrder(t *testing.T) {
	// The discrete Wilson loop is a symmetric one-step method (reversing a
	// step inverts its factor), so its error on a smooth loop falls as 1/N²
	// with an even expansion; Richardson extrapolation then gives 1/N⁴.
	// Measured against the exact Berry phase (Berry 1984) and, for a
	// generic tripod loop, against a converged extrapolated reference.
	order := func(ns []int, errs []float64) float64 {
		// least-squares slope of log err against log N
		var sx, sy, sxx, sxy float64
		for i := range ns {
			x, y := math.Log(float64(ns[i])), math.Log(errs[i])
			sx, sy, sxx, sxy = sx+x, sy+y, sxx+x*x, sxy+x*y
		}
		m := float64(len(ns))
		return -(m*sxy - sx*sy) / (m*sxx - sx*sx)
	}
	ns := []int{32, 64, 128, 256, 512}
	// Spin-½ cone, exact phase.
	{
		th := 0.9
		want := cmplx.Exp(complex(0, -math.Pi*(1-math.Cos(th))))
		w := NewWilson(Spin(1, 0))
		u := NewMat(1, 1)
		var errs []float64
		for _, n := range ns {
			if _, err := w.Loop(geoCone(th, 1), n, u); err != nil {
				t.Fatal(err)
			}
			errs = append(errs, cmplx.Abs(u.Data[0]-want))
		}
		q := order(ns, errs)
		t.Logf("spin-½ cone: errors %.2e … %.2e, order %.3f", errs[0], errs[len(errs)-1], q)
		if q < 1.95 {
			t.Errorf("spin-½ cone: convergence order %.3f < 2", q)
		}
	}
	// No rounding floor at large N: the 1/N² law still holds from 16384 to
	// 65536 points (errors near 1e-9), and the tracked eigenbasis stays
	// orthonormal to rounding.
	{
		th := 0.9
		want := cmplx.Exp(complex(0, -math.Pi*(1-math.Cos(th))))
		w := NewWilson(Spin(1, 0))
		u := NewMat(1, 1)
		var errs []float64
		for _, n := range []int{16384, 65536} {
			if _, err := w.Loop(geoCone(th, 1), n, u); err != nil {
				t.Fatal(err)
			}
			errs = append(errs, cmplx.Abs(u.Data[0]-want))
		}
		q := math.Log(errs[0]/errs[1]) / math.Log(4)
		t.Logf("spin-½ cone at large N: errors %.2e, %.2e, order %.3f", errs[0], errs[1], q)
		if q < 1.95 {
			t.Errorf("spin-½ cone at large N: order %.3f", q)
		}
		// The drift of the warm-started tracker (the closed-form dark
		// basis of the tripod has none to accumulate, so take the general
		// path here).
		wt := NewWilson(Tripod())
		wt.noFast = true
		if _, err := wt.Loop(geoSmoothTripod, 65536, NewMat(2, 2)); err != nil {
			t.Fatal(err)
		}
		if e := UnitarityError(wt.tr.v); e > 1e-13 {
			t.Errorf("tracked basis after 65536 points: ‖V†V − I‖ = %.2g", e)
		}
	}
	// Generic tripod loop (non-Abelian), reference by extrapolation.
	{
		w := NewWilson(Tripod())
		ref, err := w.Adaptive(geoSmoothTripod, AdaptiveOptions{Tol: 1e-13, Extrapolate: true})
		if err != nil {
			t.Fatal(err)
		}
		u, u2 := NewMat(2, 2), NewMat(2, 2)
		var errs, rerrs []float64
		for _, n := range ns {
			if _, err := w.Loop(geoSmoothTripod, n, u); err != nil {
				t.Fatal(err)
			}
			errs = append(errs, FrobeniusDist(u, ref.U))
			if _, err := w.Loop(geoSmoothTripod, 2*n, u2); err != nil {
				t.Fatal(err)
			}
			r := NewMat(2, 2)
			richardson(w.tr.pol, r, u2, u, NewMat(2, 2))
			rerrs = append(rerrs, FrobeniusDist(r, ref.U))
		}
		q, qr := order(ns, errs), order(ns[:4], rerrs[:4])
		t.Logf("tripod loop: errors %.2e … %.2e, order %.3f; extrapolated %.2e … %.2e, order %.3f (reference with %d points)",
			errs[0], errs[len(errs)-1], q, rerrs[0], rerrs[3], qr, ref.Points)
		if q < 1.95 {
			t.Errorf("tripod: convergence order %.3f < 2", q)
		}
		if qr < 3.8 {
			t.Errorf("tripod: extrapolated order %.3f < 4", qr)
		}
	}
}

func TestWilsonReversedLoopAndGauge(t *testing.T) {
	// Reversing a loop inverts its holonomy (path-ordered exponential), and
	// a change of fixed level phases D = diag(e^{iχ_k}) — drive phases
	// shifted by χ_u − χ_l — transforms it as D_c U D_c†.
	w := NewWilson(Tripod())
	const n = 2048
	u, ur, ug := NewMat(2, 2), NewMat(2, 2), NewMat(2, 2)
	if _, err := w.Loop(geoSmoothTripod, n, u); err != nil {
		t.Fatal(err)
	}
	if e := UnitarityError(u); e > 1e-13 {
		t.Errorf("holonomy not unitary: ‖U†U − I‖ = %g", e)
	}
	rev := func(s float64, p Point) { geoSmoothTripod(1-s, p) }
	if _, err := w.Loop(rev, n, ur); err != nil {
		t.Fatal(err)
	}
	prod := NewMat(2, 2)
	Mul(prod, u, ur)
	if d := FrobeniusDist(prod, Identity(2)); d > 1e-12 {
		t.Errorf("U(reversed)·U = \n%v", prod)
	}
	chi := []float64{0.3, -1.1, 0.5, 0.2} // g0, g1, a, e
	tri := Tripod()
	gauged := func(s float64, p Point) {
		geoSmoothTripod(s, p)
		for c, ch := range tri.Channels {
			p.Drive[c] *= cmplx.Exp(complex(0, chi[ch.Upper]-chi[ch.Lower]))
		}
	}
	if _, err := w.Loop(gauged, n, ug); err != nil {
		t.Fatal(err)
	}
	d := NewMatFrom(2, 2, []complex128{cmplx.Exp(complex(0, chi[0])), 0, 0, cmplx.Exp(complex(0, chi[1]))})
	tmp, want := NewMat(2, 2), NewMat(2, 2)
	Mul(tmp, d, u)
	MulBH(want, tmp, d)
	if dd := FrobeniusDist(ug, want); dd > 1e-12 {
		t.Errorf("level-phase change: got\n%vwant\n%v", ug, want)
	}
}

func TestWilsonLoopAllocatesNothing(t *testing.T) {
	qs, _, _, qset := geoQutrit()
	for _, c := range []struct {
		s    *Scheme
		loop Loop
	}{
		{Tripod(), geoSmoothTripod},
		{Spin(1, 0, 1), geoCone(0.8, 1)},
		{Spin(4, 0, 1, 2), geoCone(0.5, 1)}, // three one-state clusters
		{qs, geoSector(1, 2, qset)},         // one three-state cluster
	} {
		w := NewWilson(c.s)
		u := NewMat(w.K(), w.K())
		if _, err := w.Loop(c.loop, 64, u); err != nil {
			t.Fatal(err)
		}
		if a := testing.AllocsPerRun(5, func() { w.Loop(c.loop, 256, u) }); a != 0 {
			t.Errorf("%s: %g allocations per Wilson.Loop", c.s.Name, a)
		}
	}
}

func TestBerryPhaseLargeSpin(t *testing.T) {
	// Berry (1984), γ_m = −m Ω(C) for any spin: the 16-level ladder
	// s = 15/2 (the largest scheme), state m = +15/2.
	th := 0.2
	res, err := NewWilson(Spin(15, 0)).Adaptive(geoCone(th, 1), AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	want := cmplx.Exp(complex(0, -7.5*2*math.Pi*(1-math.Cos(th))))
	if d := cmplx.Abs(res.U.Data[0] - want); d > 1e-9 {
		t.Errorf("spin-15/2 m=+15/2: U = %v, want %v", res.U.Data[0], want)
	} else {
		t.Logf("spin-15/2 m=+15/2: |Δ| = %.1e with %d points", d, res.Points)
	}
}

// geoQutrit is a four-pod: ground levels g0, g1, g2 (computational) and a,
// each coupled to e, with three dark states; set writes real drives
// Ω sinθ (cosφ u + sinφ w) on g0…g2 and Ω cosθ on a.
func geoQutrit() (s *Scheme, u, w []float64, set func(p Point, th, ph float64)) {
	s = &Scheme{
		Name:   "qutrit",
		Levels: []Level{{Name: "g0"}, {Name: "g1"}, {Name: "g2"}, {Name: "a"}, {Name: "e"}},
		Channels: []Channel{
			{Name: "p0", Lower: 0, Upper: 4, Factor: 1},
			{Name: "p1", Lower: 1, Upper: 4, Factor: 1},
			{Name: "p2", Lower: 2, Upper: 4, Factor: 1},
			{Name: "pa", Lower: 3, Upper: 4, Factor: 1},
		},
		Computational: []int{0, 1, 2},
	}
	u = []float64{2 / 3.0, 1 / 3.0, 2 / 3.0}
	w = []float64{-2 / 3.0, 2 / 3.0, 1 / 3.0} // u·w = 0, both unit
	set = func(p Point, th, ph float64) {
		for k := 0; k < 3; k++ {
			p.Drive[k] = complex(geoOmega*math.Sin(th)*(math.Cos(ph)*u[k]+math.Sin(ph)*w[k]), 0)
		}
		p.Drive[3] = complex(geoOmega*math.Cos(th), 0)
	}
	return s, u, w, set
}

func TestThreeDimensionalDarkSubspace(t *testing.T) {
	// Four ground levels g0, g1, g2, a coupled to e (three dark states,
	// the qutrit g0, g1, g2 computational). Real drives
	// Ω_k = Ω sinθ (cosφ u_k + sinφ w_k) on g0…g2 and Ω cosθ on a are the
	// tripod of Duan, Cirac and Zoller (2001) in the ground basis
	// {u, w, u×w}: the sector loop rotates u towards w by the solid angle
	// α = (1 − cos θ₀)φ₀ and leaves u×w, which never couples, alone:
	// U = I + sin α (w uᵀ − u wᵀ) + (cos α − 1)(u uᵀ + w wᵀ).
	s, u, w, set := geoQutrit()
	th0, ph0 := 1.0, 2.2
	res, err := NewWilson(s).Adaptive(geoSector(th0, ph0, set), AdaptiveOptions{Points: 48, Tol: 1e-10, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	al := (1 - math.Cos(th0)) * ph0
	want := Identity(3)
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			want.Data[i*3+j] += complex(math.Sin(al)*(w[i]*u[j]-u[i]*w[j])+(math.Cos(al)-1)*(u[i]*u[j]+w[i]*w[j]), 0)
		}
	}
	if d := FrobeniusDist(res.U, want); d > 1e-8 {
		t.Errorf("qutrit holonomy\n%vwant\n%v(‖Δ‖ = %.2g)", res.U, want, d)
	} else {
		t.Logf("qutrit (3-dim dark subspace): ‖U − U_exact‖ = %.1e with %d points", d, res.Points)
	}
}

func TestCoupledRingStokes(t *testing.T) {
	// Any coupling graph: six levels on a ring with a chord, complex drives,
	// two non-degenerate computational states (two clusters). Stokes'
	// theorem (Berry 1984): arg det U of the boundary loop equals the flux
	// of Tr F through the surface.
	s := &Scheme{Name: "ring6", Computational: []int{0, 1}}
	for i := 0; i < 6; i++ {
		s.Levels = append(s.Levels, Level{Name: fmt.Sprintf("r%d", i), Detuning: geoOmega * []float64{0, 0.35, 1.4, 1.9, 2.6, 3.1}[i]})
		s.Channels = append(s.Channels, Channel{Name: fmt.Sprintf("c%d", i), Lower: i, Upper: (i + 1) % 6, Factor: 1})
	}
	s.Channels = append(s.Channels, Channel{Name: "chord", Lower: 1, Upper: 4, Factor: 0.7})
	surf := func(u, v float64, p Point) {
		z := complex(0.25*geoOmega*u, 0) * cmplx.Exp(complex(0, 2*math.Pi*v))
		for c := range p.Drive {
			p.Drive[c] = cmplx.Rect(0.2*geoOmega, 0.3*float64(c))
		}
		p.Drive[0] += z
		p.Drive[6] += 0.5 * z * z / complex(geoOmega, 0)
		p.Detuning[2] = 0.1 * geoOmega * u * math.Cos(2*math.Pi*v)
	}
	flux, err := NewFlux(s).Integral(surf, 24)
	if err != nil {
		t.Fatal(err)
	}
	res, err := NewWilson(s).Adaptive(func(x float64, p Point) { surf(1, x, p) }, AdaptiveOptions{Tol: 1e-12, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	det := res.U.At(0, 0)*res.U.At(1, 1) - res.U.At(0, 1)*res.U.At(1, 0)
	if d := math.Abs(cmplx.Phase(det) - flux); d > 1e-9 {
		t.Errorf("ring: arg det U = %.12g, flux %.12g", cmplx.Phase(det), flux)
	} else {
		t.Logf("six-level ring: arg det U = flux = %.6e (|Δ| = %.1e)", flux, d)
	}
	if e := UnitarityError(res.U); e > 1e-12 {
		t.Errorf("ring holonomy not unitary: %g", e)
	}
}

func TestGapTolGroupsSplitPair(t *testing.T) {
	// A small two-photon detuning δ on g1 splits the tripod's dark pair.
	// By default the two states are separate clusters (adiabatic with
	// respect to δ: no mixing, block-diagonal holonomy); with GapTol above δ
	// they form one cluster whose holonomy is close to the rotation of Duan,
	// Cirac and Zoller (2001), off by a small amount that vanishes with δ.
	s := Tripod()
	s.Levels[1].Detuning = 1e-3 * geoOmega
	th0, ph0 := 1.0, 1.5
	loop := geoSector(th0, ph0, geoTripodDCZ)
	w := NewWilson(s)
	res, err := w.Adaptive(loop, AdaptiveOptions{Points: 48, Tol: 1e-9, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	if off := cmplx.Abs(res.U.At(0, 1)) + cmplx.Abs(res.U.At(1, 0)); off > 1e-12 {
		t.Errorf("split pair, default tolerance: U not diagonal\n%v", res.U)
	}
	// The splitting of the two near-dark states is δ times a factor ≤ 1 that
	// varies along the loop (it is δ at the base point, where they are g0
	// and g1).
	if !(res.Gap.Min > 0 && res.Gap.Min <= 1e-3*geoOmega*(1+1e-9)) {
		t.Errorf("split pair: gap %g, want between 0 and δ = %g", res.Gap.Min, 1e-3*geoOmega)
	}
	w.GapTol = 0.01 * geoOmega
	res, err = w.Adaptive(loop, AdaptiveOptions{Points: 48, Tol: 1e-9, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	d := FrobeniusDist(res.U, geoRotation((1-math.Cos(th0))*ph0))
	if d > 0.01 || d == 0 {
		t.Errorf("split pair as one cluster: ‖U − R(α)‖ = %g, want small but non-zero", d)
	} else {
		t.Logf("split pair (δ = 1e-3 Ω) as one cluster: ‖U − R(α)‖ = %.1e", d)
	}
}
