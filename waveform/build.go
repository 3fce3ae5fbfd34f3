package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// scheduleMargin is the fraction of the adiabaticity goal α* that the
// schedule aims at. The schedule is computed on a timing grid and the
// adiabaticity is then measured on the sampled waveform; the two differ by
// a few percent (up to 6 % seen on spin-½ loops), so aiming at 0.9 α*
// keeps the measured value within the goal the verification checks.
const scheduleMargin = 0.9

// Waveform is a timed, sampled and DAC-quantised gate, ready to be
// verified, written to a file or replayed. Build makes one from a Plan;
// ReadWaveform makes one from a file. All sample slices have Len()
// entries. A Waveform is not modified by Verify or Simulate and may be
// shared between goroutines that only read it.
type Waveform struct {
	// Scheme is the level scheme (a private copy). Its level detunings
	// are exactly 2π times the Hz values written to files.
	Scheme *holonomy.Scheme
	// Target is the d×d target unitary on the computational levels.
	Target *holonomy.Mat
	// Hardware is the hardware description the waveform was built for.
	Hardware Hardware
	// Adiabaticity is the adiabaticity goal α* of the adiabatic segments.
	Adiabaticity float64
	// MinFidelity is the fidelity goal of the verification.
	MinFidelity float64
	// Spans describe the segments in time order.
	Spans []Span
	// I and Q hold, per channel, the unquantised drive Ω cos φ/2π and
	// Ω sin φ/2π of every sample (Hz).
	I, Q [][]float64
	// CodeI and CodeQ hold, per channel, the DAC codes of I and Q.
	CodeI, CodeQ [][]int32
	// Detuning holds, per level, the controlled detuning track of every
	// sample (Hz), or nil for a level without one.
	Detuning [][]float64

	LevelHz []float64 // static level detunings in Hz (canonical)
}

// Span describes one segment of a Waveform.
type Span struct {
	// Kind is the segment's kind.
	Kind Kind
	// First is the index of the first sample and Len the number of samples.
	First, Len int
	// Ramp is the number of samples of each amplitude ramp of an
	// adiabatic segment (0 for cyclic segments).
	Ramp int
	// Area is the pulse area Σ_k A_k Δt of a cyclic segment in rad (0 for
	// adiabatic segments).
	Area float64
	// Amplitude is the peak envelope A/2π multiplying the unit point (Hz).
	Amplitude float64
	// MinGap is the smallest gap/2π between the working states and the
	// others along an adiabatic loop (Hz; 0 for cyclic segments).
	MinGap float64
}

// Len returns the number of samples per channel.
func (w *Waveform) Len() int {
	if len(w.I) == 0 {
		return 0
	}
	return len(w.I[0])
}

// Dt returns the sample period in seconds.
func (w *Waveform) Dt() float64 { return 1 / w.Hardware.SampleRate }

// Duration returns the waveform duration Len()/SampleRate in seconds,
// including the zero padding.
func (w *Waveform) Duration() float64 { return float64(w.Len()) / w.Hardware.SampleRate }

// Quantized returns the drive channel c emits at sample k after the DAC,
// code × FullScale/(2^(b−1) − 1), in Hz.
func (w *Waveform) Quantized(c, k int) complex128 {
	l := w.Hardware.lsb(c)
	return complex(float64(w.CodeI[c][k])*l, float64(w.CodeQ[c][k])*l)
}

// LimitError reports that a plan cannot be built at all within a hardware
// limit (for example the sample count). Limits that can be exceeded
// without harm to the computation are reported as failed checks instead.
type LimitError struct {
	// Check holds the limit, the value the plan needs and the margin.
	Check Check
}

// Error says which limit is exceeded and by how much.
func (e *LimitError) Error() string {
	c := e.Check
	return fmt.Sprintf("%s: the gate needs %s but the limit is %s (%s over)", c.Name, fmtUnit(c.Value, c.Unit), fmtUnit(c.Limit, c.Unit), fmtUnit(-c.Margin, c.Unit))
}

func fmtUnit(v float64, unit string) string { return FormatSI(v, unit) }

