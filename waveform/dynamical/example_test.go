package dynamical_test

import (
	"fmt"
	"log"
	"math"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform/dynamical"
)

// The plain dynamical gate for a Hadamard target: one resonant pulse and a
// virtual z rotation.
func ExampleDecomposeQubit() {
	r := complex(1/math.Sqrt2, 0)
	h := holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
	p, err := dynamical.DecomposeQubit(h)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(p)
	// Output:
	// resonant pulse of area 0.5π and phase -0.5π, then a virtual z rotation by 1π
}
