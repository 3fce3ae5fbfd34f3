// Package wavetest holds the test fixtures shared by the waveform packages:
// invented hardware, the tripod and Λ loops and plans used across tests.
package wavetest

import (
	"github.com/loopgate/loopgate/waveform"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// The hardware numbers below are invented for the tests (a generic AWG:
// 1 GS/s, 14-bit DAC, Rabi frequencies of ten-odd MHz); they are not
// taken from any instrument.
func Hardware(nch int, rabi float64) waveform.Hardware {
	h := waveform.Hardware{SampleRate: 1e9, MaxSlew: 2e15, Granularity: 16, MaxSamples: 1 << 20, DACBits: 14, MaxDuration: 1e-4}
	for i := 0; i < nch; i++ {
		h.MaxRabi = append(h.MaxRabi, rabi)
		h.FullScale = append(h.FullScale, 1.2*rabi)
	}
	return h
}

// SliceLoop is the "orange slice" loop of the tripod on the sphere of real
// normalised drive vectors n = (Ω₀, Ω₁, Ω_a)/Ω in the parametrisation of
// holonomy.TripodPoint: from the pole θ = 0 down the meridian φ = 0 to the
// equator, along the equator to φ = Δ, and back up the meridian φ = Δ. Each
// leg is traversed linearly in s; the corners are left to the timing.
func SliceLoop(delta float64) holonomy.Loop {
	return func(s float64, p holonomy.Point) {
		var th, ph float64
		switch {
		case s < 1.0/3:
			th, ph = math.Pi/2*3*s, 0
		case s < 2.0/3:
			th, ph = math.Pi/2, delta*(3*s-1)
		default:
			th, ph = math.Pi/2*(3-3*s), delta
		}
		holonomy.TripodPoint(p, 1, th, ph)
	}
}

// Rotation returns [[cos Δ, −sin Δ], [sin Δ, cos Δ]].
func Rotation(delta float64) *holonomy.Mat {
	c, s := math.Cos(delta), math.Sin(delta)
	return holonomy.NewMatFrom(2, 2, []complex128{complex(c, 0), complex(-s, 0), complex(s, 0), complex(c, 0)})
}

func TripodPlan(delta, alpha float64) *waveform.Plan {
	return &waveform.Plan{
		Scheme:       holonomy.Tripod(),
		Target:       Rotation(delta),
		Segments:     []waveform.Segment{{Kind: waveform.Adiabatic, Shape: SliceLoop(delta)}},
		Adiabaticity: alpha,
	}
}

// Hadamard is (X + Z)/√2.
func Hadamard() *holonomy.Mat {
	r := complex(1/math.Sqrt2, 0)
	return holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
}

// LambdaPlan is the one-loop nonadiabatic gate of Sjöqvist et al., New J.
// Phys. 14, 103035 (2012): a fixed unit drive (sin(θ/2)e^{iφ}, −cos(θ/2))
// with pulse area 2π acts on the qubit as n·σ, n = (sinθ cosφ, sinθ sinφ,
// cosθ).
func LambdaPlan(theta, phi float64, target *holonomy.Mat) *waveform.Plan {
	return &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: target,
		Segments: []waveform.Segment{{Kind: waveform.Cyclic, Area: 2 * math.Pi, Shape: func(s float64, p holonomy.Point) {
			holonomy.LambdaPoint(p, 1, theta, phi)
		}}},
	}
}

// NDotSigma returns n·σ for n = (sinθ cosφ, sinθ sinφ, cosθ).
func NDotSigma(theta, phi float64) *holonomy.Mat {
	st, ct := math.Sincos(theta)
	e := cmplx.Rect(st, -phi)
	return holonomy.NewMatFrom(2, 2, []complex128{complex(ct, 0), e, cmplx.Conj(e), complex(-ct, 0)})
}

func MustBuild(t testing.TB, p *waveform.Plan, hw waveform.Hardware) *waveform.Waveform {
	t.Helper()
	w, err := waveform.Build(p, hw)
	if err != nil {
		t.Fatalf("Build: %v", err)
	}
	return w
}

func MustVerify(t testing.TB, w *waveform.Waveform, m waveform.ErrorModel) *waveform.Verification {
	t.Helper()
	v, err := waveform.Verify(w, m)
	if err != nil {
		t.Fatalf("Verify: %v", err)
	}
	return v
}

func FindCheck(v *waveform.Verification, name string) (waveform.Check, bool) {
	for _, c := range v.Checks {
		if c.Name == name {
			return c, true
		}
	}
	return waveform.Check{}, false
}
