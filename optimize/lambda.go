package optimize

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"github.com/loopgate/loopgate/holonomy"
)

// LambdaForm selects how a nonadiabatic Λ gate is built from pulses.
//
// In both forms a pulse (segment) drives the qubit levels g0, g1 to the
// excited level e with couplings ⟨e|H|g0⟩ = (Ω/2) sin(θ/2) e^{i(φ+χ)} and
// ⟨e|H|g1⟩ = −(Ω/2) cos(θ/2) e^{iχ}. Only the bright state
// |b⟩ = sin(θ/2)e^{−iφ}|g0⟩ − cos(θ/2)|g1⟩ couples to e; the dark state
// |d⟩ = cos(θ/2)|g0⟩ + sin(θ/2)e^{iφ}|g1⟩ is untouched. Because the
// direction of the coupling is constant during a segment, H(t) = Ω(t)H₁
// commutes with itself at all times and a resonant segment of pulse area
// A = ∫Ω dt gives exactly exp(−iAH₁), whatever the envelope:
//
//	|d⟩⟨d| + cos(A/2)(|b⟩⟨b| + |e⟩⟨e|) − i sin(A/2)(e^{iχ}|e⟩⟨b| + e^{−iχ}|b⟩⟨e|).
//
// The computational subspace returns to itself, with no dynamical phase
// (⟨b|H|b⟩ = ⟨d|H|d⟩ = 0), which makes the gate holonomic.
type LambdaForm int

const (
	// SingleLoop is one loop made of two half pulses of area π with the
	// same bright state, the second with its common drive phase shifted by
	// χ (Herterich and Sjöqvist, Phys. Rev. A 94, 052310 (2016)). The first
	// half sends |b⟩ to −i|e⟩, the second sends |e⟩ to −ie^{−iχ}|b⟩, so
	//
	//	U = |d⟩⟨d| − e^{−iχ}|b⟩⟨b| = e^{iγ/2} exp(−i(γ/2) n·σ),  γ = π − χ,
	//
	// a rotation by γ about n = (sinθ cosφ, sinθ sinφ, cosθ): every gate
	// in one loop of total area 2π. Parameters (θ, φ, χ). The two halves
	// must share the bright state: with different bright states the second
	// half would leave part of the dark state of the first in e (leakage).
	// For γ = π (H, X, Y, Z, any n·σ) χ = 0 and the two halves form one
	// continuous 2π pulse.
	SingleLoop LambdaForm = iota
	// TwoLoops is two full loops of area 2π with bright-state parameters
	// (θ1, φ1) then (θ2, φ2) (Sjöqvist et al., New J. Phys. 14, 103035
	// (2012)): each gives U_j = n_j·σ, so U = (n2·σ)(n1·σ), a rotation by
	// twice the angle between n1 and n2 about n1×n2. Parameters
	// (θ1, φ1, θ2, φ2). A target that is itself an n·σ (a π rotation)
	// needs only the first loop; the closed form then returns one segment.
	TwoLoops
)

// String names the form.
func (f LambdaForm) String() string {
	switch f {
	case SingleLoop:
		return "single loop (two half pulses)"
	case TwoLoops:
		return "two loops"
	}
	return fmt.Sprintf("LambdaForm(%d)", int(f))
}

// NumParams returns the number of search parameters of the form.
func (f LambdaForm) NumParams() int {
	if f == TwoLoops {
		return 4
	}
	return 3
}

// Segment is one resonant pulse of a nonadiabatic Λ gate: constant
// coupling direction, pulse area Area = ∫Ω dt (Ω the Rabi frequency of the
// bright transition, H = (Ω/2)(|e⟩⟨b| + h.c.)). The waveform stage
// realises it with any envelope of that area whose amplitude starts and
// ends at zero, switching the parameters only while the amplitude is zero.
type Segment struct {
	// Theta and Phi set the bright state (see LambdaForm), in radians.
	Theta, Phi float64
	// Phase is the common drive phase χ of both channels, in radians.
	Phase float64
	// Area is the pulse area in radians (π or 2π).
	Area float64
}

