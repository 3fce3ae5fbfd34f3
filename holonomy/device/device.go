package device

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// MaxLevels is the largest number of levels a Device may have (the same
// bound as holonomy.Scheme).
const MaxLevels = holonomy.MaxLevels

// FarFraction defines a carrier "far" from a transition: a tone with carrier
// ω is far from a listed transition of frequency ω_t when
//
//	|ω − ω_t| > FarFraction · max(|ω|, |ω_t|).
//
// At that detuning the co-rotating term oscillates within a factor of three
// of the counter-rotating one, so the rotating-wave coupling the list
// declares is no longer a meaningful description of that transition: the
// listing is a mistake (a wrong level order, a carrier in the wrong unit, a
// transition of another tone). Off-resonant crosstalk on a neighbouring
// transition (an anharmonicity of a few hundred MHz at a 5 GHz carrier, a
// Zeeman splitting of tens of MHz at 2.87 GHz) is far inside the limit. A
// tone is refused only when it is far from every transition it lists.
const FarFraction = 0.5

// Level is one state of a Device.
type Level struct {
	// Name identifies the level in files and messages.
	Name string
	// Energy is the level's energy E_k in rad/s (ħ = 1; files carry E/2π in
	// Hz). Only differences matter; the lowest level is usually 0.
	Energy float64
	// Decay is the total rate Γ_k (1/s, ≥ 0) at which the population of
	// the level decays, wherever it goes.
	Decay float64
	// Branches lists where the decay goes: a fraction of Γ_k into each
	// named destination level. The remainder 1 − Σ Fraction leaves the
	// model (to levels not described). Nil: all decay leaves the model.
	Branches []Branch
	// Dephasing is the pure dephasing rate γ_k (1/s, ≥ 0) of the level:
	// collapse operator √(2γ_k)|k⟩⟨k|, so a coherence ρ_jk decays at
	// γ_j + γ_k from dephasing.
	Dephasing float64
}

// Branch sends a fraction of a level's decay to another modelled level.
type Branch struct {
	// To is the destination level's index; it must differ from the
	// decaying level.
	To int
	// Fraction is the branching ratio in [0, 1].
	Fraction float64
}

// Coupling is one transition a tone drives: with the tone's complex drive
// Ω e^{iφ} it adds (Factor·Ω/2)(e^{iφ} e^{iδt}|Upper⟩⟨Lower| + h.c.), where
// δ is the coupling's detuning in the frame (see Model). Either level may be
// any level of the device; Upper is the one the tone raises the energy of,
// so E_Upper − E_Lower is the transition frequency the carrier is compared
// with.
type Coupling struct {
	Lower, Upper int
	// Factor is the matrix-element factor (1 for the transition whose Rabi
	// frequency the tone's drive is; √(n+1) on a transmon ladder).
	Factor float64
}

// Tone is one drive: a carrier with a complex envelope, coupling every
// transition it lists.
type Tone struct {
	// Name identifies the tone (one drive waveform channel).
	Name string
	// Carrier is the carrier angular frequency ω in rad/s. It must be 0
	// when Pin is set.
	Carrier float64
	// Pin, when set, makes the carrier the transition frequency
	// E_Upper − E_Lower of that pair, so the tone stays resonant with it
	// whatever the energies.
	Pin *Transition
	// Couplings are the transitions the tone drives, at least one.
	Couplings []Coupling
}

// Transition names a pair of levels by index.
type Transition struct{ Lower, Upper int }

// Device is a level structure with drive tones and per-level dissipation:
// the physical model a waveform is verified in. See the package
// documentation for the frame and the Hamiltonian.
type Device struct {
	// Name is a short description ("transmon ladder", "nv spin-1", ...).
	Name string
	// Levels are the states, 2 to MaxLevels of them.
	Levels []Level
	// Tones are the drives, at least one.
	Tones []Tone
	// Computational lists the levels spanning the computational subspace
	// (for a qubit, |0⟩ first).
	Computational []int
	// Frame holds the frame frequency F_k (rad/s) of every level; nil
	// chooses the default frame (see DefaultFrame).
	Frame []float64
	// Rotating marks a device whose energies and carriers are already
	// given in a rotating frame (as a holonomy.Scheme is: energies are
	// static detunings, carriers 0). The far-carrier check and
	// counter-rotating terms need laboratory frequencies and do not apply.
	Rotating bool
	// CounterRotating adds, for every coupling, the counter-rotating term
	// (Factor·Ω*/2) e^{i(F_u − F_l + ω)t}|Upper⟩⟨Lower| + h.c. of a
	// linearly polarised drive. Off (the rotating-wave approximation) by
	// default; turn it on when Ω/ω is not negligible.
	CounterRotating bool
}

