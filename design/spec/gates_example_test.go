package spec_test

import (
	"fmt"

	"github.com/loopgate/loopgate/design/spec"
)

func ExampleLookupGate() {
	g, ok := spec.LookupGate("√X")
	fmt.Println(ok, g.Name, g.Symbol, "-", g.Title)
	fmt.Print(g.Matrix())
	// Output:
	// true SX √X - square root of X
	// [+0.500000+0.500000i +0.500000-0.500000i]
	// [+0.500000-0.500000i +0.500000+0.500000i]
}

func ExampleGates() {
	for _, g := range spec.Gates()[:5] {
		fmt.Printf("%-4s %s\n", g.Name, g.Title)
	}
	// Output:
	// I    identity
	// X    Pauli X
	// Y    Pauli Y
	// Z    Pauli Z
	// H    Hadamard
}