// LambdaCoupling locates the Λ structure in a scheme: the two
// computational levels and the channels joining each to a common excited
// level.
type LambdaCoupling struct {
	// Scheme is the level scheme.
	Scheme *holonomy.Scheme
	// Excited is the index of the common level e.
	Excited int
	// Channel[j] is the channel joining computational level j to e.
	Channel [2]int
}

// NewLambdaCoupling finds the Λ structure in sc: exactly two computational
// levels, each joined by one channel to the same non-computational level.
// Other channels are left at zero drive.
func NewLambdaCoupling(sc *holonomy.Scheme) (*LambdaCoupling, error) {
	if err := sc.Validate(); err != nil {
		return nil, fmt.Errorf("optimize: Λ scheme: %w", err)
	}
	if len(sc.Computational) != 2 {
		return nil, fmt.Errorf("optimize: scheme %q: a Λ gate needs 2 computational levels, the scheme has %d", sc.Name, len(sc.Computational))
	}
	g0, g1 := sc.Computational[0], sc.Computational[1]
	other := func(ch holonomy.Channel, g int) int {
		switch g {
		case ch.Lower:
			return ch.Upper
		case ch.Upper:
			return ch.Lower
		}
		return -1
	}
	for c0, ch0 := range sc.Channels {
		e := other(ch0, g0)
		if e < 0 || e == g1 {
			continue
		}
		for c1, ch1 := range sc.Channels {
			if c1 != c0 && other(ch1, g1) == e {
				return &LambdaCoupling{Scheme: sc, Excited: e, Channel: [2]int{c0, c1}}, nil
			}
		}
	}
	return nil, fmt.Errorf("optimize: scheme %q: no level is joined by a channel to each of the qubit levels %q and %q, "+
		"so it has no Λ structure for a nonadiabatic gate", sc.Name, sc.Levels[g0].Name, sc.Levels[g1].Name)
}

// Point writes into p the unit-scale control point of segment g: drives on
// the two Λ channels such that ⟨e|H|g0⟩ = sin(θ/2)e^{i(φ+χ)}/2 and
// ⟨e|H|g1⟩ = −cos(θ/2)e^{iχ}/2 (bright Rabi frequency 1, matrix-element
// factors divided out), all other drives zero. p.Detuning is left alone.
// It does not allocate.
func (lc *LambdaCoupling) Point(g Segment, p holonomy.Point) {
	lc.point(g, p, nil)
}

func (lc *LambdaCoupling) point(g Segment, p holonomy.Point, scale []float64) {
	for c := range p.Drive {
		p.Drive[c] = 0
	}
	st, ct := math.Sincos(g.Theta / 2)
	want := [2]complex128{
		cmplx.Rect(st, g.Phi+g.Phase),
		cmplx.Rect(-ct, g.Phase),
	}
	for j, c := range lc.Channel {
		ch := lc.Scheme.Channels[c]
		v := want[j]
		if ch.Upper == lc.Scheme.Computational[j] {
			// The channel drives g_j as its upper level: ⟨e|H|g⟩ is the
			// conjugate of f·Drive/2.
			v = cmplx.Conj(v)
		}
		v /= complex(ch.Factor, 0)
		if scale != nil {
			v *= complex(scale[c], 0)
		}
		p.Drive[c] = v
	}
}

// lambdaEval propagates segment sequences on one (possibly perturbed)
// scheme without allocating.
type lambdaEval struct {
	lc     *LambdaCoupling
	sc     *holonomy.Scheme
	scale  []float64
	prop   *holonomy.Propagator
	p      holonomy.Point
	h, u   *holonomy.Mat
	cols   *holonomy.Mat // n×k: the computational columns of the propagator
	blk    *holonomy.Mat
	target *holonomy.Mat
}

func newLambdaEval(lc *LambdaCoupling, sc *holonomy.Scheme, scale []float64, target *holonomy.Mat) *lambdaEval {
	n, k := sc.Dim(), len(sc.Computational)
	return &lambdaEval{lc: lc, sc: sc, scale: scale, prop: holonomy.NewPropagator(n), p: sc.NewPoint(),
		h: holonomy.NewMat(n, n), u: holonomy.NewMat(n, n), cols: holonomy.NewMat(n, k), blk: holonomy.NewMat(k, k), target: target}
}

