package wavefile_test

import (
	"bytes"
	"fmt"
	"log"
	"math"

	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"github.com/loopgate/loopgate/waveform/sim"
	"github.com/loopgate/loopgate/waveform/wavefile"
)

// Writing and reading a waveform file: the file carries its format name
// and version, and reading it back validates it against the schema.
func ExampleReadWaveform() {
	// The Λ Hadamard of Sjöqvist et al. (θ = π/4, φ = 0), as in ExampleBuild.
	plan := wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard())
	w, err := waveform.Build(plan, wavetest.Hardware(2, 10e6))
	if err != nil {
		log.Fatal(err)
	}
	v, err := sim.Verify(w, sim.ErrorModel{})
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
