package design

import (
	"context"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"github.com/loopgate/loopgate/waveform/wavefile"
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
)

// CheckOptions controls CheckLoopFile.
type CheckOptions struct {
	// Target, if not empty, names the gate to compare with instead of the
	// file's target (see Gates).
	Target string
	// Rabi is the peak Rabi frequency Ω/2π (Hz) the loop will be driven
	// with. A loop file holds unit-scale points (peak Rabi frequency 1), so
	// the scheme's static detunings enter the holonomy only relative to Ω:
	// with Rabi > 0 they are scaled by it; with 0 they are left out, and a
	// note says so when the scheme has any.
	Rabi float64
}

// LoopCheck is what CheckLoopFile reports about a loop file.
type LoopCheck struct {
	// Source names the loop file and Scheme its level scheme.
	Source string `json:"source"`
	Scheme string `json:"scheme"`
	// Target describes the gate compared with.
	Target string `json:"target"`
	// Gate is the gate the loop makes on the computational levels, rows of
	// [re, im] pairs.
	Gate [][][2]float64 `json:"gate"`
	// Fidelity is the average gate fidelity to the target (up to a global
	// phase) and Leakage the population the gate loses from the qubit.
	Fidelity float64 `json:"fidelity"`
	Leakage  float64 `json:"leakage"`
	// Segments describes each segment.
	Segments []SegmentCheck `json:"segments"`
	// Notes qualify the result in words.
	Notes []string `json:"notes,omitempty"`
	// Pass reports whether Fidelity ≥ MinFidelity.
	Pass        bool    `json:"pass"`
	MinFidelity float64 `json:"min_fidelity"`
}

// SegmentCheck describes one segment of a loop file.
type SegmentCheck struct {
	Kind string `json:"kind"`
	// Points and ErrorEstimate describe the adaptive holonomy (adiabatic
	// segments): loop points used and the estimated Frobenius error.
	Points        int     `json:"points,omitempty"`
	ErrorEstimate float64 `json:"error_estimate,omitempty"`
	// MinGap is the smallest gap along the loop at unit amplitude (the
	// gap at peak Rabi frequency Ω is MinGap·Ω), and MinGapAt where it is.
	MinGap   float64 `json:"min_gap_unit,omitempty"`
	MinGapAt float64 `json:"min_gap_at,omitempty"`
	// AdiabaticityProduct is κ = max_s |⟨m|∂ₛH|n⟩|/(E_m − E_n)² at unit
	// amplitude: traversing the loop at uniform speed in time T with peak
	// Rabi frequency Ω gives adiabaticity parameter κ/(ΩT). Zero for
	// cyclic segments.
	AdiabaticityProduct float64 `json:"adiabaticity_product,omitempty"`
	// Area is the pulse area of a cyclic segment (rad).
	Area float64 `json:"area_rad,omitempty"`
	// Findings are diagnostics in words.
	Findings []string `json:"findings,omitempty"`
}

// checkTol is the holonomy accuracy requested by CheckLoopFile.
const checkTol = 1e-8

// CheckLoopFile reads a loop file and computes the gate its segments
// make: the adaptive Wilson-loop holonomy of each adiabatic segment and
// the exact propagator of each cyclic segment (exp(−iH·A) for the
// unit-scale Hamiltonian H and area A, exact for any pulse shape since H
// keeps its direction), composed in order; then the fidelity to the
// target and diagnostics in words.
func CheckLoopFile(ctx context.Context, path string, opt CheckOptions) (*LoopCheck, error) {
	r, err := openInput(path, "loop file")
	if err != nil {
		return nil, err
	}
	defer r.Close()
	lf, err := wavefile.ReadLoop(r, path)
	if err != nil {
		return nil, &InputError{Err: err}
	}
	target, label := lf.Target, targetLabel(lf.Target)
	if opt.Target != "" {
		g, ok := spec.LookupGate(opt.Target)
		if !ok {
			return nil, &InputError{Err: fmt.Errorf("flag --target: unknown gate %q (see 'loopgate gates')", opt.Target)}
		}
		target, label = g.Matrix(), g.Symbol
	}
	detuned := false
	for _, l := range lf.Scheme.Levels {
		detuned = detuned || l.Detuning != 0
	}
	var note string
	if opt.Rabi > 0 {
		lf.Scheme = unitScheme(lf.Scheme, opt.Rabi)
	} else {
		lf.Scheme = unitScheme(lf.Scheme, 0)
		for k := range lf.Scheme.Levels {
			lf.Scheme.Levels[k].Detuning = 0
		}
		if detuned {
			note = "the scheme's static detunings were left out: give the peak Rabi frequency (--rabi) to include them relative to it"
		}
	}
	sc := lf.Scheme
	n, d := sc.Dim(), len(sc.Computational)
	if target.R != d {
		return nil, &InputError{Err: fmt.Errorf("loop file %s: the target is %d×%d but the scheme has %d computational levels", path, target.R, target.C, d)}
	}
	total := holonomy.Identity(n)
	tmp := holonomy.NewMat(n, n)
	seg := holonomy.NewMat(n, n)
	out := &LoopCheck{Source: path, Scheme: sc.Name, Target: label, MinFidelity: waveform.DefaultMinFidelity}
	for i, s := range lf.Segments {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		segc := SegmentCheck{Kind: s.Kind.String()}
		loop := lf.Shape(i)
		switch s.Kind {
		case waveform.Cyclic:
			segc.Area = s.Area
			cyclicPropagator(lf.Scheme, loop, s.Area, seg)
		default:
			res, err := holonomy.NewWilson(lf.Scheme).Adaptive(loop, holonomy.AdaptiveOptions{Points: 4 * len(s.S), Tol: checkTol, Extrapolate: true})
			if err != nil {
				var ge *holonomy.GapError
				if errors.As(err, &ge) {
					return nil, &InfeasibleError{Err: fmt.Errorf("loop file %s: segment %d: %w", path, i, err)}
				}
				return nil, fmt.Errorf("loop file %s: segment %d: %w", path, i, err)
			}
			segc.Points, segc.ErrorEstimate = res.Points, res.ErrorEstimate
			segc.MinGap, segc.MinGapAt = res.Gap.Min, res.Gap.At
			for _, f := range res.Findings {
				segc.Findings = append(segc.Findings, f.Message)
			}
			segc.AdiabaticityProduct, err = adiabaticityProduct(lf.Scheme, loop, 4*len(s.S))
			if err != nil {
				return nil, fmt.Errorf("loop file %s: segment %d: %w", path, i, err)
			}
			embedBlock(seg, res.U, lf.Scheme.Computational)
		}
		holonomy.Mul(tmp, seg, total)
		total.Copy(tmp)
		out.Segments = append(out.Segments, segc)
	}
	if note != "" {
		out.Notes = append(out.Notes, note)
	}
	out.Fidelity, out.Leakage = holonomy.GateFidelity(total, sc.Computational, target)
	out.Pass = out.Fidelity >= out.MinFidelity
	for _, a := range sc.Computational {
		var row [][2]float64
		for _, b := range sc.Computational {
			v := total.At(a, b)
			row = append(row, [2]float64{real(v), imag(v)})
		}
		out.Gate = append(out.Gate, row)
	}
	if !out.Pass {
		return out, &ChecksFailedError{Failed: []string{fmt.Sprintf("fidelity %.6f < %.6f", out.Fidelity, out.MinFidelity)}}
	}
	return out, nil
}

