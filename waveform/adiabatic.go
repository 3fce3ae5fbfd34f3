package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// timeAdiabatic analyses the loop on a grid and chooses the amplitude, the
// ramp time and the local-adiabatic loop time (package documentation).
func (b *builder) timeAdiabatic(seg Segment) (*timing, error) {
	la := newLoopAnalysis(b, seg)
	amp, err := b.loopAmplitude(la)
	if err != nil {
		return nil, err
	}
	la.amp = amp
	t := &timing{seg: seg, amp: amp, minGap: math.Inf(1)}
	// Working clusters at the base point.
	la.setPoint(b.pt, amp, la.pts)
	b.sc.Hamiltonian(b.h, b.pt)
	b.sp.Factorize(b.h)
	if err := b.sp.ChooseWorking(); err != nil {
		return nil, fmt.Errorf("at the base point: %w", err)
	}
	t.clusters = len(b.sp.Working())
	cost, err := la.costGrid(t)
	if err != nil {
		return nil, err
	}
	total, err := la.cutPieces(t, cost)
	if err != nil {
		return nil, err
	}
	t.tMain = 2 * total
	if t.tRamp, err = b.rampTime(la, amp); err != nil {
		return nil, err
	}
	return t, nil
}

// loopAmplitude evaluates the shape on the timing grid (into la.pts) and
// returns the largest envelope its peak unit drives allow (ampLimit).
func (b *builder) loopAmplitude(la *loopAnalysis) (float64, error) {
	const G = gridIntervals
	nch := len(b.sc.Channels)
	maxU := make([]float64, nch)
	for i := 0; i <= G; i++ {
		s := float64(i) / G
		v := la.at(s, la.pts[i*la.dim:(i+1)*la.dim])
		for c := 0; c < nch; c++ {
			maxU[c] = math.Max(maxU[c], math.Hypot(v[2*c], v[2*c+1]))
		}
		for _, x := range v {
			if !holonomy.Finite(x) {
				return 0, fmt.Errorf("shape gives a non-finite point at s = %g", s)
			}
		}
	}
	return b.ampLimit(maxU)
}

// costGrid returns the cost density on the grid (one-sided derivatives at
// the ends) and lowers t.minGap to the smallest gap met.
func (la *loopAnalysis) costGrid(t *timing) ([]float64, error) {
	const G = gridIntervals
	cost := make([]float64, G+1)
	for i := 0; i <= G; i++ {
		side := 0
		if i == 0 {
			side = 1
		} else if i == G {
			side = -1
		}
		c, gap, err := la.cost(float64(i)/G, side)
		if err != nil {
			return nil, err
		}
		cost[i] = c
		t.minGap = math.Min(t.minGap, gap)
	}
	return cost, nil
}

// cutPieces cuts the loop at its corners (located to rounding) into smooth
// pieces with normalised clocks, appends them to t.pieces and returns the
// total cost ∫c ds.
func (la *loopAnalysis) cutPieces(t *timing, cost []float64) (float64, error) {
	const G = gridIntervals
	bounds := append([]float64{0}, la.corners()...)
	bounds = append(bounds, 1)
	var total float64
	for j := 0; j+1 < len(bounds); j++ {
		b0, b1 := bounds[j], bounds[j+1]
		c0, g0, err := la.cost(b0, 1)
		if err != nil {
			return 0, err
		}
		c1, g1, err := la.cost(b1, -1)
		if err != nil {
			return 0, err
		}
		t.minGap = math.Min(t.minGap, math.Min(g0, g1))
		pc := piece{s: []float64{b0}, tau: []float64{0}}
		prevS, prevC, acc := b0, c0, 0.0
		add := func(s, c float64) {
			acc += 0.5 * (c + prevC) * (s - prevS)
			pc.s = append(pc.s, s)
			pc.tau = append(pc.tau, acc)
			prevS, prevC = s, c
		}
		for i := 0; i <= G; i++ {
			s := float64(i) / G
			if s > b0+1e-9 && s < b1-1e-9 {
				add(s, cost[i])
			}
		}
		add(b1, c1)
		if acc <= 0 {
			continue
		}
		for i := range pc.tau {
			pc.tau[i] /= acc
		}
		pc.frac = acc
		total += acc
		t.pieces = append(t.pieces, pc)
	}
	if total <= 0 {
		return 0, fmt.Errorf("the loop does not move the working subspace (zero length)")
	}
	for i := range t.pieces {
		t.pieces[i].frac /= total
	}
	return total, nil
}

