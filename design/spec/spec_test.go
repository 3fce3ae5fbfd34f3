package spec

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/schemas"
)

func mustParse(t *testing.T, src, name string) *Spec {
	t.Helper()
	s, err := ParseSpec([]byte(src), name)
	if err != nil {
		t.Fatalf("ParseSpec(%s): %v", name, err)
	}
	return s
}

func TestDemoSpecs(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "..", "testdata", "demo-*.yaml"))
	if err != nil || len(files) != 6 {
		t.Fatalf("want 6 demo specs, found %d (%v)", len(files), err)
	}
	want := map[string]struct {
		gate   string
		method Method
	}{
		"demo-tripod-hadamard.yaml": {"H", Adiabatic}, "demo-tripod-t.yaml": {"T", Adiabatic}, "demo-tripod-sx.yaml": {"SX", Adiabatic},
		"demo-lambda-hadamard.yaml": {"H", Nonadiabatic}, "demo-lambda-t.yaml": {"T", Nonadiabatic}, "demo-lambda-sx.yaml": {"SX", Nonadiabatic},
	}
	for _, f := range files {
		s, err := LoadSpec(f)
		if err != nil {
			t.Errorf("%v", err)
			continue
		}
		w, ok := want[filepath.Base(f)]
		if !ok {
			t.Errorf("unexpected demo %s", f)
			continue
		}
		g, _ := LookupGate(w.gate)
		if s.Target.Name != w.gate || holonomy.FrobeniusDist(s.Target.U, g.Matrix()) != 0 || s.Method != w.method {
			t.Errorf("%s: target %s, method %v; want %s, %v", f, s.Target.Name, s.Method, w.gate, w.method)
		}
		if s.File != f || s.Hash() == "" || !bytes.Equal(s.Source, mustRead(t, f)) {
			t.Errorf("%s: file name, source or hash not kept", f)
		}
	}
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// The embedded default demo is byte-identical to its testdata copy.
func TestDemoEmbeddedMatchesTestdata(t *testing.T) {
	if !bytes.Equal(DemoSpec(), mustRead(t, filepath.Join("..", "..", "testdata", DemoName))) {
		t.Fatalf("design/spec/demo/%s and testdata/%s differ; keep them identical", DemoName, DemoName)
	}
	if _, err := ParseSpec(DemoSpec(), DemoName); err != nil {
		t.Fatal(err)
	}
	d := DemoSpec()
	d[0] = 'X'
	if DemoSpec()[0] == 'X' {
		t.Error("DemoSpec shares its bytes")
	}
}

// The demo's quantities arrive in SI units, and inside the scheme in rad/s.
func TestDemoValues(t *testing.T) {
	s, err := ParseSpec(DemoSpec(), DemoName)
	if err != nil {
		t.Fatal(err)
	}
	h := s.Hardware
	eq := func(name string, got, want float64) {
		t.Helper()
		if got != want {
			t.Errorf("%s = %v, want %v", name, got, want)
		}
	}
	for i := range 3 {
		eq("MaxRabi", h.MaxRabi[i], 20e6)
		eq("MaxSlew", h.MaxSlew[i], 2e15)
		eq("FullScale", h.FullScale[i], 25e6)
	}
	eq("SampleRate", h.SampleRate, 1e9)
	eq("MinDuration", h.MinDuration, 200e-9)
	eq("MaxDuration", h.MaxDuration, 5e-6)
	if h.Granularity != 16 || h.MaxSamples != 65536 || h.DACBits != 14 {
		t.Errorf("hardware integers %+v", h)
	}
	sc := s.Scheme
	if s.Preset != "tripod" || sc.Name != "tripod" || len(sc.Levels) != 4 || !reflect.DeepEqual(sc.Computational, []int{0, 1}) {
		t.Errorf("scheme %+v", sc)
	}
	if !near(sc.Levels[3].Decay, 2*math.Pi*4e6) {
		t.Errorf("decay of e = %v, want 2π × 4 MHz", sc.Levels[3].Decay)
	}
	if !reflect.DeepEqual(s.Excited, []int{3}) {
		t.Errorf("excited levels %v, want [3]", s.Excited)
	}
	r := s.Search
	// (The number of harmonics is tuned for speed by the pipeline's owner;
	// TestSearchErrorsSweepsSections covers its decoding.)
	if r.Family != Fourier || r.Harmonics < 1 || r.Restarts != 8 || r.Seed != 7 || r.TargetInfidelity != 1e-6 ||
		r.Evaluations != defaultEvaluations || r.LoopPoints != defaultLoopPoints || r.Robust.Enabled() {
		t.Errorf("search %+v", r)
	}
	e := s.Errors
	if !reflect.DeepEqual(e.Amplitude, []float64{0.01, 0.01, 0.01}) || e.OnePhoton != 5e5 || e.TwoPhoton != 2e4 ||
		!near(e.Dephasing, 2*math.Pi*200) || e.Filter != GaussianFilter || e.RiseTime != 2e-9 || !e.Quantise || e.PhaseStep != 0 {
		t.Errorf("errors %+v", e)
	}
	w := s.Sweeps
	if w.Amplitude != (Sweep{0.1, 41}) || w.Detuning != (Sweep{5e4, 41}) || w.DetuningKind != TwoPhoton || w.MapAmplitude != 41 || w.MapDetuning != 41 {
		t.Errorf("sweeps %+v", w)
	}
}

