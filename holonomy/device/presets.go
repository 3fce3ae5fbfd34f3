package device

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// HzToRad converts a frequency in Hz (as files carry it) to rad/s.
func HzToRad(f float64) float64 { return 2 * math.Pi * f }

// FromScheme returns the device of a resonant single-transition
// holonomy.Scheme, as a Device given in the scheme's rotating frame
// (Rotating): level k has energy Δ_k (the scheme's static detuning), decay
// Γ_k out of the model (the scheme's Decay), and channel c becomes tone c
// with carrier 0 and the single coupling Lower→Upper with the channel's
// factor; the frame is 0 on every level. Its Model's Hamiltonian is then
// holonomy.Scheme.Hamiltonian bit for bit, and every sample is one exact
// step, so simulations reproduce holonomy.Propagator.Sequence and
// holonomy.Lindblad.Sequence bit for bit. Tone names are the channel names.
func FromScheme(s *holonomy.Scheme) *Device {
	d := &Device{Name: s.Name, Rotating: true, Computational: append([]int(nil), s.Computational...),
		Frame: make([]float64, s.Dim())}
	for _, l := range s.Levels {
		d.Levels = append(d.Levels, Level{Name: l.Name, Energy: l.Detuning, Decay: l.Decay})
	}
	for _, c := range s.Channels {
		d.Tones = append(d.Tones, Tone{Name: c.Name, Couplings: []Coupling{{Lower: c.Lower, Upper: c.Upper, Factor: c.Factor}}})
	}
	return d
}

// Tripod, Lambda and Spin return the existing presets of holonomy in the
// device model (see FromScheme).
func Tripod() *Device { return FromScheme(holonomy.Tripod()) }

// Lambda returns the Λ preset of holonomy as a device (see Tripod).
func Lambda() *Device { return FromScheme(holonomy.Lambda()) }

// Spin returns the spin-s preset of holonomy as a device (see Tripod).
func Spin(twoS int, computational ...int) *Device {
	return FromScheme(holonomy.Spin(twoS, computational...))
}

// TransmonParams describes a transmon-like anharmonic ladder. Frequencies
// are in rad/s, rates in 1/s.
type TransmonParams struct {
	// Levels is the number of ladder levels, 3 to MaxLevels: the working
	// levels and at least one spectator above them.
	Levels int
	// Omega01 is the 0↔1 transition frequency ω₀₁ (> 0).
	Omega01 float64
	// Anharmonicity is α = ω₁₂ − ω₀₁ (negative for a transmon; must be
	// non-zero). Level k has energy E_k = kω₀₁ + k(k−1)α/2.
	Anharmonicity float64
	// Tones lists the transitions k↔k+1 that get a tone pinned to them
	// (nil: 0↔1 and 1↔2). Every tone couples every ladder transition.
	Tones []int
	// Computational lists the qubit levels (nil: 0 and 1).
	Computational []int
	// T1 is the lifetime of level 1 in seconds (0: no decay). Level k
	// decays to k−1 at rate k/T1 (the √k matrix elements squared). Pure
	// dephasing is left to the caller (Level.Dephasing, SetQubitT1T2).
	T1 float64
}

// Transmon returns a transmon-like ladder (Koch et al., Phys. Rev. A 76,
// 042319 (2007)): levels "0", "1", ... with energies kω₀₁ + k(k−1)α/2, tones
// "w01", "w12", ... pinned to their transitions, each coupling every
// transition k↔k+1 with the charge matrix-element factor √(k+1) relative to
// 0↔1 (so a tone's drive is its Rabi frequency on 0↔1). A tone at ω₀₁ thus
// drives 1↔2 off resonance by α and 2↔3 by 2α, and a tone at ω₁₂ drives 0↔1
// by −α.
func Transmon(p TransmonParams) (*Device, error) {
	if p.Levels < 3 || p.Levels > MaxLevels {
		return nil, fieldErr(ErrShape, "levels", "transmon ladder with %d levels; need 3 to %d (working levels and a spectator)", p.Levels, MaxLevels)
	}
	if !(p.Omega01 > 0) || !finite(p.Omega01) || !finite(p.Anharmonicity) || p.Anharmonicity == 0 {
		return nil, fieldErr(ErrValue, "omega01", "ω01 = %v must be positive and α = %v non-zero, both finite", p.Omega01, p.Anharmonicity)
	}
	if p.T1 < 0 || !finite(p.T1) {
		return nil, fieldErr(ErrValue, "t1", "T1 = %v s must be finite and ≥ 0", p.T1)
	}
	tones := p.Tones
	if tones == nil {
		tones = []int{0, 1}
	}
	d := &Device{Name: fmt.Sprintf("transmon ladder, %d levels", p.Levels), Computational: p.Computational}
	if d.Computational == nil {
		d.Computational = []int{0, 1}
	}
	for k := 0; k < p.Levels; k++ {
		fk := float64(k)
		l := Level{Name: fmt.Sprint(k), Energy: fk*p.Omega01 + fk*(fk-1)*p.Anharmonicity/2}
		if p.T1 > 0 && k > 0 {
			l.Decay = fk / p.T1
			l.Branches = []Branch{{To: k - 1, Fraction: 1}}
		}
		d.Levels = append(d.Levels, l)
	}
	for _, k := range tones {
		if k < 0 || k+1 >= p.Levels {
			return nil, fieldErr(ErrShape, "tones", "no transition %d↔%d in a %d-level ladder", k, k+1, p.Levels)
		}
		t := Tone{Name: fmt.Sprintf("w%d%d", k, k+1), Pin: &Transition{Lower: k, Upper: k + 1}}
		for j := 0; j+1 < p.Levels; j++ {
			t.Couplings = append(t.Couplings, Coupling{Lower: j, Upper: j + 1, Factor: math.Sqrt(float64(j + 1))})
		}
		d.Tones = append(d.Tones, t)
	}
	return d, d.Validate()
}

