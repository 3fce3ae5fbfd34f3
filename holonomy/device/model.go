package device

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
)

// Model is a validated Device resolved into its rotating frame: the static
// diagonal E_k − F_k, one term per coupling of every tone with its detuning
// δ, and the dissipation in Lindblad form. It is immutable and safe for
// concurrent use; simulate it with a Simulator.
type Model struct {
	dev       Device
	n         int
	frame     []float64
	diag      []float64
	terms     []term
	decay     []float64 // Γ_k, total
	dephasing []float64 // γ_k
	jumps     []holonomy.Jump
	pureOK    bool // no dephasing and no decay returning to the model
	maxRate   float64
}

// term is one coupling of one tone: (half·Ω̃ e^{iδt})|upper⟩⟨lower| + h.c.,
// with Ω̃ the tone's drive, or its conjugate for a counter-rotating term.
type term struct {
	tone, coupling int
	lower, upper   int
	half, delta    float64
	counter        bool
}

// CouplingTerm describes one term of a Model's Hamiltonian (see Model.Terms).
type CouplingTerm struct {
	// Tone and Coupling index the device's tone and its coupling.
	Tone, Coupling int
	// Lower and Upper are the level indices.
	Lower, Upper int
	// Factor is the coupling's matrix-element factor.
	Factor float64
	// Detuning is δ in rad/s: the term rotates as e^{iδt}. For a
	// co-rotating term δ = F_Upper − F_Lower − ω, for a counter-rotating one
	// δ = F_Upper − F_Lower + ω.
	Detuning float64
	// CounterRotating marks the counter-rotating partner of a coupling.
	CounterRotating bool
}

// Compile validates d and resolves it into a Model. The Model keeps its own
// copy of d.
func Compile(d *Device) (*Model, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	n := d.Dim()
	m := &Model{dev: *d, n: n, pureOK: true}
	m.frame = d.Frame
	if m.frame == nil {
		m.frame = DefaultFrame(d)
	}
	m.frame = append([]float64(nil), m.frame...)
	m.diag = make([]float64, n)
	m.decay = make([]float64, n)
	m.dephasing = make([]float64, n)
	for k, l := range d.Levels {
		m.diag[k] = l.Energy - m.frame[k]
		m.decay[k] = l.Decay
		m.dephasing[k] = l.Dephasing
		if l.Dephasing != 0 {
			m.pureOK = false
		}
		for _, b := range l.Branches {
			if r := l.Decay * b.Fraction; r != 0 {
				m.jumps = append(m.jumps, holonomy.Jump{From: k, To: b.To, Rate: r})
				m.pureOK = false
			}
		}
		m.maxRate = max(m.maxRate, l.Decay+2*l.Dephasing)
	}
	var counter []term
	for i, t := range d.Tones {
		w := d.CarrierOf(i)
		for c, cp := range t.Couplings {
			fr := m.frame[cp.Upper] - m.frame[cp.Lower]
			tm := term{tone: i, coupling: c, lower: cp.Lower, upper: cp.Upper, half: cp.Factor / 2, delta: fr - w}
			m.terms = append(m.terms, tm)
			if d.CounterRotating {
				tm.delta, tm.counter = fr+w, true
				counter = append(counter, tm)
			}
		}
	}
	m.terms = append(m.terms, counter...)
	return m, nil
}

// DefaultFrame returns the default frame of a valid device: the frame that
// co-rotates with the tones. Each tone has a primary transition — its
// pinned transition, or else the listed coupling whose frequency is nearest
// its carrier (the first on a tie) — and the frame makes the primary
// transitions static: F_Upper − F_Lower = ω. Levels joined by primary
// transitions form groups; in each group the lowest-index level keeps its
// own energy (F = E, so its diagonal entry is 0) and the others follow by
// the tones' carriers, in tone order. A tone whose primary transition would
// contradict frequencies already fixed (a loop of tones) is left rotating,
// and a level no primary transition reaches keeps F = E. In this frame a
// resonant tone on its transition adds no time dependence, a detuned tone
// shows as the static diagonal E_k − F_k, and every other coupling of every
// tone (crosstalk on neighbouring transitions) rotates at its detuning.
func DefaultFrame(d *Device) []float64 {
	n := d.Dim()
	type edge struct {
		a, b int
		w    float64 // F_b − F_a
	}
	var edges []edge
	for i, t := range d.Tones {
		w := d.CarrierOf(i)
		var tr Transition
		if t.Pin != nil {
			tr = *t.Pin
		} else {
			best := math.Inf(1)
			for _, cp := range t.Couplings {
				det := math.Abs(w - (d.Levels[cp.Upper].Energy - d.Levels[cp.Lower].Energy))
				if det < best {
					best, tr = det, Transition{cp.Lower, cp.Upper}
				}
			}
		}
		edges = append(edges, edge{tr.Lower, tr.Upper, w})
	}
	f := make([]float64, n)
	set := make([]bool, n)
	for root := 0; root < n; root++ {
		if set[root] {
			continue
		}
		f[root], set[root] = d.Levels[root].Energy, true
		// Propagate through the edges until nothing changes; tone order
		// decides which edge fixes a level first.
		for changed := true; changed; {
			changed = false
			for _, e := range edges {
				switch {
				case set[e.a] && !set[e.b]:
					f[e.b], set[e.b], changed = f[e.a]+e.w, true, true
				case set[e.b] && !set[e.a]:
					f[e.a], set[e.a], changed = f[e.b]-e.w, true, true
				}
			}
		}
	}
	return f
}