// cyclicPropagator writes exp(−i H·area) into dst for the unit-scale
// Hamiltonian of the segment's point.
func cyclicPropagator(sc *holonomy.Scheme, loop holonomy.Loop, area float64, dst *holonomy.Mat) {
	p := sc.NewPoint()
	loop(0, p)
	h := holonomy.NewMat(sc.Dim(), sc.Dim())
	sc.Hamiltonian(h, p)
	for i := range h.Data {
		h.Data[i] *= complex(0, -area)
	}
	holonomy.Expm(dst, h)
}

// embedBlock writes the identity with the k×k block u placed on the levels comp.
func embedBlock(dst, u *holonomy.Mat, comp []int) {
	dst.SetIdentity()
	for i, a := range comp {
		for j, b := range comp {
			dst.Set(a, b, u.At(i, j))
		}
	}
}

// adiabaticityProduct returns max over the loop of
// ‖P_W ∂ₛH|n⟩‖/(E_W − E_n)² at unit amplitude, where W is the working
// subspace (the eigenvectors with most weight on the computational levels
// at s = 0, tracked by their places in the ascending spectrum) and n runs
// over the other eigenstates; ∂ₛH is a central difference.
func adiabaticityProduct(sc *holonomy.Scheme, loop holonomy.Loop, n int) (float64, error) {
	dim := sc.Dim()
	eig := holonomy.NewEigen(dim)
	vals := make([]float64, dim)
	v := holonomy.NewMat(dim, dim)
	h, hp, hm := holonomy.NewMat(dim, dim), holonomy.NewMat(dim, dim), holonomy.NewMat(dim, dim)
	p := sc.NewPoint()
	at := func(dst *holonomy.Mat, s float64) {
		s = s - math.Floor(s)
		for k := range p.Detuning {
			p.Detuning[k] = 0
		}
		loop(s, p)
		sc.Hamiltonian(dst, p)
	}
	// Working places: the len(Computational) eigenvectors with the most
	// computational weight at s = 0.
	at(h, 0)
	eig.Factorize(h, vals, v)
	k := len(sc.Computational)
	weight := make([]float64, dim)
	for j := 0; j < dim; j++ {
		for _, c := range sc.Computational {
			a := v.At(c, j)
			weight[j] += real(a)*real(a) + imag(a)*imag(a)
		}
	}
	work := make([]bool, dim)
	for t := 0; t < k; t++ {
		best := -1
		for j := 0; j < dim; j++ {
			if !work[j] && (best < 0 || weight[j] > weight[best]) {
				best = j
			}
		}
		work[best] = true
	}
	ds := 1 / float64(n)
	var kappa float64
	for i := 0; i < n; i++ {
		s := float64(i) * ds
		at(h, s)
		at(hp, s+ds/2)
		at(hm, s-ds/2)
		eig.Factorize(h, vals, v)
		for m := 0; m < dim; m++ {
			if !work[m] {
				continue
			}
			for q := 0; q < dim; q++ {
				if work[q] {
					continue
				}
				gap := vals[m] - vals[q]
				if math.Abs(gap) < 1e-12 {
					return 0, fmt.Errorf("the gap closes near s = %.4f", s)
				}
				var el complex128
				for a := 0; a < dim; a++ {
					for b := 0; b < dim; b++ {
						dh := (hp.At(a, b) - hm.At(a, b)) / complex(ds, 0)
						el += cmplx.Conj(v.At(a, m)) * dh * v.At(b, q)
					}
				}
				kappa = math.Max(kappa, cmplx.Abs(el)/(gap*gap))
			}
		}
	}
	return kappa, nil
}

// targetLabel names a target stored in a file: the named gate it equals up
// to a global phase, or its matrix.
func targetLabel(u *holonomy.Mat) string {
	for _, g := range spec.Gates() {
		if u.R == 2 && holonomy.BlockInfidelity(u, g.Matrix()) < 1e-12 {
			return g.Symbol + " (" + g.Title + "), stored in the file"
		}
	}
	return "the unitary stored in the file"
}