// rampTime returns the duration of each amplitude ramp: long enough for
// the adiabaticity along the ramp at the base point and for the slew limit
// of the sin² ramp, and at least minRampSamples.
func (b *builder) rampTime(la *loopAnalysis, amp float64) (float64, error) {
	la.setPoint(b.pt, 1, la.pts)
	b.bare.Hamiltonian(b.dh, b.pt) // ∂H/∂A
	thr := 1e-9 * holonomy.FrobeniusNorm(b.dh)
	var kr float64
	for m := 1; m <= rampGrid; m++ {
		a := amp * float64(m) / rampGrid
		la.setPoint(b.pt, a, la.pts)
		b.sc.Hamiltonian(b.h, b.pt)
		b.sp.Factorize(b.h)
		if err := b.sp.ChooseWorking(); err != nil {
			return 0, fmt.Errorf("on the amplitude ramp at %.3g of full amplitude: %w", float64(m)/rampGrid, err)
		}
		k, _ := b.sp.AdiabaticRatio(b.dh, thr)
		if math.IsInf(k, 1) {
			return 0, fmt.Errorf("on the amplitude ramp at %.3g of full amplitude the computational levels are degenerate with a state they are coupled to: %w", float64(m)/rampGrid, holonomy.ErrNoSubspace)
		}
		kr = math.Max(kr, k)
	}
	var u0 float64
	for c := range b.sc.Channels {
		u0 = math.Max(u0, math.Hypot(la.pts[2*c], la.pts[2*c+1]))
	}
	tr := math.Max(math.Pi/2*amp*kr/b.alpha, amp*u0/(4*b.slew))
	return math.Max(tr, minRampSamples/b.hw.SampleRate), nil
}

// loopAnalysis evaluates a segment's shape on the timing grid.
type loopAnalysis struct {
	b        *builder
	seg      Segment
	nch, dim int
	amp      float64
	pts      []float64 // grid points, flattened (drive re, im per channel; detunings)
	p, q, dv []float64 // scratch points and derivative
}

func newLoopAnalysis(b *builder, seg Segment) *loopAnalysis {
	nch, nlev := len(b.sc.Channels), b.sc.Dim()
	dim := 2*nch + nlev
	return &loopAnalysis{
		b: b, seg: seg, nch: nch, dim: dim,
		pts: make([]float64, (gridIntervals+1)*dim),
		p:   make([]float64, dim), q: make([]float64, dim), dv: make([]float64, dim),
	}
}

// at writes the unit point at s into dst and returns it.
func (la *loopAnalysis) at(s float64, dst []float64) []float64 {
	tmp := la.b.tmp
	clearPoint(tmp)
	la.seg.Shape(s, tmp)
	for c, v := range tmp.Drive {
		dst[2*c], dst[2*c+1] = real(v), imag(v)
	}
	copy(dst[2*la.nch:], tmp.Detuning)
	return dst
}

// setPoint sets p to a times the flattened unit point v.
func (la *loopAnalysis) setPoint(p holonomy.Point, a float64, v []float64) {
	for c := range p.Drive {
		p.Drive[c] = complex(a*v[2*c], a*v[2*c+1])
	}
	for l := range p.Detuning {
		p.Detuning[l] = a * v[2*la.nch+l]
	}
}

// deriv sets la.dv to ∂_s of the unit point at s: central (side 0),
// right (side > 0) or left (side < 0) difference, periodic in s.
func (la *loopAnalysis) deriv(s float64, side int) {
	wrap := func(x float64) float64 {
		if x > 1 {
			return x - 1
		}
		if x < 0 {
			return x + 1
		}
		return x
	}
	h := derivStep
	var lo, hi float64
	switch {
	case side > 0:
		lo, hi = s, s+h
	case side < 0:
		lo, hi = s-h, s
	default:
		lo, hi = s-h, s+h
	}
	la.at(wrap(lo), la.p)
	la.at(wrap(hi), la.q)
	for j := range la.dv {
		la.dv[j] = (la.q[j] - la.p[j]) / (hi - lo)
	}
}

