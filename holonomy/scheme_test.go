package holonomy

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// geoSpinMatrices builds S_x, S_y, S_z for spin s = twoS/2 in the basis
// m = s, s−1, …, −s from the textbook ladder-operator matrix elements
// ⟨m+1|S₊|m⟩ = √(s(s+1) − m(m+1)) (Sakurai, Modern Quantum Mechanics,
// ch. 3.5; from memory), independently of Spin.
func geoSpinMatrices(twoS int) (sx, sy, sz *Mat) {
	n := twoS + 1
	s := float64(twoS) / 2
	sx, sy, sz = NewMat(n, n), NewMat(n, n), NewMat(n, n)
	for k := 0; k < n; k++ {
		m := s - float64(k)
		sz.Set(k, k, complex(m, 0))
		if k+1 < n { // ⟨m|S₊|m−1⟩, level k+1 has m−1
			mm := m - 1
			e := math.Sqrt(s*(s+1) - mm*(mm+1))
			// S₊ element (k, k+1); S₋ element (k+1, k).
			sx.Set(k, k+1, complex(e/2, 0))
			sx.Set(k+1, k, complex(e/2, 0))
			sy.Set(k, k+1, complex(0, -e/2)) // (S₊ − S₋)/(2i)
			sy.Set(k+1, k, complex(0, e/2))
		}
	}
	return sx, sy, sz
}

func TestSpinHamiltonianIsOmegaNDotS(t *testing.T) {
	for twoS := 1; twoS <= 15; twoS++ {
		s := Spin(twoS, 0)
		if err := s.Validate(); err != nil {
			t.Fatalf("2s=%d: %v", twoS, err)
		}
		sx, sy, sz := geoSpinMatrices(twoS)
		n := twoS + 1
		p := s.NewPoint()
		h := NewMat(n, n)
		want := NewMat(n, n)
		for _, a := range [][3]float64{{1.3, 0.4, 2.2}, {-0.7, 2.9, -1.1}, {5, math.Pi / 2, 0}} {
			om, th, ph := a[0], a[1], a[2]
			SpinPoint(p, om, th, ph)
			s.Hamiltonian(h, p)
			nx, ny, nz := math.Sin(th)*math.Cos(ph), math.Sin(th)*math.Sin(ph), math.Cos(th)
			for i := range want.Data {
				want.Data[i] = complex(om, 0) * (complex(nx, 0)*sx.Data[i] + complex(ny, 0)*sy.Data[i] + complex(nz, 0)*sz.Data[i])
			}
			if d := FrobeniusDist(h, want); d > 1e-13*float64(n) {
				t.Errorf("2s=%d (ω,θ,φ)=%v: ‖H − ω n·S‖ = %g", twoS, a, d)
			}
		}
	}
}

func TestHamiltonianConvention(t *testing.T) {
	// A channel l→u with drive Ω e^{iφ} and factor f adds
	// (fΩ/2)(e^{iφ}|u⟩⟨l| + h.c.); a detuning adds Δ|k⟩⟨k| (package doc).
	s := &Scheme{
		Name:   "test",
		Levels: []Level{{Name: "a", Detuning: 0.5}, {Name: "b"}, {Name: "c", Detuning: -2}},
		Channels: []Channel{
			{Name: "ab", Lower: 0, Upper: 1, Factor: 1},
			{Name: "ab2", Lower: 0, Upper: 1, Factor: -0.5}, // same pair: adds
			{Name: "cb", Lower: 2, Upper: 1, Factor: 2},
		},
		Computational: []int{0},
	}
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	p := s.NewPoint()
	p.Drive[0] = cmplx.Rect(3, 0.7)
	p.Drive[1] = cmplx.Rect(1, -0.2)
	p.Drive[2] = cmplx.Rect(0.4, 2)
	p.Detuning[1] = 0.25
	h := NewMat(3, 3)
	s.Hamiltonian(h, p)
	hba := 0.5*cmplx.Rect(3, 0.7) - 0.25*cmplx.Rect(1, -0.2)
	hbc := cmplx.Rect(0.4, 2)
	want := NewMatFrom(3, 3, []complex128{
		0.5, cmplx.Conj(hba), 0,
		hba, 0.25, hbc,
		0, cmplx.Conj(hbc), -2,
	})
	if d := FrobeniusDist(h, want); d > 1e-15 {
		t.Errorf("H =\n%vwant\n%v", h, want)
	}
	// nil detuning slice means zero controlled detunings.
	p.Detuning = nil
	s.Hamiltonian(h, p)
	if h.At(1, 1) != 0 || h.At(0, 0) != 0.5 {
		t.Errorf("nil Detuning: diagonal %v %v", h.At(0, 0), h.At(1, 1))
	}
}

