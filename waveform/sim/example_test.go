package sim_test

import (
	"fmt"
	"log"
	"math"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

// An adiabatic tripod gate: the "orange slice" loop of opening π/4 on the
// sphere of normalised real drives rotates the qubit by the enclosed solid
// angle. Verify reports the adiabaticity parameter the timing aimed at.
func ExampleVerify() {
	delta := math.Pi / 4
	loop := func(s float64, p holonomy.Point) {
		th, ph := math.Pi/2, delta*(3*s-1)
		switch {
		case s < 1.0/3:
			th, ph = math.Pi/2*3*s, 0
		case s >= 2.0/3:
			th, ph = math.Pi/2*(3-3*s), delta
		}
		holonomy.TripodPoint(p, 1, th, ph)
	}
	c, s := complex(math.Cos(delta), 0), complex(math.Sin(delta), 0)
	plan := &waveform.Plan{
		Scheme:   holonomy.Tripod(),
		Target:   holonomy.NewMatFrom(2, 2, []complex128{c, -s, s, c}),
		Segments: []waveform.Segment{{Kind: waveform.AdiabaticSegment, Shape: loop}},
	}
	w, err := waveform.Build(plan, wavetest.Hardware(3, 10e6))
	if err != nil {
		log.Fatal(err)
	}
	v, err := sim.Verify(w, sim.ErrorModel{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("duration %.2f µs, adiabaticity %.3f (target %.2f)\n", w.Duration()*1e6, v.Adiabaticity, w.Adiabaticity)
	fmt.Printf("fidelity %.4f\n", v.Fidelity)
	for _, ch := range v.Checks[:3] {
		fmt.Println(ch.Name, ch.Pass)
	}
	// Output:
	// duration 3.97 µs, adiabaticity 0.045 (target 0.05)
	// fidelity 1.0000
	// fidelity true
	// adiabaticity true
	// peak Rabi frequency p0 true
}

// A Simulator runs many error models on one waveform without allocating:
// here the fidelity of the Λ Hadamard under amplitude errors.
func ExampleSimulator() {
	// The Λ Hadamard of Sjöqvist et al. (θ = π/4, φ = 0), as in ExampleBuild.
	plan := wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard())
	w, err := waveform.Build(plan, wavetest.Hardware(2, 10e6))
	if err != nil {
		log.Fatal(err)
	}
	s := sim.NewSimulator(w)
	var out sim.Figures
	for _, eps := range []float64{-0.1, -0.05, 0, 0.05, 0.1} {
		if err := s.Run(sim.ErrorModel{AmplitudeError: eps}, &out); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("ε = %+.2f: F = %.4f\n", eps, out.Fidelity)
	}
	// Output:
	// ε = -0.10: F = 0.9519
	// ε = -0.05: F = 0.9877
	// ε = +0.00: F = 1.0000
	// ε = +0.05: F = 0.9877
	// ε = +0.10: F = 0.9519
}
