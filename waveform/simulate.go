package waveform

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// ErrorModel lists the imperfections a verification includes. The zero
// value is the ideal model of the quantised waveform: no errors, drive
// taken from the DAC codes.
type ErrorModel struct {
	// AmplitudeError is the common relative amplitude error ε: every Rabi
	// frequency Ω becomes (1 + ε)Ω. It must exceed −1.
	AmplitudeError float64
	// ChannelErrors are extra relative amplitude errors per channel (nil
	// for none); channel c is scaled by (1 + ε)(1 + ε_c).
	ChannelErrors []float64
	// OnePhotonDetuning (Hz) is added to every excited level: a level that
	// is not computational and is the upper level of some channel.
	OnePhotonDetuning float64
	// TwoPhotonDetuning (Hz) is added to the second computational level
	// |1⟩, detuning the qubit levels from each other.
	TwoPhotonDetuning float64
	// Decay is the population decay rate Γ (1/s) of every excited level,
	// applied as the non-Hermitian term −iΓ/2|e⟩⟨e| (loss out of the
	// modelled levels). The scheme's own Level.Decay values are not used.
	Decay float64
	// Dephasing is the pure dephasing rate γ_φ (1/s) of the computational
	// levels, solved with the Lindblad master equation: a coherence
	// between two computational levels decays as exp(−γ_φ t).
	Dephasing float64
	// RiseTime is the 10–90% rise time (s) of the analog output, modelled
	// as a linear low-pass filter of shape Filter applied to the
	// zero-order-hold signal of every channel and controlled detuning
	// track. The filtered signal is evaluated exactly, as the convolution
	// of the held samples with the filter's impulse response, at the
	// midpoints of SubSteps sub-steps per sample, on a time grid extended
	// to hold the filter's reach, and propagated with those sub-steps. The
	// static error detunings (OnePhotonDetuning, TwoPhotonDetuning) act
	// throughout the extended grid. Zero means unlimited bandwidth, and
	// Filter is then ignored (it must still be a valid kind).
	RiseTime float64
	// Filter is the shape of the low-pass filter when RiseTime > 0; the
	// zero value is GaussianFilter. See FilterKind for the two shapes,
	// their reach and the extension of the time grid.
	Filter FilterKind
	// SubSteps is the number of propagation steps per sample when
	// RiseTime > 0; zero means 8.
	SubSteps int
	// PhaseStep is the drive-phase resolution (rad) of a phase modulator
	// that can set phases only on a grid: the phase of every held sample
	// of every channel (from the DAC codes, or from I and Q when
	// Unquantized) is rounded to the nearest multiple of PhaseStep
	// (halfway cases away from zero), its modulus kept, before filtering
	// and propagation. A sample whose phase is already on the grid is used
	// unchanged. The phase switches exactly at the sample boundaries (no
	// timing jitter). Zero means exact phases; the largest step is π.
	PhaseStep float64
	// Unquantized takes the drive from the unquantised I and Q instead of
	// the DAC codes.
	Unquantized bool
}

// FilterKind is the shape of the low-pass filter that models the analog
// bandwidth of the drive chain (ErrorModel.Filter).
type FilterKind int

const (
	// GaussianFilter is a zero-phase Gaussian low pass: the step response
	// is Φ(t/σ), Φ the standard normal distribution function and
	// σ = RiseTime/2.5631 (the 10–90% points of Φ are ±1.2816σ). Its
	// kernel reaches 6σ both ways (the neglected tails hold Φ(−6) ≈ 1e−9
	// of the pulse area) and the time grid is extended by as much at both
	// ends. It delays nothing.
	GaussianFilter FilterKind = iota
	// FirstOrderFilter is a causal single-pole (RC) low pass with time
	// constant τ = RiseTime/ln 9: the step response is 1 − e^{−t/τ} for
	// t > 0, reaching 10% at τ ln(10/9) and 90% at τ ln 10. Its kernel
	// reaches 12 ln 10 τ ≈ 27.6τ into the past (the neglected tail holds
	// e^{−27.6} = 1e−12 of the pulse area) and the time grid is extended by
	// as much after the end, so the gate includes the filter's tail and
	// every pulse keeps its area (unit DC gain). The filter delays the
	// signal (by τ for a slow ramp); a delay common to all channels and
	// detuning tracks does not change the gate when no static error
	// detuning acts during it.
	FirstOrderFilter
)