// Dim returns the number of levels.
func (d *Device) Dim() int { return len(d.Levels) }

// LevelIndex returns the index of the level called name, or −1.
func (d *Device) LevelIndex(name string) int {
	for i, l := range d.Levels {
		if l.Name == name {
			return i
		}
	}
	return -1
}

// ToneIndex returns the index of the tone called name, or −1.
func (d *Device) ToneIndex(name string) int {
	for i, t := range d.Tones {
		if t.Name == name {
			return i
		}
	}
	return -1
}

// CarrierOf returns the carrier of tone i in rad/s: the pinned transition's
// frequency when Pin is set, else Carrier. Indices must have been validated.
func (d *Device) CarrierOf(i int) float64 {
	t := d.Tones[i]
	if t.Pin != nil {
		return d.Levels[t.Pin.Upper].Energy - d.Levels[t.Pin.Lower].Energy
	}
	return t.Carrier
}

// Validate reports whether the device is well formed. Errors are
// *FieldError (or *FarCarrierError) values wrapping one sentinel of this
// package: shapes and names (ErrShape), non-finite or negative numbers
// (ErrValue), a level decaying into itself (ErrSelfDecay), branching ratios
// above 1 (ErrBranching), a carrier far from every transition its tone lists
// (ErrFarCarrier, see FarFraction), counter-rotating terms on a Rotating
// device (ErrValue).
func (d *Device) Validate() error {
	n := len(d.Levels)
	if n < 2 || n > MaxLevels {
		return fieldErr(ErrShape, "levels", "%d levels; need 2 to %d", n, MaxLevels)
	}
	if err := d.validateLevels(); err != nil {
		return err
	}
	if len(d.Tones) == 0 {
		return fieldErr(ErrShape, "tones", "no drive tones")
	}
	names := make(map[string]bool, len(d.Tones))
	for i, t := range d.Tones {
		f := fmt.Sprintf("tones[%d]", i)
		if t.Name == "" {
			return fieldErr(ErrShape, f+".name", "tone has no name")
		}
		if names[t.Name] {
			return fieldErr(ErrShape, f+".name", "tone name %q is used twice", t.Name)
		}
		names[t.Name] = true
		if err := d.validateTone(i); err != nil {
			return err
		}
	}
	if len(d.Computational) == 0 || len(d.Computational) > n {
		return fieldErr(ErrShape, "computational", "need 1 to %d computational levels, have %d", n, len(d.Computational))
	}
	seen := make(map[int]bool)
	for i, k := range d.Computational {
		if k < 0 || k >= n {
			return fieldErr(ErrShape, fmt.Sprintf("computational[%d]", i), "level index %d is not in the device", k)
		}
		if seen[k] {
			return fieldErr(ErrShape, fmt.Sprintf("computational[%d]", i), "level %q is listed twice", d.Levels[k].Name)
		}
		seen[k] = true
	}
	if d.Frame != nil {
		if len(d.Frame) != n {
			return fieldErr(ErrShape, "frame", "%d frame frequencies for %d levels", len(d.Frame), n)
		}
		for k, f := range d.Frame {
			if !finite(f) {
				return fieldErr(ErrValue, fmt.Sprintf("frame[%d]", k), "frame frequency %v is not finite", f)
			}
		}
	}
	if d.Rotating && d.CounterRotating {
		return fieldErr(ErrValue, "counter_rotating", "counter-rotating terms need laboratory carriers; the device is given in a rotating frame")
	}
	return nil
}