// gate propagates the computational columns of segs, each a square pulse
// of unit peak Rabi frequency lasting Area (exact for resonant pulses of any
// envelope; with detunings it is the square-envelope propagator), and
// returns the infidelity and leakage of the computational block: the
// fidelity needs no other column. Each column is propagated on its own, so
// the block is the same, bit for bit, as that of fullGate.
func (e *lambdaEval) gate(segs []Segment) (infid, leak float64) {
	comp := e.sc.Computational
	e.cols.Zero()
	for j, c := range comp {
		e.cols.Set(c, j, 1)
	}
	e.steps(e.cols, segs)
	for a, r := range comp {
		for b := range comp {
			e.blk.Set(a, b, e.cols.At(r, b))
		}
	}
	return e.score()
}

// fullGate is gate with the full propagator, left in e.u.
func (e *lambdaEval) fullGate(segs []Segment) (infid, leak float64) {
	e.u.SetIdentity()
	e.steps(e.u, segs)
	holonomy.Block(e.blk, e.u, e.sc.Computational)
	return e.score()
}

func (e *lambdaEval) steps(u *holonomy.Mat, segs []Segment) {
	for _, g := range segs {
		e.lc.point(g, e.p, e.scale)
		e.sc.Hamiltonian(e.h, e.p)
		e.prop.Step(u, e.h, g.Area)
	}
}

// score returns the infidelity and leakage of e.blk.
func (e *lambdaEval) score() (infid, leak float64) {
	var norm float64
	for _, v := range e.blk.Data {
		norm += real(v)*real(v) + imag(v)*imag(v)
	}
	return holonomy.BlockInfidelity(e.blk, e.target), math.Max(0, 1-norm/float64(e.blk.R))
}

// LambdaClosedForm returns the segments that make the 2×2 unitary target
// (up to a global phase) in the given form, exactly.
//
// With the target written as V = T/√det T = a₀I − i a·σ in SU(2) (sign
// chosen so that a₀ ≥ 0), it is a rotation by γ = 2 atan2(|a|, a₀) ∈ [0, π]
// about n = a/|a|. SingleLoop: bright-state angles (θ, φ) of n and second-half
// phase χ = π − γ. TwoLoops: since (n2·σ)(n1·σ) = n1·n2 I + i(n2×n1)·σ,
// take n1 ⊥ n, n2 = cos(γ/2) n1 + sin(γ/2) n×n1, so n1·n2 = a₀ and
// n1×n2 = a; when a₀ = 0 (the target is n·σ up to a phase) one loop with
// n1 = n suffices. The identity gives χ = π (SingleLoop) or n1 = n2
// (TwoLoops).
func LambdaClosedForm(target *holonomy.Mat, form LambdaForm) ([]Segment, error) {
	if err := checkTarget(target, 2); err != nil {
		return nil, err
	}
	a0, a := su2Params(target)
	na := math.Sqrt(a[0]*a[0] + a[1]*a[1] + a[2]*a[2])
	gamma := 2 * math.Atan2(na, a0)
	n := [3]float64{0, 0, 1}
	if na > 1e-15 {
		n = [3]float64{a[0] / na, a[1] / na, a[2] / na}
	}
	switch form {
	case SingleLoop:
		th, ph := angles(n)
		return []Segment{
			{Theta: th, Phi: ph, Phase: 0, Area: math.Pi},
			{Theta: th, Phi: ph, Phase: math.Pi - gamma, Area: math.Pi},
		}, nil
	case TwoLoops:
		if math.Abs(a0) <= 1e-12 {
			th, ph := angles(n)
			return []Segment{{Theta: th, Phi: ph, Area: 2 * math.Pi}}, nil
		}
		// n1 ⊥ n: n × ẑ unless n is along z.
		n1 := [3]float64{n[1], -n[0], 0}
		if m := math.Hypot(n1[0], n1[1]); m > 1e-8 {
			n1[0], n1[1] = n1[0]/m, n1[1]/m
		} else {
			n1 = [3]float64{1, 0, 0}
		}
		c, s := math.Cos(gamma/2), math.Sin(gamma/2)
		x := cross(n, n1)
		n2 := [3]float64{c*n1[0] + s*x[0], c*n1[1] + s*x[1], c*n1[2] + s*x[2]}
		t1, p1 := angles(n1)
		t2, p2 := angles(n2)
		return []Segment{{Theta: t1, Phi: p1, Area: 2 * math.Pi}, {Theta: t2, Phi: p2, Area: 2 * math.Pi}}, nil
	}
	return nil, fmt.Errorf("optimize: unknown Λ form %d", int(form))
}