// String returns "gaussian" or "first-order", the names used in waveform
// files.
func (k FilterKind) String() string {
	switch k {
	case GaussianFilter:
		return "gaussian"
	case FirstOrderFilter:
		return "first-order"
	}
	return fmt.Sprintf("FilterKind(%d)", int(k))
}

// FilterName returns the name of m's filter as written in waveform files:
// "none" without a rise time, else the filter kind's name.
func (m *ErrorModel) FilterName() string {
	if m.RiseTime == 0 {
		return "none"
	}
	return m.Filter.String()
}

// gaussRise is the 10–90% rise time of Φ(t/σ) in units of σ: 2·z₀.₉ with
// z₀.₉ = 1.2815515655446004 the 90% point of the standard normal
// distribution.
const gaussRise = 2 * 1.2815515655446004

// ln9 is ln 9, the 10–90% rise time of 1 − e^{−t/τ} in units of τ:
// ln 10 − ln(10/9).
const ln9 = 2.1972245773362196

const (
	// maxFilterSamples bounds the reach of a filter kernel in samples.
	maxFilterSamples = 4096
	// filterReach is the half-width of the Gaussian filter kernel in σ;
	// the neglected tails hold Φ(−6) ≈ 1e−9 of the pulse area.
	filterReach = 6
	// firstOrderReach is the reach of the first-order filter kernel in τ,
	// 12 ln 10: the neglected tail holds e^{−12 ln 10} = 1e−12 of the
	// pulse area.
	firstOrderReach = 12 * math.Ln10
)

// Outcome is the result of one simulation.
type Outcome struct {
	// Fidelity is the average gate fidelity on the computational levels
	// including leakage (Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47
	// (2007)); Leakage is 1 − Tr(M†M)/d, which includes decay losses.
	Fidelity, Leakage float64
	// PeakAux holds, for each computational input level, the largest
	// total population of the non-computational levels, read at the
	// sample boundaries.
	PeakAux []float64
	// PeakExcited holds, for each computational input level, the largest
	// total population of the excited levels (not computational, upper
	// level of some channel), read at the sample boundaries.
	PeakExcited []float64
	// Times (s) and Populations[input][level][i] hold level populations
	// at decimated sample boundaries, for each computational input level;
	// nil unless traces were requested.
	Times       []float64
	Populations [][][]float64
}

// Simulator propagates a Waveform under an ErrorModel. It is a reusable
// workspace: after the first Run with a given model shape, further runs
// allocate nothing, and the propagation loop never allocates. A Simulator
// is not safe for concurrent use; give each goroutine its own (they may
// share the Waveform).
type Simulator struct {
	// TracePoints is the number of decimated population samples Run
	// records (0 for none). About that many are kept, evenly spaced in
	// samples, including the last sample.
	TracePoints int

	w       *Waveform
	n, d    int
	nch     int
	excited []int
	prop    *holonomy.Propagator
	lind    *lindbladWork
	h, u, e *holonomy.Mat
	tmp     *holonomy.Mat
	pt      holonomy.Point
	decay   []float64
	zero    []float64
	drv     []complex128 // current step's drives, rad/s
	prevDrv []complex128
	dtn     []float64 // current step's controlled + error detunings, rad/s
	prevDtn []float64
	scale   []float64 // 2π(1 + ε)(1 + ε_c) per channel
	errDet  []float64 // error detunings per level, rad/s
	m       ErrorModel
	sub     int // propagation steps per sample
	padL    int // samples added before the waveform (filter reach)
	padR    int // samples added after it
	last    int // sample boundaries on the extended grid: N + padL + padR
	back    int // the kernel weighs samples q − back … q + ahead
	ahead   int
	kernel  []float64 // filter weights, sub × (back + ahead + 1)
	kerKind FilterKind
	kerRise float64
	kerSub  int
	held    []complex128 // the samples read (phase-rounded), channel-major, when cached
	cached  bool         // sample reads held
	isComp  []bool
	isExc   []bool
}

