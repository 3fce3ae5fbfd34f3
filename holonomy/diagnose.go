package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
)

// FindingKind classifies a Finding.
type FindingKind int

const (
	// RealLoop: the Hamiltonian is real along the whole loop in a basis of
	// fixed level phases. The holonomy is then a real orthogonal matrix in
	// that basis, so one state can pick up a Berry phase of 0 or π only
	// (common practice; Berry, Proc. R. Soc. A 392, 45 (1984)).
	RealLoop FindingKind = iota + 1
	// NoArea: the loop encloses no area in control space (the controls do
	// not change, change along one line only, or the path retraces itself),
	// so its holonomy is the identity (common practice; Berry 1984).
	NoArea
	// BaseLeakage: at the base point the working subspace is not wholly in
	// the span of the computational levels, so the holonomy identifies each
	// computational state with the nearest state of the working subspace,
	// and a gate made with the loop leaks out of the computational levels
	// unless they are brought in and out adiabatically.
	BaseLeakage
)

// String returns a short name of the kind.
func (k FindingKind) String() string {
	switch k {
	case RealLoop:
		return "real-loop"
	case NoArea:
		return "no-area"
	case BaseLeakage:
		return "base-leakage"
	}
	return fmt.Sprintf("FindingKind(%d)", int(k))
}

// Finding is one diagnostic about a loop, with a message in plain words.
type Finding struct {
	// Kind classifies the finding.
	Kind FindingKind
	// Message explains it in plain words, for people.
	Message string
}

// String returns the kind and the message.
func (f Finding) String() string { return f.Kind.String() + ": " + f.Message }

// Diagnose samples loop at n points (n ≥ 4) and reports what limits the
// holonomy it can give, as findings in plain words:
//
//   - RealLoop when every H(s) is real up to fixed level phases: for each
//     coupled pair of levels the phase of H_ij is constant modulo π along
//     the loop, and the phases are consistent around every cycle of the
//     coupling graph (checked on a spanning tree).
//   - NoArea when the controls do not change, when all points lie on one
//     straight line in control space, or when the path retraces itself. The
//     last is decided by reducing the path: walking the samples, a sample
//     that lies on the route already walked (within 1e-8 of the loop's size,
//     located on the loop itself by golden-section search between
//     neighbouring samples, and reachable within twice the step just taken)
//     cuts the route back to it. The loop retraces itself if the route
//     shrinks to the base point. (A sample farther than half a step from
//     the chord of a stretch is taken not to lie on it, which holds on any
//     loop sampled finely enough for its holonomy.) Control space has the real and imaginary
//     parts of the drives and the detunings as coordinates (rad/s).
//   - BaseLeakage when the working subspace at the base point has less
//     than all its weight on the computational levels.
//
// The error is that of choosing the working subspace at the base point.
// Diagnose allocates.
func (w *Wilson) Diagnose(loop Loop, n int) ([]Finding, error) {
	if w.err != nil {
		return nil, w.err
	}
	if n < 4 {
		panic("holonomy: Wilson.Diagnose: need at least 4 loop points")
	}
	var out []Finding
	tr := w.tr
	if err := w.eval(loop, 0, tr.h); err != nil {
		return nil, err
	}
	tr.cold()
	if err := tr.choose(w.GapTol, "base point (s = 0)"); err != nil {
		return nil, err
	}
	if wt := tr.baseWeight(); wt < 1-1e-9 {
		out = append(out, Finding{BaseLeakage, fmt.Sprintf(
			"at the base point the working subspace is not wholly made of the computational levels %s: in the worst direction only %.4g%% of a state's weight lies on them, so a gate made with this loop leaks up to %.3g%% out of them unless the drives bring the levels in and out adiabatically",
			tr.compNames(), 100*wt, 100*(1-wt))})
	}
	isReal, err := w.realLoop(loop, n)
	if err != nil {
		return nil, err
	}
	if isReal {
		out = append(out, Finding{RealLoop,
			"the Hamiltonian stays real along the loop (up to fixed phases of the levels), so the holonomy is a real orthogonal matrix in that basis and a single state can pick up a Berry phase of only 0 or π; drive phases that change along the loop are needed for other gates"})
	}
	msg, err := w.noArea(loop, n)
	if err != nil {
		return nil, err
	}
	if msg != "" {
		out = append(out, Finding{NoArea, msg + ", so it encloses no area: its holonomy is the identity and it makes no gate"})
	}
	return out, nil
}

