package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// matchPhase makes the dynamical phase between the two working clusters
// of an adiabatic segment a whole multiple of 2π, so that the gate is the
// holonomy alone (up to a global phase). With Φ = Σ_k (E_2 − E_1)_k Δt over
// the sampled segment (E_1 < E_2 the cluster energies at each sample), it
// first lengthens the loop so that Φ reaches the next multiple 2πm at the
// full amplitude, then lowers the amplitude slightly (secant iteration on
// the resampled segment) until Φ = 2πm to 1e-9 rad. Since Φ ∝ A·T for a
// Hamiltonian that scales with A, the adiabaticity parameter ∝ 1/(A·T)
// does not grow.
func (b *builder) matchPhase(t *timing) error {
	const tol = 1e-9
	phase := func(amp float64) (total, loop float64, err error) {
		t.amp = amp
		n := 2*t.nRamp + t.nMain
		w := &Waveform{I: make([][]float64, len(b.sc.Channels)), Q: make([][]float64, len(b.sc.Channels)), Detuning: make([][]float64, b.sc.Dim())}
		for c := range w.I {
			w.I[c], w.Q[c] = make([]float64, n), make([]float64, n)
		}
		b.sampleAdiabatic(w, t, 0)
		return b.clusterPhase(w, t.nRamp, n)
	}
	a0 := t.amp
	p0, l0, err := phase(a0)
	if err != nil {
		return err
	}
	m := math.Ceil(p0/(2*math.Pi) - 1e-12)
	want := 2 * math.Pi * m
	if math.Abs(p0-want) <= tol {
		return nil
	}
	// Lengthen the loop: its phase grows in proportion to its length.
	if l0 <= 0 {
		return fmt.Errorf("the dynamical phase between the working clusters does not grow along the loop")
	}
	perSample := l0 / float64(t.nMain)
	t.nMain += int(math.Ceil((want - p0) / perSample))
	// Lower the amplitude to hit 2πm exactly.
	x0, f0 := a0, 0.0
	if p, _, err := phase(x0); err != nil {
		return err
	} else {
		f0 = p - want
	}
	// The phase per sample is not uniform along the loop: add samples
	// until the full amplitude reaches 2πm, so that the root lies at an
	// amplitude ≤ a0.
	for tries := 0; f0 < 0 && tries < 8; tries++ {
		t.nMain += int(math.Ceil(-f0/perSample)) + 1
		p, _, err := phase(x0)
		if err != nil {
			return err
		}
		f0 = p - want
	}
	bestX, bestF := x0, f0
	x1 := a0 * want / (want + f0)
	for it := 0; it < 30; it++ {
		if !(x1 > 0.5*a0 && x1 <= a0) {
			break
		}
		p, _, err := phase(x1)
		if err != nil {
			return err
		}
		f1 := p - want
		if math.Abs(f1) <= tol {
			return nil
		}
		if math.Abs(f1) < math.Abs(bestF) {
			bestX, bestF = x1, f1
		}
		if f1 == f0 {
			break
		}
		x0, x1, f0 = x1, x1-f1*(x1-x0)/(f1-f0), f1
	}
	// The amplitude may not exceed a0, and the sample count is whole, so
	// the exact root can lie out of reach; a residual phase δ costs an
	// infidelity of about δ²/6 on a qubit, so up to phaseAccept (≈ 2e-9)
	// is kept.
	if math.Abs(bestF) <= phaseAccept {
		if _, _, err := phase(bestX); err != nil {
			return err
		}
		return nil
	}
	return fmt.Errorf("cannot make the dynamical phase between the working clusters a multiple of 2π (reached %.3g rad off)", bestF)
}

// phaseAccept is the largest residual dynamical phase (rad) matchPhase
// accepts when the exact root is out of reach.
const phaseAccept = 1e-4

// clusterPhase returns Φ = Σ_k (Ẽ_2 − Ẽ_1)_k Δt over the n samples of an
// adiabatic segment in w (unquantised drive, static detunings included)
// and the part of it from the loop, between the ramps of nr samples. Ẽ_C
// is the energy of working cluster C with its second-order adiabatic
// correction, Ẽ_C = E_C + Σ_{j∉C} ‖P_C ∂_tH|j⟩‖²/(|C|(E_C − E_j)³) (the
// level shift from the nonadiabatic coupling i⟨j|∂_t m⟩ = i⟨j|∂_tH|m⟩/(E_m −
// E_j) in second-order perturbation theory; without it the phase would be
// off by O(α)), with ∂_tH from central differences of the samples. The
// two clusters are chosen by weight at every ramp sample and followed by
// their places in the spectrum along the loop.
func (b *builder) clusterPhase(w *Waveform, nr, n int) (total, loop float64, err error) {
	dt := 1 / b.hw.SampleRate
	pt := b.pt
	set := func(dst *holonomy.Mat, k int) {
		w.unquantizedPoint(k, pt)
		b.sc.Hamiltonian(dst, pt)
	}
	dim := b.sc.Dim()
	hp, hm := holonomy.NewMat(dim, dim), holonomy.NewMat(dim, dim)
	var loopWork [][2]int
	for k := 0; k < n; k++ {
		set(b.h, k)
		b.sp.Factorize(b.h)
		inLoop := k >= nr && k < n-nr
		if inLoop && loopWork != nil {
			b.sp.SetWorking(loopWork)
		} else {
			if err := b.sp.ChooseWorking(); err != nil {
				return 0, 0, fmt.Errorf("sample %d of the segment: %w", k, err)
			}
			if inLoop {
				loopWork = append([][2]int(nil), b.sp.Working()...)
			}
		}
		if len(b.sp.Working()) != 2 {
			return 0, 0, fmt.Errorf("sample %d of the segment: %d working clusters where the base point has 2", k, len(b.sp.Working()))
		}
		// ∂_tH by central differences (one-sided at the ends).
		kp, km := min(k+1, n-1), max(k-1, 0)
		set(hp, kp)
		set(hm, km)
		for i := range hp.Data {
			hp.Data[i] = (hp.Data[i] - hm.Data[i]) / complex(float64(kp-km)*dt, 0)
		}
		dv, vals := b.sp.InEigenbasis(hp), b.sp.Values()
		energy := func(r [2]int) float64 {
			var e float64
			for i := r[0]; i < r[1]; i++ {
				e += vals[i]
			}
			e /= float64(r[1] - r[0])
			var shift float64
			for j := 0; j < dim; j++ {
				if j >= r[0] && j < r[1] {
					continue
				}
				de := e - vals[j]
				for m := r[0]; m < r[1]; m++ {
					x := dv.Data[m*dim+j]
					shift += (real(x)*real(x) + imag(x)*imag(x)) / (de * de * de)
				}
			}
			return e + shift/float64(r[1]-r[0])
		}
		d := (energy(b.sp.Working()[1]) - energy(b.sp.Working()[0])) * dt
		total += d
		if inLoop {
			loop += d
		}
	}
	return total, loop, nil
}