// CheckModel reports whether m is a valid error model for w (the checks
// Run makes before any work): amplitude errors above −1, finite detunings,
// rates and detunings the sampled model resolves, a filter whose reach and
// step count stay within bounds, and so on.
func (w *Waveform) CheckModel(m ErrorModel) error { return NewSimulator(w).validate(&m) }

// NewSimulator returns a workspace for simulating w.
func NewSimulator(w *Waveform) *Simulator {
	n := w.Scheme.Dim()
	s := &Simulator{
		w: w, n: n, d: len(w.Scheme.Computational), nch: len(w.Scheme.Channels),
		excited: w.Scheme.ExcitedLevels(),
		prop:    holonomy.NewPropagator(n),
		h:       holonomy.NewMat(n, n),
		u:       holonomy.NewMat(n, n),
		e:       holonomy.NewMat(n, n),
		tmp:     holonomy.NewMat(n, n),
		pt:      w.Scheme.NewPoint(),
		decay:   make([]float64, n),
		zero:    make([]float64, n),
		isComp:  make([]bool, n),
		isExc:   make([]bool, n),
		drv:     make([]complex128, len(w.Scheme.Channels)),
		prevDrv: make([]complex128, len(w.Scheme.Channels)),
		dtn:     make([]float64, n),
		prevDtn: make([]float64, n),
		scale:   make([]float64, len(w.Scheme.Channels)),
		errDet:  make([]float64, n),
	}
	for _, k := range w.Scheme.Computational {
		s.isComp[k] = true
	}
	for _, k := range s.excited {
		s.isExc[k] = true
	}
	return s
}

// Simulate propagates w under m and returns the outcome with about 400
// decimated population samples. It allocates a Simulator; use one directly
// to run many models.
func Simulate(w *Waveform, m ErrorModel) (*Outcome, error) {
	s := NewSimulator(w)
	s.TracePoints = 400
	out := new(Outcome)
	if err := s.Run(m, out); err != nil {
		return nil, err
	}
	return out, nil
}

