package design_test

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/design"
)

func ExampleParseQuantity() {
	rabi, _ := design.ParseQuantity("20 MHz", design.Frequency) // Ω/2π in Hz
	rate, _ := design.ParseQuantity("1.2 GS/s", design.SampleRate)
	dur, _ := design.ParseQuantity("800 ns", design.Time)
	gamma, _ := design.ParseQuantity("4 MHz", design.Rate) // Γ/2π = 4 MHz
	fmt.Println(rabi, rate, dur)
	fmt.Printf("Γ = 2π × %.3g /s\n", gamma/(2*math.Pi))

	_, err := design.ParseQuantity("1.2 GHz", design.SampleRate)
	fmt.Println(err)
	// Output:
	// 2e+07 1.2e+09 8e-07
	// Γ = 2π × 4e+06 /s
	// "1.2 GHz" is not a sample rate (GHz is a unit of frequency); accepted units: S/s, kS/s, MS/s, GS/s
}

func ExampleFormatQuantity() {
	fmt.Println(design.FormatQuantity(2.5e7, design.Frequency))
	fmt.Println(design.FormatQuantity(2e-7, design.Time))
	fmt.Println(design.FormatQuantity(2e15, design.SlewRate))
	// Output:
	// 25 MHz
	// 200 ns
	// 2 GHz/µs
}