const minimalSpec = `spec_version: 1
target: {gate: T}
scheme: {preset: tripod}
method: adiabatic
hardware:
  max_rabi: "10 MHz"
  max_slew: "1 MHz/ns"
  sample_rate: "500 MS/s"
  max_samples: 4096
  dac_bits: 12
  full_scale: "10 MHz"
  min_duration: "100 ns"
  max_duration: "4 us"
`

func TestDefaults(t *testing.T) {
	s := mustParse(t, minimalSpec, "min.yaml")
	want := Search{Family: Fourier, Harmonics: defaultHarmonics, Vertices: defaultVertices, Restarts: defaultRestarts, Seed: defaultSeed,
		TargetInfidelity: defaultTargetInfidelity, Evaluations: defaultEvaluations, LoopPoints: defaultLoopPoints, Robust: Ensemble{DetuningKind: OnePhoton}}
	if s.Search != want {
		t.Errorf("search defaults %+v, want %+v", s.Search, want)
	}
	if s.Hardware.Granularity != 1 {
		t.Errorf("granularity default %d", s.Hardware.Granularity)
	}
	if !reflect.DeepEqual(s.Errors, ErrorModel{Amplitude: []float64{0, 0, 0}, Quantise: true}) {
		t.Errorf("error-model defaults %+v", s.Errors)
	}
	// Detuning sweep: a tenth of the smallest max_rabi.
	if s.Sweeps.Detuning.Span != 1e6 || s.Sweeps.Amplitude.Span != defaultAmplitudeSpan {
		t.Errorf("sweep defaults %+v", s.Sweeps)
	}
	for _, l := range s.Scheme.Levels {
		if l.Decay != 0 || l.Detuning != 0 {
			t.Errorf("level %+v has a default decay or detuning", l)
		}
	}
}

func TestTargetForms(t *testing.T) {
	base := strings.Replace(minimalSpec, "target: {gate: T}\n", "", 1)
	cases := []struct {
		target string
		want   *holonomy.Mat
	}{
		{"target: {gate: √X}\n", mustGate(t, "SX")},
		{"target: {gate: hadamard}\n", mustGate(t, "H")},
		{"target: {rotation: {axis: x, angle: \"pi/2\"}}\n", mustRot(t, [3]float64{1, 0, 0}, math.Pi/2)},
		{"target: {rotation: {axis: -z, angle: \"45 deg\"}}\n", mustRot(t, [3]float64{0, 0, -1}, math.Pi/4)},
		{"target: {rotation: {axis: [1, 0, 1], angle: \"180 deg\"}}\n", mustRot(t, [3]float64{1, 0, 1}, math.Pi)},
		{"target:\n  unitary:\n    - [0, 1]\n    - [{re: 1}, 0]\n", mustGate(t, "X")},
		{"target:\n  unitary:\n    - [1, 0]\n    - [0, \"0.7071067811865476+0.7071067811865476i\"]\n", mustGate(t, "T")},
		{"target:\n  unitary:\n    - [\"0\", \"-1i\"]\n    - [{im: 1}, \"0\"]\n", mustGate(t, "Y")},
	}
	for _, c := range cases {
		s := mustParse(t, base+c.target, "t.yaml")
		if d := holonomy.FrobeniusDist(s.Target.U, c.want); d > 1e-15 {
			t.Errorf("%q: target differs by %g:\n%v", c.target, d, s.Target.U)
		}
		if s.Target.Label == "" {
			t.Errorf("%q: no label", c.target)
		}
	}
}

