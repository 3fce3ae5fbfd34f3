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
const ScheduleMargin = 0.9

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
		lsb = math.Max(lsb, hw.LSB(c))
	}
	floor := 2 * lsb * hw.SampleRate
	slew := math.Min(slewUse*hw.MaxSlew, hw.MaxSlew-floor)
	if slew <= 0 {
		return 0, &LimitError{Check: NewCheck(SlewCheck, "slew rate (two DAC steps per sample)", floor, hw.MaxSlew, "Hz/s")}
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
	hz    []float64        // static level detunings in Hz (canonical)
	hw    Hardware
	alpha float64
	slew  float64 // slew rate the timing plans for, Hz/s (see plannedSlew)
	sp    *holonomy.Spectrum
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
	b, err := newBuilder(p, hw)
	if err != nil {
		return nil, err
	}
	tms, err := b.timeSegments(p)
	if err != nil {
		return nil, err
	}
	stretchToMinDuration(tms, b.hw.MinDuration)
	n, err := b.countSamples(tms)
	if err != nil {
		return nil, err
	}
	w := b.sample(p, tms, n)
	if err := w.quantize(); err != nil {
		return nil, err
	}
	return w, nil
}

// newBuilder validates p and hw and sets up the shared workspace.
func newBuilder(p *Plan, hw Hardware) (*builder, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if err := hw.Validate(len(p.Scheme.Channels)); err != nil {
		return nil, err
	}
	hw = hw.Clone()
	slew, err := plannedSlew(&hw)
	if err != nil {
		return nil, err
	}
	sc, hz := CanonScheme(p.Scheme)
	bare := SchemeFromHz(sc, make([]float64, len(hz)))
	return &builder{
		sc: sc, bare: bare, hz: hz, hw: hw, alpha: ScheduleMargin * p.adiabaticity(), slew: slew,
		sp: holonomy.NewSpectrum(sc),
		h:  holonomy.NewMat(sc.Dim(), sc.Dim()), dh: holonomy.NewMat(sc.Dim(), sc.Dim()),
		pt: sc.NewPoint(), tmp: sc.NewPoint(),
	}, nil
}

// timeSegments chooses the continuous timing of every segment.
func (b *builder) timeSegments(p *Plan) ([]*timing, error) {
	tms := make([]*timing, len(p.Segments))
	for i, seg := range p.Segments {
		var (
			t   *timing
			err error
		)
		if seg.Kind == AdiabaticSegment {
			t, err = b.timeAdiabatic(seg)
		} else {
			t, err = b.timeCyclic(seg)
		}
		if err != nil {
			return nil, fmt.Errorf("segment %d (%s): %w", i, seg.Kind, err)
		}
		tms[i] = t
	}
	return tms, nil
}

// stretchToMinDuration stretches the stretchable parts (loops and pulses)
// so that the gate lasts at least minDuration.
func stretchToMinDuration(tms []*timing, minDuration float64) {
	var fixed, stretch float64
	for _, t := range tms {
		fixed += 2 * t.tRamp
		stretch += t.tMain
	}
	if total := fixed + stretch; total < minDuration && stretch > 0 {
		f := (minDuration - fixed) / stretch
		for _, t := range tms {
			t.tMain *= f
		}
	}
}

// countSamples rounds every part to whole samples (matching the dynamical
// phase of two-cluster adiabatic segments) and returns the total padded to
// the granularity, or a *LimitError beyond the sample limit.
func (b *builder) countSamples(tms []*timing) (int, error) {
	hw := &b.hw
	rate := hw.SampleRate
	n0 := 0
	for _, t := range tms {
		t.nRamp = samplesFor(t.tRamp, rate)
		t.nMain = samplesFor(t.tMain, rate)
		if t.seg.Kind == AdiabaticSegment {
			t.nRamp = max(t.nRamp, minRampSamples)
			t.nMain = max(t.nMain, 1)
		} else {
			t.nRamp = 0
			t.nMain = max(t.nMain, minCyclicSamples)
		}
		if t.seg.Kind == AdiabaticSegment && t.clusters == 2 {
			if err := b.matchPhase(t); err != nil {
				return 0, err
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
		return 0, &LimitError{Check: NewCheck(SampleCountCheck, what, float64(n), float64(limit), ""), FileBound: what != "sample count"}
	}
	return n, nil
}

// sample allocates the waveform of n samples and samples every segment.
func (b *builder) sample(p *Plan, tms []*timing, n int) *Waveform {
	sc := b.sc
	w := &Waveform{
		Scheme:       sc,
		Target:       p.Target.Clone(),
		Hardware:     b.hw,
		Adiabaticity: p.adiabaticity(),
		MinFidelity:  p.minFidelity(),
		LevelHz:      b.hz,
	}
	nch, nlev := len(sc.Channels), sc.Dim()
	w.I, w.Q = make([][]float64, nch), make([][]float64, nch)
	for c := 0; c < nch; c++ {
		w.I[c], w.Q[c] = make([]float64, n), make([]float64, n)
	}
	w.Detuning = make([][]float64, nlev)
	at := 0
	for _, t := range tms {
		sp := SegmentTiming{Kind: t.seg.Kind, First: at}
		if t.seg.Kind == AdiabaticSegment {
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
		w.Segments = append(w.Segments, sp)
		at += sp.Len
	}
	return w
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
		lim := math.Min(b.hw.MaxRabi[c], b.hw.FullScale[c]) - b.hw.LSB(c)
		if lim <= 0 {
			return 0, fmt.Errorf("channel %q: the Rabi limit %g Hz is below one DAC step (%g Hz)", b.sc.Channels[c].Name, b.hw.MaxRabi[c], b.hw.LSB(c))
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
