package optimize

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"runtime"
	"sync"

	"github.com/loopgate/loopgate/holonomy"
)

// DefaultLengthWeight is the weight of the loop length in the objective
// when Search.LengthWeight is zero: 1e-4 per radian of control-space
// length. Near a solution the infidelity grows quadratically with the
// parameter error, so a linear length term of weight λ shifts the optimum
// by O(λ) and costs O(λ²) ≈ 1e-8 in infidelity — well below the default
// target — while still preferring the shorter, hence faster, of two loops
// that make the same gate.
const DefaultLengthWeight = 1e-4

// ErrTargetNotReached is wrapped by the error of a search that ends without
// meeting its target infidelity (or with a positive penalty); the best
// result found comes with it.
var ErrTargetNotReached = errors.New("target infidelity not reached")

// searchMargin is the share of the target infidelity a run aims for, so
// that the final adaptive check, which differs from the fixed-N value by the
// discretisation error, still meets the target.
const searchMargin = 0.1

// Search finds a closed loop of a Shape whose adiabatic holonomy on a
// scheme is a target gate.
//
// # Algorithm
//
// The objective of the loop parameters x is
//
//	f(x) = (1 − F(U_N(x), target)) + λ·L(x) + Penalty(x),
//
// where U_N is the discrete Wilson loop of the working subspace with a fixed
// number N of loop points (holonomy.Wilson), F the average gate fidelity of
// Pedersen, Møller and Mølmer (Phys. Lett. A 367, 47 (2007)) — blind to a
// global phase —, L the loop's length in the control metric (Length) and λ
// the length weight. It is minimised with the Nelder–Mead simplex method
// (Nelder and Mead, Comput. J. 7, 308 (1965); gonum's NelderMead with its
// dimension-dependent coefficients), started at Start if given and then
// from points drawn by a PCG generator seeded with Seed, so that the same
// search gives the same loop bit for bit. A run ends when its best point
// has infidelity ≤ TargetInfidelity and zero Penalty (success: the search
// stops), or when its best value has not fallen by 0.1 % in 30·dim
// iterations (the next restart begins), or when the evaluation budget is
// spent.
//
// Before searching, Reachability refuses targets the loops cannot make.
// After a success the loop is checked with holonomy's adaptive Wilson loop
// (Richardson-extrapolated, error estimate ≤ CheckTolerance); if the
// checked infidelity misses the target because N was too coarse, the
// search continues from the best point with 2N points (at most three
// times).
//
// With an Ensemble, a second stage minimises the mean infidelity over the
// ensemble members from the nominal optimum (see RobustReport). Each member
// is evaluated with the perturbed scheme (detunings added to its levels)
// and amplitude-scaled drives. A common amplitude scale leaves the
// normalised loop and so the adiabatic holonomy unchanged; detunings change
// the dark states. The ensemble measures the geometric part only: where a
// detuning lifts the degeneracy of the working subspace, the dynamical
// phase it adds depends on the schedule and is left to the waveform stage's
// propagation.
type Search struct {
	// Scheme is the level scheme.
	Scheme *holonomy.Scheme
	// Target is the k×k unitary gate on the computational levels.
	Target *holonomy.Mat
	// Shape is the loop family searched; its current parameters are not
	// used (see Start) and it is not modified.
	Shape Shape
	// Restarts bounds the number of Nelder–Mead runs; zero means 20.
	Restarts int
	// Seed seeds the PCG generator of the starting points.
	Seed uint64
	// TargetInfidelity is the success threshold; zero means 1e-6.
	TargetInfidelity float64
	// MaxEvaluations bounds the objective evaluations of the nominal
	// search (restarts and refinements together); zero means 20000.
	MaxEvaluations int
	// Points is the fixed number N of Wilson-loop points during the
	// search; zero means Shape.NumPoints().
	Points int
	// LengthWeight is λ per radian of loop length; zero means
	// DefaultLengthWeight and a negative value switches the term off.
	LengthWeight float64
	// Penalty, if not nil, adds hardware penalties for parameters x (to
	// evaluate them, set them on a clone of Shape). It must be
	// deterministic, return 0 for acceptable loops and a positive amount
	// otherwise, and not keep x. The search calls it from one goroutine at
	// a time (its restarts run concurrently, with the calls serialised).
	Penalty func(x []float64) float64
	// InitialScale is the half-width of the uniform distribution of the
	// random starting parameters; zero means 1.
	InitialScale float64
	// Start, if not nil, is the starting point of the first run.
	Start []float64
	// Ensemble, if not empty, adds the robust stage.
	Ensemble Ensemble
	// RobustEvaluations bounds the robust stage; zero means 800. Each of
	// its evaluations costs one Wilson loop per ensemble member.
	RobustEvaluations int
	// CheckTolerance is the error estimate requested from the final
	// adaptive Wilson loop; zero means 1e-7.
	CheckTolerance float64
}