func mustGate(t *testing.T, n string) *holonomy.Mat {
	g, ok := LookupGate(n)
	if !ok {
		t.Fatal(n)
	}
	return g.Matrix()
}

func mustRot(t *testing.T, a [3]float64, th float64) *holonomy.Mat {
	u, err := Rotation(a, th)
	if err != nil {
		t.Fatal(err)
	}
	return u
}

func TestCustomGraphAndPresetNumbers(t *testing.T) {
	src := strings.Replace(minimalSpec, "scheme: {preset: tripod}\n", `scheme:
  name: test-graph
  levels:
    - {name: q0}
    - {name: q1, detuning: "0 Hz"}
    - {name: x}
    - {name: e, detuning: "10 MHz", decay: "1e6 /s"}
  channels:
    - {name: c0, lower: q0, upper: e}
    - {name: c1, lower: q1, upper: e, factor: -0.5}
    - {name: cx, lower: x, upper: e, factor: 2}
  qubit: [q1, q0]
`, 1)
	s := mustParse(t, src, "g.yaml")
	sc := s.Scheme
	if sc.Name != "test-graph" || s.Preset != "" {
		t.Errorf("name %q preset %q", sc.Name, s.Preset)
	}
	if !near(sc.Levels[3].Detuning, 2*math.Pi*10e6) || sc.Levels[3].Decay != 1e6 || sc.Levels[2].Detuning != 0 {
		t.Errorf("levels %+v", sc.Levels)
	}
	if c := sc.Channels[1]; c.Lower != 1 || c.Upper != 3 || c.Factor != -0.5 {
		t.Errorf("channel %+v", c)
	}
	if !reflect.DeepEqual(sc.Computational, []int{1, 0}) || !reflect.DeepEqual(s.Excited, []int{3}) {
		t.Errorf("qubit %v excited %v", sc.Computational, s.Excited)
	}
}

// near compares to 1e-15 relative: 2π·x computed at run time may differ
// in the last bit from the compiler's exact constant.
func near(a, b float64) bool { return math.Abs(a-b) <= 1e-15*math.Abs(b) }

func TestPresetDetuningAndSpin(t *testing.T) {
	src := strings.Replace(minimalSpec, "scheme: {preset: tripod}\n", `scheme:
  preset: tripod
  detuning: {e: "15 MHz"}
  decay: {e: "2 MHz", a: "1 kHz"}
`, 1)
	s := mustParse(t, src, "p.yaml")
	if !near(s.Scheme.Levels[3].Detuning, 2*math.Pi*15e6) || !near(s.Scheme.Levels[3].Decay, 2*math.Pi*2e6) || !near(s.Scheme.Levels[2].Decay, 2*math.Pi*1e3) {
		t.Errorf("levels %+v", s.Scheme.Levels)
	}
	for _, c := range []struct {
		spin string
		n    int
	}{{`"1/2"`, 2}, {"1", 3}, {`"3/2"`, 4}, {"2.5", 6}, {`"15/2"`, 16}} {
		src := strings.Replace(minimalSpec, "scheme: {preset: tripod}\n", "scheme: {preset: spin, spin: "+c.spin+"}\n", 1)
		src = strings.Replace(src, "{gate: T}", "{gate: S}", 1)
		s := mustParse(t, src, "spin.yaml")
		if len(s.Scheme.Levels) != c.n || len(s.Scheme.Channels) != c.n-1 || s.Preset != "spin" {
			t.Errorf("spin %s: %d levels", c.spin, len(s.Scheme.Levels))
		}
		if s.Sweeps.DetuningKind != TwoPhoton || s.Search.Robust.DetuningKind != TwoPhoton {
			t.Errorf("spin %s: detuning kind defaults to %v; no excited level", c.spin, s.Sweeps.DetuningKind)
		}
	}
	for _, bad := range []string{`"8"`, "0", `"1/3"`, "0.3"} {
		src := strings.Replace(minimalSpec, "scheme: {preset: tripod}\n", "scheme: {preset: spin, spin: "+bad+"}\n", 1)
		if _, err := ParseSpec([]byte(src), "spin.yaml"); err == nil || !strings.Contains(err.Error(), "scheme.spin") {
			t.Errorf("spin %s: %v", bad, err)
		}
	}
}

