package optimize_test

import (
	"context"
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/optimize"
)

// Design a Hadamard gate as the adiabatic holonomy of a smooth loop of
// normalised tripod drives.
func ExampleSearch() {
	sc := holonomy.Tripod()
	sp, err := optimize.NewDriveSphere(sc, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	r := complex(1/math.Sqrt2, 0)
	hadamard := holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
	s := &optimize.Search{Scheme: sc, Target: hadamard, Shape: optimize.NewFourier(sp, 1), Seed: 1}
	res, err := s.Run(context.Background())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("reachable:", res.Reach)
	fmt.Println("loop parameters:", len(res.Params))
	fmt.Println("infidelity at most 1e-6:", res.Infidelity <= 1e-6)
	// The holonomy, with its global phase removed.
	ph := res.U.At(0, 0) / complex(math.Hypot(real(res.U.At(0, 0)), imag(res.U.At(0, 0))), 0)
	for i := 0; i < 2; i++ {
		fmt.Printf("%+.2f %+.2f\n", real(res.U.At(i, 0)/ph), real(res.U.At(i, 1)/ph))
	}
	// Output:
	// reachable: every unitary up to a global phase
	// loop parameters: 12
	// infidelity at most 1e-6: true
	// +0.71 +0.71
	// +0.71 -0.71
}

// The nonadiabatic Λ Hadamard gate in one loop: two half pulses with the
// bright state of the axis n = (1, 0, 1)/√2; a π rotation needs no phase
// jump between the halves.
func ExampleLambdaClosedForm() {
	r := complex(1/math.Sqrt2, 0)
	hadamard := holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
	segs, err := optimize.LambdaClosedForm(hadamard, optimize.SingleLoop)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range segs {
		fmt.Printf("θ = %.4f  φ = %.4f  χ = %.4f  area = %.4f\n", g.Theta, g.Phi, g.Phase, g.Area)
	}
	// Output:
	// θ = 0.7854  φ = 0.0000  χ = 0.0000  area = 3.1416
	// θ = 0.7854  φ = 0.0000  χ = 0.0000  area = 3.1416
}

// A loop of field directions gives a spin-½ only geometric phases, so a
// Hadamard gate is refused before any search.
func ExampleReachability() {
	sc := holonomy.Spin(1, 0, 1)
	sp, err := optimize.NewFieldSphere(sc)
	if err != nil {
		fmt.Println(err)
		return
	}
	r := complex(1/math.Sqrt2, 0)
	hadamard := holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
	reach, err := optimize.Reachability(sc, sp, hadamard, 1e-6)
	fmt.Println(reach)
	fmt.Println(err)
	// Output:
	// diagonal gates (geometric phases only)
	// optimize: target gate cannot be made on scheme "spin-1/2": the computational levels are non-degenerate at the base point (energies {m=+1/2} at 0.5; {m=-1/2} at -0.5, unit scale), so a field-direction loop of spin-1/2 gives only diagonal gates diag(e^{iγ_1}, …) of geometric phases; the target has off-diagonal weight 0.5 (share of Σ|T_ij|² off the diagonal); the closest reachable gate has infidelity 0.333, above the requested 1e-06
}
