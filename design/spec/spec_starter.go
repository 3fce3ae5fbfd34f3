package spec

import (
	"embed"
	"fmt"
	"strings"
)

//go:embed demo/demo-tripod-hadamard.yaml
var demoSpec []byte

//go:embed starter/*.yaml
var starterFS embed.FS

// DemoName is the name under which the embedded demo spec is reported; it
// equals the name of its copy in the repository's testdata folder.
const DemoName = "demo-tripod-hadamard.yaml"

// DemoSpec returns the embedded default demo spec (an adiabatic Hadamard
// gate on an invented tripod system) as a new slice. It parses with
// ParseSpec(DemoSpec(), DemoName).
func DemoSpec() []byte { return append([]byte(nil), demoSpec...) }

var starterFiles = []struct{ name, file string }{
	{"tripod", "starter/tripod.yaml"},
	{"lambda", "starter/lambda.yaml"},
	{"spin-1/2", "starter/spin-1-2.yaml"},
	{"custom", "starter/custom.yaml"},
}

// StarterPresets returns the names StarterSpec accepts: tripod, lambda,
// spin-1/2 and custom (an explicit coupling graph).
func StarterPresets() []string {
	n := make([]string, len(starterFiles))
	for i, f := range starterFiles {
		n[i] = f.name
	}
	return n
}

// StarterSpec returns a commented starter spec for preset (see
// StarterPresets) that parses and validates as it is, for the user to
// edit. An unknown preset is an error listing the known ones.
func StarterSpec(preset string) ([]byte, error) {
	for _, f := range starterFiles {
		if strings.EqualFold(f.name, strings.TrimSpace(preset)) {
			b, err := starterFS.ReadFile(f.file)
			if err != nil {
				panic("design: missing embedded starter " + f.file)
			}
			return b, nil
		}
	}
	return nil, fmt.Errorf("no starter spec for %q; choose one of %s", preset, strings.Join(StarterPresets(), ", "))
}

// DemoSpecName names the built-in demo spec in messages; it is a copy of
// the file with the same name under testdata/.
const DemoSpecName = "demo-tripod-hadamard.yaml (built in)"

// LoadDemoSpec parses the built-in demo spec.
func LoadDemoSpec() (*Spec, error) { return ParseSpec(DemoSpec(), DemoSpecName) }