// Dark subspaces at equal drive, against closed forms. For a tripod with
// factors f_k the bright state is ∝ Σ f_k|g_k⟩ and the two dark states span
// the rest of the ground space (Duan, Cirac and Zoller, Science 292, 1695
// (2001)); the dark subspace's weight on the qubit is therefore
// Tr(P_dark P_qubit) = 2 − (f0² + f1²)/(f0² + f1² + fa²). A Λ system has a
// single dark state (Sjöqvist et al., New J. Phys. 14, 103035 (2012)).
func TestDarkSubspace(t *testing.T) {
	for _, f := range [][3]float64{{1, 1, 1}, {1, 1, 0.7}, {0.3, 2, 1.5}} {
		sc := holonomy.Tripod()
		for i := range sc.Channels {
			sc.Channels[i].Factor = f[i]
		}
		sc.Levels[3].Detuning = 2 * math.Pi * 7e6 // a one-photon detuning keeps the dark states
		dim, w, _, err := darkSubspace(sc, 2*math.Pi*20e6)
		if err != nil {
			t.Fatal(err)
		}
		f2 := f[0]*f[0] + f[1]*f[1]
		want := 2 - f2/(f2+f[2]*f[2])
		if dim != 2 || math.Abs(w-want) > 1e-12 {
			t.Errorf("tripod %v: dark dimension %d weight %.15f, want 2 and %.15f", f, dim, w, want)
		}
	}
	dim, w, _, err := darkSubspace(holonomy.Lambda(), 2*math.Pi*20e6)
	if err != nil || dim != 1 || math.Abs(w-1) > 1e-12 {
		t.Errorf("lambda: dimension %d weight %v err %v; want 1, 1", dim, w, err)
	}
	// A two-photon detuning on g1 splits the pair.
	sc := holonomy.Tripod()
	sc.Levels[1].Detuning = 2 * math.Pi * 1e3
	if _, _, _, err := darkSubspace(sc, 2*math.Pi*20e6); err == nil || !strings.Contains(err.Error(), "different static detunings (1 kHz apart)") {
		t.Errorf("detuned qubit: %v", err)
	}
}

func TestStarterSpecs(t *testing.T) {
	presets := StarterPresets()
	if !reflect.DeepEqual(presets, []string{"tripod", "lambda", "spin-1/2", "custom"}) {
		t.Errorf("presets %v", presets)
	}
	for _, p := range presets {
		b, err := StarterSpec(p)
		if err != nil {
			t.Fatal(err)
		}
		s, err := ParseSpec(b, p+".yaml")
		if err != nil {
			t.Errorf("starter %s does not validate: %v", p, err)
			continue
		}
		if !bytes.Contains(b, []byte("# ")) || !bytes.Contains(b, []byte("safety")) {
			t.Errorf("starter %s lacks comments or the caution", p)
		}
		switch p {
		case "custom":
			if s.Preset != "" || s.Hardware.MaxRabi[2] != 14e6 || s.Scheme.Channels[2].Factor != 0.7 || s.Search.Family != Fourier || s.Errors.Amplitude[2] != -0.01 {
				t.Errorf("custom starter decoded as %+v", s)
			}
		default:
			if s.Preset != p {
				t.Errorf("starter %s has preset %q", p, s.Preset)
			}
		}
	}
	if _, err := StarterSpec("pentapod"); err == nil || !strings.Contains(err.Error(), "tripod, lambda, spin-1/2, custom") {
		t.Errorf("unknown preset: %v", err)
	}
}

