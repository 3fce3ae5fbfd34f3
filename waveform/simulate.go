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
	// as a zero-phase Gaussian low-pass filter applied to the
	// zero-order-hold signal: its step response is Φ(t/σ) with Φ the
	// standard normal distribution function and σ = RiseTime/2.5631. The
	// filtered drive is evaluated exactly (as the convolution of the
	// held samples with the Gaussian) at the midpoints of SubSteps
	// sub-steps per sample, on a time grid extended by 6σ at both ends,
	// and propagated with those sub-steps. Zero means unlimited bandwidth.
	// The filter delays nothing; a real filter's common delay shifts all
	// channels alike and does not change the gate.
	RiseTime float64
	// SubSteps is the number of propagation steps per sample when
	// RiseTime > 0; zero means 8.
	SubSteps int
	// Unquantized takes the drive from the unquantised I and Q instead of
	// the DAC codes.
	Unquantized bool
}

// gaussRise is the 10–90% rise time of Φ(t/σ) in units of σ: 2·z₀.₉ with
// z₀.₉ = 1.2815515655446004 the 90% point of the standard normal
// distribution.
const gaussRise = 2 * 1.2815515655446004

const (
	maxFilterSamples = 4096
	// filterReach is the half-width of the Gaussian filter kernel in σ;
	// the neglected tails hold Φ(−6) ≈ 1e−9 of the pulse area.
	filterReach = 6
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

	w        *Waveform
	n, d     int
	nch      int
	excited  []int
	prop     *holonomy.Propagator
	lind     *lindbladWork
	h, u, e  *holonomy.Mat
	tmp      *holonomy.Mat
	pt       holonomy.Point
	decay    []float64
	zero     []float64
	drv      []complex128 // current step's drives, rad/s
	prevDrv  []complex128
	dtn      []float64 // current step's controlled + error detunings, rad/s
	prevDtn  []float64
	scale    []float64 // 2π(1 + ε)(1 + ε_c) per channel
	errDet   []float64 // error detunings per level, rad/s
	m        ErrorModel
	sub, pad int
	R        int       // filter half-width in samples
	kernel   []float64 // filter weights, sub × (2R+1)
	kerSigma float64
	kerSub   int
	isComp   []bool
	isExc    []bool
}

