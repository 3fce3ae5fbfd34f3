package sim

import (
	"github.com/loopgate/loopgate/holonomy"
)

// lindbladWork propagates the d² operators |a⟩⟨b| (a, b computational)
// through the waveform with the engine's exact per-step Lindblad solver
// (holonomy.Lindblad), with decay Γ on the excited levels and the qubit
// dephasing γ_φ split as γ_φ/2 on each computational level in the engine's
// convention, so that a coherence between two computational levels decays
// as exp(−γ_φ t) and one between a computational and another level as
// exp(−γ_φ t/2). The results are the columns a·n + b of an n²×n²
// superoperator whose other columns stay zero: holonomy.ChannelFidelity
// reads only those columns (Pedersen, Møller and Mølmer, Phys. Lett. A 367,
// 47 (2007), Kraus form).
type lindbladWork struct {
	n    int
	lind *holonomy.Lindblad
	rho  []*holonomy.Mat // per input a·d + b
	cols []int           // superoperator column of each input
	sup  *holonomy.Mat   // n²×n², only cols filled
}

func newLindbladWork(n int, comp []int) *lindbladWork {
	lw := &lindbladWork{
		n:    n,
		lind: holonomy.NewLindblad(n, make([]float64, n), make([]float64, n)),
		sup:  holonomy.NewMat(n*n, n*n),
	}
	for _, ia := range comp {
		for _, ib := range comp {
			lw.rho = append(lw.rho, holonomy.NewMat(n, n))
			lw.cols = append(lw.cols, ia*n+ib)
		}
	}
	return lw
}

// reset sets the rates and the inputs |a⟩⟨b|.
func (lw *lindbladWork) reset(comp []int, decay []float64, isComp []bool, gphi float64) {
	copy(lw.lind.Decay, decay)
	for k := range lw.lind.Dephasing {
		lw.lind.Dephasing[k] = 0
		if isComp[k] {
			lw.lind.Dephasing[k] = gphi / 2
		}
	}
	d := len(comp)
	for a, ia := range comp {
		for b, ib := range comp {
			r := lw.rho[a*d+b]
			r.Zero()
			r.Set(ia, ib, 1)
		}
	}
}

// step propagates every input through one step.
func (lw *lindbladWork) step(h *holonomy.Mat, dt float64) {
	for _, r := range lw.rho {
		lw.lind.Step(r, h, dt)
	}
}

// population returns ⟨l|E(|a⟩⟨a|)|l⟩ for computational input index a.
func (lw *lindbladWork) population(l, a, d int) float64 {
	return real(lw.rho[a*d+a].At(l, l))
}

// fidelity returns the average fidelity and leakage against target.
func (lw *lindbladWork) fidelity(comp []int, target *holonomy.Mat) (fid, leak float64) {
	n, N := lw.n, lw.n*lw.n
	for i, r := range lw.rho {
		col := lw.cols[i]
		for k, v := range r.Data {
			lw.sup.Data[k*N+col] = v
		}
	}
	return holonomy.ChannelFidelity(lw.sup, n, comp, target)
}

// runLindblad is Run's path for a model with dephasing.
func (s *Simulator) runLindblad(m *ErrorModel, steps, stride int, dt float64, out *Figures) error {
	if s.lind == nil {
		s.lind = newLindbladWork(s.n, s.w.Scheme.Computational)
	}
	lw := s.lind
	comp := s.w.Scheme.Computational
	lw.reset(comp, s.decay, s.isComp, m.Dephasing)
	s.recordRho(out, stride, 0)
	for j := 0; j < steps; j++ {
		s.controls(j)
		s.hamiltonian()
		lw.step(s.h, dt)
		if (j+1)%s.sub == 0 {
			s.recordRho(out, stride, (j+1)/s.sub)
		}
	}
	out.Fidelity, out.Leakage = lw.fidelity(comp, s.w.Target)
	return nil
}

// recordRho is record for the density-matrix path.
func (s *Simulator) recordRho(out *Figures, stride, q int) {
	lw := s.lind
	n := s.n
	for a := range s.w.Scheme.Computational {
		var aux, exc float64
		for l := 0; l < n; l++ {
			if !s.isComp[l] {
				p := lw.population(l, a, s.d)
				aux += p
				if s.isExc[l] {
					exc += p
				}
			}
		}
		out.PeakAux[a] = max(out.PeakAux[a], aux)
		out.PeakExcited[a] = max(out.PeakExcited[a], exc)
	}
	if stride == 0 || (q%stride != 0 && q != s.last) {
		return
	}
	out.Times = append(out.Times, float64(q-s.padL)*s.w.Dt())
	for a := range s.w.Scheme.Computational {
		for l := 0; l < n; l++ {
			out.Populations[a][l] = append(out.Populations[a][l], lw.population(l, a, s.d))
		}
	}
}