// Validate re-checks a Spec changed after parsing, e.g. by flags.
func TestValidateAfterChange(t *testing.T) {
	s := mustParse(t, minimalSpec, "min.yaml")
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	s.Search.Restarts = MaxRestarts + 1
	s.Hardware.MaxSamples = MaxSampleCount
	s.Hardware.MaxRabi[1] = math.NaN()
	s.Target.U = holonomy.NewMatFrom(2, 2, []complex128{1, 1, 0, 1})
	err := s.Validate()
	var se *SpecError
	if !errors.As(err, &se) {
		t.Fatalf("Validate: %v", err)
	}
	msg := err.Error()
	for _, f := range []string{
		"spec min.yaml: search.restarts: the number of restarts must be from 1 to 256; found 257",
		"spec min.yaml: hardware.max_rabi.p1: must be positive; found NaN",
		"spec min.yaml: hardware.max_samples: 16777216 samples × 3 channels would need about 3 GiB",
		"spec min.yaml: target.unitary: not unitary",
	} {
		if !strings.Contains(msg, f) {
			t.Errorf("Validate message\n%s\nlacks %q", msg, f)
		}
	}
	if len(se.Problems) != 4 {
		t.Errorf("%d problems, want 4:\n%s", len(se.Problems), msg)
	}
	// A zero Spec is refused, without panicking.
	if err := (&Spec{}).Validate(); err == nil {
		t.Error("zero Spec accepted")
	}
}

func TestCheckSampleMemory(t *testing.T) {
	if err := CheckSampleMemory(65536, 3); err != nil {
		t.Error(err)
	}
	limit := MaxWaveformBytes / BytesPerSample // samples × channels at the bound
	if err := CheckSampleMemory(limit/4, 4); err != nil {
		t.Errorf("exactly at the bound: %v", err)
	}
	if err := CheckSampleMemory(limit/4+1, 4); err == nil {
		t.Error("one sample over the memory bound accepted")
	}
	if err := CheckSampleMemory(MaxSampleCount+1, 1); err == nil {
		t.Error("sample count over the bound accepted")
	}
	if err := CheckSampleMemory(-1, 1); err == nil {
		t.Error("negative size accepted")
	}
}

// A per-channel problem written once for all channels is reported once,
// at the line where it was written.
func TestProblemDedupAndOrder(t *testing.T) {
	src := strings.Replace(minimalSpec, `max_rabi: "10 MHz"`, `max_rabi: "-10 MHz"`, 1)
	src = strings.Replace(src, `full_scale: "10 MHz"`, `full_scale: "0 MHz"`, 1)
	_, err := ParseSpec([]byte(src), "d.yaml")
	var se *SpecError
	if !errors.As(err, &se) {
		t.Fatal(err)
	}
	want := []Problem{
		{Path: "hardware.max_rabi", Line: 6, Col: 13, Msg: "must be positive; found -10 MHz"},
		{Path: "hardware.full_scale", Line: 11, Col: 15, Msg: "must be positive; found 0 Hz"},
	}
	if !reflect.DeepEqual(se.Problems, want) {
		t.Errorf("problems\n%+v\nwant\n%+v", se.Problems, want)
	}
}