// Result is the outcome of a Search.
type Result struct {
	// Params are the loop parameters found.
	Params []float64
	// Shape is an independent copy of the searched shape set to Params;
	// its Point method is the loop.
	Shape Shape
	// Loop is Shape.Point, the loop as a holonomy.Loop.
	Loop holonomy.Loop
	// U is the k×k holonomy from the final adaptive Wilson loop.
	U *holonomy.Mat
	// Infidelity is 1 − F of U against the target.
	Infidelity float64
	// SearchInfidelity is the infidelity with Points loop points, as
	// the search saw it.
	SearchInfidelity float64
	// Points is the number of Wilson-loop points the search ended with.
	Points int
	// Length is the loop's length in the control metric, in radians.
	Length float64
	// Penalty is the caller's penalty at Params.
	Penalty float64
	// Check is the adaptive Wilson loop's result (points, error estimate,
	// smallest gap, findings).
	Check *holonomy.AdaptiveHolonomy
	// Reach is the set of gates the scheme's loops can make.
	Reach Reach
	// Evaluations counts objective evaluations of the nominal search, and
	// Restarts its Nelder–Mead runs.
	Evaluations, Restarts int
	// Robust compares robust and nominal designs when an Ensemble was given.
	Robust *RobustReport
}

type searchConfig struct {
	restarts, maxEvals, points, robustEvals int
	target, lambda, scale, checkTol         float64
	penalty                                 func([]float64) float64 // Search.Penalty, one call at a time
}

func (s *Search) config() searchConfig {
	c := searchConfig{restarts: s.Restarts, maxEvals: s.MaxEvaluations, points: s.Points, robustEvals: s.RobustEvaluations,
		target: s.TargetInfidelity, lambda: s.LengthWeight, scale: s.InitialScale, checkTol: s.CheckTolerance}
	if c.restarts <= 0 {
		c.restarts = 20
	}
	if c.maxEvals <= 0 {
		c.maxEvals = 20000
	}
	if c.points <= 0 {
		c.points = s.Shape.NumPoints()
	}
	if c.robustEvals <= 0 {
		c.robustEvals = 800
	}
	if c.target <= 0 {
		c.target = 1e-6
	}
	switch {
	case c.lambda == 0:
		c.lambda = DefaultLengthWeight
	case c.lambda < 0:
		c.lambda = 0
	}
	if c.scale <= 0 {
		c.scale = 1
	}
	if c.checkTol <= 0 {
		c.checkTol = 1e-7
	}
	if pen := s.Penalty; pen != nil {
		// The search's workers share the caller's penalty, which need not
		// be safe for concurrent use.
		var mu sync.Mutex
		c.penalty = func(x []float64) float64 {
			mu.Lock()
			defer mu.Unlock()
			return pen(x)
		}
	}
	return c
}