// FormatSI formats v with four significant digits and an SI prefix on unit
// ("96 ns", "20 MHz"); slew rates in Hz/s are shown in MHz/µs, and with
// an empty unit it formats the plain number.
func FormatSI(v float64, unit string) string {
	switch unit {
	case "":
		return fmt.Sprintf("%.6g", v)
	case "Hz/s": // slew rates read best as MHz per µs
		return fmt.Sprintf("%.4g MHz/µs", v/1e12)
	}
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprintf("%g %s", v, unit)
	}
	prefixes := []struct {
		f float64
		p string
	}{{1e12, "T"}, {1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}}
	a := math.Abs(v)
	for _, p := range prefixes {
		if a >= p.f*0.99995 {
			return fmt.Sprintf("%.4g %s%s", v/p.f, p.p, unit)
		}
	}
	return fmt.Sprintf("%.4g %s", v, unit)
}

const (
	gridIntervals    = 1024 // loop grid for the local-adiabatic schedule
	rampGrid         = 64   // amplitude grid for the ramp analysis
	minRampSamples   = 16
	minCyclicSamples = 16
	cornerAngle      = 0.1 // rad; a sharper turn between grid secants is a corner
	derivStep        = 1e-6
	// slewUse is the share of the slew limit the timing plans for; the
	// rest absorbs discretisation and DAC rounding (the plan also leaves at
	// least two DAC steps per sample free, see plannedSlew).
	slewUse = 0.95
)

// plannedSlew returns the slew rate the timing plans for: slewUse of the
// limit, and at least two DAC steps per sample below it, since rounding
// each sample to a code can add up to one step between neighbours. A limit
// at or below two steps per sample cannot be met by any quantised
// waveform and is a *LimitError.
func plannedSlew(hw *Hardware) (float64, error) {
	var lsb float64
	for c := range hw.FullScale {
		lsb = math.Max(lsb, hw.lsb(c))
	}
	floor := 2 * lsb * hw.SampleRate
	slew := math.Min(slewUse*hw.MaxSlew, hw.MaxSlew-floor)
	if slew <= 0 {
		return 0, &LimitError{Check: NewCheck("slew rate (two DAC steps per sample)", floor, hw.MaxSlew, "Hz/s", boundMax)}
	}
	return slew, nil
}

// timing is the continuous timing of one segment before sampling.
type timing struct {
	seg    Segment
	amp    float64 // A (adiabatic) or limit on A_p (cyclic), rad/s
	tRamp  float64 // s
	tMain  float64 // loop time (adiabatic) or pulse time (cyclic), s
	nRamp  int
	nMain  int
	pieces []piece
	minGap float64 // rad/s
	// clusters is the number of working clusters at the base point of
	// an adiabatic segment.
	clusters int
}

// piece is a smooth part of a loop between corners: grid points s[i] with
// the normalised cumulative cost tau[i] running from 0 to 1.
type piece struct {
	frac   float64 // share of the loop time
	s, tau []float64
}

// sAt returns s at normalised clock τ ∈ [0, 1] by linear interpolation.
func (p *piece) sAt(tau float64) float64 {
	t := p.tau
	if tau <= 0 {
		return p.s[0]
	}
	if tau >= 1 {
		return p.s[len(p.s)-1]
	}
	lo, hi := 0, len(t)-1
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if t[m] <= tau {
			lo = m
		} else {
			hi = m
		}
	}
	if t[hi] == t[lo] {
		return p.s[lo]
	}
	f := (tau - t[lo]) / (t[hi] - t[lo])
	return p.s[lo] + f*(p.s[hi]-p.s[lo])
}

// builder holds what the timing of all segments shares.
type builder struct {
	sc    *holonomy.Scheme // canonical copy, static detunings
	bare  *holonomy.Scheme // same without static detunings (for ∂H)
	hw    Hardware
	alpha float64
	slew  float64 // slew rate the timing plans for, Hz/s (see plannedSlew)
	sp    *spectrum
	h, dh *holonomy.Mat
	pt    holonomy.Point
	tmp   holonomy.Point
}

