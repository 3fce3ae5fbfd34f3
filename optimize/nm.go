package optimize

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

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
	eval       evalFunc
	needTarget bool // stop at the first point with infid ≤ target and pen ≤ 0
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

func (m *multiStart) run(ctx context.Context) (msResult, error) {
	best := msResult{f: math.Inf(1), infid: math.Inf(1), x: make([]float64, m.dim)}
	met := func(infid, pen float64) bool { return infid <= m.target && pen <= 0 }
	goal := m.goal
	if goal <= 0 || goal > m.target {
		goal = m.target
	}
	x0 := make([]float64, m.dim)
	var runBest struct {
		f, infid, pen float64
	}
	problem := optimize.Problem{
		Func: func(x []float64) float64 {
			best.evals++
			f, infid, pen := m.eval(x)
			if math.IsNaN(f) || math.IsInf(f, 0) {
				f = failValue
			}
			if f < runBest.f {
				runBest.f, runBest.infid, runBest.pen = f, infid, pen
			}
			better := f < best.f
			if m.needTarget {
				// A point meeting the target beats one that does not.
				bm, xm := met(best.infid, best.pen), met(infid, pen)
				better = (xm && !bm) || (xm == bm && f < best.f)
			}
			if better {
				best.f, best.infid, best.pen = f, infid, pen
				copy(best.x, x)
			}
			return f
		},
		Status: func() (optimize.Status, error) {
			if err := ctx.Err(); err != nil {
				return optimize.Failure, err
			}
			return optimize.NotTerminated, nil
		},
	}
	for r := 0; r < m.restarts; r++ {
		remaining := m.maxEvals - best.evals
		if remaining <= m.dim+1 {
			break
		}
		if r < len(m.starts) {
			copy(x0, m.starts[r])
		} else {
			m.draw(m.rng, x0)
		}
		runBest.f = math.Inf(1)
		conv := &threshold{
			done:     func() bool { return m.needTarget && runBest.infid <= goal && runBest.pen <= 0 },
			patience: m.patience,
			progress: m.progress,
		}
		settings := &optimize.Settings{
			Converger:       conv,
			FuncEvaluations: remaining,
			Concurrent:      1,
		}
		best.restarts++
		_, err := optimize.Minimize(problem, x0, settings, &optimize.NelderMead{SimplexSize: m.simplex})
		if err != nil {
			if ctx.Err() != nil {
				return best, fmt.Errorf("optimize: search stopped after %d evaluations: %w", best.evals, ctx.Err())
			}
			return best, fmt.Errorf("optimize: Nelder–Mead: %w", err)
		}
		if m.needTarget && met(best.infid, best.pen) {
			best.success = true
			return best, nil
		}
	}
	if !m.needTarget {
		best.success = true
	}
	return best, ctx.Err()
}