// Device returns a copy of the compiled device (slices shared: do not
// modify them).
func (m *Model) Device() Device { return m.dev }

// Dim returns the number of levels.
func (m *Model) Dim() int { return m.n }

// Frame returns the frame frequencies F_k in rad/s (a copy).
func (m *Model) Frame() []float64 { return append([]float64(nil), m.frame...) }

// Terms returns every coupling term of the Hamiltonian with its detuning.
func (m *Model) Terms() []CouplingTerm {
	out := make([]CouplingTerm, len(m.terms))
	for i, t := range m.terms {
		out[i] = CouplingTerm{Tone: t.tone, Coupling: t.coupling, Lower: t.lower, Upper: t.upper,
			Factor: 2 * t.half, Detuning: t.delta, CounterRotating: t.counter}
	}
	return out
}

// PureStateExact reports whether a propagator (pure-state) simulation is
// exact for this model: no level dephases and no decay returns to a
// modelled level (decay out of the model is the exact non-Hermitian term
// −iΓ/2). Otherwise use Simulator.Channel or Simulator.Evolve.
func (m *Model) PureStateExact() bool { return m.pureOK }

// Rates returns the Lindblad data of the model: the total decay rate Γ_k and
// the dephasing rate γ_k of every level (1/s), and the decays that return
// population to a modelled level. They are copies.
func (m *Model) Rates() (decay, dephasing []float64, jumps []holonomy.Jump) {
	return append([]float64(nil), m.decay...), append([]float64(nil), m.dephasing...), append([]holonomy.Jump(nil), m.jumps...)
}

// NewPoint returns a zero control sample: one drive per tone, one controlled
// detuning per level.
func (m *Model) NewPoint() holonomy.Point {
	return holonomy.Point{Drive: make([]complex128, len(m.dev.Tones)), Detuning: make([]float64, m.n)}
}

// CheckPoint reports whether p is shaped for the model (one drive per tone,
// one detuning per level or none) and finite.
func (m *Model) CheckPoint(p holonomy.Point) error {
	if len(p.Drive) != len(m.dev.Tones) {
		return fieldErr(ErrShape, "drive", "sample has %d drives for %d tones", len(p.Drive), len(m.dev.Tones))
	}
	if p.Detuning != nil && len(p.Detuning) != m.n {
		return fieldErr(ErrShape, "detuning", "sample has %d detunings for %d levels", len(p.Detuning), m.n)
	}
	for i, d := range p.Drive {
		if !finite(real(d)) || !finite(imag(d)) {
			return fieldErr(ErrValue, fmt.Sprintf("drive[%d]", i), "tone %q: drive %v is not finite", m.dev.Tones[i].Name, d)
		}
	}
	for k, d := range p.Detuning {
		if !finite(d) {
			return fieldErr(ErrValue, fmt.Sprintf("detuning[%d]", k), "level %q: detuning %v is not finite", m.dev.Levels[k].Name, d)
		}
	}
	return nil
}

// Hamiltonian writes H(t) (rad/s) in the model's frame for the control
// sample p at time t (s, from the start of the waveform) into dst (n×n):
//
//	H(t) = Σ_k (E_k − F_k + δ_k)|k⟩⟨k|
//	     + Σ_terms (f/2)(Ω̃ e^{iδt}|u⟩⟨l| + h.c.),
//
// with δ_k the sample's controlled detuning and Ω̃ the tone's drive (its
// conjugate for a counter-rotating term). A term with δ = 0 is added without
// a phase factor, so a resonant device built by FromScheme reproduces
// holonomy.Scheme.Hamiltonian bit for bit. It does not allocate.
func (m *Model) Hamiltonian(dst *holonomy.Mat, p holonomy.Point, t float64) {
	n := m.n
	if dst.R != n || dst.C != n || len(p.Drive) != len(m.dev.Tones) || (p.Detuning != nil && len(p.Detuning) != n) {
		panic("device: Model.Hamiltonian: dimension mismatch")
	}
	dst.Zero()
	for k, d := range m.diag {
		if p.Detuning != nil {
			d += p.Detuning[k]
		}
		dst.Data[k*n+k] = complex(d, 0)
	}
	for i := range m.terms {
		tm := &m.terms[i]
		drv := p.Drive[tm.tone]
		if tm.counter {
			drv = cmplx.Conj(drv)
		}
		v := drv * complex(tm.half, 0)
		if tm.delta != 0 {
			s, c := math.Sincos(tm.delta * t)
			v *= complex(c, s)
		}
		dst.Data[tm.upper*n+tm.lower] += v
		dst.Data[tm.lower*n+tm.upper] += cmplx.Conj(v)
	}
}

// ToLab writes into dst (n entries) the phases e^{−iF_k t} that take a
// state from the model's frame to the laboratory frame at time t:
// ψ_lab,k = e^{−iF_k t} ψ_frame,k. The frames agree at t = 0, so a
// propagator from 0 to t becomes U_lab = diag(dst)·U_frame.
func (m *Model) ToLab(dst []complex128, t float64) {
	for k, f := range m.frame {
		s, c := math.Sincos(f * t)
		dst[k] = complex(c, -s)
	}
}