// Build chooses the timing of every segment of p within the hardware
// limits hw, samples the drive at hw.SampleRate, pads it to the
// granularity and converts it to DAC codes (see the package documentation
// for the schedule, the sampling and the rounding). It returns an error
// for an invalid plan or hardware description, a closing energy gap, a
// base point without an isolated working subspace, or a sample count
// beyond hw.MaxSamples (a *LimitError, detected before allocating). Limits
// that the chosen timing exceeds — duration, for example — are not
// errors: they show up as failed checks in Verify.
func Build(p *Plan, hw Hardware) (*Waveform, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if err := hw.Validate(len(p.Scheme.Channels)); err != nil {
		return nil, err
	}
	hw = hw.clone()
	slew, err := plannedSlew(&hw)
	if err != nil {
		return nil, err
	}
	sc, hz := CanonScheme(p.Scheme)
	bare := SchemeFromHz(sc, make([]float64, len(hz)))
	b := &builder{
		sc: sc, bare: bare, hw: hw, alpha: scheduleMargin * p.adiabaticity(), slew: slew,
		sp: newSpectrum(sc),
		h:  holonomy.NewMat(sc.Dim(), sc.Dim()), dh: holonomy.NewMat(sc.Dim(), sc.Dim()),
		pt: sc.NewPoint(), tmp: sc.NewPoint(),
	}
	tms := make([]*timing, len(p.Segments))
	for i, seg := range p.Segments {
		var (
			t   *timing
			err error
		)
		if seg.Kind == Adiabatic {
			t, err = b.timeAdiabatic(seg)
		} else {
			t, err = b.timeCyclic(seg)
		}
		if err != nil {
			return nil, fmt.Errorf("segment %d (%s): %w", i, seg.Kind, err)
		}
		tms[i] = t
	}
	// Stretch the stretchable parts (loops and pulses) to the minimum
	// duration.
	var fixed, stretch float64
	for _, t := range tms {
		fixed += 2 * t.tRamp
		stretch += t.tMain
	}
	if total := fixed + stretch; total < hw.MinDuration && stretch > 0 {
		f := (hw.MinDuration - fixed) / stretch
		for _, t := range tms {
			t.tMain *= f
		}
	}
	rate := hw.SampleRate
	n0 := 0
	for _, t := range tms {
		t.nRamp = samplesFor(t.tRamp, rate)
		t.nMain = samplesFor(t.tMain, rate)
		if t.seg.Kind == Adiabatic {
			t.nRamp = max(t.nRamp, minRampSamples)
			t.nMain = max(t.nMain, 1)
		} else {
			t.nRamp = 0
			t.nMain = max(t.nMain, minCyclicSamples)
		}
		if t.seg.Kind == Adiabatic && t.clusters == 2 {
			if err := b.matchPhase(t); err != nil {
				return nil, err
			}
		}
		n0 += 2*t.nRamp + t.nMain
	}
	g := hw.Granularity
	n := (n0 + g - 1) / g * g
	limit, what := hw.MaxSamples, "sample count"
	if MaxSampleLimit < limit {
		limit, what = MaxSampleLimit, "sample count (waveform file bound)"
	}
	if n0 > limit || n > limit {
		return nil, &LimitError{Check: NewCheck(what, float64(n), float64(limit), "", boundMax)}
	}
	w := &Waveform{
		Scheme:       sc,
		Target:       p.Target.Clone(),
		Hardware:     hw,
		Adiabaticity: p.adiabaticity(),
		MinFidelity:  p.minFidelity(),
		LevelHz:      hz,
	}
	nch, nlev := len(sc.Channels), sc.Dim()
	w.I, w.Q = make([][]float64, nch), make([][]float64, nch)
	for c := 0; c < nch; c++ {
		w.I[c], w.Q[c] = make([]float64, n), make([]float64, n)
	}
	w.Detuning = make([][]float64, nlev)
	at := 0
	for _, t := range tms {
		sp := Span{Kind: t.seg.Kind, First: at}
		if t.seg.Kind == Adiabatic {
			b.sampleAdiabatic(w, t, at)
			sp.Len = 2*t.nRamp + t.nMain
			sp.Ramp = t.nRamp
			sp.Amplitude = t.amp / (2 * math.Pi)
			sp.MinGap = t.minGap / (2 * math.Pi)
		} else {
			ap := b.sampleCyclic(w, t, at)
			sp.Len = t.nMain
			sp.Area = t.seg.Area
			sp.Amplitude = ap / (2 * math.Pi)
		}
		w.Spans = append(w.Spans, sp)
		at += sp.Len
	}
	if err := w.quantize(); err != nil {
		return nil, err
	}
	return w, nil
}

