package holonomy

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// geoSphere is the sphere of field directions θ = πu, φ = 2πv at fixed
// field magnitude; the edges u = 0 and u = 1 are the poles.
func geoSphere(u, v float64, p Point) { SpinPoint(p, geoOmega, math.Pi*u, 2*math.Pi*v) }

func TestBerryCurvatureSphere(t *testing.T) {
	// Berry, Proc. R. Soc. A 392, 45 (1984), the spin example: the curvature
	// of state m of a spin in the field direction n is −m times the solid
	// angle element, F_θφ = −m sinθ, so its flux through any sphere around
	// the degeneracy B = 0 is −4πm: −2π for spin-½ aligned, −4π for spin-1
	// m = +1; the Chern numbers (1/2π)∬F are −1 and −2 with the package
	// sign convention (±1 and ±2 up to convention).
	for _, c := range []struct {
		twoS  int
		chern int
	}{{1, -1}, {2, -2}, {3, -3}} {
		m := float64(c.twoS) / 2
		f := NewFlux(Spin(c.twoS, 0))
		flux, err := f.Integral(geoSphere, 24)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(flux - (-4 * math.Pi * m)); d > 1e-9 {
			t.Errorf("2s=%d: flux %.12g, want %.12g", c.twoS, flux, -4*math.Pi*m)
		} else {
			t.Logf("2s=%d: flux through the sphere %.12f = %.12f × 2π (|Δ| = %.1e)", c.twoS, flux, flux/(2*math.Pi), d)
		}
		ch, err := f.Chern(geoSphere, 12, 12)
		if err != nil || ch != c.chern {
			t.Errorf("2s=%d: Chern number %d (%v), want %d", c.twoS, ch, err, c.chern)
		}
		// Pointwise: F_uv = F_θφ · π · 2π.
		for _, u := range []float64{0.1, 0.37, 0.8} {
			got, err := f.Curvature(geoSphere, u, 0.3)
			if err != nil {
				t.Fatal(err)
			}
			want := -m * math.Sin(math.Pi*u) * 2 * math.Pi * math.Pi
			if math.Abs(got-want) > 1e-9*math.Abs(want) {
				t.Errorf("2s=%d u=%g: F_uv = %.12g, want %.12g", c.twoS, u, got, want)
			}
		}
	}
	// The sphere need not be centred on the degeneracy nor round: an
	// ellipsoid of fields around B = 0 gives the same Chern number
	// (topological invariance), one not enclosing it gives 0.
	ell := func(off float64) Surface {
		return func(u, v float64, p Point) {
			st, ct := math.Sincos(math.Pi * u)
			sp, cp := math.Sincos(2 * math.Pi * v)
			bx, by, bz := 2*st*cp, 0.7*st*sp, 1.3*ct+off
			b := math.Sqrt(bx*bx + by*by + bz*bz)
			SpinPoint(p, geoOmega*b, math.Acos(bz/b), math.Atan2(by, bx))
		}
	}
	f := NewFlux(Spin(1, 0))
	if ch, err := f.Chern(ell(0.4), 24, 24); err != nil || ch != -1 {
		t.Errorf("ellipsoid around B = 0: Chern %d (%v), want -1", ch, err)
	}
	if ch, err := f.Chern(ell(2), 24, 24); err != nil || ch != 0 {
		t.Errorf("ellipsoid not around B = 0: Chern %d (%v), want 0", ch, err)
	}
}

// geoLambdaDisk is a disk of the drive Ω₀ in the complex plane, centre c and
// radius r (rad/s), of a Λ scheme with detuned g1 and e; its boundary is the
// circle Ω₀ = c + r e^{2πis}.
func geoLambdaDisk(c complex128, r float64) (*Scheme, Surface, Loop) {
	s := Lambda()
	s.Levels[1].Detuning = 0.3 * geoOmega
	s.Levels[2].Detuning = 2 * geoOmega
	s.Computational = []int{0}
	surf := func(u, v float64, p Point) {
		p.Drive[0] = c + complex(r*u, 0)*cmplx.Exp(complex(0, 2*math.Pi*v))
		p.Drive[1] = complex(0.4*geoOmega, 0)
	}
	loop := func(x float64, p Point) { surf(1, x, p) }
	return s, surf, loop
}