// su2Params writes the 2×2 unitary t as e^{iα}(a₀I − i a·σ) with a₀ ≥ 0
// (and, when a₀ = 0, the first non-zero component of a positive).
func su2Params(t *holonomy.Mat) (a0 float64, a [3]float64) {
	det := t.At(0, 0)*t.At(1, 1) - t.At(0, 1)*t.At(1, 0)
	ph := cmplx.Sqrt(det)
	v00, v01 := t.At(0, 0)/ph, t.At(0, 1)/ph
	v10, v11 := t.At(1, 0)/ph, t.At(1, 1)/ph
	// V = [[a0 − i a3, −i a1 − a2], [−i a1 + a2, a0 + i a3]].
	a0 = real(v00+v11) / 2
	a[0] = -imag(v01+v10) / 2
	a[1] = real(v10-v01) / 2
	a[2] = -imag(v00-v11) / 2
	flip := a0 < 0
	if math.Abs(a0) <= 1e-12 {
		// A π rotation: ±a give the same gate; make the first clearly
		// non-zero component of the axis positive.
		a0 = 0
		for _, v := range a {
			if math.Abs(v) > 1e-12 {
				flip = v < 0
				break
			}
		}
	}
	if flip {
		a0, a[0], a[1], a[2] = -a0, -a[0], -a[1], -a[2]
	}
	return a0, a
}

func angles(n [3]float64) (theta, phi float64) {
	theta = math.Acos(math.Max(-1, math.Min(1, n[2])))
	phi = math.Atan2(n[1]+0, n[0]) // +0 turns −0 into 0
	if math.Abs(math.Sin(theta)) < 1e-15 {
		phi = 0
	}
	return theta, phi
}

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

// segmentsFrom writes the segments of form for parameters x into dst.
func segmentsFrom(form LambdaForm, x []float64, dst []Segment) []Segment {
	dst = dst[:0]
	if form == TwoLoops {
		return append(dst,
			Segment{Theta: x[0], Phi: x[1], Area: 2 * math.Pi},
			Segment{Theta: x[2], Phi: x[3], Area: 2 * math.Pi})
	}
	return append(dst,
		Segment{Theta: x[0], Phi: x[1], Area: math.Pi},
		Segment{Theta: x[0], Phi: x[1], Phase: x[2], Area: math.Pi})
}

// paramsFrom returns the search parameters of closed-form segments.
func paramsFrom(form LambdaForm, segs []Segment) []float64 {
	if form == TwoLoops {
		if len(segs) == 1 {
			// One loop n·σ equals (n2·σ)(n1·σ) for n1 ⊥ n, n2 = n × n1
			// only up to a phase; as a starting point use two loops
			// whose product is the same π rotation.
			n := [3]float64{math.Sin(segs[0].Theta) * math.Cos(segs[0].Phi), math.Sin(segs[0].Theta) * math.Sin(segs[0].Phi), math.Cos(segs[0].Theta)}
			n1 := [3]float64{n[1], -n[0], 0}
			if m := math.Hypot(n1[0], n1[1]); m > 1e-8 {
				n1[0], n1[1] = n1[0]/m, n1[1]/m
			} else {
				n1 = [3]float64{1, 0, 0}
			}
			n2 := cross(n, n1)
			t1, p1 := angles(n1)
			t2, p2 := angles(n2)
			return []float64{t1, p1, t2, p2}
		}
		return []float64{segs[0].Theta, segs[0].Phi, segs[1].Theta, segs[1].Phi}
	}
	return []float64{segs[0].Theta, segs[0].Phi, segs[1].Phase}
}