func (d *Device) validateLevels() error {
	n := len(d.Levels)
	names := make(map[string]bool, n)
	for k, l := range d.Levels {
		f := fmt.Sprintf("levels[%d]", k)
		if l.Name == "" {
			return fieldErr(ErrShape, f+".name", "level has no name")
		}
		if names[l.Name] {
			return fieldErr(ErrShape, f+".name", "level name %q is used twice", l.Name)
		}
		names[l.Name] = true
		if !finite(l.Energy) {
			return fieldErr(ErrValue, f+".energy", "level %q: energy %v is not finite", l.Name, l.Energy)
		}
		if !finite(l.Decay) || l.Decay < 0 {
			return fieldErr(ErrValue, f+".decay", "level %q: decay rate %v /s must be finite and ≥ 0", l.Name, l.Decay)
		}
		if !finite(l.Dephasing) || l.Dephasing < 0 {
			return fieldErr(ErrValue, f+".dephasing", "level %q: dephasing rate %v /s must be finite and ≥ 0", l.Name, l.Dephasing)
		}
		var sum float64
		to := make(map[int]bool, len(l.Branches))
		for b, br := range l.Branches {
			bf := fmt.Sprintf("%s.branches[%d]", f, b)
			if br.To < 0 || br.To >= n {
				return fieldErr(ErrShape, bf+".to", "level %q decays into level index %d, which is not in the device", l.Name, br.To)
			}
			if br.To == k {
				return fieldErr(ErrSelfDecay, bf+".to", "level %q lists itself as a decay destination", l.Name)
			}
			if to[br.To] {
				return fieldErr(ErrShape, bf+".to", "level %q lists destination %q twice", l.Name, d.Levels[br.To].Name)
			}
			to[br.To] = true
			if !finite(br.Fraction) || br.Fraction < 0 || br.Fraction > 1 {
				return fieldErr(ErrValue, bf+".fraction", "level %q: branching ratio %v into %q must be in [0, 1]", l.Name, br.Fraction, d.Levels[br.To].Name)
			}
			sum += br.Fraction
		}
		// One part in 10¹² absorbs the rounding of decimal fractions such as
		// 0.7 + 0.2 + 0.1.
		if sum > 1+1e-12 {
			return fieldErr(ErrBranching, f+".branches", "level %q: branching ratios sum to %.12g > 1", l.Name, sum)
		}
	}
	return nil
}

func (d *Device) validateTone(i int) error {
	t := d.Tones[i]
	n := len(d.Levels)
	f := fmt.Sprintf("tones[%d]", i)
	if len(t.Couplings) == 0 {
		return fieldErr(ErrShape, f+".couplings", "tone %q couples no transition", t.Name)
	}
	if t.Pin != nil {
		if t.Pin.Lower < 0 || t.Pin.Lower >= n || t.Pin.Upper < 0 || t.Pin.Upper >= n || t.Pin.Lower == t.Pin.Upper {
			return fieldErr(ErrShape, f+".pin", "tone %q is pinned to %d→%d, not a transition of the device", t.Name, t.Pin.Lower, t.Pin.Upper)
		}
		if t.Carrier != 0 {
			return fieldErr(ErrValue, f+".carrier", "tone %q has both a carrier (%g rad/s) and a pinned transition", t.Name, t.Carrier)
		}
	} else if !finite(t.Carrier) || (!d.Rotating && t.Carrier <= 0) {
		return fieldErr(ErrValue, f+".carrier", "tone %q: carrier %v rad/s must be finite and positive", t.Name, t.Carrier)
	}
	seen := make(map[[2]int]bool, len(t.Couplings))
	for c, cp := range t.Couplings {
		cf := fmt.Sprintf("%s.couplings[%d]", f, c)
		if cp.Lower < 0 || cp.Lower >= n || cp.Upper < 0 || cp.Upper >= n {
			return fieldErr(ErrShape, cf, "tone %q couples level index %d→%d, not in the device", t.Name, cp.Lower, cp.Upper)
		}
		if cp.Lower == cp.Upper {
			return fieldErr(ErrShape, cf, "tone %q couples level %q to itself", t.Name, d.Levels[cp.Lower].Name)
		}
		key := [2]int{min(cp.Lower, cp.Upper), max(cp.Lower, cp.Upper)}
		if seen[key] {
			return fieldErr(ErrShape, cf, "tone %q lists the pair %q, %q twice", t.Name, d.Levels[key[0]].Name, d.Levels[key[1]].Name)
		}
		seen[key] = true
		if !finite(cp.Factor) || cp.Factor == 0 {
			return fieldErr(ErrValue, cf+".factor", "tone %q: matrix-element factor %v must be finite and non-zero", t.Name, cp.Factor)
		}
	}
	if d.Rotating {
		return nil
	}
	w := d.CarrierOf(i)
	best := -1
	var bestDet float64
	for c, cp := range t.Couplings {
		det := math.Abs(w - (d.Levels[cp.Upper].Energy - d.Levels[cp.Lower].Energy))
		if best < 0 || det < bestDet {
			best, bestDet = c, det
		}
	}
	cp := t.Couplings[best]
	wt := d.Levels[cp.Upper].Energy - d.Levels[cp.Lower].Energy
	if limit := FarFraction * math.Max(math.Abs(w), math.Abs(wt)); bestDet > limit {
		return &FarCarrierError{Field: f + ".carrier", Tone: t.Name, Carrier: w,
			Nearest: d.Levels[cp.Lower].Name + "→" + d.Levels[cp.Upper].Name, Transition: wt, Limit: limit}
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
