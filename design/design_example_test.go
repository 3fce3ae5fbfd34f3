package design_test

import (
	"context"
	"fmt"
	"github.com/loopgate/loopgate/design/spec"
	"os"

	"github.com/loopgate/loopgate/design"
)

// ExampleDesign designs the nonadiabatic Λ Hadamard gate of a demo spec
// into a temporary folder, without the robustness sweeps and the report.
func ExampleDesign() {
	spc, err := spec.LoadSpec("../testdata/demo-lambda-hadamard.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	dir, err := os.MkdirTemp("", "loopgate-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	out, err := design.Design(context.Background(), spc, design.Options{OutDir: dir, NoSweeps: true, NoReport: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s on %s: %d samples, fidelity ≥ 0.9999: %v, files: %d\n",
		out.Target, out.Scheme, out.Samples, out.Ideal.Fidelity >= 0.9999, len(out.Files))
	// Output:
	// H (Hadamard) on lambda: 96 samples, fidelity ≥ 0.9999: true, files: 4
}