// realLoop reports whether H(s) is real at every sample up to fixed level
// phases.
func (w *Wilson) realLoop(loop Loop, n int) (bool, error) {
	nl := len(w.s.Levels)
	h := w.h1
	ref := make([]complex128, nl*nl) // element of largest modulus per pair
	var hmax float64
	for j := 0; j < n; j++ {
		if err := w.eval(loop, float64(j)/float64(n), h); err != nil {
			return false, err
		}
		for a := 0; a < nl; a++ {
			for b := a + 1; b < nl; b++ {
				x := h.Data[a*nl+b]
				if sqmag(x) > sqmag(ref[a*nl+b]) {
					ref[a*nl+b] = x
				}
				hmax = math.Max(hmax, cmplx.Abs(x))
			}
		}
	}
	tol := 1e-9 * hmax
	for j := 0; j < n; j++ {
		if err := w.eval(loop, float64(j)/float64(n), h); err != nil {
			return false, err
		}
		for a := 0; a < nl; a++ {
			for b := a + 1; b < nl; b++ {
				r := ref[a*nl+b]
				if cmplx.Abs(r) <= tol {
					continue
				}
				// Imaginary part of H_ab e^{−i arg r}.
				if math.Abs(imag(h.Data[a*nl+b]*conjg(r)))/cmplx.Abs(r) > tol {
					return false, nil
				}
			}
		}
	}
	// Level phases χ with arg r_ab ≡ χ_a − χ_b (mod π) on a spanning forest,
	// then every other coupled pair must agree.
	chi := make([]float64, nl)
	seen := make([]bool, nl)
	queue := make([]int, 0, nl)
	coupled := func(a, b int) (complex128, bool) {
		if a > b {
			r := ref[b*nl+a]
			return conjg(r), cmplx.Abs(r) > tol
		}
		r := ref[a*nl+b]
		return r, cmplx.Abs(r) > tol
	}
	for root := 0; root < nl; root++ {
		if seen[root] {
			continue
		}
		seen[root] = true
		queue = append(queue[:0], root)
		for len(queue) > 0 {
			a := queue[0]
			queue = queue[1:]
			for b := 0; b < nl; b++ {
				r, ok := coupled(a, b)
				if !ok || seen[b] {
					continue
				}
				// H_ab = |r| e^{i(χ_a − χ_b)} up to sign: χ_b = χ_a − arg r.
				chi[b] = chi[a] - cmplx.Phase(r)
				seen[b] = true
				queue = append(queue, b)
			}
		}
	}
	for a := 0; a < nl; a++ {
		for b := a + 1; b < nl; b++ {
			r, ok := coupled(a, b)
			if !ok {
				continue
			}
			d := cmplx.Phase(r) - (chi[a] - chi[b])
			if math.Abs(math.Sin(d)) > 1e-9 {
				return false, nil
			}
		}
	}
	return true, nil
}

// noArea returns a description if the loop encloses no area, else "".
func (w *Wilson) noArea(loop Loop, n int) (string, error) {
	dim := 2*len(w.s.Channels) + len(w.s.Levels)
	xs := make([]float64, (n+1)*dim)
	for j := 0; j <= n; j++ {
		if err := w.eval(loop, float64(j)/float64(n), w.h1); err != nil {
			return "", err
		}
		w.coords(xs[j*dim : (j+1)*dim])
	}
	x0 := xs[:dim]
	far, size := 0, 0.0
	for j := 1; j <= n; j++ {
		if d := dist(xs[j*dim:(j+1)*dim], x0); d > size {
			far, size = j, d
		}
	}
	if size == 0 {
		return "the controls do not change along the loop", nil
	}
	// One straight line?
	line := true
	xf := xs[far*dim : (far+1)*dim]
	for j := 1; j <= n && line; j++ {
		xj := xs[j*dim : (j+1)*dim]
		var dot float64
		for i := range xj {
			dot += (xj[i] - x0[i]) * (xf[i] - x0[i])
		}
		t := dot / (size * size)
		var off float64
		for i := range xj {
			e := xj[i] - x0[i] - t*(xf[i]-x0[i])
			off += e * e
		}
		line = math.Sqrt(off) <= 1e-9*size
	}
	if line {
		return "only one combination of the controls changes along the loop (all its points lie on one straight line in control space)", nil
	}
	if w.retraces(loop, xs, dim, n, 1e-8*size) {
		return "the loop retraces its own path (every stretch travelled out is travelled back)", nil
	}
	return "", nil
}

