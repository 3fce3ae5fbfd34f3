package optimize

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// sequentialMultiStart is the multi-start search as it ran before the
// worker pool: one run after another, each with the evaluations left, the
// global best updated at every evaluation. It is the reference the pooled
// search must reproduce exactly.
func sequentialMultiStart(m *multiStart) msResult {
	best := msResult{f: math.Inf(1), infid: math.Inf(1), x: make([]float64, m.dim)}
	met := func(infid, pen float64) bool { return infid <= m.target && pen <= 0 }
	goal := m.goal
	if goal <= 0 || goal > m.target {
		goal = m.target
	}
	x0 := make([]float64, m.dim)
	var runBest struct{ f, infid, pen float64 }
	problem := optimize.Problem{Func: func(x []float64) float64 {
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
			bm, xm := met(best.infid, best.pen), met(infid, pen)
			better = (xm && !bm) || (xm == bm && f < best.f)
		}
		if better {
			best.f, best.infid, best.pen = f, infid, pen
			copy(best.x, x)
		}
		return f
	}}
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
		conv := &threshold{done: func() bool { return m.needTarget && runBest.infid <= goal && runBest.pen <= 0 },
			patience: m.patience, progress: m.progress}
		best.restarts++
		if _, err := optimize.Minimize(problem, x0, &optimize.Settings{Converger: conv, FuncEvaluations: remaining, Concurrent: 1},
			&optimize.NelderMead{SimplexSize: m.simplex}); err != nil {
			panic(err)
		}
		if m.needTarget && met(best.infid, best.pen) {
			best.success = true
			return best
		}
	}
	if !m.needTarget {
		best.success = true
	}
	return best
}

// rastrigin is a many-minima test function (Rastrigin, 1974; the form
// 10d + Σ(x² − 10 cos 2πx) is common practice); its global minimum is 0 at
// the origin, so random restarts often end in a local minimum.
func rastrigin(x []float64) (float64, float64, float64) {
	f := 10 * float64(len(x))
	for _, v := range x {
		f += v*v - 10*math.Cos(2*math.Pi*v)
	}
	return f, f, 0
}

func withProcs(n int, f func()) {
	old := runtime.GOMAXPROCS(n)
	defer runtime.GOMAXPROCS(old)
	f()
}

// TestMultiStartPoolMatchesSequential: the pooled multi-start search gives
// bit for bit the result of the sequential one (evaluations, runs, best
// point, success) with 1, 2 and 4 workers, over targets met at different
// runs, never met, and evaluation budgets that cut runs short.
func TestMultiStartPoolMatchesSequential(t *testing.T) {
	cases := 0
	for _, target := range []float64{1e-6, 0.5, 1.5, 3} {
		for _, maxEvals := range []int{150, 700, 4000} {
			for seed := uint64(1); seed <= 3; seed++ {
				mk := func() *multiStart {
					return &multiStart{dim: 3, restarts: 9, maxEvals: maxEvals, target: target, simplex: 0.3,
						patience: 20, progress: 1e-3, rng: rand.New(rand.NewPCG(seed, 7)),
						draw: func(rng *rand.Rand, x []float64) {
							for i := range x {
								x[i] = 4 * (2*rng.Float64() - 1)
							}
						},
						eval: rastrigin, needTarget: target > 1e-6}
				}
				ref := mk()
				want := sequentialMultiStart(ref)
				for _, procs := range []int{1, 2, 4} {
					var got msResult
					var err error
					withProcs(procs, func() {
						m := mk()
						m.newEval = func(int) evalFunc { return rastrigin }
						got, err = m.run(context.Background())
					})
					name := fmt.Sprintf("target %g maxEvals %d seed %d GOMAXPROCS %d", target, maxEvals, seed, procs)
					if err != nil {
						t.Fatalf("%s: %v", name, err)
					}
					if got.evals != want.evals || got.restarts != want.restarts || got.success != want.success ||
						math.Float64bits(got.f) != math.Float64bits(want.f) || fmt.Sprint(got.x) != fmt.Sprint(want.x) {
						t.Errorf("%s: pooled %+v, sequential %+v", name, got, want)
					}
				}
				cases++
				if ref.needTarget && want.restarts > 1 && want.success {
					t.Logf("target %g maxEvals %d seed %d: met in run %d after %d evaluations", target, maxEvals, seed, want.restarts, want.evals)
				}
			}
		}
	}
}

// TestSearchSameOnAnyGOMAXPROCS: the tripod search gives byte-identical
// results with GOMAXPROCS 1 and 2, with and without a hardware penalty
// (whose calls the search serialises).
func TestSearchSameOnAnyGOMAXPROCS(t *testing.T) {
	run := func(procs int, name string, penalty bool) string {
		var out string
		withProcs(procs, func() {
			s := tripodSearch(t, gate(name), false, fourier1)
			s.Restarts, s.Seed = 6, 3
			s.TargetInfidelity = 1e-9 // usually needs several runs
			if penalty {
				s.Penalty = func(x []float64) float64 { return math.Max(0, math.Abs(x[0])-0.5) }
			}
			res, err := s.Run(context.Background())
			if err != nil && res == nil {
				t.Fatal(err)
			}
			bits := make([]uint64, len(res.Params))
			for i, v := range res.Params {
				bits[i] = math.Float64bits(v)
			}
			out = fmt.Sprintf("%x %d %d %x %v %v", bits, res.Evaluations, res.Restarts,
				math.Float64bits(res.SearchInfidelity), res.U.Data, err)
		})
		return out
	}
	for _, name := range []string{"H", "T"} {
		for _, pen := range []bool{false, true} {
			a, b := run(1, name, pen), run(2, name, pen)
			if a != b {
				t.Errorf("%s penalty %v: GOMAXPROCS 1 and 2 differ:\n%s\n%s", name, pen, a, b)
			}
		}
	}
}

// TestRobustSameOnAnyGOMAXPROCS: the robust stage evaluates its ensemble
// members in concurrent groups; its result (parameters, per-member
// infidelities, evaluations) is byte-identical for GOMAXPROCS 1, 2 and 3,
// for a Fourier loop and a polygon (whose Point uses scratch space of its
// own, so each group needs its own shape).
func TestRobustSameOnAnyGOMAXPROCS(t *testing.T) {
	shapes := map[string]func(*Sphere) Shape{
		"fourier": fourier1,
		"polygon": func(sp *Sphere) Shape { return NewPolygon(sp, 2) },
	}
	for name, shape := range shapes {
		var first string
		for _, procs := range []int{1, 2, 3} {
			var out string
			withProcs(procs, func() {
				s := tripodSearch(t, gate("T"), false, shape)
				s.Ensemble = GridEnsemble(0.02, 0.1, []float64{0, 0, 1, 0})
				s.RobustEvaluations = 60
				res, err := s.Run(context.Background())
				if err != nil {
					t.Fatal(err)
				}
				r := res.Robust
				if r == nil || r.Insensitive || r.Evaluations == 0 {
					t.Fatalf("%s: the robust stage did not run: %+v", name, r)
				}
				out = fmt.Sprintf("%v|%v|%v|%d|%v", bitsOf(res.Params), bitsOf(r.Nominal), bitsOf(r.Robust), r.Evaluations, r.Kept)
			})
			if procs == 1 {
				first = out
			} else if out != first {
				t.Errorf("%s: GOMAXPROCS %d differs from 1:\n%s\n%s", name, procs, out, first)
			}
		}
	}
}

func bitsOf(x []float64) []uint64 {
	b := make([]uint64, len(x))
	for i, v := range x {
		b[i] = math.Float64bits(v)
	}
	return b
}