// The schema is complete in the ways the brief asks: every property has a
// description, every object forbids unknown keys (or maps names to a
// typed value), every pattern is a known one, and its bounds equal the
// Go constants.
func TestSchemaConsistency(t *testing.T) {
	var doc map[string]any
	if err := json.Unmarshal(schemas.Spec, &doc); err != nil {
		t.Fatal(err)
	}
	if doc["$schema"] != "http://json-schema.org/draft-07/schema#" {
		t.Errorf("$schema = %v", doc["$schema"])
	}
	known := map[string]bool{namePattern: true, "^[+-]?[xyz]$": true, "^ *[0-9]+(?: */ *2)? *$": true}
	for p := range dimByPattern {
		known[p] = true
	}
	var walk func(path string, s map[string]any)
	walk = func(path string, s map[string]any) {
		if _, ok := s["$ref"]; !ok {
			if d, _ := s["description"].(string); d == "" && path != "" {
				t.Errorf("%s: no description", path)
			}
		} else if d, _ := s["description"].(string); d == "" {
			t.Errorf("%s: no description beside $ref", path)
		}
		if p, ok := s["pattern"].(string); ok && !known[p] {
			t.Errorf("%s: unknown pattern %s", path, p)
		}
		if hasType(s, "object") {
			ap, ok := s["additionalProperties"]
			if !ok || (ap != false && !isMap(ap)) {
				t.Errorf("%s: object without additionalProperties false", path)
			}
		}
		if props, ok := s["properties"].(map[string]any); ok {
			for k, v := range props {
				walk(path+"."+k, v.(map[string]any))
			}
		}
		for _, k := range []string{"items", "additionalProperties"} {
			if m, ok := s[k].(map[string]any); ok {
				walk(path+"."+k, m)
			}
		}
		if defs, ok := s["definitions"].(map[string]any); ok {
			for k, v := range defs {
				walk("#"+k, v.(map[string]any))
			}
		}
	}
	walk("", doc)

	_, sdoc := specSchema()
	bound := func(segs []string, key string, want float64) {
		t.Helper()
		s := schemaAt(sdoc, strings.Join(append([]string{"(root)"}, segs...), segSep))
		if got, _ := s[key].(float64); got != want {
			t.Errorf("schema %v %s = %v, Go constant %v", segs, key, s[key], want)
		}
	}
	bound([]string{"hardware", "max_samples"}, "maximum", MaxSampleCount)
	bound([]string{"hardware", "granularity"}, "maximum", MaxGranularity)
	bound([]string{"search", "harmonics"}, "maximum", MaxHarmonics)
	bound([]string{"search", "vertices"}, "minimum", MinVertices)
	bound([]string{"search", "vertices"}, "maximum", MaxVertices)
	bound([]string{"search", "restarts"}, "maximum", MaxRestarts)
	bound([]string{"search", "evaluations"}, "maximum", MaxEvaluations)
	bound([]string{"search", "loop_points"}, "minimum", MinLoopPoints)
	bound([]string{"search", "loop_points"}, "maximum", MaxLoopPoints)
	bound([]string{"search", "seed"}, "maximum", MaxSeed)
	bound([]string{"sweeps", "amplitude", "points"}, "maximum", MaxSweepPoints)
	bound([]string{"sweeps", "detuning", "points"}, "maximum", MaxSweepPoints)
	bound([]string{"sweeps", "map", "amplitude_points"}, "maximum", MaxMapPoints)
	bound([]string{"sweeps", "map", "detuning_points"}, "maximum", MaxMapPoints)
	bound([]string{"scheme", "levels"}, "maxItems", holonomy.MaxLevels)
	bound([]string{"scheme", "channels"}, "maxItems", MaxChannels)
	if !strings.Contains(string(schemas.Spec), "1e-9") {
		t.Error("schema does not state the unitarity tolerance")
	}
	if UnitarityTol != 1e-9 {
		t.Error("UnitarityTol changed; update the schema's description")
	}
}

func hasType(s map[string]any, t string) bool {
	switch v := s["type"].(type) {
	case string:
		return v == t
	case []any:
		for _, x := range v {
			if x == t {
				return true
			}
		}
	}
	return false
}

func isMap(v any) bool { _, ok := v.(map[string]any); return ok }

// Parsing is deterministic: the same bytes give equal Specs and equal
// error texts.
func TestParseDeterministic(t *testing.T) {
	a, _ := ParseSpec(DemoSpec(), "x")
	b, _ := ParseSpec(DemoSpec(), "x")
	if !reflect.DeepEqual(a, b) {
		t.Error("two parses differ")
	}
	bad := mustRead(t, filepath.Join("..", "..", "testdata", "bad", "unknown-key.yaml"))
	_, e1 := ParseSpec(bad, "x")
	for range 20 {
		if _, e2 := ParseSpec(bad, "x"); e2.Error() != e1.Error() {
			t.Fatalf("error text varies:\n%v\n%v", e1, e2)
		}
	}
}