func TestValidate(t *testing.T) {
	good := func() *Scheme { return Tripod() }
	cases := []struct {
		name  string
		edit  func(s *Scheme)
		match string
	}{
		{"one level", func(s *Scheme) { s.Levels = s.Levels[:1]; s.Channels = nil }, "need 2 to 16"},
		{"17 levels", func(s *Scheme) {
			for i := 0; i < 13; i++ {
				s.Levels = append(s.Levels, Level{Name: strings.Repeat("x", i+1)})
			}
		}, "need 2 to 16"},
		{"unnamed level", func(s *Scheme) { s.Levels[2].Name = "" }, "level 2 has no name"},
		{"duplicate level", func(s *Scheme) { s.Levels[2].Name = "g0" }, `"g0" is used twice`},
		{"negative decay", func(s *Scheme) { s.Levels[3].Decay = -1 }, "decay"},
		{"NaN detuning", func(s *Scheme) { s.Levels[0].Detuning = math.NaN() }, "finite"},
		{"no channels", func(s *Scheme) { s.Channels = nil }, "no drive channels"},
		{"unnamed channel", func(s *Scheme) { s.Channels[1].Name = "" }, "channel 1 has no name"},
		{"duplicate channel", func(s *Scheme) { s.Channels[1].Name = "p0" }, `"p0" is used twice`},
		{"missing level", func(s *Scheme) { s.Channels[0].Upper = 4 }, "does not exist"},
		{"self coupling", func(s *Scheme) { s.Channels[0].Upper = 0 }, "to itself"},
		{"zero factor", func(s *Scheme) { s.Channels[0].Factor = 0 }, "non-zero"},
		{"no computational", func(s *Scheme) { s.Computational = nil }, "computational levels"},
		{"bad computational", func(s *Scheme) { s.Computational = []int{0, 7} }, "index 7"},
		{"repeated computational", func(s *Scheme) { s.Computational = []int{1, 1} }, "listed twice"},
	}
	if err := good().Validate(); err != nil {
		t.Fatalf("tripod: %v", err)
	}
	for _, c := range cases {
		s := good()
		c.edit(s)
		err := s.Validate()
		if err == nil || !strings.Contains(err.Error(), c.match) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.match)
		}
	}
	// All levels computational is allowed (e.g. spin-½ with both levels).
	if err := Spin(1, 0, 1).Validate(); err != nil {
		t.Errorf("spin-1/2 with both levels computational: %v", err)
	}
	// Any coupling graph: a 16-level ring with a chord.
	ring := &Scheme{Name: "ring", Computational: []int{0, 5}}
	for i := 0; i < MaxLevels; i++ {
		ring.Levels = append(ring.Levels, Level{Name: "r" + string(rune('a'+i))})
		ring.Channels = append(ring.Channels, Channel{Name: "c" + string(rune('a'+i)), Lower: i, Upper: (i + 1) % MaxLevels, Factor: 1})
	}
	ring.Channels = append(ring.Channels, Channel{Name: "chord", Lower: 3, Upper: 11, Factor: 0.5})
	if err := ring.Validate(); err != nil {
		t.Errorf("16-level ring: %v", err)
	}
}

func TestPresetPoints(t *testing.T) {
	// Duan, Cirac and Zoller, Science 292, 1695 (2001): the bright state
	// sinθcosφ|g0⟩ + sinθ sinφ|g1⟩ + cosθ|a⟩ couples to e; the two states
	// orthogonal to it are dark (zero energy).
	tri := Tripod()
	p := tri.NewPoint()
	TripodPoint(p, 2, 0.9, 0.4)
	h := NewMat(4, 4)
	tri.Hamiltonian(h, p)
	st, ct := math.Sincos(0.9)
	sp, cp := math.Sincos(0.4)
	d1 := []complex128{complex(ct*cp, 0), complex(ct*sp, 0), complex(-st, 0), 0}
	d2 := []complex128{complex(-sp, 0), complex(cp, 0), 0, 0}
	for _, d := range [][]complex128{d1, d2} {
		var r float64
		for i := 0; i < 4; i++ {
			var s complex128
			for j := 0; j < 4; j++ {
				s += h.At(i, j) * d[j]
			}
			r += cmplx.Abs(s)
		}
		if r > 1e-15 {
			t.Errorf("tripod dark state %v: ‖H d‖ = %g", d, r)
		}
	}
	// Sjöqvist et al., New J. Phys. 14, 103035 (2012): Λ couplings
	// Ω sin(θ/2)e^{iφ} and −Ω cos(θ/2); the dark state is
	// cos(θ/2)|g0⟩ + sin(θ/2)e^{iφ}|g1⟩.
	lam := Lambda()
	q := lam.NewPoint()
	LambdaPoint(q, 3, 1.1, -0.6)
	h3 := NewMat(3, 3)
	lam.Hamiltonian(h3, q)
	ds := []complex128{complex(math.Cos(0.55), 0), cmplx.Rect(math.Sin(0.55), -0.6), 0}
	var r float64
	for i := 0; i < 3; i++ {
		var s complex128
		for j := 0; j < 3; j++ {
			s += h3.At(i, j) * ds[j]
		}
		r += cmplx.Abs(s)
	}
	if r > 1e-15 {
		t.Errorf("Λ dark state: ‖H d‖ = %g", r)
	}
	if got := cmplx.Abs(q.Drive[0])*cmplx.Abs(q.Drive[0]) + cmplx.Abs(q.Drive[1])*cmplx.Abs(q.Drive[1]); math.Abs(got-9) > 1e-14 {
		t.Errorf("Λ total Rabi frequency² = %g, want 9", got)
	}
}