func (s *Search) validate() error {
	if s.Scheme == nil {
		return errors.New("optimize: search: no scheme given")
	}
	if s.Shape == nil {
		return errNoShape
	}
	if err := s.Scheme.Validate(); err != nil {
		return fmt.Errorf("optimize: search: %w", err)
	}
	sp := s.Shape.Control()
	if sp == nil || sp.channels != len(s.Scheme.Channels) || sp.levels != len(s.Scheme.Levels) {
		return fmt.Errorf("optimize: search: the loop shape's sphere was made for another scheme than %q", s.Scheme.Name)
	}
	if s.Start != nil && len(s.Start) != s.Shape.NumParams() {
		return fmt.Errorf("optimize: search: Start has %d values, the shape has %d parameters", len(s.Start), s.Shape.NumParams())
	}
	return s.Ensemble.check(s.Scheme)
}

// objective evaluates Search's objective on one shape and Wilson workspace.
type objective struct {
	shape   Shape
	loop    holonomy.Loop
	w       *holonomy.Wilson
	u       *holonomy.Mat
	target  *holonomy.Mat
	n       int
	lambda  float64
	penalty func([]float64) float64
	a, b    []float64      // length scratch
	chords  int            // samples of the length
	members []*member      // robust stage only
	groups  []*memberGroup // the members shared out among goroutines
	per     []float64
}

// member is one ensemble member of the robust stage.
type member struct {
	w     *holonomy.Wilson
	base  holonomy.Loop
	scale []float64
	loop  holonomy.Loop
}

func (m *member) point(s float64, p holonomy.Point) {
	m.base(s, p)
	for c := range p.Drive {
		p.Drive[c] *= complex(m.scale[c], 0)
	}
}

func newObjective(s *Search, c searchConfig) *objective {
	k := len(s.Scheme.Computational)
	sh := s.Shape.Clone()
	d := sh.Control().Dim()
	o := &objective{shape: sh, w: holonomy.NewWilson(s.Scheme), u: holonomy.NewMat(k, k), target: s.Target,
		n: c.points, lambda: c.lambda, penalty: c.penalty, a: make([]float64, d), b: make([]float64, d)}
	o.loop = sh.Point
	o.chords = lengthPoints(sh)
	return o
}

// parts returns the length and penalty terms at the shape's parameters x.
func (o *objective) parts(x []float64) (float64, float64) {
	var l, p float64
	if o.lambda > 0 {
		l = o.lambda * length(o.shape, o.chords, o.a, o.b)
	}
	if o.penalty != nil {
		p = o.penalty(x)
	}
	return l, p
}

// nominal is the objective of the nominal search.
func (o *objective) nominal(x []float64) (total, infid, pen float64) {
	o.shape.SetParams(x)
	l, p := o.parts(x)
	if _, err := o.w.Loop(o.loop, o.n, o.u); err != nil {
		return failValue + l + p, 1, p
	}
	inf := holonomy.BlockInfidelity(o.u, o.target)
	return inf + l + p, inf, p
}

// robust is the objective of the robust stage: the mean infidelity over the
// members.
func (o *objective) robust(x []float64) (total, infid, pen float64) {
	o.shape.SetParams(x)
	l, p := o.parts(x)
	o.memberInfidelities(x, o.n, o.per)
	mean, _ := meanMax(o.per)
	return mean + l + p, mean, p
}

// memberGroup is the share of the ensemble members one goroutine evaluates:
// members g, g+G, g+2G, … of G groups, on the group's own copy of the shape.
type memberGroup struct {
	shape   Shape
	u       *holonomy.Mat
	members []int
}

// memberInfidelities writes into out the infidelity of every member at
// the shape parameters x with n loop points (1 where the Wilson loop
// fails). The groups run concurrently; each member's value depends only on
// x, so out is the same for any number of groups.
func (o *objective) memberInfidelities(x []float64, n int, out []float64) {
	one := func(g *memberGroup) {
		g.shape.SetParams(x)
		for _, i := range g.members {
			m := o.members[i]
			out[i] = 1
			if _, err := m.w.Loop(m.loop, n, g.u); err == nil {
				out[i] = holonomy.BlockInfidelity(g.u, o.target)
			}
		}
	}
	var wg sync.WaitGroup
	for gi := 1; gi < len(o.groups); gi++ {
		wg.Add(1)
		go func(g *memberGroup) {
			defer wg.Done()
			one(g)
		}(o.groups[gi])
	}
	one(o.groups[0])
	wg.Wait()
}

