package waveform_test

import (
	"fmt"
	"log"
	"math"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

// A nonadiabatic holonomic Hadamard gate on a Λ scheme (Sjöqvist et al.,
// New J. Phys. 14, 103035 (2012), θ = π/4, φ = 0): one pulse of area 2π
// along a fixed drive direction, built, sampled and verified.
func ExampleBuild() {
	r := complex(1/math.Sqrt2, 0)
	plan := &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r}),
		Segments: []waveform.Segment{{
			Kind: waveform.CyclicSegment,
			Area: 2 * math.Pi,
			Shape: func(s float64, p holonomy.Point) {
				holonomy.LambdaPoint(p, 1, math.Pi/4, 0)
			},
		}},
	}
	w, err := waveform.Build(plan, wavetest.Hardware(2, 10e6))
	if err != nil {
		log.Fatal(err)
	}
	v, err := sim.Verify(w, sim.ErrorModel{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d samples (%.0f ns), envelope peak %.2f MHz\n", w.Len(), w.Duration()*1e9, w.Segments[0].Amplitude/1e6)
	fmt.Printf("fidelity %.6f, all checks pass: %v\n", v.Fidelity, v.Pass())
	// Output:
	// 192 samples (192 ns), envelope peak 10.81 MHz
	// fidelity 1.000000, all checks pass: true
}
