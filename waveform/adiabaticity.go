package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// MeasureAdiabaticity returns the adiabaticity parameter
//
//	α = max_k max_{C, n∉C} ‖P_C ∂_tH|n⟩‖ / (E_C − E_n)²
//
// over the interior samples k of every adiabatic segment, where the
// eigendecomposition is that of H at sample k (unquantised drive) and
// ∂_tH is the central difference (H_{k+1} − H_{k−1})/(2Δt). The working
// clusters C are chosen by their weight on the computational levels at
// every ramp sample and, along the loop, are the clusters chosen at its
// first sample followed by their places in the ascending spectrum. It
// returns NaN when the waveform has no adiabatic segment and an error when
// the gap closes.
func (w *Waveform) MeasureAdiabaticity() (float64, error) {
	sc := w.Scheme
	n := sc.Dim()
	sp := holonomy.NewSpectrum(sc)
	h, hp, hm := holonomy.NewMat(n, n), holonomy.NewMat(n, n), holonomy.NewMat(n, n)
	pt := sc.NewPoint()
	set := func(dst *holonomy.Mat, k int) {
		w.unquantizedPoint(k, pt)
		sc.Hamiltonian(dst, pt)
	}
	alpha := math.NaN()
	dt := w.Dt()
	for si, span := range w.Segments {
		if span.Kind != AdiabaticSegment {
			continue
		}
		if math.IsNaN(alpha) {
			alpha = 0
		}
		loop0, loop1 := span.First+span.Ramp, span.First+span.Len-span.Ramp
		// Working clusters of the loop, chosen at its first sample.
		set(h, loop0)
		sp.Factorize(h)
		if err := sp.ChooseWorking(); err != nil {
			return 0, fmt.Errorf("segment %d, first loop sample %d: %w", si, loop0, err)
		}
		loopWork := append([][2]int(nil), sp.Working()...)
		for k := span.First + 1; k < span.First+span.Len-1; k++ {
			set(h, k)
			set(hp, k+1)
			set(hm, k-1)
			for i := range hp.Data {
				hp.Data[i] = (hp.Data[i] - hm.Data[i]) / complex(2*dt, 0)
			}
			sp.Factorize(h)
			if k >= loop0 && k < loop1 {
				sp.SetWorking(loopWork)
			} else if err := sp.ChooseWorking(); err != nil {
				return 0, fmt.Errorf("segment %d, ramp sample %d: %w", si, k, err)
			}
			thr := 1e-9 * (holonomy.FrobeniusNorm(hp) + 1e-300)
			kappa, gap := sp.AdiabaticRatio(hp, thr)
			if math.IsInf(kappa, 1) || (k >= loop0 && k < loop1 && gap <= sp.Tol()) {
				return 0, fmt.Errorf("segment %d, sample %d: %w", si, k, &holonomy.GapError{S: float64(k-loop0) / float64(max(1, loop1-loop0)), V: math.NaN(), Gap: gap, Tol: sp.Tol()})
			}
			alpha = math.Max(alpha, kappa)
		}
	}
	return alpha, nil
}

// unquantizedPoint writes the control point of sample k from the
// unquantised samples into pt (rad/s): drives 2π(I + iQ) and the
// controlled detuning tracks (zero for levels without one).
func (w *Waveform) unquantizedPoint(k int, pt holonomy.Point) {
	for c := range pt.Drive {
		pt.Drive[c] = complex(2*math.Pi*w.I[c][k], 2*math.Pi*w.Q[c][k])
	}
	for l := range pt.Detuning {
		pt.Detuning[l] = 0
		if w.Detuning[l] != nil {
			pt.Detuning[l] = 2 * math.Pi * w.Detuning[l][k]
		}
	}
}