// NewSimulator returns a workspace for simulating w.
func NewSimulator(w *Waveform) *Simulator {
	n := w.Scheme.Dim()
	s := &Simulator{
		w: w, n: n, d: len(w.Scheme.Computational), nch: len(w.Scheme.Channels),
		excited: excitedLevels(w.Scheme),
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
	if !finite(m.AmplitudeError) || m.AmplitudeError <= -1 {
		return fmt.Errorf("error model: amplitude error %v; need a finite number above −1", m.AmplitudeError)
	}
	if m.ChannelErrors != nil && len(m.ChannelErrors) != s.nch {
		return fmt.Errorf("error model: %d channel amplitude errors for %d channels", len(m.ChannelErrors), s.nch)
	}
	for c, v := range m.ChannelErrors {
		if !finite(v) || v <= -1 {
			return fmt.Errorf("error model: amplitude error of channel %q is %v; need a finite number above −1", s.w.Scheme.Channels[c].Name, v)
		}
	}
	if !finite(m.OnePhotonDetuning) || !finite(m.TwoPhotonDetuning) {
		return errors.New("error model: detunings must be finite")
	}
	if !finite(m.Decay) || m.Decay < 0 || !finite(m.Dephasing) || m.Dephasing < 0 {
		return errors.New("error model: decay and dephasing rates must be finite and non-negative")
	}
	if !finite(m.RiseTime) || m.RiseTime < 0 {
		return fmt.Errorf("error model: rise time %v s; need a finite number ≥ 0", m.RiseTime)
	}
	if m.RiseTime > s.w.Duration() {
		return fmt.Errorf("error model: rise time %g s is longer than the waveform (%g s)", m.RiseTime, s.w.Duration())
	}
	if m.RiseTime > 0 && m.RiseTime/gaussRise*filterReach*s.w.Hardware.SampleRate > maxFilterSamples {
		return fmt.Errorf("error model: rise time %g s spans more than %d samples", m.RiseTime, maxFilterSamples/filterReach)
	}
	if m.SubSteps < 0 || m.SubSteps > 64 {
		return fmt.Errorf("error model: %d sub-steps per sample; need 0 (default 8) to 64", m.SubSteps)
	}
	if len(s.w.Scheme.Computational) < 2 && m.TwoPhotonDetuning != 0 {
		return errors.New("error model: a two-photon detuning needs two computational levels")
	}
	return nil
}

// maxSteps bounds the propagation steps of one simulation (samples plus
// filter margins, times sub-steps).
const maxSteps = 1 << 24

// Run propagates the waveform under m and stores the result in out,
// reusing out's slices when they are large enough.
func (s *Simulator) Run(m ErrorModel, out *Outcome) error {
	if err := s.validate(&m); err != nil {
		return err
	}
	w := s.w
	n := s.n
	N := w.Len()
	sub, pad := 1, 0
	if m.RiseTime > 0 {
		sub = m.SubSteps
		if sub == 0 {
			sub = 8
		}
		sigma := m.RiseTime / gaussRise
		pad = int(math.Ceil(filterReach*sigma*w.Hardware.SampleRate)) + 1
		s.R = s.setKernel(sigma, sub)
	}
	steps := (N + 2*pad) * sub
	if steps > maxSteps {
		return fmt.Errorf("error model: the simulation needs %d propagation steps; the limit is %d", steps, maxSteps)
	}
	s.m, s.sub, s.pad = m, sub, pad
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
		stride = max(1, (N+2*pad+tp-1)/tp)
		np := (N+2*pad+stride-1)/stride + 1
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
		return s.runLindblad(&m, steps, sub, pad, stride, dt, out)
	}
	lossy := m.Decay > 0
	s.u.SetIdentity()
	eValid := false
	s.record(out, stride, 0, pad)
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
			s.record(out, stride, (j+1)/sub, pad)
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
func (s *Simulator) record(out *Outcome, stride, q, pad int) {
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
	last := s.w.Len() + 2*pad
	if stride == 0 || (q%stride != 0 && q != last) {
		return
	}
	out.Times = append(out.Times, float64(q-pad)*s.w.Dt())
	for i, c := range s.w.Scheme.Computational {
		for l := 0; l < n; l++ {
			x := u[l*n+c]
			out.Populations[i][l] = append(out.Populations[i][l], real(x)*real(x)+imag(x)*imag(x))
		}
	}
}

// sample returns the drive of channel c at sample k (Hz), from the DAC
// codes or, for an unquantised model, from I and Q.
func (s *Simulator) sample(c, k int) complex128 {
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
	if s.sub == 1 && s.pad == 0 {
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
	N, R := w.Len(), s.R
	width := 2*R + 1
	q, o := j/s.sub-s.pad, j%s.sub
	ker := s.kernel[o*width : (o+1)*width]
	for c := range drv {
		drv[c] = 0
	}
	copy(dtn, s.errDet)
	for r := max(-R, -q); r <= R && q+r < N; r++ {
		k := q + r
		wt := ker[r+R]
		for c := range drv {
			drv[c] += s.sample(c, k) * complex(s.scale[c]*wt, 0)
		}
		for l, tr := range w.Detuning {
			if tr != nil {
				dtn[l] += 2 * math.Pi * tr[k] * wt
			}
		}
	}
}

// setKernel computes the weights of the held samples q+r, r = −R … R, in
// the filtered signal at the midpoint of sub-step o of sample q:
// w_o(r) = Φ((x − r)Δt/σ) − Φ((x − r − 1)Δt/σ), x = (o + ½)/sub.
func (s *Simulator) setKernel(sigma float64, sub int) int {
	dts := s.w.Dt() / sigma
	R := int(math.Ceil(filterReach/dts)) + 1
	width := 2*R + 1
	if s.kerSigma == sigma && s.kerSub == sub && len(s.kernel) == sub*width {
		return R
	}
	s.kernel = growF(s.kernel, sub*width)[:sub*width]
	phi := func(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }
	for o := 0; o < sub; o++ {
		x := (float64(o) + 0.5) / float64(sub)
		for r := -R; r <= R; r++ {
			s.kernel[o*width+r+R] = phi((x-float64(r))*dts) - phi((x-float64(r)-1)*dts)
		}
	}
	s.kerSigma, s.kerSub = sigma, sub
	return R
}

func growF(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	return b[:n]
}