// validate checks m for the waveform's scheme.
func (s *Simulator) validate(m *ErrorModel) error {
	if !holonomy.Finite(m.AmplitudeError) || m.AmplitudeError <= -1 {
		return fmt.Errorf("error model: amplitude error %v; need a finite number above −1", m.AmplitudeError)
	}
	if m.ChannelErrors != nil && len(m.ChannelErrors) != s.nch {
		return fmt.Errorf("error model: %d channel amplitude errors for %d channels", len(m.ChannelErrors), s.nch)
	}
	for c, v := range m.ChannelErrors {
		if !holonomy.Finite(v) || v <= -1 {
			return fmt.Errorf("error model: amplitude error of channel %q is %v; need a finite number above −1", s.w.Scheme.Channels[c].Name, v)
		}
	}
	if !holonomy.Finite(m.OnePhotonDetuning) || !holonomy.Finite(m.TwoPhotonDetuning) {
		return errors.New("error model: detunings must be finite")
	}
	// Rates and detunings so large that the state decays or winds many
	// times within one sample are outside what a sampled model resolves
	// (and would make the exact steps arbitrarily long): refuse them.
	dt := s.w.Dt()
	if r := (m.Decay + 2*m.Dephasing) * dt; r > maxRatePerSample {
		return fmt.Errorf("error model: decay %.3g /s and dephasing %.3g /s act %.3g times per sample (%.3g s); the limit is %g: rates this large are outside what a sampled waveform model resolves",
			m.Decay, m.Dephasing, r, dt, float64(maxRatePerSample))
	}
	for _, d := range []float64{m.OnePhotonDetuning, m.TwoPhotonDetuning} {
		if r := 2 * math.Pi * math.Abs(d) * dt; r > maxRatePerSample {
			return fmt.Errorf("error model: a detuning of %.3g Hz winds %.3g rad per sample (%.3g s); the limit is %g rad", d, r, dt, float64(maxRatePerSample))
		}
	}
	if !holonomy.Finite(m.Decay) || m.Decay < 0 || !holonomy.Finite(m.Dephasing) || m.Dephasing < 0 {
		return errors.New("error model: decay and dephasing rates must be finite and non-negative")
	}
	if !holonomy.Finite(m.RiseTime) || m.RiseTime < 0 {
		return fmt.Errorf("error model: rise time %v s; need a finite number ≥ 0", m.RiseTime)
	}
	if m.RiseTime > s.w.Duration() {
		return fmt.Errorf("error model: rise time %g s is longer than the waveform (%g s)", m.RiseTime, s.w.Duration())
	}
	if m.Filter != GaussianFilter && m.Filter != FirstOrderFilter {
		return fmt.Errorf("error model: unknown filter kind %d; use GaussianFilter or FirstOrderFilter", int(m.Filter))
	}
	if m.RiseTime > 0 {
		if reach := filterReachSamples(m.Filter, m.RiseTime, s.w.Hardware.SampleRate); reach > maxFilterSamples {
			return fmt.Errorf("error model: the %s filter of rise time %g s reaches %.0f samples (%s); the limit is %d samples",
				m.Filter, m.RiseTime, reach, reachText(m.Filter), maxFilterSamples)
		}
	}
	if !holonomy.Finite(m.PhaseStep) || m.PhaseStep < 0 || m.PhaseStep > math.Pi {
		return fmt.Errorf("error model: phase step %v rad; need a finite number from 0 (exact phases) to π", m.PhaseStep)
	}
	if m.SubSteps < 0 || m.SubSteps > 64 {
		return fmt.Errorf("error model: %d sub-steps per sample; need 0 (default 8) to 64", m.SubSteps)
	}
	if len(s.w.Scheme.Computational) < 2 && m.TwoPhotonDetuning != 0 {
		return errors.New("error model: a two-photon detuning needs two computational levels")
	}
	return nil
}

// filterReachSamples returns the reach of a filter kernel in samples: 6σ
// for the Gaussian, 27.6τ for the first-order filter.
func filterReachSamples(k FilterKind, rise, rate float64) float64 {
	if k == FirstOrderFilter {
		return rise / ln9 * firstOrderReach * rate
	}
	return rise / gaussRise * filterReach * rate
}

// reachText describes a filter's reach for messages.
func reachText(k FilterKind) string {
	if k == FirstOrderFilter {
		return "27.6 time constants, τ = rise time/ln 9"
	}
	return "6σ, σ = rise time/2.5631"
}

// maxRatePerSample bounds Γ·Δt, 2γ_φ·Δt and 2πδ·Δt per sample in an
// error model.
const maxRatePerSample = 100

// maxSteps bounds the propagation steps of one simulation (samples plus
// filter margins, times sub-steps).
const maxSteps = 1 << 24

