package device

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// randomPoints returns n control samples for sch with drives up to omega
// (rad/s) and, when det, controlled detunings up to omega/3.
func randomPoints(rng *rand.Rand, sch *holonomy.Scheme, n int, omega float64, det bool) []holonomy.Point {
	pts := make([]holonomy.Point, n)
	for i := range pts {
		p := sch.NewPoint()
		for c := range p.Drive {
			p.Drive[c] = cmplx.Rect(omega*rng.Float64(), 2*math.Pi*rng.Float64())
		}
		if det {
			for k := range p.Detuning {
				p.Detuning[k] = omega / 3 * (2*rng.Float64() - 1)
			}
		}
		pts[i] = p
	}
	return pts
}

func compile(t testing.TB, d *Device) *Model {
	t.Helper()
	m, err := Compile(d)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func identical(a, b *holonomy.Mat) bool {
	for i := range a.Data {
		if a.Data[i] != b.Data[i] {
			return false
		}
	}
	return true
}

// The resonant single-transition presets, with static detunings, decay out
// of the model and controlled detunings, give bit for bit the Hamiltonians,
// propagators and channels of the existing holonomy code path.
func TestResonantSchemesBitForBit(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 1))
	omega := 2 * math.Pi * 10e6
	lossyLambda := holonomy.Lambda()
	lossyLambda.Levels[2].Detuning = 2 * math.Pi * 3.3e6
	lossyLambda.Levels[2].Decay = 2.1e6
	lossyLambda.Levels[1].Detuning = -2 * math.Pi * 0.7e6
	cases := []struct {
		name string
		s    *holonomy.Scheme
		det  bool
	}{
		{"tripod", holonomy.Tripod(), false},
		{"lambda, detuned and decaying", lossyLambda, false},
		{"spin-1 with controlled detunings", holonomy.Spin(2, 0, 2), true},
		{"spin-3/2", holonomy.Spin(3, 0, 3), true},
	}
	for _, c := range cases {
		pts := randomPoints(rng, c.s, 50, omega, c.det)
		dt := 1 / 2.4e9
		m := compile(t, FromScheme(c.s))
		n := c.s.Dim()
		h0, h1 := holonomy.NewMat(n, n), holonomy.NewMat(n, n)
		for j, p := range pts {
			c.s.Hamiltonian(h0, p)
			m.Hamiltonian(h1, p, float64(j)*dt)
			if !identical(h0, h1) {
				t.Fatalf("%s: Hamiltonian of sample %d differs:\n%v\n%v", c.name, j, h0, h1)
			}
		}
		want := holonomy.PropagateZOH(c.s, pts, dt)
		got := holonomy.Identity(n)
		sim := NewSimulator(m)
		if err := sim.Propagate(got, pts, dt); err != nil {
			t.Fatal(err)
		}
		if !identical(want, got) {
			t.Errorf("%s: propagator differs from holonomy.PropagateZOH by %g", c.name, holonomy.FrobeniusDist(want, got))
		}
		if steps, _ := sim.Substeps(pts, dt); steps != int64(len(pts)) {
			t.Errorf("%s: %d sub-steps for %d resonant samples", c.name, steps, len(pts))
		}
		// Channels: holonomy.Lindblad with the same rates.
		decay, deph, _ := m.Rates()
		l := holonomy.NewLindblad(n, decay, deph)
		sw := holonomy.Identity(n * n)
		l.Sequence(sw, c.s, pts[:10], dt)
		sg := holonomy.Identity(n * n)
		if err := sim.Channel(sg, pts[:10], dt); err != nil {
			t.Fatal(err)
		}
		if !identical(sw, sg) {
			t.Errorf("%s: channel differs from holonomy.Lindblad.Sequence by %g", c.name, holonomy.FrobeniusDist(sw, sg))
		}
	}
}

// A device with dephasing or returning decay is refused by the pure-state
// path, and with decay only out of the model the pure-state path and the
// Lindblad path agree (the non-Hermitian shortcut is exact there).
func TestPureStatePathOnlyWhereExact(t *testing.T) {
	d, err := Transmon(TransmonParams{Levels: 3, Omega01: HzToRad(5e9), Anharmonicity: HzToRad(-220e6)})
	if err != nil {
		t.Fatal(err)
	}
	for k := range d.Levels {
		d.Levels[k].Decay = float64(k) * 3e5 // out of the model
	}
	m := compile(t, d)
	pts := make([]holonomy.Point, 24)
	for j := range pts {
		pts[j] = m.NewPoint()
		pts[j].Drive[0] = complex(HzToRad(40e6)*math.Sin(math.Pi*float64(j)/24), 0)
	}
	dt := 1 / 2.4e9
	sim := NewSimulator(m)
	u := holonomy.Identity(3)
	if err := sim.Propagate(u, pts, dt); err != nil {
		t.Fatal(err)
	}
	s := holonomy.Identity(9)
	if err := sim.Channel(s, pts, dt); err != nil {
		t.Fatal(err)
	}
	// 𝓔(|k⟩⟨l|) = U|k⟩⟨l|U† for every k, l.
	var worst float64
	for k := 0; k < 3; k++ {
		for l := 0; l < 3; l++ {
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					want := u.At(i, k) * cmplx.Conj(u.At(j, l))
					worst = max(worst, cmplx.Abs(s.At(i*3+j, k*3+l)-want))
				}
			}
		}
	}
	if worst > 1e-12 {
		t.Errorf("non-Hermitian propagator and Lindblad channel differ by %g", worst)
	}
	d.Levels[2].Branches = []Branch{{To: 1, Fraction: 1}}
	sim = NewSimulator(compile(t, d))
	if err := sim.Propagate(holonomy.Identity(3), pts, dt); !errors.Is(err, ErrNeedsDensityMatrix) {
		t.Errorf("returning decay: got %v, want ErrNeedsDensityMatrix", err)
	}
}
