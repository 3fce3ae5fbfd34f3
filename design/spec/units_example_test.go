package spec_test

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/design/spec"
)

func ExampleParseQuantity() {
	rabi, _ := spec.ParseQuantity("20 MHz", spec.Frequency) // Ω/2π in Hz
	rate, _ := spec.ParseQuantity("1.2 GS/s", spec.SampleRate)
	dur, _ := spec.ParseQuantity("800 ns", spec.Time)
	gamma, _ := spec.ParseQuantity("4 MHz", spec.Rate) // Γ/2π = 4 MHz
	fmt.Println(rabi, rate, dur)
	fmt.Printf("Γ = 2π × %.3g /s\n", gamma/(2*math.Pi))

	_, err := spec.ParseQuantity("1.2 GHz", spec.SampleRate)
	fmt.Println(err)
	// Output:
	// 2e+07 1.2e+09 8e-07
	// Γ = 2π × 4e+06 /s
	// "1.2 GHz" is not a sample rate (GHz is a unit of frequency); accepted units: S/s, kS/s, MS/s, GS/s
}

func ExampleFormatQuantity() {
	fmt.Println(spec.FormatQuantity(2.5e7, spec.Frequency))
	fmt.Println(spec.FormatQuantity(2e-7, spec.Time))
	fmt.Println(spec.FormatQuantity(2e15, spec.SlewRate))
	// Output:
	// 25 MHz
	// 200 ns
	// 2 GHz/µs
}