// retraces reduces the sampled path as described at Diagnose.
func (w *Wilson) retraces(loop Loop, xs []float64, dim, n int, eps float64) bool {
	buf := make([]float64, dim)
	at := func(t float64) []float64 {
		if w.eval(loop, t, w.h1) != nil {
			for i := range buf {
				buf[i] = math.NaN()
			}
			return buf
		}
		w.coords(buf)
		return buf
	}
	// closest returns the point of the loop between parameters a < b
	// nearest to x (golden-section search on the distance).
	closest := func(a, b float64, x []float64) (float64, float64) {
		const g = 0.6180339887498949
		lo, hi := a, b
		c, d := hi-g*(hi-lo), lo+g*(hi-lo)
		fc, fd := dist(at(c), x), dist(at(d), x)
		for hi-lo > 1e-13*math.Max(1, b) && hi-lo > 1e-300 {
			if fc <= fd {
				hi, d, fd = d, c, fc
				c = hi - g*(hi-lo)
				fc = dist(at(c), x)
			} else {
				lo, c, fc = c, d, fd
				d = lo + g*(hi-lo)
				fd = dist(at(d), x)
			}
		}
		best, fb := a, dist(at(a), x)
		if f := dist(at(b), x); f < fb {
			best, fb = b, f
		}
		if fc < fb {
			best, fb = c, fc
		}
		if fd < fb {
			best, fb = d, fd
		}
		return best, fb
	}
	pt := func(j int) []float64 { return xs[j*dim : (j+1)*dim] }
	// The route walked so far, reduced: pieces of the loop R([a, b]), each
	// within one sample interval, joined end to start.
	type piece struct {
		a, b float64
		pa   []float64 // R(a)
		pb   []float64 // R(b)
	}
	var route []piece
	for j := 1; j <= n; j++ {
		x := pt(j)
		step := dist(x, pt(j-1))
		found := false
		skipped := 0.0
		for i := len(route) - 1; i >= 0; i-- {
			pc := route[i]
			// Cheap rejection: a point farther from the chord of the piece
			// than half its length (plus eps) is not on the piece.
			if chordDist(x, pc.pa, pc.pb) <= eps+0.5*dist(pc.pa, pc.pb) {
				t, d := closest(pc.a, pc.b, x)
				if d <= eps {
					// Walked back to R(t): cut the route there.
					route = route[:i]
					if p := at(t); t > pc.a && dist(p, pc.pa) > eps {
						route = append(route, piece{pc.a, t, pc.pa, append([]float64(nil), p...)})
					}
					found = true
					break
				}
			}
			skipped += dist(pc.pa, pc.pb)
			if skipped > 2*step+eps {
				break
			}
		}
		if !found {
			route = append(route, piece{float64(j-1) / float64(n), float64(j) / float64(n), pt(j - 1), pt(j)})
		}
	}
	return len(route) == 0
}

// coords writes the control-space coordinates of w.p into x.
func (w *Wilson) coords(x []float64) {
	i := 0
	for _, d := range w.p.Drive {
		x[i], x[i+1] = real(d), imag(d)
		i += 2
	}
	copy(x[i:], w.p.Detuning)
}

// chordDist returns the distance from x to the segment [a, b].
func chordDist(x, a, b []float64) float64 {
	var ab2, t float64
	for i := range a {
		d := b[i] - a[i]
		ab2 += d * d
		t += (x[i] - a[i]) * d
	}
	if ab2 > 0 {
		t = math.Max(0, math.Min(1, t/ab2))
	} else {
		t = 0
	}
	var s float64
	for i := range a {
		e := x[i] - a[i] - t*(b[i]-a[i])
		s += e * e
	}
	return math.Sqrt(s)
}

func dist(a, b []float64) float64 {
	var s float64
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return math.Sqrt(s)
}
