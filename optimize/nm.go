package optimize

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/optimize"
)

// evalFunc evaluates the objective at x: the total (infidelity plus
// penalties) that Nelder–Mead minimises, and its parts.
type evalFunc func(x []float64) (total, infid, pen float64)

// failValue is the objective of a point where the holonomy could not be
// computed (for instance a closing gap): worse than any computed point,
// and finite so that the simplex logic keeps working.
const failValue = 10

// multiStart runs gonum's Nelder–Mead from a sequence of starting points
// (the given starts first, then seeded random draws) until a point meets
// the target or the budget is spent.
//
// With newEval set, the runs go to a pool of min(GOMAXPROCS, restarts)
// workers, each with its own evaluator, and the results are combined in
// the order of the starting points exactly as a sequential search would
// combine them: run r has the budget maxEvals minus the evaluations of runs
// 0 … r−1 (a run that may have been cut short by a larger budget given
// before those were known is run again with the right one), the best point
// is the first best in that order, and the search ends after the first run
// that meets the target; later runs started meanwhile are abandoned and
// not counted. The first run goes alone, since most searches end with it. Each run depends only on its starting point and budget, and
// the starting points are drawn in order, so the result is the same for
// any GOMAXPROCS and any timing.
type multiStart struct {
	dim        int
	restarts   int     // number of starting points tried, at least 1
	maxEvals   int     // total evaluation bound
	target     float64 // success: infid ≤ target and pen ≤ 0
	goal       float64 // a run stops when its best infid ≤ goal (≤ target; zero means target)
	simplex    float64
	patience   int     // major iterations without relative progress before a restart ends
	progress   float64 // relative decrease that counts as progress
	starts     [][]float64
	draw       func(rng *rand.Rand, x []float64)
	rng        *rand.Rand
	eval       evalFunc // the evaluator when newEval is nil (one worker)
	needTarget bool     // stop at the first point with infid ≤ target and pen ≤ 0
	// newEval, if not nil, returns the evaluator of worker i (i ≥ 0); each
	// must have its own workspace and all must give the same values.
	newEval func(i int) evalFunc
}

// msResult is the best point of a multiStart run and its bookkeeping.
type msResult struct {
	x               []float64
	f, infid, pen   float64
	evals, restarts int
	success         bool // the target was met (or, without a target, the run ended normally)
}

// threshold is a gonum Converger that stops a run when the best point meets
// the target, or when the best objective has not fallen by a relative
// amount progress in patience major iterations.
type threshold struct {
	done     func() bool
	patience int
	progress float64
	best     float64
	iter     int
}

func (c *threshold) Init(int) { c.best, c.iter = math.Inf(1), 0 }

func (c *threshold) Converged(loc *optimize.Location) optimize.Status {
	if c.done() {
		return optimize.FunctionThreshold
	}
	if loc.F < c.best*(1-c.progress) || math.IsInf(c.best, 1) {
		c.best, c.iter = loc.F, 0
		return optimize.NotTerminated
	}
	c.iter++
	if c.iter >= c.patience {
		return optimize.FunctionConvergence
	}
	return optimize.NotTerminated
}

// runOut is the outcome of one Nelder–Mead run.
type runOut struct {
	x             []float64
	f, infid, pen float64
	evals, budget int
	err           error
}

// pool holds the runs handed to the workers.
type pool struct {
	x0s     [][]float64
	budgets []int
	outs    []*runOut
	dones   []chan struct{}
	jobs    chan<- int
}

// errAbandoned ends a run whose result is no longer needed.
var errAbandoned = errors.New("optimize: run abandoned")

// better reports whether (f, infid, pen) beats (bf, binfid, bpen): with a
// target, a point meeting it beats one that does not; otherwise (and among
// equals in that) the lower objective wins.
func (m *multiStart) better(f, infid, pen, bf, binfid, bpen float64) bool {
	if !m.needTarget {
		return f < bf
	}
	bm, xm := m.met(binfid, bpen), m.met(infid, pen)
	return (xm && !bm) || (xm == bm && f < bf)
}

func (m *multiStart) met(infid, pen float64) bool { return infid <= m.target && pen <= 0 }

