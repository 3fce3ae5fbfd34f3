package device

import (
	"math"
	"testing"
)

// The default frame co-rotates with each tone's primary transition: on the
// transmon ladder (tones pinned to 0↔1 and 1↔2) levels 0–2 sit at their own
// energies and the spectator 3, reached by no primary transition, keeps
// F = E, so the diagonal is zero and the crosstalk terms rotate at
// multiples of the anharmonicity: w01 on 1↔2 at α and on 2↔3 at 2α, w12 on
// 0↔1 at −α and on 2↔3 at α.
func TestDefaultFrameTransmon(t *testing.T) {
	alpha := HzToRad(-220e6)
	d, err := Transmon(TransmonParams{Levels: 4, Omega01: HzToRad(5e9), Anharmonicity: alpha})
	if err != nil {
		t.Fatal(err)
	}
	m := compile(t, d)
	for k, f := range m.Frame() {
		if f != d.Levels[k].Energy {
			t.Errorf("level %d: frame %g, energy %g", k, f, d.Levels[k].Energy)
		}
	}
	want := map[[2]int]float64{{0, 0}: 0, {0, 1}: alpha, {0, 2}: 2 * alpha, {1, 0}: -alpha, {1, 1}: 0, {1, 2}: alpha}
	for _, tm := range m.Terms() {
		if w := want[[2]int{tm.Tone, tm.Lower}]; math.Abs(tm.Detuning-w) > 1e-12*HzToRad(5e9) {
			t.Errorf("tone %d on %d→%d: detuning %g, want %g", tm.Tone, tm.Lower, tm.Upper, tm.Detuning, w)
		}
	}
}

// A detuned tone shows as a static diagonal entry, and a loop of tones whose
// carriers do not close leaves the last tone rotating by the mismatch.
func TestDefaultFrameDetunedAndLoop(t *testing.T) {
	w1, w2 := HzToRad(3e9), HzToRad(4e9)
	d := &Device{
		Name:   "loop",
		Levels: []Level{{Name: "g"}, {Name: "x", Energy: w1}, {Name: "y", Energy: w2}},
		Tones: []Tone{
			{Name: "a", Carrier: w1 - HzToRad(5e6), Couplings: []Coupling{{Lower: 0, Upper: 1, Factor: 1}}},
			{Name: "b", Carrier: w2 - w1, Couplings: []Coupling{{Lower: 1, Upper: 2, Factor: 1}}},
			{Name: "c", Carrier: w2, Couplings: []Coupling{{Lower: 0, Upper: 2, Factor: 1}}},
		},
		Computational: []int{0, 1},
	}
	m := compile(t, d)
	f := m.Frame()
	// g keeps its energy; x follows tone a, y follows tone b.
	if f[0] != 0 || math.Abs(f[1]-(w1-HzToRad(5e6))) > 1e-3 || math.Abs(f[2]-(w2-HzToRad(5e6))) > 1e-3 {
		t.Fatalf("frame %v", f)
	}
	terms := m.Terms()
	if terms[0].Detuning != 0 || terms[1].Detuning != 0 {
		t.Errorf("primary tones rotate: %+v", terms[:2])
	}
	if math.Abs(terms[2].Detuning+HzToRad(5e6)) > 1e-3 { // rounding of 2π·GHz numbers
		t.Errorf("tone c closes the loop with detuning %g, want −2π·5 MHz", terms[2].Detuning)
	}
}

// The existing presets are expressible in the device model and compile.
func TestExistingPresetsCompile(t *testing.T) {
	for _, d := range []*Device{Tripod(), Lambda(), Spin(1, 0, 1), Spin(2, 0, 2)} {
		m := compile(t, d)
		for _, tm := range m.Terms() {
			if tm.Detuning != 0 {
				t.Errorf("%s: resonant preset term %+v rotates", d.Name, tm)
			}
		}
	}
}