// cost returns the cost density c(s) = max(κ/α*, A·max|∂_s u_c|/(2π·slew))
// (seconds per unit s) and the gap at s, using the working clusters chosen
// at the base point and tracked by their places in the spectrum.
func (la *loopAnalysis) cost(s float64, side int) (float64, float64, error) {
	b := la.b
	la.at(s, la.p)
	la.setPoint(b.pt, la.amp, la.p)
	b.sc.Hamiltonian(b.h, b.pt)
	b.sp.Factorize(b.h)
	la.deriv(s, side)
	la.setPoint(b.pt, la.amp, la.dv)
	b.bare.Hamiltonian(b.dh, b.pt)
	thr := 1e-9 * (holonomy.FrobeniusNorm(b.dh) + 1e-300)
	kappa, gap := b.sp.AdiabaticRatio(b.dh, thr)
	if tol := b.sp.Tol(); gap <= tol || math.IsInf(kappa, 1) {
		return 0, gap, &holonomy.GapError{S: s, V: math.NaN(), Gap: gap, Tol: tol}
	}
	var du float64
	for c := 0; c < la.nch; c++ {
		du = math.Max(du, math.Hypot(la.dv[2*c], la.dv[2*c+1]))
	}
	return math.Max(kappa/b.alpha, la.amp*du/(2*math.Pi*b.slew)), gap, nil
}

// corners returns the loop parameters in (0, 1) where the direction of
// motion turns by more than cornerAngle between neighbouring grid secants,
// each located to rounding by bisection: the corner is the largest s at
// which the chord from a grid point before it still runs along the
// incoming direction (within cornerAngle/4).
func (la *loopAnalysis) corners() []float64 {
	const G = gridIntervals
	dim := la.dim
	sec := func(i int, dst []float64) {
		for j := range dst {
			dst[j] = la.pts[(i+1)*dim+j] - la.pts[i*dim+j]
		}
	}
	prev, cur := make([]float64, dim), make([]float64, dim)
	marked := make([]bool, G+1)
	sec(0, prev)
	for i := 1; i < G; i++ {
		sec(i, cur)
		if angle(prev, cur) > cornerAngle {
			marked[i] = true
		}
		prev, cur = cur, prev
	}
	var out []float64
	chord, ref := make([]float64, dim), make([]float64, dim)
	for i := 1; i < G; i++ {
		if !marked[i] {
			continue
		}
		j := i
		for j+1 < G && marked[j+1] {
			j++
		}
		// The corner lies in [s_{i−1}, s_{j+1}].
		a := float64(i-1) / G
		hi := float64(j+1) / G
		la.deriv(a, -1)
		copy(ref, la.dv)
		la.at(a, la.p)
		lo := a
		for it := 0; it < 60; it++ {
			mid := 0.5 * (lo + hi)
			la.at(mid, la.q)
			for k := range chord {
				chord[k] = la.q[k] - la.p[k]
			}
			if angle(chord, ref) <= cornerAngle/4 {
				lo = mid
			} else {
				hi = mid
			}
		}
		if lo > 1e-9 && lo < 1-1e-9 && (len(out) == 0 || lo > out[len(out)-1]+1e-9) {
			out = append(out, lo)
		}
		i = j
	}
	return out
}

// angle returns the angle between two vectors (0 if either is zero).
func angle(a, b []float64) float64 {
	var dot, na, nb float64
	for j := range a {
		dot += a[j] * b[j]
		na += a[j] * a[j]
		nb += b[j] * b[j]
	}
	if na == 0 || nb == 0 {
		return 0
	}
	return math.Acos(math.Max(-1, math.Min(1, dot/math.Sqrt(na*nb))))
}

// sampleAdiabatic writes ramp up, loop and ramp down at offset at.
func (b *builder) sampleAdiabatic(w *Waveform, t *timing, at int) {
	dt := 1 / b.hw.SampleRate
	nr, nl := t.nRamp, t.nMain
	tr, tl := float64(nr)*dt, float64(nl)*dt
	clearPoint(b.tmp)
	t.seg.Shape(0, b.tmp)
	for k := 0; k < nr; k++ {
		s := math.Sin(math.Pi * (float64(k) + 0.5) * dt / (2 * tr))
		b.writePoint(w, at+k, t.amp*s*s, b.tmp)
		b.writePoint(w, at+nr+nl+nr-1-k, t.amp*s*s, b.tmp)
	}
	pc, start := 0, 0.0
	for k := 0; k < nl; k++ {
		x := (float64(k) + 0.5) * dt / tl
		for pc < len(t.pieces)-1 && x >= start+t.pieces[pc].frac {
			start += t.pieces[pc].frac
			pc++
		}
		p := &t.pieces[pc]
		xp := (x - start) / p.frac
		xp = math.Max(0, math.Min(1, xp))
		tau := xp - math.Sin(2*math.Pi*xp)/(2*math.Pi)
		clearPoint(b.pt)
		t.seg.Shape(p.sAt(tau), b.pt)
		b.writePoint(w, at+nr+k, t.amp, b.pt)
	}
}
