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

// edgeResult is one refined edge.
type Edge struct {
	X    float64
	Open bool
	Zero bool // the fidelity at zero error is below the threshold
}

// findEdge locates the edge of the robust region of w on one side
// (0: negative, 1: positive) of zero along r.Axis (method in Compare).
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
	var a, b, ga, gb float64
	if j+dir >= 0 && j+dir < len(x) {
		a, b = x[j], x[j+dir]
		ga = math.Sqrt(math.Max(0, 1-f[j])) - qt
		gb = math.Sqrt(math.Max(0, 1-f[j+dir])) - qt
	} else {
		// Search outwards from the end of the grid, doubling the distance.
		a = x[j]
		ga = math.Sqrt(math.Max(0, 1-f[j])) - qt
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
				b, gb = xb, g
				break
			}
			a, ga = xb, g
		}
	}
	// Illinois iteration on [a (inside), b (outside)].
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
