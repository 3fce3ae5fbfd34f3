package holonomy

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// Level is one state of a level scheme.
type Level struct {
	// Name identifies the level in files and messages.
	Name string
	// Detuning is the static energy Δ_k of the level in rad/s (ħ = 1);
	// it adds Δ_k|k⟩⟨k| to H.
	Detuning float64
	// Decay is the population loss rate Γ_k out of the level in 1/s.
	// It enters only non-Hermitian propagation as −iΓ_k/2 |k⟩⟨k|.
	Decay float64
}

// Channel is one drive coupling a lower level to an upper level.
type Channel struct {
	// Name identifies the channel in files and messages.
	Name string
	// Lower and Upper are level indices; they must differ.
	Lower, Upper int
	// Factor is the matrix-element factor multiplying the drive
	// (for spin-s ladders the Clebsch–Gordan factor √(s(s+1)−m(m+1))).
	Factor float64
}

// Scheme is a level scheme seen as a coupling graph: levels joined by drive
// channels. A control point (see Point) gives every channel a complex drive
// Ω_c e^{iφ_c} and every level an extra detuning. The Hamiltonian is
//
//	H/ħ = Σ_k (Δ_k + δ_k)|k⟩⟨k| + Σ_c (f_c/2)(Ω_c e^{iφ_c}|u_c⟩⟨l_c| + h.c.)
//
// in angular units (rad/s), where f_c is the channel's Factor.
type Scheme struct {
	// Name is a short description ("tripod", "lambda", "spin-1/2", ...).
	Name string
	// Levels are the states of the scheme, 2 to 16 of them.
	Levels []Level
	// Channels are the drive couplings.
	Channels []Channel
	// Computational lists the levels spanning the computational subspace
	// (for a qubit, the two qubit levels, |0⟩ first).
	Computational []int
}

// MaxLevels is the largest number of levels a Scheme may have.
const MaxLevels = 16

// Point is one point R of control space for a Scheme.
type Point struct {
	// Drive holds Ω_c e^{iφ_c} per channel in rad/s (the Rabi frequency is
	// the modulus, the phase the argument).
	Drive []complex128
	// Detuning holds a controlled detuning δ_k per level in rad/s, added to
	// the level's static Detuning. A nil slice means all zero.
	Detuning []float64
}

// NewPoint returns a zero control point shaped for s.
func (s *Scheme) NewPoint() Point {
	return Point{Drive: make([]complex128, len(s.Channels)), Detuning: make([]float64, len(s.Levels))}
}

// Dim returns the number of levels.
func (s *Scheme) Dim() int { return len(s.Levels) }

// Validate reports whether the scheme is well formed: 2–16 levels with
// distinct names, finite detunings and non-negative finite decay rates; at
// least one channel, channels with distinct names joining two distinct
// existing levels with finite non-zero factors (several channels may join the
// same pair; their couplings add); and 1 to n computational levels that exist
// and are distinct. Any coupling graph meeting these rules is accepted.
func (s *Scheme) Validate() error {
	n := len(s.Levels)
	if n < 2 || n > MaxLevels {
		return fmt.Errorf("level scheme has %d levels; need 2 to %d", n, MaxLevels)
	}
	names := make(map[string]bool, n)
	for i, l := range s.Levels {
		if l.Name == "" {
			return fmt.Errorf("level %d has no name", i)
		}
		if names[l.Name] {
			return fmt.Errorf("level name %q is used twice", l.Name)
		}
		names[l.Name] = true
		if !finite(l.Detuning) || !finite(l.Decay) || l.Decay < 0 {
			return fmt.Errorf("level %q: detuning and decay must be finite and decay non-negative", l.Name)
		}
	}
	if len(s.Channels) == 0 {
		return errors.New("level scheme has no drive channels")
	}
	chNames := make(map[string]bool, len(s.Channels))
	for i, c := range s.Channels {
		if c.Name == "" {
			return fmt.Errorf("channel %d has no name", i)
		}
		if chNames[c.Name] {
			return fmt.Errorf("channel name %q is used twice", c.Name)
		}
		chNames[c.Name] = true
		if c.Lower < 0 || c.Lower >= n || c.Upper < 0 || c.Upper >= n {
			return fmt.Errorf("channel %q joins a level that does not exist", c.Name)
		}
		if c.Lower == c.Upper {
			return fmt.Errorf("channel %q couples level %q to itself", c.Name, s.Levels[c.Lower].Name)
		}
		if !finite(c.Factor) || c.Factor == 0 {
			return fmt.Errorf("channel %q: matrix-element factor must be finite and non-zero", c.Name)
		}
	}
	if len(s.Computational) == 0 || len(s.Computational) > n {
		return fmt.Errorf("level scheme needs 1 to %d computational levels, has %d", n, len(s.Computational))
	}
	seen := make(map[int]bool)
	for _, k := range s.Computational {
		if k < 0 || k >= n {
			return fmt.Errorf("computational level index %d is not in the scheme", k)
		}
		if seen[k] {
			return fmt.Errorf("computational level %q is listed twice", s.Levels[k].Name)
		}
		seen[k] = true
	}
	return nil
}