// LambdaSearch designs a nonadiabatic holonomic gate on a Λ scheme with
// Nelder–Mead (Nelder and Mead, Comput. J. 7, 308 (1965)) over the
// parameters of a LambdaForm, restarted from seeded random angles. The
// objective is the infidelity of the exactly propagated pulse sequence
// (one propagator step per segment, see LambdaForm) plus the caller's
// penalty. The closed form (LambdaClosedForm) is known; FromClosedForm
// starts the first restart there.
type LambdaSearch struct {
	// Scheme is the Λ scheme (see NewLambdaCoupling).
	Scheme *holonomy.Scheme
	// Target is the 2×2 unitary gate on the computational levels.
	Target *holonomy.Mat
	// Form is the pulse form; the zero value is SingleLoop.
	Form LambdaForm
	// Restarts bounds the number of Nelder–Mead runs; zero means 20.
	Restarts int
	// Seed seeds the PCG generator of the starting points.
	Seed uint64
	// TargetInfidelity is the stopping infidelity; zero means 1e-6.
	TargetInfidelity float64
	// MaxEvaluations bounds the objective evaluations; zero means 20000.
	MaxEvaluations int
	// FromClosedForm starts the first run at the closed-form solution.
	FromClosedForm bool
	// Penalty, if not nil, adds hardware penalties for parameters x: it
	// must be deterministic, return 0 for acceptable designs and a
	// positive amount otherwise, and not keep x.
	Penalty func(x []float64) float64
	// Ensemble, if not empty, makes the design robust: after the nominal
	// search a second Nelder–Mead run from the nominal optimum minimises the
	// mean infidelity over the ensemble. Amplitude errors change the pulse
	// areas; detuned members are propagated with square envelopes of unit
	// peak Rabi frequency (duration = area).
	Ensemble Ensemble
	// RobustEvaluations bounds the robust stage; zero means 3000.
	RobustEvaluations int
}

// LambdaResult is the outcome of a LambdaSearch.
type LambdaResult struct {
	// Form is the pulse form.
	Form LambdaForm
	// Params are the search parameters (see LambdaForm).
	Params []float64
	// Segments are the pulses to play, in order.
	Segments []Segment
	// U is the full unit-scale propagator of the segments (n×n).
	U *holonomy.Mat
	// Infidelity and Leakage are those of U's computational block.
	Infidelity, Leakage float64
	// Penalty is the caller's penalty at Params.
	Penalty float64
	// Evaluations and Restarts count objective evaluations and
	// Nelder–Mead runs (nominal stage).
	Evaluations, Restarts int
	// Robust compares robust and nominal designs when an Ensemble was given.
	Robust *RobustReport
}

func (s *LambdaSearch) defaults() (restarts, maxEvals, robustEvals int, target float64) {
	restarts, maxEvals, robustEvals, target = s.Restarts, s.MaxEvaluations, s.RobustEvaluations, s.TargetInfidelity
	if restarts <= 0 {
		restarts = 20
	}
	if maxEvals <= 0 {
		maxEvals = 20000
	}
	if robustEvals <= 0 {
		robustEvals = 3000
	}
	if target <= 0 {
		target = 1e-6
	}
	return
}