// one runs Nelder–Mead from x0 with at most budget evaluations of eval; it
// gives up with errAbandoned when abandon reports true.
func (m *multiStart) one(ctx context.Context, eval evalFunc, x0 []float64, budget int, abandon func() bool) *runOut {
	out := &runOut{x: make([]float64, m.dim), f: math.Inf(1), infid: math.Inf(1), budget: budget}
	goal := m.goal
	if goal <= 0 || goal > m.target {
		goal = m.target
	}
	var runBest struct{ f, infid, pen float64 }
	runBest.f = math.Inf(1)
	problem := optimize.Problem{
		Func: func(x []float64) float64 {
			out.evals++
			f, infid, pen := eval(x)
			if math.IsNaN(f) || math.IsInf(f, 0) {
				f = failValue
			}
			if f < runBest.f {
				runBest.f, runBest.infid, runBest.pen = f, infid, pen
			}
			if m.better(f, infid, pen, out.f, out.infid, out.pen) {
				out.f, out.infid, out.pen = f, infid, pen
				copy(out.x, x)
			}
			return f
		},
		Status: func() (optimize.Status, error) {
			if err := ctx.Err(); err != nil {
				return optimize.Failure, err
			}
			if abandon() {
				return optimize.Failure, errAbandoned
			}
			return optimize.NotTerminated, nil
		},
	}
	conv := &threshold{
		done:     func() bool { return m.needTarget && runBest.infid <= goal && runBest.pen <= 0 },
		patience: m.patience,
		progress: m.progress,
	}
	settings := &optimize.Settings{Converger: conv, FuncEvaluations: budget, Concurrent: 1}
	_, out.err = optimize.Minimize(problem, x0, settings, &optimize.NelderMead{SimplexSize: m.simplex})
	return out
}

// run performs the multi-start search (see multiStart).
func (m *multiStart) run(ctx context.Context) (msResult, error) {
	evals := []evalFunc{m.eval}
	if m.newEval != nil {
		evals = evals[:0]
		for i := 0; i < max(1, min(runtime.GOMAXPROCS(0), m.restarts)); i++ {
			evals = append(evals, m.newEval(i))
		}
	}
	nw := len(evals)
	// Run r: starting point and budget (set before it is handed out), its
	// outcome, and the signal that the outcome is there.
	x0s := make([][]float64, m.restarts)
	budgets := make([]int, m.restarts)
	outs := make([]*runOut, m.restarts)
	dones := make([]chan struct{}, m.restarts)
	jobs := make(chan int, m.restarts)
	var last atomic.Int64 // runs after this index are abandoned
	last.Store(int64(m.restarts))
	var wg sync.WaitGroup
	for w := 0; w < nw; w++ {
		wg.Add(1)
		go func(eval evalFunc) {
			defer wg.Done()
			for r := range jobs {
				if int64(r) > last.Load() {
					outs[r] = &runOut{err: errAbandoned}
				} else {
					outs[r] = m.one(ctx, eval, x0s[r], budgets[r], func() bool { return int64(r) > last.Load() })
				}
				close(dones[r])
			}
		}(evals[w])
	}
	best, err := m.combine(ctx, &pool{x0s, budgets, outs, dones, jobs}, nw, evals[0])
	last.Store(-1)
	close(jobs)
	wg.Wait()
	return best, err
}

// combine hands out the runs (at most nw ahead of the last one combined, none
// ahead of the first) and
// combines their results in order. spare evaluates a run again when its
// budget was too large; it is free whenever that is needed (it is a
// worker's evaluator only with one worker, which is then idle).
func (m *multiStart) combine(ctx context.Context, p *pool, nw int, spare evalFunc) (msResult, error) {
	best := msResult{f: math.Inf(1), infid: math.Inf(1), x: make([]float64, m.dim)}
	next := 0
	for r := 0; r < m.restarts; r++ {
		remaining := m.maxEvals - best.evals
		if remaining <= m.dim+1 {
			break
		}
		// The first run goes alone: most searches end with it, and a run
		// started beside it would only take CPU time from other work.
		window := nw
		if r == 0 {
			window = 1
		}
		for ; next < m.restarts && next < r+window; next++ {
			x0 := make([]float64, m.dim)
			if next < len(m.starts) {
				copy(x0, m.starts[next])
			} else {
				m.draw(m.rng, x0)
			}
			p.x0s[next] = x0
			// Budget as far as known now; never below the exact one.
			p.budgets[next] = m.maxEvals - best.evals
			p.dones[next] = make(chan struct{})
			p.jobs <- next
		}
		<-p.dones[r]
		o := p.outs[r]
		if o.err == nil && o.budget != remaining && o.evals >= remaining {
			if nw > 1 {
				spare = m.newEval(nw)
			}
			o = m.one(ctx, spare, p.x0s[r], remaining, func() bool { return false })
		}
		best.restarts++
		best.evals += o.evals
		if o.err != nil {
			if ctx.Err() != nil {
				return best, fmt.Errorf("optimize: search stopped after %d evaluations: %w", best.evals, ctx.Err())
			}
			return best, fmt.Errorf("optimize: Nelder–Mead: %w", o.err)
		}
		if m.better(o.f, o.infid, o.pen, best.f, best.infid, best.pen) {
			best.f, best.infid, best.pen = o.f, o.infid, o.pen
			copy(best.x, o.x)
		}
		if m.needTarget && m.met(best.infid, best.pen) {
			best.success = true
			return best, nil
		}
	}
	if !m.needTarget {
		best.success = true
	}
	return best, ctx.Err()
}
