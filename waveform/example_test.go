package waveform_test

import (
	"bytes"
	"fmt"
	"github.com/loopgate/loopgate/waveform/wavefile"
	"log"
	"math"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/waveform"
)

// demoHardware is an invented AWG: 1 GS/s, 14-bit DAC, 10 MHz Rabi limit
// on every channel, calibrated at 12 MHz full scale.
func demoHardware(channels int) waveform.Hardware {
	hw := waveform.Hardware{
		SampleRate: 1e9, MaxSlew: 2e15, Granularity: 16, MaxSamples: 65536,
		DACBits: 14, MinDuration: 0, MaxDuration: 20e-6,
	}
	for c := 0; c < channels; c++ {
		hw.MaxRabi = append(hw.MaxRabi, 10e6)
		hw.FullScale = append(hw.FullScale, 12e6)
	}
	return hw
}

// A nonadiabatic holonomic Hadamard gate on a Λ scheme (Sjöqvist et al.,
// New J. Phys. 14, 103035 (2012), θ = π/4, φ = 0): one pulse of area 2π
// along a fixed drive direction, built, sampled and verified.
func ExampleBuild() {
	r := complex(1/math.Sqrt2, 0)
	plan := &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r}),
		Segments: []waveform.Segment{{
			Kind: waveform.Cyclic,
			Area: 2 * math.Pi,
			Shape: func(s float64, p holonomy.Point) {
				holonomy.LambdaPoint(p, 1, math.Pi/4, 0)
			},
		}},
	}
	w, err := waveform.Build(plan, demoHardware(2))
	if err != nil {
		log.Fatal(err)
	}
	v, err := waveform.Verify(w, waveform.ErrorModel{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d samples (%.0f ns), envelope peak %.2f MHz\n", w.Len(), w.Duration()*1e9, w.Spans[0].Amplitude/1e6)
	fmt.Printf("fidelity %.6f, all checks pass: %v\n", v.Fidelity, v.Pass())
	// Output:
	// 192 samples (192 ns), envelope peak 10.81 MHz
	// fidelity 1.000000, all checks pass: true
}

// An adiabatic tripod gate: the "orange slice" loop of opening π/4 on the
// sphere of normalised real drives rotates the qubit by the enclosed solid
// angle. Verify reports the adiabaticity parameter the timing aimed at.
func ExampleVerify() {
	delta := math.Pi / 4
	loop := func(s float64, p holonomy.Point) {
		th, ph := math.Pi/2, delta*(3*s-1)
		switch {
		case s < 1.0/3:
			th, ph = math.Pi/2*3*s, 0
		case s >= 2.0/3:
			th, ph = math.Pi/2*(3-3*s), delta
		}
		holonomy.TripodPoint(p, 1, th, ph)
	}
	c, s := complex(math.Cos(delta), 0), complex(math.Sin(delta), 0)
	plan := &waveform.Plan{
		Scheme:   holonomy.Tripod(),
		Target:   holonomy.NewMatFrom(2, 2, []complex128{c, -s, s, c}),
		Segments: []waveform.Segment{{Kind: waveform.Adiabatic, Shape: loop}},
	}
	w, err := waveform.Build(plan, demoHardware(3))
	if err != nil {
		log.Fatal(err)
	}
	v, err := waveform.Verify(w, waveform.ErrorModel{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("duration %.2f µs, adiabaticity %.3f (target %.2f)\n", w.Duration()*1e6, v.Adiabaticity, w.Adiabaticity)
	fmt.Printf("fidelity %.4f\n", v.Fidelity)
	for _, ch := range v.Checks[:3] {
		fmt.Println(ch.Name, ch.Pass)
	}
	// Output:
	// duration 3.97 µs, adiabaticity 0.045 (target 0.05)
	// fidelity 1.0000
	// fidelity true
	// adiabaticity true
	// peak Rabi frequency p0 true
}

// A Simulator runs many error models on one waveform without allocating:
// here the fidelity of the Λ Hadamard under amplitude errors.
func ExampleSimulator() {
	r := complex(1/math.Sqrt2, 0)
	plan := &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r}),
		Segments: []waveform.Segment{{Kind: waveform.Cyclic, Area: 2 * math.Pi,
			Shape: func(s float64, p holonomy.Point) { holonomy.LambdaPoint(p, 1, math.Pi/4, 0) }}},
	}
	w, err := waveform.Build(plan, demoHardware(2))
	if err != nil {
		log.Fatal(err)
	}
	sim := waveform.NewSimulator(w)
	var out waveform.Outcome
	for _, eps := range []float64{-0.1, -0.05, 0, 0.05, 0.1} {
		if err := sim.Run(waveform.ErrorModel{AmplitudeError: eps}, &out); err != nil {
			log.Fatal(err)
		}
		fmt.Printf("ε = %+.2f: F = %.4f\n", eps, out.Fidelity)
	}
	// Output:
	// ε = -0.10: F = 0.9519
	// ε = -0.05: F = 0.9877
	// ε = +0.00: F = 1.0000
	// ε = +0.05: F = 0.9877
	// ε = +0.10: F = 0.9519
}

// Writing and reading a waveform file: the file carries its format name
// and version, and reading it back validates it against the schema.
func ExampleReadWaveform() {
	r := complex(1/math.Sqrt2, 0)
	plan := &waveform.Plan{
		Scheme: holonomy.Lambda(),
		Target: holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r}),
		Segments: []waveform.Segment{{Kind: waveform.Cyclic, Area: 2 * math.Pi,
			Shape: func(s float64, p holonomy.Point) { holonomy.LambdaPoint(p, 1, math.Pi/4, 0) }}},
	}
	w, err := waveform.Build(plan, demoHardware(2))
	if err != nil {
		log.Fatal(err)
	}
	v, err := waveform.Verify(w, waveform.ErrorModel{})
	if err != nil {
		log.Fatal(err)
	}
	spec := []byte("an invented spec\n")
	f := &wavefile.File{ToolVersion: "example", SpecSHA256: wavefile.SpecHash(spec), Seed: 42, Spec: string(spec), Waveform: w, Verification: v}
	var buf bytes.Buffer
	if err := f.WriteJSON(&buf); err != nil {
		log.Fatal(err)
	}
	g, err := wavefile.ReadWaveform(&buf, "hadamard.json")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(g.Waveform.Len(), "samples, seed", g.Seed, "pass", g.Verification.Pass())
	fmt.Println(wavefile.NPYColumns(g.Waveform))
	_, err = wavefile.ReadWaveform(bytes.NewReader([]byte(`{"format": "loopgate-waveform", "version": 2}`)), "future.json")
	fmt.Println(err)
	// Output:
	// 192 samples, seed 42 pass true
	// [time_s p0_i_hz p0_q_hz p1_i_hz p1_q_hz p0_i_code p0_q_code p1_i_code p1_q_code]
	// future.json: /version: format version 2 is not supported; this build reads version 1
}
