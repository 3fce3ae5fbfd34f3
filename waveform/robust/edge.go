package robust

import (
	"context"
	"math"

	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/sim"
)

// Edge searches beyond the swept range extend at most this many times the
// range's extent on that side (and never past |ε| = maxEdgeAmplitude).
const (
	edgeSearchFactor = 64
	maxEdgeAmplitude = 0.95
	edgeRelTol       = 1e-6
	edgeMaxIter      = 60
)

// Edge is one refined edge of the robust region along an error axis.
type Edge struct {
	// X is the error value at the edge.
	X float64
	// Open is set when no edge was found within the search limit; X is
	// then the last value inside the region.
	Open bool
	// Zero is set when the fidelity at zero error is below the threshold
	// (there is no region).
	Zero bool
}

// FindEdge locates the edge of the robust region of w on one side
// (0: negative, 1: positive) of zero along r.Axis, starting from the sweep
// s of w along r, with the simulations run by wk. The method is the one
// dynamical.Compare documents: a bracket from the sweep (or an outward
// search doubling the distance), then the Illinois variant of regula
// falsi (Dowell and Jarratt, BIT 11, 168 (1971)) on √(1 − F) − √(1 − thr).
func FindEdge(ctx context.Context, wk *Worker, w *waveform.Waveform, base sim.ErrorModel, r Range, s *Sweep, side int, thr float64) (Edge, error) {
	qt := math.Sqrt(1 - thr)
	eval := func(x float64) (float64, error) {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		m := base
		r.Axis.Set(&m, x)
		out, err := wk.Run(w, m)
		if err != nil {
			return 0, err
		}
		return math.Sqrt(math.Max(0, 1-out.Fidelity)) - qt, nil
	}
	x, f := s.X, s.Fidelity
	i0 := nearestZero(x)
	if !(f[i0] >= thr) {
		return Edge{Zero: true}, nil
	}
	dir := 1
	if side == 0 {
		dir = -1
	}
	// Bracket from the sweep.
	j := i0
	for j+dir >= 0 && j+dir < len(x) && f[j+dir] >= thr {
		j += dir
	}
	a := x[j]
	ga := math.Sqrt(math.Max(0, 1-f[j])) - qt
	if j+dir >= 0 && j+dir < len(x) {
		b := x[j+dir]
		gb := math.Sqrt(math.Max(0, 1-f[j+dir])) - qt
		return illinois(eval, a, b, ga, gb)
	}
	return searchOutwards(eval, r, a, ga, dir)
}

// searchOutwards brackets the edge beyond the end a of the swept grid
// (inside the region, g(a) = ga), doubling the distance from zero up to
// edgeSearchFactor times the range's extent, then refines it.
func searchOutwards(eval func(float64) (float64, error), r Range, a, ga float64, dir int) (Edge, error) {
	ext := math.Abs(a)
	if ext == 0 {
		ext = math.Max(math.Abs(r.Min), math.Abs(r.Max))
	}
	if ext == 0 {
		ext = 1e-3 // a one-point range at zero: start small
		if r.Axis != AmplitudeAxis {
			ext = 1e3
		}
	}
	limit := edgeSearchFactor * ext
	if r.Axis == AmplitudeAxis {
		limit = math.Min(limit, maxEdgeAmplitude)
	}
	d := math.Abs(a)
	if d == 0 {
		d = ext / 2
	}
	for {
		if d >= limit {
			return Edge{X: a, Open: true}, nil
		}
		d = math.Min(2*d, limit)
		xb := float64(dir) * d
		g, err := eval(xb)
		if err != nil {
			return Edge{}, err
		}
		if g > 0 {
			return illinois(eval, a, xb, ga, g)
		}
		a, ga = xb, g
	}
}

// illinois locates the zero of g on [a (inside, g(a) = ga ≤ 0), b
// (outside, g(b) = gb > 0)] to the relative tolerance edgeRelTol.
func illinois(eval func(float64) (float64, error), a, b, ga, gb float64) (Edge, error) {
	side2 := 0
	for it := 0; it < edgeMaxIter; it++ {
		if math.Abs(b-a) <= edgeRelTol*math.Max(math.Abs(a), math.Abs(b)) {
			break
		}
		c := a
		if gb != ga {
			c = a - ga*(b-a)/(gb-ga)
		}
		if !(c > math.Min(a, b) && c < math.Max(a, b)) {
			c = 0.5 * (a + b)
		}
		gc, err := eval(c)
		if err != nil {
			return Edge{}, err
		}
		if gc > 0 {
			b, gb = c, gc
			if side2 == -1 {
				ga /= 2
			}
			side2 = -1
		} else {
			a, ga = c, gc
			if side2 == 1 {
				gb /= 2
			}
			side2 = 1
		}
	}
	if gb == ga {
		return Edge{X: a}, nil
	}
	c := a - ga*(b-a)/(gb-ga)
	c = math.Max(math.Min(a, b), math.Min(math.Max(a, b), c))
	return Edge{X: c}, nil
}