// Run performs the search. It honours ctx between evaluations. When the
// target is not met it returns the best result found together with an
// error wrapping ErrTargetNotReached.
func (s *LambdaSearch) Run(ctx context.Context) (*LambdaResult, error) {
	if s.Scheme == nil {
		return nil, errors.New("optimize: Λ search: no scheme given")
	}
	lc, err := NewLambdaCoupling(s.Scheme)
	if err != nil {
		return nil, err
	}
	if err := checkTarget(s.Target, 2); err != nil {
		return nil, err
	}
	if s.Form != SingleLoop && s.Form != TwoLoops {
		return nil, fmt.Errorf("optimize: unknown Λ form %d", int(s.Form))
	}
	if err := s.Ensemble.check(s.Scheme); err != nil {
		return nil, err
	}
	restarts, maxEvals, robustEvals, target := s.defaults()
	dim := s.Form.NumParams()
	nominal := newLambdaEval(lc, s.Scheme, nil, s.Target)
	segs := make([]Segment, 0, 2)
	pen := func(x []float64) float64 {
		if s.Penalty == nil {
			return 0
		}
		return s.Penalty(x)
	}
	eval := func(x []float64) (float64, float64, float64) {
		segs = segmentsFrom(s.Form, x, segs)
		inf, _ := nominal.gate(segs)
		p := pen(x)
		return inf + p, inf, p
	}
	ms := &multiStart{
		dim: dim, restarts: restarts, maxEvals: maxEvals, target: target, goal: 1e-3 * target,
		simplex: 0.3, patience: 30 * dim, progress: 1e-3,
		rng:        rand.New(rand.NewPCG(s.Seed, 0x4c616d626461)),
		draw:       drawAngles,
		eval:       eval,
		needTarget: true,
	}
	if s.FromClosedForm {
		cf, err := LambdaClosedForm(s.Target, s.Form)
		if err != nil {
			return nil, err
		}
		ms.starts = [][]float64{paramsFrom(s.Form, cf)}
	}
	best, err := ms.run(ctx)
	if err != nil {
		return nil, err
	}
	res := s.result(lc, best.x, best.evals, best.restarts)
	if s.Penalty != nil {
		res.Penalty = s.Penalty(res.Params)
	}
	if !best.success {
		return res, fmt.Errorf("optimize: Λ search for %s after %d evaluations in %d runs: best infidelity %.3g "+
			"(penalty %.3g) misses the target %.3g with zero penalty: %w", s.Form, best.evals, best.restarts, best.infid,
			res.Penalty, target, ErrTargetNotReached)
	}
	if len(s.Ensemble) > 0 {
		rep, x, err := s.robust(ctx, lc, res.Params, robustEvals, pen, target)
		if err != nil {
			return nil, err
		}
		nomParams := res.Params
		res = s.result(lc, x, res.Evaluations, res.Restarts)
		if s.Penalty != nil {
			res.Penalty = s.Penalty(res.Params)
		}
		rep.NominalParams = nomParams
		res.Robust = rep
	}
	return res, nil
}

func (s *LambdaSearch) result(lc *LambdaCoupling, x []float64, evals, restarts int) *LambdaResult {
	e := newLambdaEval(lc, s.Scheme, nil, s.Target)
	x = append([]float64(nil), x...)
	segs := segmentsFrom(s.Form, x, nil)
	inf, leak := e.fullGate(segs)
	return &LambdaResult{Form: s.Form, Params: x, Segments: segs, U: e.u, Infidelity: inf, Leakage: leak,
		Evaluations: evals, Restarts: restarts}
}

// robust minimises the mean ensemble infidelity from x0.
func (s *LambdaSearch) robust(ctx context.Context, lc *LambdaCoupling, x0 []float64, maxEvals int,
	pen func([]float64) float64, target float64) (*RobustReport, []float64, error) {
	members := make([]*lambdaEval, len(s.Ensemble))
	for i, p := range s.Ensemble {
		sc, scale := p.apply(s.Scheme)
		members[i] = newLambdaEval(lc, sc, scale, s.Target)
	}
	segs := make([]Segment, 0, 2)
	per := make([]float64, len(members))
	eval := func(x []float64) (float64, float64, float64) {
		segs = segmentsFrom(s.Form, x, segs)
		for i, m := range members {
			per[i], _ = m.gate(segs)
		}
		mean, _ := meanMax(per)
		p := pen(x)
		return mean + p, mean, p
	}
	measure := func(x []float64) []float64 {
		eval(x)
		return append([]float64(nil), per...)
	}
	return robustStage(ctx, s.Ensemble, x0, eval, measure, maxEvals, 0.05, target)
}

// drawAngles draws θ ∈ [0, π] uniformly in cos θ and the other angles
// uniformly in [−π, π).
func drawAngles(rng *rand.Rand, x []float64) {
	for i := range x {
		x[i] = (2*rng.Float64() - 1) * math.Pi
	}
	x[0] = math.Acos(2*rng.Float64() - 1)
	if len(x) == 4 {
		x[2] = math.Acos(2*rng.Float64() - 1)
	}
}