// Hamiltonian writes the Hermitian Hamiltonian H(R)/ħ at control point p into
// dst (n×n, rad/s). Level decay is not included. It does not allocate.
func (s *Scheme) Hamiltonian(dst *Mat, p Point) {
	n := len(s.Levels)
	if dst.R != n || dst.C != n || len(p.Drive) != len(s.Channels) || (p.Detuning != nil && len(p.Detuning) != n) {
		panic("holonomy: Scheme.Hamiltonian: dimension mismatch")
	}
	dst.Zero()
	for k, l := range s.Levels {
		d := l.Detuning
		if p.Detuning != nil {
			d += p.Detuning[k]
		}
		dst.Data[k*n+k] = complex(d, 0)
	}
	for c, ch := range s.Channels {
		v := p.Drive[c] * complex(ch.Factor/2, 0)
		dst.Data[ch.Upper*n+ch.Lower] += v
		dst.Data[ch.Lower*n+ch.Upper] += cmplx.Conj(v)
	}
}

// Tripod returns the tripod scheme: ground levels g0, g1 (the qubit) and an
// auxiliary ground level a, each coupled to one excited level e by channels
// p0, p1 and pa. With all three drives on resonance it has two zero-energy
// dark states (Duan, Cirac and Zoller, Science 292, 1695 (2001)).
func Tripod() *Scheme {
	return &Scheme{
		Name:   "tripod",
		Levels: []Level{{Name: "g0"}, {Name: "g1"}, {Name: "a"}, {Name: "e"}},
		Channels: []Channel{
			{Name: "p0", Lower: 0, Upper: 3, Factor: 1},
			{Name: "p1", Lower: 1, Upper: 3, Factor: 1},
			{Name: "pa", Lower: 2, Upper: 3, Factor: 1},
		},
		Computational: []int{0, 1},
	}
}

// Lambda returns the Λ scheme: qubit levels g0, g1 each coupled to one
// excited level e by channels p0 and p1 (Sjöqvist et al., New J. Phys. 14,
// 103035 (2012)).
func Lambda() *Scheme {
	return &Scheme{
		Name:   "lambda",
		Levels: []Level{{Name: "g0"}, {Name: "g1"}, {Name: "e"}},
		Channels: []Channel{
			{Name: "p0", Lower: 0, Upper: 2, Factor: 1},
			{Name: "p1", Lower: 1, Upper: 2, Factor: 1},
		},
		Computational: []int{0, 1},
	}
}

// Spin returns a spin-s ladder (s = twoS/2, twoS from 1 to 15) in a magnetic
// field whose direction is the control. Level k has magnetic quantum number
// m = s − k and is named "m=+1/2", "m=0", ... . Channel k joins level k+1
// (m−1, lower) to level k (m, upper) with Clebsch–Gordan factor
// √(s(s+1) − m(m−1)). Use SpinPoint to set a field direction. The
// computational levels are given by index.
func Spin(twoS int, computational ...int) *Scheme {
	if twoS < 1 || twoS > MaxLevels-1 {
		panic("holonomy: Spin: 2s must be 1 to 15")
	}
	s := float64(twoS) / 2
	n := twoS + 1
	sc := &Scheme{Name: fmt.Sprintf("spin-%s", halfName(twoS)), Computational: computational}
	for k := 0; k < n; k++ {
		sc.Levels = append(sc.Levels, Level{Name: "m=" + signedHalf(twoS-2*k)})
	}
	for k := 0; k+1 < n; k++ {
		m := s - float64(k)
		sc.Channels = append(sc.Channels, Channel{
			Name:   fmt.Sprintf("x%d", k),
			Lower:  k + 1,
			Upper:  k,
			Factor: math.Sqrt(s*(s+1) - m*(m-1)),
		})
	}
	return sc
}

// SpinPoint writes into p the control point of a spin scheme made by Spin
// for the Hamiltonian H = ω n·S with n = (sinθ cosφ, sinθ sinφ, cosθ):
// drives ω sinθ e^{−iφ} on every channel and detunings ω cosθ·m.
//
// It panics if p is not shaped for a spin scheme (one more detuning than
// drives).
func SpinPoint(p Point, omega, theta, phi float64) {
	n := len(p.Detuning)
	if n < 2 || len(p.Drive) != n-1 {
		panic("holonomy: SpinPoint: point is not shaped for a spin scheme")
	}
	s := float64(n-1) / 2
	st, ct := math.Sincos(theta)
	d := cmplx.Rect(omega*st, -phi)
	for k := range p.Drive {
		p.Drive[k] = d
	}
	for k := 0; k < n; k++ {
		p.Detuning[k] = omega * ct * (s - float64(k))
	}
}