// NVParams describes an NV-like spin-1 ground state. Frequencies in rad/s.
type NVParams struct {
	// ZeroField is the zero-field splitting D (2π·2.87 GHz for the NV
	// centre, from memory).
	ZeroField float64
	// Zeeman is the splitting E(m=+1) − E(m=−1) = 2γB of the static field
	// (tens of MHz in practice; must be non-zero so the tones differ).
	Zeeman float64
	// Computational lists the qubit levels by index (0: m=0, 1: m=−1,
	// 2: m=+1); nil means {m=−1, m=+1}, with m=0 auxiliary.
	Computational []int
}

// NV returns an NV-like spin-1: levels "m=0" (energy 0), "m=-1"
// (D − Zeeman/2) and "m=+1" (D + Zeeman/2); tones "t-" and "t+" pinned to
// m=0↔m=−1 and m=0↔m=+1, each coupling both transitions with factor 1 (so
// the drive is the Rabi frequency of either transition); m=0 is the lower
// end of both couplings. The tone at one transition drives the other off
// resonance by the Zeeman splitting.
func NV(p NVParams) (*Device, error) {
	if !(p.ZeroField > 0) || !finite(p.ZeroField) || !finite(p.Zeeman) || p.Zeeman == 0 || math.Abs(p.Zeeman) >= p.ZeroField {
		return nil, fieldErr(ErrValue, "zero_field", "D = %v must be positive and the Zeeman splitting %v non-zero and below D", p.ZeroField, p.Zeeman)
	}
	both := []Coupling{{Lower: 0, Upper: 1, Factor: 1}, {Lower: 0, Upper: 2, Factor: 1}}
	d := &Device{
		Name: "nv-like spin-1",
		Levels: []Level{{Name: "m=0"}, {Name: "m=-1", Energy: p.ZeroField - p.Zeeman/2},
			{Name: "m=+1", Energy: p.ZeroField + p.Zeeman/2}},
		Tones: []Tone{
			{Name: "t-", Pin: &Transition{Lower: 0, Upper: 1}, Couplings: both},
			{Name: "t+", Pin: &Transition{Lower: 0, Upper: 2}, Couplings: both},
		},
		Computational: p.Computational,
	}
	if d.Computational == nil {
		d.Computational = []int{1, 2}
	}
	return d, d.Validate()
}

// SetQubitT1T2 gives the qubit on levels lower and upper of d the
// relaxation time t1 and coherence time t2 (seconds): level upper decays
// into lower at 1/t1 (branch fraction 1, replacing the level's decay and
// branches) and dephases at γ = 1/t2 − 1/(2t1), so that in the Lindblad
// model of the package populations relax as e^{−t/T1} and the coherence
// ρ_lower,upper decays as e^{−t/T2} (Bloch, Phys. Rev. 70, 460 (1946)).
// The lower level's rates are left as they are. t2 may not exceed 2·t1
// (ErrT2); t1 = 0 or t2 = 0 means no decay or no extra dephasing.
func SetQubitT1T2(d *Device, lower, upper int, t1, t2 float64) error {
	n := d.Dim()
	if lower < 0 || lower >= n || upper < 0 || upper >= n || lower == upper {
		return fieldErr(ErrShape, "qubit", "qubit levels %d, %d are not two levels of the device", lower, upper)
	}
	if !(t1 >= 0) || !(t2 >= 0) || math.IsInf(t1, 0) || math.IsInf(t2, 0) {
		return fieldErr(ErrValue, "t1", "T1 = %v s and T2 = %v s must be finite and ≥ 0", t1, t2)
	}
	var g1, g2 float64
	if t1 > 0 {
		g1 = 1 / t1
	}
	if t2 > 0 {
		g2 = 1 / t2
	}
	phi := g2 - g1/2
	if t2 > 0 && phi < -1e-12*g2 {
		return fieldErr(ErrT2, "t2", "T2 = %g s exceeds 2·T1 = %g s", t2, 2*t1)
	}
	l := &d.Levels[upper]
	l.Decay = g1
	l.Branches = nil
	if g1 > 0 {
		l.Branches = []Branch{{To: lower, Fraction: 1}}
	}
	l.Dephasing = 0
	if t2 > 0 {
		l.Dephasing = math.Max(phi, 0)
	}
	return nil
}