// groupMembers shares the members among min(GOMAXPROCS, members) groups,
// the first on o's shape, the others on clones, and points every member's
// loop at its group's shape.
func (o *objective) groupMembers() {
	ng := max(1, min(runtime.GOMAXPROCS(0), len(o.members)))
	k := o.u.R
	o.groups = make([]*memberGroup, ng)
	for g := range o.groups {
		sh := o.shape
		if g > 0 {
			sh = o.shape.Clone()
		}
		o.groups[g] = &memberGroup{shape: sh, u: holonomy.NewMat(k, k)}
	}
	for i, m := range o.members {
		g := o.groups[i%ng]
		g.members = append(g.members, i)
		m.base = g.shape.Point
	}
}

// Run performs the search and the final check. It honours ctx between
// objective evaluations and returns ctx's error (wrapped) when cancelled.
// A target out of reach gives an *UnreachableError before any search. When
// the target is not met the best result found is returned together with an
// error wrapping ErrTargetNotReached.
func (s *Search) Run(ctx context.Context) (*Result, error) {
	if err := s.validate(); err != nil {
		return nil, err
	}
	c := s.config()
	reach, err := Reachability(s.Scheme, s.Shape.Control(), s.Target, c.target)
	if err != nil {
		return nil, err
	}
	o := newObjective(s, c)
	dim := s.Shape.NumParams()
	scale := c.scale
	ms := s.nominalStarts(o, c)
	best, err := ms.run(ctx)
	if err != nil {
		return nil, err
	}
	evals, restarts := best.evals, best.restarts
	x, searchInf := best.x, best.infid
	res, err := s.check(o, x, c)
	if err != nil {
		return nil, err
	}
	// Refine: the fixed-N Wilson loop was too coarse for the target.
	for r := 0; r < 3 && best.success && res.Infidelity > c.target && evals < c.maxEvals; r++ {
		o.n *= 2
		ref := &multiStart{
			dim: dim, restarts: 1, maxEvals: c.maxEvals - evals, target: c.target, goal: searchMargin * c.target,
			simplex: 0.02 * scale, patience: 30 * dim, progress: 1e-3,
			starts: [][]float64{x}, eval: o.nominal, needTarget: true,
		}
		rb, err := ref.run(ctx)
		if err != nil {
			return nil, err
		}
		evals += rb.evals
		restarts += rb.restarts
		x, searchInf = rb.x, rb.infid
		if res, err = s.check(o, x, c); err != nil {
			return nil, err
		}
	}
	res.Reach = reach
	res.SearchInfidelity = searchInf
	res.Evaluations, res.Restarts = evals, restarts
	if !best.success || res.Infidelity > c.target || res.Penalty > 0 {
		return res, fmt.Errorf("optimize: search on %q with %d parameters after %d evaluations in %d runs: "+
			"best infidelity %.3g (checked %.3g, penalty %.3g) misses the target %.3g with zero penalty: %w",
			s.Scheme.Name, dim, evals, restarts, searchInf, res.Infidelity, res.Penalty, c.target, ErrTargetNotReached)
	}
	if len(s.Ensemble) > 0 {
		rep, xr, err := s.robust(ctx, o, x, c)
		if err != nil {
			return nil, err
		}
		nominal := res
		if res, err = s.check(o, xr, c); err != nil {
			return nil, err
		}
		res.Reach = reach
		res.SearchInfidelity = nominal.SearchInfidelity
		res.Evaluations, res.Restarts = evals, restarts
		rep.NominalParams = nominal.Params
		res.Robust = rep
	}
	return res, nil
}