// prepare validates m and sets up the workspace for it: sub-steps, the
// filter kernel and the extended grid, the amplitude scales, the error
// detunings, the decay rates and the phase-rounded samples. It returns
// the number of propagation steps.
func (s *Simulator) prepare(m *ErrorModel) (int, error) {
	if err := s.validate(m); err != nil {
		return 0, err
	}
	w := s.w
	N := w.Len()
	sub, padL, padR := 1, 0, 0
	if m.RiseTime > 0 {
		sub = m.SubSteps
		if sub == 0 {
			sub = 8
		}
		s.setKernel(m.Filter, m.RiseTime, sub)
		// The grid is extended by the kernel's reach (plus one sample),
		// so that the filtered signal has risen from, and decayed to, the
		// neglected tails at its ends: both ends for the Gaussian, after
		// the end only for the causal first-order filter.
		if m.Filter == FirstOrderFilter {
			padR = s.back
		} else {
			sigma := m.RiseTime / gaussRise
			padL = int(math.Ceil(filterReach*sigma*w.Hardware.SampleRate)) + 1
			padR = padL
		}
	}
	steps := (N + padL + padR) * sub
	if steps > maxSteps {
		return 0, fmt.Errorf("error model: the simulation needs %d propagation steps; the limit is %d", steps, maxSteps)
	}
	s.m, s.sub, s.padL, s.padR, s.last = *m, sub, padL, padR, N+padL+padR
	for c := 0; c < s.nch; c++ {
		f := 2 * math.Pi * (1 + m.AmplitudeError)
		if m.ChannelErrors != nil {
			f *= 1 + m.ChannelErrors[c]
		}
		s.scale[c] = f
	}
	for k := range s.errDet {
		s.errDet[k] = 0
	}
	for _, k := range s.excited {
		s.errDet[k] += 2 * math.Pi * m.OnePhotonDetuning
	}
	if m.TwoPhotonDetuning != 0 {
		s.errDet[w.Scheme.Computational[1]] += 2 * math.Pi * m.TwoPhotonDetuning
	}
	for i := range s.decay {
		s.decay[i] = 0
	}
	for _, k := range s.excited {
		s.decay[k] = m.Decay
	}
	// The held samples, phase-rounded when the model has a phase step,
	// are computed once and read from held: the filter reads each of
	// them many times. Without a phase step they are the very values
	// sample computes.
	s.cached = false
	if m.PhaseStep > 0 || m.RiseTime > 0 {
		s.held = growC(s.held, s.nch*N)
		for c := 0; c < s.nch; c++ {
			for k := 0; k < N; k++ {
				z := s.sample(c, k)
				if m.PhaseStep > 0 {
					z = roundPhase(z, m.PhaseStep)
				}
				s.held[c*N+k] = z
			}
		}
		s.cached = true
	}
	return steps, nil
}

// roundPhase returns z with its phase rounded to the nearest multiple of
// step (halfway cases away from zero) and its modulus kept; z itself when
// its phase is already a multiple of step (or z is zero).
func roundPhase(z complex128, step float64) complex128 {
	if z == 0 {
		return z
	}
	ph := math.Atan2(imag(z), real(z))
	q := step * math.Round(ph/step)
	if q == ph {
		return z
	}
	r := math.Hypot(real(z), imag(z))
	sn, cs := math.Sincos(q)
	return complex(r*cs, r*sn)
}

// Run propagates the waveform under m and stores the result in out,
// reusing out's slices when they are large enough.
func (s *Simulator) Run(m ErrorModel, out *Outcome) error {
	steps, err := s.prepare(&m)
	if err != nil {
		return err
	}
	w := s.w
	n := s.n
	N := w.Len()
	sub, padL, padR := s.sub, s.padL, s.padR
	dt := w.Dt() / float64(sub)
	// Outputs.
	d := s.d
	out.PeakAux = growF(out.PeakAux, d)[:d]
	out.PeakExcited = growF(out.PeakExcited, d)[:d]
	for i := range out.PeakAux {
		out.PeakAux[i], out.PeakExcited[i] = 0, 0
	}
	tp := s.TracePoints
	stride := 0
	if tp > 0 {
		stride = max(1, (N+padL+padR+tp-1)/tp)
		np := (N+padL+padR+stride-1)/stride + 1
		out.Times = growF(out.Times, np)[:0]
		if len(out.Populations) != d {
			out.Populations = make([][][]float64, d)
		}
		for i := range out.Populations {
			if len(out.Populations[i]) != n {
				out.Populations[i] = make([][]float64, n)
			}
			for l := range out.Populations[i] {
				out.Populations[i][l] = growF(out.Populations[i][l], np)[:0]
			}
		}
	} else {
		out.Times, out.Populations = nil, nil
	}
	if m.Dephasing > 0 {
		return s.runLindblad(&m, steps, stride, dt, out)
	}
	lossy := m.Decay > 0
	s.u.SetIdentity()
	eValid := false
	s.record(out, stride, 0)
	for j := 0; j < steps; j++ {
		s.controls(j)
		if j > 0 && s.sameAsPrevious() {
			if !eValid {
				s.e.SetIdentity()
				s.step(s.e, dt, lossy)
				eValid = true
			}
			holonomy.Mul(s.tmp, s.e, s.u)
			s.u, s.tmp = s.tmp, s.u
		} else {
			eValid = false
			s.step(s.u, dt, lossy)
		}
		s.keep()
		if (j+1)%sub == 0 {
			s.record(out, stride, (j+1)/sub)
		}
	}
	out.Fidelity, out.Leakage = holonomy.GateFidelity(s.u, w.Scheme.Computational, w.Target)
	return nil
}