// samplesFor returns the number of whole samples covering t seconds.
func samplesFor(t, rate float64) int {
	x := t * rate
	if x > MaxSampleLimit*2 {
		return MaxSampleLimit*2 + 1
	}
	return int(math.Ceil(x - 1e-9))
}

// ampLimit returns the largest envelope A (rad/s) that keeps every channel
// with unit-scale peak maxU[c] below its Rabi limit and the DAC full scale,
// less one code step for rounding.
func (b *builder) ampLimit(maxU []float64) (float64, error) {
	a := math.Inf(1)
	for c, u := range maxU {
		if u == 0 {
			continue
		}
		lim := math.Min(b.hw.MaxRabi[c], b.hw.FullScale[c]) - b.hw.lsb(c)
		if lim <= 0 {
			return 0, fmt.Errorf("channel %q: the Rabi limit %g Hz is below one DAC step (%g Hz)", b.sc.Channels[c].Name, b.hw.MaxRabi[c], b.hw.lsb(c))
		}
		a = math.Min(a, 2*math.Pi*lim/u)
	}
	if math.IsInf(a, 1) {
		return 0, fmt.Errorf("the segment drives no channel")
	}
	return a, nil
}

// timeCyclic chooses the shortest pulse time meeting the Rabi and slew
// limits: A_p = 2·Area/T ≤ A_max and max|dz/dt| = Area·|u_c|/T² ≤ MaxSlew.
func (b *builder) timeCyclic(seg Segment) (*timing, error) {
	clearPoint(b.pt)
	seg.Shape(0, b.pt)
	maxU := make([]float64, len(b.pt.Drive))
	var umax float64
	for c, v := range b.pt.Drive {
		maxU[c] = cabs(v)
		umax = math.Max(umax, maxU[c])
	}
	amax, err := b.ampLimit(maxU)
	if err != nil {
		return nil, err
	}
	t := 2 * seg.Area / amax
	t = math.Max(t, math.Sqrt(seg.Area*umax/(b.slew)))
	return &timing{seg: seg, amp: amax, tMain: t}, nil
}

// sampleCyclic writes the sin² envelope of prescribed area at offset at
// and returns the peak envelope (rad/s).
func (b *builder) sampleCyclic(w *Waveform, t *timing, at int) float64 {
	clearPoint(b.pt)
	t.seg.Shape(0, b.pt)
	n := t.nMain
	dt := 1 / b.hw.SampleRate
	env := make([]float64, n)
	ap := 2 * t.seg.Area / (float64(n) * dt)
	var sum float64
	for k := range env {
		s := math.Sin(math.Pi * (float64(k) + 0.5) / float64(n))
		env[k] = ap * s * s
		sum += env[k] * dt
	}
	scale := t.seg.Area / sum
	peak := 0.0
	for k := range env {
		env[k] *= scale
		peak = math.Max(peak, env[k])
		b.writePoint(w, at+k, env[k], b.pt)
	}
	return peak
}

// writePoint stores a·p (rad/s) at sample k in Hz.
func (b *builder) writePoint(w *Waveform, k int, a float64, p holonomy.Point) {
	f := a / (2 * math.Pi)
	for c, v := range p.Drive {
		w.I[c][k] = f * real(v)
		w.Q[c][k] = f * imag(v)
	}
	for l, v := range p.Detuning {
		if v == 0 {
			continue
		}
		if w.Detuning[l] == nil {
			w.Detuning[l] = make([]float64, w.Len())
		}
		w.Detuning[l][k] = f * v
	}
}