// nominalStarts sets up the multi-start nominal search. Its restarts run on
// a worker pool, each worker with its own shape, Wilson workspace and
// objective (worker 0 uses o).
func (s *Search) nominalStarts(o *objective, c searchConfig) *multiStart {
	dim := s.Shape.NumParams()
	scale := c.scale
	ms := &multiStart{
		dim: dim, restarts: c.restarts, maxEvals: c.maxEvals, target: c.target, goal: searchMargin * c.target,
		simplex: 0.25 * scale, patience: 30 * dim, progress: 1e-3,
		rng: rand.New(rand.NewPCG(s.Seed, 0x6c6f6f70)),
		draw: func(rng *rand.Rand, x []float64) {
			for i := range x {
				x[i] = (2*rng.Float64() - 1) * scale
			}
		},
		needTarget: true,
		newEval: func(i int) evalFunc {
			if i == 0 {
				return o.nominal
			}
			return newObjective(s, c).nominal
		},
	}
	if s.Start != nil {
		ms.starts = [][]float64{s.Start}
	}
	return ms
}

// check runs the adaptive Wilson loop on the shape at x and fills a Result.
func (s *Search) check(o *objective, x []float64, c searchConfig) (*Result, error) {
	sh := s.Shape.Clone()
	sh.SetParams(x)
	w := holonomy.NewWilson(s.Scheme)
	pts := o.n
	if pts%4 != 0 {
		pts *= 4
	}
	chk, err := w.Adaptive(sh.Point, holonomy.AdaptiveOptions{Points: pts, Tol: c.checkTol, Extrapolate: true})
	if err != nil && !errors.Is(err, holonomy.ErrNotConverged) {
		return nil, fmt.Errorf("optimize: checking the loop found: %w", err)
	}
	res := &Result{Params: sh.Params(), Shape: sh, Loop: sh.Point, U: chk.U, Check: chk, Points: o.n,
		Infidelity: holonomy.BlockInfidelity(chk.U, s.Target), Length: Length(sh)}
	if s.Penalty != nil {
		res.Penalty = s.Penalty(res.Params)
	}
	return res, nil
}

// robust runs the robust stage from the nominal optimum x0.
func (s *Search) robust(ctx context.Context, o *objective, x0 []float64, c searchConfig) (*RobustReport, []float64, error) {
	nominal, err := BaseClusters(s.Scheme, s.Shape.Control())
	if err != nil {
		return nil, nil, err
	}
	o.members = o.members[:0]
	for i, p := range s.Ensemble {
		sc, scale := p.apply(s.Scheme)
		cl, err := BaseClusters(sc, s.Shape.Control())
		if err == nil && !sameClusters(cl, nominal) {
			err = errors.New("its detunings split the degenerate computational levels at the base point")
		}
		if err != nil {
			return nil, nil, fmt.Errorf("optimize: ensemble member %d changes the working subspace (%v); its effect is "+
				"dynamical, not a holonomy, and is left to the waveform stage's propagation", i, err)
		}
		m := &member{w: holonomy.NewWilson(sc), base: o.loop, scale: scale}
		m.loop = m.point
		o.members = append(o.members, m)
	}
	o.groupMembers()
	o.per = make([]float64, len(o.members))
	// Accurate per-member values with four times the search's points.
	measure := func(x []float64) []float64 {
		out := make([]float64, len(o.members))
		o.memberInfidelities(x, 4*o.n, out)
		return out
	}
	return robustStage(ctx, s.Ensemble, x0, o.robust, measure, c.robustEvals, 0.05*c.scale, c.target)
}

func sameClusters(a, b []Cluster) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i].Levels) != len(b[i].Levels) {
			return false
		}
		for j := range a[i].Levels {
			if a[i].Levels[j] != b[i].Levels[j] {
				return false
			}
		}
	}
	return true
}
