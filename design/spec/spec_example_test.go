package spec_test

import (
	"fmt"

	"github.com/loopgate/loopgate/design/spec"
)

func ExampleParseSpec() {
	src := `spec_version: 1
target: {gate: H}
scheme: {preset: tripod, decay: {e: "4 MHz"}}
method: adiabatic
hardware:
  max_rabi: "20 MHz"
  max_slew: "2 MHz/ns"
  sample_rate: "1 GS/s"
  granularity: 16
  max_samples: 65536
  dac_bits: "14 bit"
  full_scale: "25 MHz"
  min_duration: "200 ns"
  max_duration: "5 us"
`
	s, err := spec.ParseSpec([]byte(src), "example.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Target.Label, "by", s.Method, "holonomy on the", s.Scheme.Name)
	fmt.Println("max Rabi frequency (Ω/2π):", spec.FormatQuantity(s.Hardware.MaxRabi[0], spec.Frequency))
	fmt.Printf("decay of e: Γ = %.4g /s\n", s.Scheme.Levels[3].Decay)
	fmt.Println("restarts (default):", s.Search.Restarts)
	// Output:
	// H (Hadamard) by adiabatic holonomy on the tripod
	// max Rabi frequency (Ω/2π): 20 MHz
	// decay of e: Γ = 2.513e+07 /s
	// restarts (default): 8
}

func ExampleParseSpec_error() {
	src := `spec_version: 1
target: {gate: H}
scheme: {preset: tripod}
method: adiabatic
hardware:
  max_rabi: "20 MHz"
  max_slew: "2 MHz/ns"
  sample_rate: "1.2 GHz"
  max_samples: 65536
  dac_bits: 14
  full_scale: "25 MHz"
  min_duration: "200 ns"
  max_duration: "5 us"
  colour: blue
`
	_, err := spec.ParseSpec([]byte(src), "demo.yaml")
	fmt.Println(err)
	// Output:
	// spec demo.yaml: hardware.sample_rate (line 8, col 16): "1.2 GHz" is not a sample rate (GHz is a unit of frequency); accepted units: S/s, kS/s, MS/s, GS/s
	// spec demo.yaml: hardware.colour (line 14, col 3): unknown key "colour"; accepted keys here: dac_bits, full_scale, granularity, max_duration, max_rabi, max_samples, max_slew, min_duration, sample_rate
}

func ExampleStarterSpec() {
	b, _ := spec.StarterSpec("lambda")
	s, err := spec.ParseSpec(b, "starter.yaml")
	fmt.Println(err == nil, s.Scheme.Name, s.Method)
	// Output:
	// true lambda nonadiabatic
}