// step applies the propagator of the current controls to u.
func (s *Simulator) step(u *holonomy.Mat, dt float64, lossy bool) {
	s.hamiltonian()
	if lossy {
		s.prop.StepDecay(u, s.h, s.decay, dt)
	} else {
		s.prop.Step(u, s.h, dt)
	}
}

// hamiltonian sets s.h to H of the current controls.
func (s *Simulator) hamiltonian() {
	copy(s.pt.Drive, s.drv)
	copy(s.pt.Detuning, s.dtn)
	s.w.Scheme.Hamiltonian(s.h, s.pt)
}

// sameAsPrevious reports whether the current controls equal the previous
// step's.
func (s *Simulator) sameAsPrevious() bool {
	for i, v := range s.drv {
		if v != s.prevDrv[i] {
			return false
		}
	}
	for i, v := range s.dtn {
		if v != s.prevDtn[i] {
			return false
		}
	}
	return true
}

// keep remembers the current controls as the previous step's.
func (s *Simulator) keep() {
	s.drv, s.prevDrv = s.prevDrv, s.drv
	s.dtn, s.prevDtn = s.prevDtn, s.dtn
}

// record updates the peak auxiliary populations after sample boundary q
// (counted on the extended grid) and stores a trace point every stride
// boundaries and at the last one.
func (s *Simulator) record(out *Outcome, stride, q int) {
	n := s.n
	u := s.u.Data
	for i, c := range s.w.Scheme.Computational {
		var aux, exc float64
		for l := 0; l < n; l++ {
			if s.isComp[l] {
				continue
			}
			x := u[l*n+c]
			p := real(x)*real(x) + imag(x)*imag(x)
			aux += p
			if s.isExc[l] {
				exc += p
			}
		}
		out.PeakAux[i] = math.Max(out.PeakAux[i], aux)
		out.PeakExcited[i] = math.Max(out.PeakExcited[i], exc)
	}
	if stride == 0 || (q%stride != 0 && q != s.last) {
		return
	}
	out.Times = append(out.Times, float64(q-s.padL)*s.w.Dt())
	for i, c := range s.w.Scheme.Computational {
		for l := 0; l < n; l++ {
			x := u[l*n+c]
			out.Populations[i][l] = append(out.Populations[i][l], real(x)*real(x)+imag(x)*imag(x))
		}
	}
}

// sample returns the drive of channel c at sample k (Hz), from the DAC
// codes or, for an unquantised model, from I and Q, with its phase
// rounded when the model has a phase step.
func (s *Simulator) sample(c, k int) complex128 {
	if s.cached {
		return s.held[c*s.w.Len()+k]
	}
	if s.m.Unquantized {
		return complex(s.w.I[c][k], s.w.Q[c][k])
	}
	return s.w.Quantized(c, k)
}

