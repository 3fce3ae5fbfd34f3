package device

import (
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// BenchmarkSimulateTransmonCrosstalk states the cost of the sub-stepping:
// the 4-level ladder of transmonGate (tones at ω₀₁ and ω₁₂ each driving all
// three transitions) over a 50 ns gate at 2.4 GS/s (120 samples), full 4×4
// propagator at the default step phase. The target is under 5 ms per
// operation on one core (go test -bench SimulateTransmon -cpu 1), with no
// allocation.
func BenchmarkSimulateTransmonCrosstalk(b *testing.B) {
	m, pts, dt, _ := transmonGate(b)
	sim := NewSimulator(m)
	u := holonomy.NewMat(4, 4)
	steps, err := sim.Substeps(pts, dt)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportMetric(float64(steps), "substeps/op")
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		u.SetIdentity()
		if err := sim.Propagate(u, pts, dt); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSimulateTransmonCrosstalkChannel is the same gate as a 16×16
// Lindblad superoperator with T1 decay down the ladder and dephasing.
func BenchmarkSimulateTransmonCrosstalkChannel(b *testing.B) {
	m, pts, dt, _ := transmonGate(b)
	d := m.Device()
	d.Levels = append([]Level(nil), d.Levels...)
	for k := 1; k < 4; k++ {
		d.Levels[k].Decay = float64(k) / 60e-6
		d.Levels[k].Branches = []Branch{{To: k - 1, Fraction: 1}}
		d.Levels[k].Dephasing = 1 / 80e-6
	}
	sim := NewSimulator(compile(b, &d))
	s := holonomy.NewMat(16, 16)
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		s.SetIdentity()
		if err := sim.Channel(s, pts, dt); err != nil {
			b.Fatal(err)
		}
	}
}

// The simulator's hot loops allocate nothing once its workspaces exist.
func TestSimulatorAllocs(t *testing.T) {
	m, pts, dt, _ := transmonGate(t)
	d := m.Device()
	d.Levels = append([]Level(nil), d.Levels...)
	d.Levels[2].Decay = 1e5
	d.Levels[2].Branches = []Branch{{To: 1, Fraction: 1}}
	lossy := compile(t, &d)
	sim, lsim := NewSimulator(m), NewSimulator(lossy)
	u, s, rho := holonomy.Identity(4), holonomy.Identity(16), holonomy.Identity(4)
	pts = pts[:8]
	for name, f := range map[string]func(){
		"Propagate": func() { _ = sim.Propagate(u, pts, dt) },
		"Channel":   func() { _ = lsim.Channel(s, pts, dt) },
		"Evolve":    func() { _ = lsim.Evolve(rho, pts, dt) },
		"Substeps":  func() { _, _ = sim.Substeps(pts, dt) },
	} {
		f() // create the workspaces
		if a := testing.AllocsPerRun(5, f); a != 0 {
			t.Errorf("%s: %g allocations per run", name, a)
		}
	}
}

// BenchmarkSimulateTransmonCrosstalkNoisyFidelity is the gate fidelity of
// the same gate with T1 decay down the ladder and dephasing, evolving only
// the four computational operators through the Lindblad equation.
func BenchmarkSimulateTransmonCrosstalkNoisyFidelity(b *testing.B) {
	m, pts, dt, _ := transmonGate(b)
	d := m.Device()
	d.Levels = append([]Level(nil), d.Levels...)
	for k := 1; k < 4; k++ {
		d.Levels[k].Decay = float64(k) / 60e-6
		d.Levels[k].Branches = []Branch{{To: k - 1, Fraction: 1}}
		d.Levels[k].Dephasing = 1 / 80e-6
	}
	sim := NewSimulator(compile(b, &d))
	target := holonomy.NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if _, _, err := sim.GateFidelity(pts, dt, target); err != nil {
			b.Fatal(err)
		}
	}
}