func TestStokesSmallLoops(t *testing.T) {
	// Stokes' theorem for the Berry connection (Berry 1984): the
	// flux of the curvature through a surface equals the phase of its
	// boundary loop. Independent computations: curvature from Berry's
	// sum-over-states formula and Gauss–Legendre quadrature, phase from the
	// discrete Wilson loop.
	for _, r := range []float64{0.02, 0.1, 0.3} {
		s, surf, loop := geoLambdaDisk(complex(0.5*geoOmega, 0.2*geoOmega), r*geoOmega)
		flux, err := NewFlux(s).Integral(surf, 24)
		if err != nil {
			t.Fatal(err)
		}
		res, err := NewWilson(s).Adaptive(loop, AdaptiveOptions{Tol: 1e-12, Extrapolate: true})
		if err != nil {
			t.Fatal(err)
		}
		phase := cmplx.Phase(res.U.Data[0])
		if d := math.Abs(flux - phase); d > 1e-9*math.Max(1, math.Abs(flux)) {
			t.Errorf("Λ disk r=%g: flux %.12g, loop phase %.12g", r, flux, phase)
		} else {
			t.Logf("Λ disk r=%.2fΩ: flux %.3e, loop phase %.3e, |Δ| = %.1e", r, flux, phase, d)
		}
	}
	// Non-Abelian: the trace of the tripod's dark-state curvature over the
	// sector surface of the phase-gate loop of Duan, Cirac and Zoller
	// (2001) equals arg det U = −φ₀ sin²θ₀.
	for _, a := range [][2]float64{{0.3, 0.4}, {1.0, 2.0}} {
		surf := func(u, v float64, p Point) { geoTripodPhase(p, a[0]*u, a[1]*v) }
		flux, err := NewFlux(Tripod()).Integral(surf, 24)
		if err != nil {
			t.Fatal(err)
		}
		res, err := NewWilson(Tripod()).Adaptive(geoSector(a[0], a[1], geoTripodPhase), AdaptiveOptions{Points: 48, Tol: 1e-11, Extrapolate: true})
		if err != nil {
			t.Fatal(err)
		}
		det := res.U.At(0, 0)*res.U.At(1, 1) - res.U.At(0, 1)*res.U.At(1, 0)
		want := -a[1] * math.Pow(math.Sin(a[0]), 2)
		if math.Abs(flux-want) > 1e-9 || math.Abs(cmplx.Phase(det)-want) > 1e-9 {
			t.Errorf("tripod sector %v: flux %.12g, arg det U %.12g, want %.12g", a, flux, cmplx.Phase(det), want)
		}
	}
	// A generic tripod surface: a disk in the plane of Ω₀ (complex) with the
	// other drives fixed and complex.
	disk := func(u, v float64, p Point) {
		p.Drive[0] = complex(0.3*geoOmega, 0.1*geoOmega) + complex(0.15*geoOmega*u, 0)*cmplx.Exp(complex(0, 2*math.Pi*v))
		p.Drive[1] = cmplx.Rect(0.2*geoOmega, 0.7)
		p.Drive[2] = complex(geoOmega, 0)
	}
	flux, err := NewFlux(Tripod()).Integral(disk, 24)
	if err != nil {
		t.Fatal(err)
	}
	res, err := NewWilson(Tripod()).Adaptive(func(x float64, p Point) { disk(1, x, p) }, AdaptiveOptions{Tol: 1e-12, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	det := res.U.At(0, 0)*res.U.At(1, 1) - res.U.At(0, 1)*res.U.At(1, 0)
	if math.Abs(flux-cmplx.Phase(det)) > 1e-9 {
		t.Errorf("tripod disk: flux %.12g, arg det U %.12g", flux, cmplx.Phase(det))
	} else {
		t.Logf("tripod disk: Tr F flux %.6e = arg det U (|Δ| = %.1e)", flux, math.Abs(flux-cmplx.Phase(det)))
	}
}

func TestLatticeFlux(t *testing.T) {
	// The lattice field strength of Fukui, Hatsugai and Suzuki (2005)
	// summed over an open surface converges to the flux as 1/n².
	s, surf, _ := geoLambdaDisk(complex(0.5*geoOmega, 0.2*geoOmega), 0.3*geoOmega)
	f := NewFlux(s)
	ref, err := f.Integral(surf, 24)
	if err != nil {
		t.Fatal(err)
	}
	var errs []float64
	for _, n := range []int{8, 16, 32} {
		l, err := f.Lattice(surf, n, n)
		if err != nil {
			t.Fatal(err)
		}
		errs = append(errs, math.Abs(l-ref))
	}
	q := math.Log2(errs[1] / errs[2])
	t.Logf("lattice flux errors %.2e %.2e %.2e (order %.2f) against %.6e", errs[0], errs[1], errs[2], q, ref)
	if q < 1.8 || errs[2] > 0.01*math.Abs(ref) {
		t.Errorf("lattice flux errors %v, order %.2f", errs, q)
	}
	// Not a closed surface: Chern refuses it.
	cone := func(u, v float64, p Point) { SpinPoint(p, geoOmega, 0.5*u, 2*math.Pi*v) }
	if _, err := NewFlux(Spin(1, 0)).Chern(cone, 8, 16); err == nil || !strings.Contains(err.Error(), "not closed") {
		t.Errorf("open cone: %v", err)
	}
	// Too coarse: a plaquette with more than π/2 of flux.
	if _, err := NewFlux(Spin(3, 0)).Lattice(geoSphere, 2, 3); err == nil || !strings.Contains(err.Error(), "finer grid") {
		t.Errorf("coarse grid: %v", err)
	}
}

func TestFluxErrors(t *testing.T) {
	// A family of fields whose magnitude |1 − 2u| vanishes at u = ½: the
	// two levels meet there (Berry 1984).
	surf := func(u, v float64, p Point) {
		SpinPoint(p, geoOmega*(1-2*u), 0.3+0.2*v, v)
	}
	f := NewFlux(Spin(1, 0))
	_, err := f.Lattice(surf, 8, 8)
	var ge *GapError
	if !errors.As(err, &ge) || ge.S != 0.5 || math.IsNaN(ge.V) || !strings.Contains(err.Error(), "(u, v) = (0.5,") {
		t.Errorf("degeneracy on the surface: %v", err)
	}
	if _, err := f.Integral(surf, 0); err == nil {
		t.Error("order 0 accepted")
	}
	allOff := func(u, v float64, p Point) { TripodPoint(p, geoOmega*u, 1, v) }
	if _, err := NewFlux(Tripod()).Curvature(allOff, 0.5, 0.5); !errors.Is(err, ErrNoSubspace) {
		t.Errorf("drives off at the corner: %v", err)
	}
	bad := Spin(1, 0)
	bad.Computational = nil
	if _, err := NewFlux(bad).Curvature(geoSphere, 0.5, 0.5); err == nil {
		t.Error("invalid scheme accepted")
	}
}
