package holonomy_test

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// A spin-½ follows a magnetic field whose direction circles a cone of polar
// angle 60°; its Berry phase is −π(1 − cos 60°) = −π/2 (Berry 1984).
func ExampleWilson_Loop() {
	spin := holonomy.Spin(1, 0) // level 0 (m = +½) is the computational level
	w := holonomy.NewWilson(spin)
	omega := 2 * math.Pi * 1e6 // field strength as a Larmor frequency, rad/s
	theta := math.Pi / 3
	cone := func(s float64, p holonomy.Point) {
		holonomy.SpinPoint(p, omega, theta, 2*math.Pi*s)
	}
	u := holonomy.NewMat(1, 1)
	gap, err := w.Loop(cone, 4096, u)
	if err != nil {
		fmt.Println(err)
		return
	}
	phase := math.Atan2(imag(u.At(0, 0)), real(u.At(0, 0)))
	fmt.Printf("Berry phase %.5f rad (−π/2 = %.5f)\n", phase, -math.Pi/2)
	fmt.Printf("smallest gap %.3f MHz\n", gap.Min/(2*math.Pi*1e6))
	// Output:
	// Berry phase -1.57080 rad (−π/2 = -1.57080)
	// smallest gap 1.000 MHz
}

// A tripod loop based where the qubit levels are dark rotates the qubit by
// the solid angle it encloses (Duan, Cirac and Zoller 2001).
func ExampleWilson_Adaptive() {
	w := holonomy.NewWilson(holonomy.Tripod())
	omega := 2 * math.Pi * 5e6
	th0, ph0 := math.Pi/2, math.Pi/2 // encloses the solid angle π/2
	loop := func(s float64, p holonomy.Point) {
		// Three legs of equal length in s, so 3·2^k points fall on the corners.
		switch {
		case s <= 1.0/3:
			holonomy.TripodPoint(p, omega, th0*3*s, 0)
		case s <= 2.0/3:
			holonomy.TripodPoint(p, omega, th0, ph0*(3*s-1))
		default:
			holonomy.TripodPoint(p, omega, th0*(3-3*s), ph0)
		}
	}
	res, err := w.Adaptive(loop, holonomy.AdaptiveOptions{Points: 48, Tol: 1e-10, Extrapolate: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	u := res.U
	r := func(i, j int) float64 { return math.Round(real(u.At(i, j))*1e6)/1e6 + 0 } // + 0 turns −0 into 0
	fmt.Printf("U = [%+.6f %+.6f; %+.6f %+.6f]\n", r(0, 0), r(0, 1), r(1, 0), r(1, 1))
	fmt.Printf("rotation angle %.6f (π/2 = %.6f)\n", math.Atan2(real(u.At(1, 0)), real(u.At(0, 0))), math.Pi/2)
	for _, f := range res.Findings {
		fmt.Println(f.Kind)
	}
	// Output:
	// U = [+0.000000 -1.000000; +1.000000 +0.000000]
	// rotation angle 1.570796 (π/2 = 1.570796)
	// real-loop
}

// The Chern number of the field-aligned spin-½ state over the sphere of field
// directions (Berry 1984; Fukui, Hatsugai and Suzuki 2005).
func ExampleFlux_Chern() {
	f := holonomy.NewFlux(holonomy.Spin(1, 0))
	sphere := func(u, v float64, p holonomy.Point) {
		holonomy.SpinPoint(p, 1e6, math.Pi*u, 2*math.Pi*v)
	}
	c, err := f.Chern(sphere, 16, 16)
	if err != nil {
		fmt.Println(err)
		return
	}
	flux, err := f.Integral(sphere, 20)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("Chern number %d, flux %.8f × 2π\n", c, flux/(2*math.Pi))
	// Output:
	// Chern number -1, flux -1.00000000 × 2π
}

// Diagnose explains in words why a loop cannot make a gate.
func ExampleWilson_Diagnose() {
	w := holonomy.NewWilson(holonomy.Tripod())
	// Out along θ and back the same way: no area enclosed.
	loop := func(s float64, p holonomy.Point) {
		x := math.Sin(math.Pi * s)
		holonomy.TripodPoint(p, 1e7, 1.2*x*x, 0.4)
	}
	fs, err := w.Diagnose(loop, 256)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range fs {
		fmt.Println(f)
	}
	// Output:
	// real-loop: the Hamiltonian stays real along the loop (up to fixed phases of the levels), so the holonomy is a real orthogonal matrix in that basis and a single state can pick up a Berry phase of only 0 or π; drive phases that change along the loop are needed for other gates
	// no-area: the loop retraces its own path (every stretch travelled out is travelled back), so it encloses no area: its holonomy is the identity and it makes no gate
}
