package holonomy

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// Failure modes of the Wilson loop: gaps that close, missing working
// subspaces, bad loops, and the sampling-error estimate.

func TestGapClosing(t *testing.T) {
	// A spin-½ whose field (B_x, B_z) circles a circle through B = 0 at
	// s = ½: the two levels cross there (Berry 1984, the degeneracy).
	through := func(r float64) Loop {
		return func(s float64, p Point) {
			bx, bz := r*math.Sin(2*math.Pi*s), 1+r*math.Cos(2*math.Pi*s)
			b := math.Hypot(bx, bz)
			SpinPoint(p, geoOmega*b, math.Atan2(bx, bz), 0)
		}
	}
	w := NewWilson(Spin(1, 0))
	u := NewMat(1, 1)
	_, err := w.Loop(through(1), 64, u)
	var ge *GapError
	if !errors.As(err, &ge) {
		t.Fatalf("loop through the degeneracy: error %v, want *GapError", err)
	}
	if ge.S != 0.5 || ge.Gap > 1e-9*geoOmega || !math.IsNaN(ge.V) {
		t.Errorf("GapError %+v, want gap ≈ 0 at s = 0.5", ge)
	}
	if !strings.Contains(err.Error(), "s = 0.5") {
		t.Errorf("message does not say where: %v", err)
	}
	// Passing at distance 0.002 ω: fine by default, an error with a
	// tolerance of 0.01 ω that reports the smallest gap and where.
	g, err := w.Loop(through(0.998), 64, u)
	if err != nil {
		t.Fatalf("near miss: %v", err)
	}
	if math.Abs(g.Min-0.002*geoOmega) > 1e-9*geoOmega || g.At != 0.5 {
		t.Errorf("near miss gap %+v, want 0.002 ω at s = 0.5", g)
	}
	w.GapTol = 0.01 * geoOmega
	_, err = w.Loop(through(0.998), 64, u)
	if !errors.As(err, &ge) || math.Abs(ge.Gap-0.002*geoOmega) > 1e-9*geoOmega || ge.Tol != 0.01*geoOmega {
		t.Errorf("near miss with tolerance: %v", err)
	}
	// Tripod with every drive off half-way: the dark pair meets the bright
	// levels (gap Ω/2 → 0).
	off := func(s float64, p Point) {
		geoSmoothTripod(s, p)
		c := complex(math.Abs(math.Cos(math.Pi*s)), 0)
		for i := range p.Drive {
			p.Drive[i] *= c
		}
	}
	_, err = NewWilson(Tripod()).Loop(off, 64, NewMat(2, 2))
	if !errors.As(err, &ge) || ge.S != 0.5 {
		t.Errorf("tripod with drives off mid-loop: %v", err)
	}
}

func TestNoWorkingSubspace(t *testing.T) {
	cases := []struct {
		name  string
		s     *Scheme
		loop  Loop
		match string
	}{
		{"drives off at the base", Tripod(), func(s float64, p Point) {
			TripodPoint(p, geoOmega*math.Sin(math.Pi*s), 0.5, 2*math.Pi*s)
		}, "4-fold degenerate"},
		{"Λ has one dark state", Lambda(), func(s float64, p Point) {
			LambdaPoint(p, geoOmega, 1, 2*math.Pi*s)
		}, "same weight"},
		{"spin-½ across the equator", Spin(1, 0), geoCone(math.Pi/2, 1), "same weight"},
		{"spin-1 m=+1 far from the pole", Spin(2, 0), geoCone(1.8, 1), "keep only"},
	}
	for _, c := range cases {
		_, err := NewWilson(c.s).Loop(c.loop, 16, NewMat(len(c.s.Computational), len(c.s.Computational)))
		if !errors.Is(err, ErrNoSubspace) || !strings.Contains(err.Error(), c.match) {
			t.Errorf("%s: error %v, want ErrNoSubspace containing %q", c.name, err, c.match)
		}
	}
}

func TestLoopErrors(t *testing.T) {
	w := NewWilson(Tripod())
	u := NewMat(2, 2)
	open := func(s float64, p Point) { TripodPoint(p, geoOmega, 0.5*s, 0) }
	if _, err := w.Loop(open, 16, u); !errors.Is(err, ErrOpenLoop) {
		t.Errorf("open loop: %v", err)
	}
	nan := func(s float64, p Point) {
		TripodPoint(p, geoOmega, 0, 0)
		if s == 0.5 {
			p.Drive[1] = complex(math.NaN(), 0)
		}
	}
	if _, err := w.Loop(nan, 16, u); err == nil || !strings.Contains(err.Error(), "s = 0.5") || !strings.Contains(err.Error(), `"p1"`) {
		t.Errorf("NaN drive: %v", err)
	}
	bad := Tripod()
	bad.Channels[0].Upper = 9
	if _, err := NewWilson(bad).Loop(open, 16, u); err == nil || !strings.Contains(err.Error(), "invalid level scheme") {
		t.Errorf("invalid scheme: %v", err)
	}
	if _, err := NewWilson(bad).Adaptive(open, AdaptiveOptions{}); err == nil {
		t.Error("invalid scheme accepted by Adaptive")
	}
	if _, err := w.Adaptive(geoSmoothTripod, AdaptiveOptions{Points: 4}); err == nil {
		t.Error("Points = 4 accepted")
	}
	func() {
		defer func() {
			if recover() == nil {
				t.Error("3×3 destination accepted")
			}
		}()
		w.Loop(geoSmoothTripod, 16, NewMat(3, 3))
	}()
}

func TestSamplingErrorAndRefinement(t *testing.T) {
	// Five turns around a wide cone with 8 points: neighbouring samples are
	// 225° apart in azimuth, far more than the subspace may turn.
	th := 1.0
	loop := geoCone(th, 5)
	w := NewWilson(Spin(1, 0))
	_, err := w.Loop(loop, 8, NewMat(1, 1))
	var se *SamplingError
	if !errors.As(err, &se) || se.Overlap > math.Sqrt(0.5) {
		t.Fatalf("undersampled loop: %v", err)
	}
	// Adaptive refines until the samples follow the subspace; Berry (1984):
	// five turns give five times the phase.
	res, err := w.Adaptive(loop, AdaptiveOptions{Points: 8, Tol: 1e-10, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	want := cmplx.Exp(complex(0, -5*math.Pi*(1-math.Cos(th))))
	if d := cmplx.Abs(res.U.Data[0] - want); d > 1e-9 {
		t.Errorf("five turns: %v, want %v", res.U.Data[0], want)
	}
	// Too few points allowed: the finest result comes with ErrNotConverged.
	res, err = w.Adaptive(loop, AdaptiveOptions{Points: 64, MaxPoints: 128, Tol: 1e-12})
	if !errors.Is(err, ErrNotConverged) || res == nil || res.Points != 128 || res.ErrorEstimate <= 1e-12 {
		t.Errorf("MaxPoints too small: %v, %+v", err, res)
	}
}