// timeAdiabatic analyses the loop on a grid and chooses the amplitude, the
// ramp time and the local-adiabatic loop time (package documentation).
func (b *builder) timeAdiabatic(seg Segment) (*timing, error) {
	const G = gridIntervals
	la := newLoopAnalysis(b, seg)
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
				return nil, fmt.Errorf("shape gives a non-finite point at s = %g", s)
			}
		}
	}
	amp, err := b.ampLimit(maxU)
	if err != nil {
		return nil, err
	}
	la.amp = amp
	t := &timing{seg: seg, amp: amp, minGap: math.Inf(1)}
	// Working clusters at the base point.
	la.setPoint(b.pt, amp, la.pts)
	b.sc.Hamiltonian(b.h, b.pt)
	b.sp.factor(b.h)
	if err := b.sp.choose(); err != nil {
		return nil, fmt.Errorf("at the base point: %w", err)
	}
	t.clusters = len(b.sp.work)
	// Cost density on the grid (one-sided derivatives at the ends).
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
	// Corners, located to rounding, cut the loop into smooth pieces.
	bounds := append([]float64{0}, la.corners()...)
	bounds = append(bounds, 1)
	var total float64
	for j := 0; j+1 < len(bounds); j++ {
		b0, b1 := bounds[j], bounds[j+1]
		c0, g0, err := la.cost(b0, 1)
		if err != nil {
			return nil, err
		}
		c1, g1, err := la.cost(b1, -1)
		if err != nil {
			return nil, err
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
		return nil, fmt.Errorf("the loop does not move the working subspace (zero length)")
	}
	for i := range t.pieces {
		t.pieces[i].frac /= total
	}
	t.tMain = 2 * total
	// Ramp: adiabaticity along the amplitude ramp at the base point, and
	// the slew limit of the sin² ramp.
	la.setPoint(b.pt, 1, la.pts)
	b.bare.Hamiltonian(b.dh, b.pt) // ∂H/∂A
	thr := 1e-9 * holonomy.FrobeniusNorm(b.dh)
	var kr float64
	for m := 1; m <= rampGrid; m++ {
		a := amp * float64(m) / rampGrid
		la.setPoint(b.pt, a, la.pts)
		b.sc.Hamiltonian(b.h, b.pt)
		b.sp.factor(b.h)
		if err := b.sp.choose(); err != nil {
			return nil, fmt.Errorf("on the amplitude ramp at %.3g of full amplitude: %w", float64(m)/rampGrid, err)
		}
		k, _ := b.sp.coupling(b.dh, thr)
		if math.IsInf(k, 1) {
			return nil, fmt.Errorf("on the amplitude ramp at %.3g of full amplitude the computational levels are degenerate with a state they are coupled to: %w", float64(m)/rampGrid, holonomy.ErrNoSubspace)
		}
		kr = math.Max(kr, k)
	}
	var u0 float64
	for c := 0; c < nch; c++ {
		u0 = math.Max(u0, math.Hypot(la.pts[2*c], la.pts[2*c+1]))
	}
	t.tRamp = math.Max(math.Pi/2*amp*kr/b.alpha, amp*u0/(4*b.slew))
	t.tRamp = math.Max(t.tRamp, minRampSamples/b.hw.SampleRate)
	return t, nil
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
	b.sp.factor(b.h)
	la.deriv(s, side)
	la.setPoint(b.pt, la.amp, la.dv)
	b.bare.Hamiltonian(b.dh, b.pt)
	thr := 1e-9 * (holonomy.FrobeniusNorm(b.dh) + 1e-300)
	kappa, gap := b.sp.coupling(b.dh, thr)
	if tol := b.sp.tol(); gap <= tol || math.IsInf(kappa, 1) {
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

// matchPhase makes the dynamical phase between the two working clusters
// of an adiabatic segment a whole multiple of 2π, so that the gate is the
// holonomy alone (up to a global phase). With Φ = Σ_k (E_2 − E_1)_k Δt over
// the sampled segment (E_1 < E_2 the cluster energies at each sample), it
// first lengthens the loop so that Φ reaches the next multiple 2πm at the
// full amplitude, then lowers the amplitude slightly (secant iteration on
// the resampled segment) until Φ = 2πm to 1e-9 rad. Since Φ ∝ A·T for a
// Hamiltonian that scales with A, the adiabaticity parameter ∝ 1/(A·T)
// does not grow.
func (b *builder) matchPhase(t *timing) error {
	const tol = 1e-9
	phase := func(amp float64) (total, loop float64, err error) {
		t.amp = amp
		n := 2*t.nRamp + t.nMain
		w := &Waveform{I: make([][]float64, len(b.sc.Channels)), Q: make([][]float64, len(b.sc.Channels)), Detuning: make([][]float64, b.sc.Dim())}
		for c := range w.I {
			w.I[c], w.Q[c] = make([]float64, n), make([]float64, n)
		}
		b.sampleAdiabatic(w, t, 0)
		return b.clusterPhase(w, t.nRamp, n)
	}
	a0 := t.amp
	p0, l0, err := phase(a0)
	if err != nil {
		return err
	}
	m := math.Ceil(p0/(2*math.Pi) - 1e-12)
	want := 2 * math.Pi * m
	if math.Abs(p0-want) <= tol {
		return nil
	}
	// Lengthen the loop: its phase grows in proportion to its length.
	if l0 <= 0 {
		return fmt.Errorf("the dynamical phase between the working clusters does not grow along the loop")
	}
	perSample := l0 / float64(t.nMain)
	t.nMain += int(math.Ceil((want - p0) / perSample))
	// Lower the amplitude to hit 2πm exactly.
	x0, f0 := a0, 0.0
	if p, _, err := phase(x0); err != nil {
		return err
	} else {
		f0 = p - want
	}
	// The phase per sample is not uniform along the loop: add samples
	// until the full amplitude reaches 2πm, so that the root lies at an
	// amplitude ≤ a0.
	for tries := 0; f0 < 0 && tries < 8; tries++ {
		t.nMain += int(math.Ceil(-f0/perSample)) + 1
		p, _, err := phase(x0)
		if err != nil {
			return err
		}
		f0 = p - want
	}
	bestX, bestF := x0, f0
	x1 := a0 * want / (want + f0)
	for it := 0; it < 30; it++ {
		if !(x1 > 0.5*a0 && x1 <= a0) {
			break
		}
		p, _, err := phase(x1)
		if err != nil {
			return err
		}
		f1 := p - want
		if math.Abs(f1) <= tol {
			return nil
		}
		if math.Abs(f1) < math.Abs(bestF) {
			bestX, bestF = x1, f1
		}
		if f1 == f0 {
			break
		}
		x0, x1, f0 = x1, x1-f1*(x1-x0)/(f1-f0), f1
	}
	// The amplitude may not exceed a0, and the sample count is whole, so
	// the exact root can lie out of reach; a residual phase δ costs an
	// infidelity of about δ²/6 on a qubit, so up to phaseAccept (≈ 2e-9)
	// is kept.
	if math.Abs(bestF) <= phaseAccept {
		if _, _, err := phase(bestX); err != nil {
			return err
		}
		return nil
	}
	return fmt.Errorf("cannot make the dynamical phase between the working clusters a multiple of 2π (reached %.3g rad off)", bestF)
}

// phaseAccept is the largest residual dynamical phase (rad) matchPhase
// accepts when the exact root is out of reach.
const phaseAccept = 1e-4

// clusterPhase returns Φ = Σ_k (Ẽ_2 − Ẽ_1)_k Δt over the n samples of an
// adiabatic segment in w (unquantised drive, static detunings included)
// and the part of it from the loop, between the ramps of nr samples. Ẽ_C
// is the energy of working cluster C with its second-order adiabatic
// correction, Ẽ_C = E_C + Σ_{j∉C} ‖P_C ∂_tH|j⟩‖²/(|C|(E_C − E_j)³) (the
// level shift from the nonadiabatic coupling i⟨j|∂_t m⟩ = i⟨j|∂_tH|m⟩/(E_m −
// E_j) in second-order perturbation theory; without it the phase would be
// off by O(α)), with ∂_tH from central differences of the samples. The
// two clusters are chosen by weight at every ramp sample and followed by
// their places in the spectrum along the loop.
func (b *builder) clusterPhase(w *Waveform, nr, n int) (total, loop float64, err error) {
	dt := 1 / b.hw.SampleRate
	pt := b.pt
	set := func(dst *holonomy.Mat, k int) {
		w.unquantizedPoint(k, pt)
		b.sc.Hamiltonian(dst, pt)
	}
	dim := b.sc.Dim()
	hp, hm := holonomy.NewMat(dim, dim), holonomy.NewMat(dim, dim)
	var loopWork [][2]int
	for k := 0; k < n; k++ {
		set(b.h, k)
		b.sp.factor(b.h)
		inLoop := k >= nr && k < n-nr
		if inLoop && loopWork != nil {
			b.sp.work = append(b.sp.work[:0], loopWork...)
		} else {
			if err := b.sp.choose(); err != nil {
				return 0, 0, fmt.Errorf("sample %d of the segment: %w", k, err)
			}
			if inLoop {
				loopWork = append([][2]int(nil), b.sp.work...)
			}
		}
		if len(b.sp.work) != 2 {
			return 0, 0, fmt.Errorf("sample %d of the segment: %d working clusters where the base point has 2", k, len(b.sp.work))
		}
		// ∂_tH by central differences (one-sided at the ends).
		kp, km := min(k+1, n-1), max(k-1, 0)
		set(hp, kp)
		set(hm, km)
		for i := range hp.Data {
			hp.Data[i] = (hp.Data[i] - hm.Data[i]) / complex(float64(kp-km)*dt, 0)
		}
		holonomy.MulAH(b.sp.tmp, b.sp.v, hp)
		holonomy.Mul(b.sp.d, b.sp.tmp, b.sp.v)
		energy := func(r [2]int) float64 {
			var e float64
			for i := r[0]; i < r[1]; i++ {
				e += b.sp.vals[i]
			}
			e /= float64(r[1] - r[0])
			var shift float64
			for j := 0; j < dim; j++ {
				if j >= r[0] && j < r[1] {
					continue
				}
				de := e - b.sp.vals[j]
				for m := r[0]; m < r[1]; m++ {
					x := b.sp.d.Data[m*dim+j]
					shift += (real(x)*real(x) + imag(x)*imag(x)) / (de * de * de)
				}
			}
			return e + shift/float64(r[1]-r[0])
		}
		d := (energy(b.sp.work[1]) - energy(b.sp.work[0])) * dt
		total += d
		if inLoop {
			loop += d
		}
	}
	return total, loop, nil
}

// quantize computes the DAC codes of every sample.
func (w *Waveform) quantize() error {
	nch := len(w.I)
	w.CodeI, w.CodeQ = make([][]int32, nch), make([][]int32, nch)
	mc := w.Hardware.MaxCode()
	for c := 0; c < nch; c++ {
		w.CodeI[c], w.CodeQ[c] = make([]int32, w.Len()), make([]int32, w.Len())
		fs := w.Hardware.FullScale[c]
		for k := range w.I[c] {
			ci, err := DACCode(w.I[c][k], fs, mc)
			if err != nil {
				return fmt.Errorf("channel %q sample %d: %w", w.Scheme.Channels[c].Name, k, err)
			}
			cq, err := DACCode(w.Q[c][k], fs, mc)
			if err != nil {
				return fmt.Errorf("channel %q sample %d: %w", w.Scheme.Channels[c].Name, k, err)
			}
			w.CodeI[c][k], w.CodeQ[c][k] = ci, cq
		}
	}
	return nil
}

// DACCode returns round(x/fs·mc), halves away from zero. Codes outside the
// DAC range are returned as they are (a failed check, never clipped);
// codes beyond the int32 range are an error.
func DACCode(x, fs, mc float64) (int32, error) {
	v := math.Round(x / fs * mc)
	if !holonomy.Finite(v) || math.Abs(v) > math.MaxInt32 {
		return 0, fmt.Errorf("drive %g Hz is beyond any DAC code at full scale %g Hz", x, fs)
	}
	return int32(v), nil
}

func cabs(v complex128) float64 { return math.Hypot(real(v), imag(v)) }
