package sim_test

import (
	"fmt"
	"log"
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
)

// Hardware imperfections in the error model: a first-order (RC) output
// filter and a phase modulator that sets phases only on a grid. The gate
// is a one-pulse Λ gate (Sjöqvist et al., New J. Phys. 14, 103035 (2012))
// along the invented direction θ = π/3, φ = 0.3. Its fixed drive
// direction makes it depend only on the pulse area, which the filter
// keeps (unit DC gain); rounding φ to the phase grid turns the gate's
// axis and costs fidelity.
func ExampleErrorModel() {
	theta, phi := math.Pi/3, 0.3
	st, ct := math.Sincos(theta)
	e := cmplx.Rect(st, -phi)
	plan := &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: holonomy.NewMatFrom(2, 2, []complex128{complex(ct, 0), e, cmplx.Conj(e), complex(-ct, 0)}),
		Segments: []waveform.Segment{{Kind: waveform.CyclicSegment, Area: 2 * math.Pi,
			Shape: func(s float64, p holonomy.Point) { holonomy.LambdaPoint(p, 1, theta, phi) }}},
	}
	w, err := waveform.Build(plan, wavetest.Hardware(2, 10e6))
	if err != nil {
		log.Fatal(err)
	}
	s := sim.NewSimulator(w)
	var out sim.Figures
	for _, c := range []struct {
		name string
		m    sim.ErrorModel
	}{
		{"ideal", sim.ErrorModel{}},
		{"first-order filter, 10 ns rise", sim.ErrorModel{Filter: sim.FirstOrderFilter, RiseTime: 10e-9}},
		{"phase step 2π/64", sim.ErrorModel{PhaseStep: 2 * math.Pi / 64}},
		{"phase step 2π/1024", sim.ErrorModel{PhaseStep: 2 * math.Pi / 1024}},
	} {
		if err := s.Run(c.m, &out); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("%-31s F = %.6f\n", c.name+":", out.Fidelity)
	}
	// Output:
	// ideal:                          F = 1.000000
	// first-order filter, 10 ns rise: F = 1.000000
	// phase step 2π/64:               F = 0.999985
	// phase step 2π/1024:             F = 1.000000
}