func TestLookupAndCheckPoint(t *testing.T) {
	s := Tripod()
	if s.LevelIndex("a") != 2 || s.LevelIndex("zz") != -1 || s.ChannelIndex("p1") != 1 || s.ChannelIndex("x") != -1 {
		t.Error("LevelIndex/ChannelIndex")
	}
	p := s.NewPoint()
	if err := s.CheckPoint(p); err != nil {
		t.Error(err)
	}
	p.Drive[1] = complex(math.Inf(1), 0)
	if err := s.CheckPoint(p); err == nil || !strings.Contains(err.Error(), `"p1"`) {
		t.Errorf("infinite drive: %v", err)
	}
	if err := s.CheckPoint(Point{Drive: make([]complex128, 2)}); err == nil {
		t.Error("short point accepted")
	}
	if got := Spin(3).Levels[1].Name; got != "m=+1/2" {
		t.Errorf("spin-3/2 level 1 is %q", got)
	}
	if got := Spin(2).Levels[1].Name; got != "m=0" {
		t.Errorf("spin-1 level 1 is %q", got)
	}
}

func TestSjoqvistLambdaGate(t *testing.T) {
	// Sjöqvist et al., New J. Phys. 14, 103035 (2012): resonant Λ with
	// couplings Ω(t) sin(θ/2)e^{iφ} (g0↔e) and −Ω(t) cos(θ/2) (g1↔e) at fixed
	// (θ, φ). With bright-state pulse area ∫Ω dt = 2π in the Ω/2 convention
	// the bright state returns with a sign change and the dark state is
	// untouched, so the qubit block of the propagator is
	// U = n·σ, n = (sinθ cosφ, sinθ sinφ, cosθ) — e.g. the Hadamard gate at
	// θ = π/4, φ = 0. Propagated exactly (zero-order hold, sin² envelope).
	lam := Lambda()
	const steps = 400
	T := 2e-6 // s
	dt := T / steps
	env := make([]float64, steps)
	var area float64
	for k := range env {
		x := math.Sin(math.Pi * (float64(k) + 0.5) / steps)
		env[k] = x * x
		area += env[k] * dt
	}
	for _, a := range [][2]float64{{math.Pi / 4, 0}, {math.Pi / 2, 0}, {math.Pi / 2, math.Pi / 2}, {1.1, 2.3}, {0, 0}} {
		th, ph := a[0], a[1]
		prop := NewPropagator(3)
		u := Identity(3)
		h := NewMat(3, 3)
		p := lam.NewPoint()
		for k := range env {
			LambdaPoint(p, 2*math.Pi*env[k]/area, th, ph) // Σ Ω_k dt = 2π
			lam.Hamiltonian(h, p)
			prop.Step(u, h, dt)
		}
		nx, ny, nz := math.Sin(th)*math.Cos(ph), math.Sin(th)*math.Sin(ph), math.Cos(th)
		want := NewMatFrom(2, 2, []complex128{complex(nz, 0), complex(nx, -ny), complex(nx, ny), complex(-nz, 0)})
		got := NewMatFrom(2, 2, []complex128{u.At(0, 0), u.At(0, 1), u.At(1, 0), u.At(1, 1)})
		if d := FrobeniusDist(got, want); d > 1e-10 {
			t.Errorf("(θ, φ) = %v: qubit block\n%vwant n·σ\n%v(‖Δ‖ = %.2g)", a, got, want, d)
		} else {
			t.Logf("(θ, φ) = (%.3f, %.3f): ‖U_qubit − n·σ‖ = %.1e", th, ph, d)
		}
		if d := cmplx.Abs(u.At(2, 2) + 1); d > 1e-10 {
			t.Errorf("(θ, φ) = %v: excited level amplitude %v, want −1 after a 2π pulse", a, u.At(2, 2))
		}
	}
}