func TestSearchErrorsSweepsSections(t *testing.T) {
	src := minimalSpec + `search:
  family: polygon
  vertices: 5
  restarts: 3
  seed: 9007199254740991
  target_infidelity: "2 ppm"
  evaluations: 1000
  loop_points: 512
  robust: {amplitude: "3 %", detuning: "150 kHz", detuning_kind: two-photon}
errors:
  amplitude: {p0: 0.02, pa: "-1 %"}
  two_photon_detuning: "-3 kHz"
  dephasing: "1e3 /s"
  filter: first-order
  rise_time: "1.5 ns"
  quantise: false
  phase_step: "0.5 deg"
sweeps:
  amplitude: {span: "5 %", points: 21}
  detuning: {span: "500 kHz", points: 11, kind: two-photon}
  map: {amplitude_points: 7, detuning_points: 9}
`
	s := mustParse(t, src, "sections.yaml")
	r := s.Search
	if r.Family != Polygon || r.Vertices != 5 || r.Restarts != 3 || r.Seed != MaxSeed || !near(r.TargetInfidelity, 2e-6) ||
		r.Evaluations != 1000 || r.LoopPoints != 512 {
		t.Errorf("search %+v", r)
	}
	if !r.Robust.Enabled() || r.Robust != (Ensemble{Amplitude: 0.03, Detuning: 150e3, DetuningKind: TwoPhoton}) {
		t.Errorf("robust %+v", r.Robust)
	}
	e := s.Errors
	if !reflect.DeepEqual(e.Amplitude, []float64{0.02, 0, -0.01}) || e.TwoPhoton != -3e3 || e.Dephasing != 1e3 ||
		e.Filter != FirstOrderFilter || e.RiseTime != 1.5e-9 || e.Quantise || !near(e.PhaseStep, math.Pi/360) {
		t.Errorf("errors %+v", e)
	}
	w := s.Sweeps
	if w.Amplitude != (Sweep{0.05, 21}) || w.Detuning != (Sweep{5e5, 11}) || w.DetuningKind != TwoPhoton || w.MapAmplitude != 7 || w.MapDetuning != 9 {
		t.Errorf("sweeps %+v", w)
	}
	for _, c := range []struct{ v, want string }{
		{s.Method.String(), "adiabatic"}, {Nonadiabatic.String(), "nonadiabatic"}, {Method(0).String(), "Method(0)"},
		{r.Family.String(), "polygon"}, {Fourier.String(), "fourier"}, {LoopFamily(9).String(), "LoopFamily(9)"},
		{OnePhoton.String(), "one-photon"}, {TwoPhoton.String(), "two-photon"}, {DetuningKind(0).String(), "DetuningKind(0)"},
		{NoFilter.String(), "none"}, {GaussianFilter.String(), "gaussian"}, {e.Filter.String(), "first-order"}, {Filter(7).String(), "Filter(7)"},
	} {
		if c.v != c.want {
			t.Errorf("String() = %q, want %q", c.v, c.want)
		}
	}
	// Settings of the other loop family are refused, not ignored.
	bad := strings.Replace(src, "  vertices: 5\n", "  vertices: 5\n  harmonics: 4\n", 1)
	if _, err := ParseSpec([]byte(bad), "b.yaml"); err == nil || !strings.Contains(err.Error(), "search.harmonics (line 17, col 14): only used with family: fourier") {
		t.Errorf("harmonics with polygon: %v", err)
	}
	bad = strings.Replace(minimalSpec, "scheme: {preset: tripod}", "scheme: {preset: spin-1/2}", 1) + "errors: {one_photon_detuning: \"1 kHz\"}\n"
	bad = strings.Replace(bad, "{gate: T}", "{gate: Z}", 1)
	if _, err := ParseSpec([]byte(bad), "b.yaml"); err == nil || !strings.Contains(err.Error(), "errors.one_photon_detuning (line 14, col 31): one-photon detuning needs an excited level") {
		t.Errorf("one-photon on spin-1/2: %v", err)
	}
}