// TripodPoint writes into p the control point of the Tripod scheme in the
// parametrisation of Duan, Cirac and Zoller, Science 292, 1695 (2001): real
// drives
//
//	Ω₀ = Ω sinθ cosφ (channel p0),  Ω₁ = Ω sinθ sinφ (p1),  Ω_a = Ω cosθ (pa),
//
// with total Rabi frequency omega = Ω in rad/s and no controlled detuning.
// At θ = 0 the dark subspace is spanned by the qubit levels g0 and g1, so
// loops based there give holonomies acting on the qubit directly.
//
// It panics if p is not shaped for a tripod (3 drives, 4 detunings or nil).
func TripodPoint(p Point, omega, theta, phi float64) {
	if len(p.Drive) != 3 || (p.Detuning != nil && len(p.Detuning) != 4) {
		panic("holonomy: TripodPoint: point is not shaped for a tripod")
	}
	st, ct := math.Sincos(theta)
	sp, cp := math.Sincos(phi)
	p.Drive[0] = complex(omega*st*cp, 0)
	p.Drive[1] = complex(omega*st*sp, 0)
	p.Drive[2] = complex(omega*ct, 0)
	for k := range p.Detuning {
		p.Detuning[k] = 0
	}
}

// LambdaPoint writes into p the control point of the Lambda scheme in the
// parametrisation of Sjöqvist et al., New J. Phys. 14, 103035 (2012):
//
//	Ω₀ = Ω sin(θ/2) e^{iφ} (channel p0),  Ω₁ = −Ω cos(θ/2) (channel p1),
//
// with Rabi frequency omega = Ω in rad/s. The drives couple e to the bright
// state |b⟩ = sin(θ/2)e^{−iφ}|g0⟩ − cos(θ/2)|g1⟩ with Rabi frequency Ω; the
// orthogonal qubit state is dark. A resonant pulse of area ∫Ω dt = 2π at
// fixed (θ, φ) returns |b⟩ to itself with a sign change and so acts on the
// qubit as n·σ with n = (sinθ cosφ, sinθ sinφ, cosθ).
//
// It panics if p is not shaped for a Λ scheme (2 drives, 3 detunings or nil).
func LambdaPoint(p Point, omega, theta, phi float64) {
	if len(p.Drive) != 2 || (p.Detuning != nil && len(p.Detuning) != 3) {
		panic("holonomy: LambdaPoint: point is not shaped for a Λ scheme")
	}
	sh, ch := math.Sincos(theta / 2)
	p.Drive[0] = cmplx.Rect(omega*sh, phi)
	p.Drive[1] = complex(-omega*ch, 0)
	for k := range p.Detuning {
		p.Detuning[k] = 0
	}
}

// LevelIndex returns the index of the level called name, or −1.
func (s *Scheme) LevelIndex(name string) int {
	for i, l := range s.Levels {
		if l.Name == name {
			return i
		}
	}
	return -1
}

// ChannelIndex returns the index of the channel called name, or −1.
func (s *Scheme) ChannelIndex(name string) int {
	for i, c := range s.Channels {
		if c.Name == name {
			return i
		}
	}
	return -1
}

// CheckPoint reports whether p is shaped for s (one drive per channel, one
// detuning per level or none) and holds only finite values.
func (s *Scheme) CheckPoint(p Point) error {
	if len(p.Drive) != len(s.Channels) {
		return fmt.Errorf("control point has %d drives for %d channels", len(p.Drive), len(s.Channels))
	}
	if p.Detuning != nil && len(p.Detuning) != len(s.Levels) {
		return fmt.Errorf("control point has %d detunings for %d levels", len(p.Detuning), len(s.Levels))
	}
	for c, d := range p.Drive {
		if !finite(real(d)) || !finite(imag(d)) {
			return fmt.Errorf("channel %q: drive %v is not finite", s.Channels[c].Name, d)
		}
	}
	for k, d := range p.Detuning {
		if !finite(d) {
			return fmt.Errorf("level %q: detuning %v is not finite", s.Levels[k].Name, d)
		}
	}
	return nil
}

func halfName(twoS int) string {
	if twoS%2 == 0 {
		return fmt.Sprint(twoS / 2)
	}
	return fmt.Sprintf("%d/2", twoS)
}

func signedHalf(twoM int) string {
	switch {
	case twoM > 0:
		return "+" + halfName(twoM)
	case twoM < 0:
		return "-" + halfName(-twoM)
	}
	return "0"
}
