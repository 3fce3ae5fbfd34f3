package device

import (
	"fmt"

	"github.com/loopgate/loopgate/holonomy"
)

// GateFidelity returns the average gate fidelity with leakage of the
// samples (each held dt seconds) as the d×d unitary target on the model's
// computational levels, and the leakage, with the formula of holonomy
// (Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47 (2007)).
//
// When the model is PureStateExact it propagates the n×n propagator and
// uses holonomy.GateFidelity; otherwise it evolves only the d² operators
// |a⟩⟨b| on the computational levels through the full Lindblad dissipation —
// the only columns of the channel holonomy.ChannelFidelity reads — which
// costs d²/n² of Channel. It allocates its workspaces on first use.
func (s *Simulator) GateFidelity(samples []holonomy.Point, dt float64, target *holonomy.Mat) (fid, leak float64, err error) {
	comp := s.m.dev.Computational
	d, n := len(comp), s.m.n
	if target.R != d || target.C != d {
		return 0, 0, fieldErr(ErrShape, "target", "target is %d×%d for %d computational levels", target.R, target.C, d)
	}
	if s.m.pureOK {
		if s.fidU == nil {
			s.fidU = holonomy.NewMat(n, n)
		}
		s.fidU.SetIdentity()
		if err := s.Propagate(s.fidU, samples, dt); err != nil {
			return 0, 0, err
		}
		fid, leak = holonomy.GateFidelity(s.fidU, comp, target)
		return fid, leak, nil
	}
	if s.fidS == nil {
		s.fidS, s.fidOp = holonomy.NewMat(n*n, n*n), holonomy.NewMat(n, n)
	}
	if _, err := s.count(samples, dt, true); err != nil {
		return 0, 0, err
	}
	N := n * n
	for _, a := range comp {
		for _, b := range comp {
			op := s.fidOp
			op.Zero()
			op.Set(a, b, 1)
			if err := s.Evolve(op, samples, dt); err != nil {
				return 0, 0, fmt.Errorf("device: GateFidelity: %w", err)
			}
			col := a*n + b
			for r, v := range op.Data {
				s.fidS.Data[r*N+col] = v
			}
		}
	}
	fid, leak = holonomy.ChannelFidelity(s.fidS, n, comp, target)
	return fid, leak, nil
}