// controls sets s.drv (rad/s, with amplitude errors) and s.dtn (controlled
// tracks and error detunings, rad/s) for step j, filtered when the model
// has a rise time.
func (s *Simulator) controls(j int) {
	w := s.w
	drv, dtn := s.drv, s.dtn
	if s.m.RiseTime == 0 {
		for c := range drv {
			drv[c] = s.sample(c, j) * complex(s.scale[c], 0)
		}
		for l := range dtn {
			v := s.errDet[l]
			if tr := w.Detuning[l]; tr != nil {
				v += 2 * math.Pi * tr[j]
			}
			dtn[l] = v
		}
		return
	}
	N, back, ahead := w.Len(), s.back, s.ahead
	width := back + ahead + 1
	q, o := j/s.sub-s.padL, j%s.sub
	ker := s.kernel[o*width : (o+1)*width]
	for c := range drv {
		drv[c] = 0
	}
	copy(dtn, s.errDet)
	for r := max(-back, -q); r <= ahead && q+r < N; r++ {
		k := q + r
		wt := ker[r+back]
		for c := range drv {
			drv[c] += s.held[c*N+k] * complex(s.scale[c]*wt, 0)
		}
		for l, tr := range w.Detuning {
			if tr != nil {
				dtn[l] += 2 * math.Pi * tr[k] * wt
			}
		}
	}
}

// setKernel computes the weights of the held samples q+r, r = −back …
// ahead, in the filtered signal at the midpoint x = (o + ½)/sub of
// sub-step o of sample q, for a filter of the given kind and 10–90% rise
// time. With S the filter's step response and Δt the sample interval,
// w_o(r) = S((x − r)Δt) − S((x − r − 1)Δt) (the response at time x Δt
// to a unit sample held over [rΔt, (r+1)Δt)).
//
// Gaussian: S(t) = Φ(t/σ), back = ahead = ⌈6σ/Δt⌉ + 1.
//
// First order: S(t) = 1 − e^{−t/τ} for t > 0 and 0 before, so future
// samples weigh nothing (ahead = 0), w_o(0) = 1 − e^{−a x} and, for
// r < 0, w_o(r) = e^{−a(x − r − 1)}(1 − e^{−a}) with a = Δt/τ, both
// computed with expm1 to keep their relative accuracy; back =
// ⌈27.6τ/Δt⌉ + 1. The weights of a row sum to 1 − e^{−a(x + back)}, the
// neglected tail being below 1e−12.
func (s *Simulator) setKernel(kind FilterKind, rise float64, sub int) {
	if s.kerKind == kind && s.kerRise == rise && s.kerSub == sub && len(s.kernel) > 0 {
		return
	}
	var back, ahead int
	switch kind {
	case FirstOrderFilter:
		a := s.w.Dt() / (rise / ln9)
		back, ahead = int(math.Ceil(firstOrderReach/a))+1, 0
		width := back + 1
		s.kernel = growF(s.kernel, sub*width)[:sub*width]
		g := -math.Expm1(-a) // 1 − e^{−a}
		for o := 0; o < sub; o++ {
			x := (float64(o) + 0.5) / float64(sub)
			row := s.kernel[o*width : (o+1)*width]
			for r := -back; r < 0; r++ {
				row[r+back] = math.Exp(-a*(x-float64(r)-1)) * g
			}
			row[back] = -math.Expm1(-a * x)
		}
	default:
		dts := s.w.Dt() / (rise / gaussRise)
		R := int(math.Ceil(filterReach/dts)) + 1
		back, ahead = R, R
		width := 2*R + 1
		s.kernel = growF(s.kernel, sub*width)[:sub*width]
		phi := func(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }
		for o := 0; o < sub; o++ {
			x := (float64(o) + 0.5) / float64(sub)
			for r := -R; r <= R; r++ {
				s.kernel[o*width+r+R] = phi((x-float64(r))*dts) - phi((x-float64(r)-1)*dts)
			}
		}
	}
	s.back, s.ahead = back, ahead
	s.kerKind, s.kerRise, s.kerSub = kind, rise, sub
}

func growF(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	return b[:n]
}

func growC(b []complex128, n int) []complex128 {
	if cap(b) < n {
		return make([]complex128, n)
	}
	return b[:n]
}
