package spec

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// badCases maps every file in ../testdata/bad to the field its first
// problem names ("" for the whole file), the number of problems, and
// fragments the message must contain.
var badCases = []struct {
	file  string
	path  string
	count int
	frag  []string
}{
	// YAML and file level.
	{"malformed-yaml.yaml", "", 1, []string{"line 3: malformed YAML", "did not find expected"}},
	{"tab-indent.yaml", "", 1, []string{"line 4: malformed YAML"}},
	{"empty.yaml", "", 1, []string{"file is empty"}},
	{"comments-only.yaml", "", 1, []string{"no YAML content"}},
	{"is-a-directory.yaml", "", 0, []string{"is a directory; expected a YAML spec file"}},
	{"two-documents.yaml", "", 1, []string{"line 23, col 1", "second YAML document"}},
	{"duplicate-key.yaml", "search.seed", 1, []string{"(line 23, col 3)", `key "seed" appears twice (first at line 22)`}},
	{"yaml-tag.yaml", "target.gate", 1, []string{"YAML tag !custom is not supported"}},
	{"alias-bomb.yaml", "", 1, []string{"more than 20000 YAML nodes"}},
	{"not-a-mapping.yaml", "", 1, []string{"expected a mapping; found a list of 2 items"}},
	// Schema: unknown keys, missing fields, wrong types, bounds.
	{"unknown-key.yaml", "hardware.sample_rate", 2, []string{
		"hardware.sample_rate (line 11, col 3): missing; expected: AWG sample rate",
		`hardware.sample_rat (line 13, col 3): unknown key "sample_rat" (did you mean "sample_rate"?); accepted keys here: dac_bits,`}},
	{"unknown-section.yaml", "verification", 1, []string{`unknown key "verification"; accepted keys here: errors, hardware,`}},
	{"missing-field.yaml", "hardware.max_slew", 1, []string{"hardware.max_slew (line 11, col 3): missing; expected: Largest rate of change"}},
	{"missing-section.yaml", "target", 1, []string{": target: missing; expected: The gate to make"}},
	{"wrong-type.yaml", "hardware.granularity", 1, []string{`expected a whole number; found the text "sixteen"`}},
	{"wrong-type-quantity.yaml", "hardware.max_rabi", 1, []string{`expected a frequency written as a string with its unit, e.g. "5 MHz"; found the number 20000000`}},
	{"wrong-type-list.yaml", "target.gate", 1, []string{"expected a text string; found a list of 2 items"}},
	{"bad-spec-version.yaml", "spec_version", 1, []string{"the number 2 is not accepted; expected one of: 1"}},
	{"bad-method.yaml", "method", 1, []string{`the text "fast" is not accepted; expected one of: adiabatic, nonadiabatic`}},
	{"bad-name.yaml", "scheme.levels[2].name", 1, []string{`"a b" is not a valid name`}},
	{"zero-restarts.yaml", "search.restarts", 1, []string{"the number 0 is too small; the least accepted value is 1"}},
	{"too-many-restarts.yaml", "search.restarts", 1, []string{"too large; the largest accepted value is 256"}},
	{"too-many-samples.yaml", "hardware.max_samples", 1, []string{"the number 100000000 is too large; the largest accepted value is 16777216"}},
	{"too-many-levels.yaml", "scheme.levels", 1, []string{"a list of 17 items is too long; expected at most 16"}},
	{"map-too-large.yaml", "sweeps.map.amplitude_points", 1, []string{"largest accepted value is 201"}},
	{"two-targets.yaml", "target", 1, []string{"give exactly one of: gate, rotation, unitary"}},
	// Non-finite, negative and zero values.
	{"nan.yaml", "search.target_infidelity", 1, []string{"(line 23, col 22): .nan is not a finite number"}},
	{"inf.yaml", "errors.amplitude", 1, []string{".inf is not a finite number"}},
	{"negative-rabi.yaml", "hardware.max_rabi", 1, []string{"hardware.max_rabi (line 11, col 13): must be positive; found -20 MHz"}},
	{"zero-sample-rate.yaml", "hardware.sample_rate", 1, []string{"must be positive; found 0 S/s"}},
	{"zero-duration.yaml", "hardware.min_duration", 1, []string{"must be positive; found 0 s"}},
	{"negative-decay.yaml", "scheme.decay.e", 1, []string{"decay rate must be zero or positive", "Γ/2π = -4 MHz"}},
	// Units.
	{"unit-wrong-for-field.yaml", "hardware.sample_rate", 1, []string{
		`hardware.sample_rate (line 13, col 16): "1.2 GHz" is not a sample rate (GHz is a unit of frequency); accepted units: S/s, kS/s, MS/s, GS/s`}},
	{"unit-unparseable.yaml", "hardware.min_duration", 1, []string{`"soon" is not a time (expected a number and a unit`, "accepted units: s, ms, us"}},
	{"unit-wrong-dimension.yaml", "hardware.max_duration", 1, []string{`"5 MHz" is not a time (MHz is a unit of frequency)`}},
	{"unit-misspelt.yaml", "hardware.max_rabi", 1, []string{`unknown unit "Mhz"; did you mean MHz?`}},
	{"unit-missing.yaml", "hardware.full_scale", 1, []string{`"25" is not a frequency (it has no unit); accepted units: Hz, kHz, MHz, GHz`}},
	// Target.
	{"non-unitary.yaml", "target.unitary", 1, []string{"not unitary: ‖U†U − I‖ = 1.73", "exceeds the tolerance 1e-09"}},
	{"non-unitary-digits.yaml", "target.unitary", 1, []string{"not unitary", "tolerance 1e-09", "at least 10 significant digits"}},
	{"bad-complex.yaml", "target.unitary[1][1]", 1, []string{`"one" is not a complex number`}},
	{"unknown-gate.yaml", "target.gate", 1, []string{`unknown gate "CNOT"; named gates are I, X, Y, Z, H,`}},
	{"zero-axis.yaml", "target.rotation.axis", 1, []string{"has no direction"}},
	// Level scheme.
	{"channel-unknown-level.yaml", "scheme.channels[2].upper", 1, []string{`channel "pa" names level "ex", which does not exist; levels are g0, g1, a, e`}},
	{"self-coupling.yaml", "scheme.channels[2].upper", 1, []string{`channel "pa" couples level "e" to itself`}},
	{"duplicate-level.yaml", "scheme.levels[2].name", 2, []string{`level name "g1" is used twice`}},
	{"qubit-not-in-scheme.yaml", "scheme.qubit[1]", 1, []string{`no level "g2" in the scheme; its levels are g0, g1, a, e`}},
	{"qubit-uncoupled.yaml", "scheme.qubit", 1, []string{`qubit level "g1" is not coupled by any channel`}},
	{"no-dark-subspace.yaml", "scheme", 1, []string{"no degenerate working subspace for the adiabatic method", "1 dark state(s)", "use method: nonadiabatic"}},
	{"no-dark-subspace-graph.yaml", "scheme", 1, []string{"no degenerate working subspace for the adiabatic method", "1 dark state(s)"}},
	{"no-lambda-for-nonadiabatic.yaml", "scheme", 1, []string{"no working subspace for the nonadiabatic method", "coupled by a channel to both qubit levels"}},
	{"preset-and-graph.yaml", "scheme", 1, []string{"give either preset or levels and channels, not both"}},
	{"spin-missing.yaml", "scheme.spin", 1, []string{"missing; the spin preset needs the spin s"}},
	// Hardware and resources.
	{"sample-memory.yaml", "hardware.max_samples", 1, []string{"16777216 samples × 3 channels would need about 3 GiB of memory, more than the bound 1 GiB"}},
	{"full-scale-below-max.yaml", "hardware.full_scale.p1", 1, []string{"the DAC full scale 15 MHz is below max_rabi 20 MHz"}},
	{"missing-channel-value.yaml", "hardware.full_scale", 1, []string{`no value for channel "pa"`}},
	{"unknown-channel.yaml", "hardware.full_scale.p3", 1, []string{`no channel "p3" in the scheme; its channels are p0, p1, pa`}},
	{"min-over-max-duration.yaml", "hardware.min_duration", 1, []string{"10 µs is longer than max_duration 5 µs"}},
	{"min-duration-too-many-samples.yaml", "hardware.min_duration", 1, []string{"needs 2000 samples, more than max_samples 1024"}},
	{"too-many-evaluations.yaml", "search.evaluations", 1, []string{"restarts × evaluations = 256 × 200000 = 51200000 is more than the bound 2000000"}},
	// Error models.
	{"rise-time-without-filter.yaml", "errors.rise_time", 1, []string{"a rise time is given but no filter"}},
	{"filter-without-rise-time.yaml", "errors.rise_time", 1, []string{"the gaussian filter needs a positive rise time"}},
}

func TestBadInput(t *testing.T) {
	listed := map[string]bool{}
	for _, c := range badCases {
		listed[c.file] = true
		t.Run(c.file, func(t *testing.T) {
			path := filepath.Join("..", "..", "testdata", "bad", c.file)
			s, err := LoadSpec(path)
			if err == nil {
				t.Fatalf("accepted: %+v", s)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "spec "+path+": ") {
				t.Errorf("message does not start by naming the file: %q", msg)
			}
			for _, f := range c.frag {
				if !strings.Contains(msg, f) {
					t.Errorf("message\n\t%s\ndoes not contain\n\t%s", msg, f)
				}
			}
			var se *SpecError
			if !errors.As(err, &se) {
				if c.count != 0 {
					t.Fatalf("error is %T, not *SpecError", err)
				}
				return
			}
			if len(se.Problems) != c.count {
				t.Errorf("%d problems, want %d:\n%s", len(se.Problems), c.count, msg)
			}
			if p := se.Problems[0]; p.Path != c.path {
				t.Errorf("first problem names field %q, want %q", p.Path, c.path)
			} else if c.path != "" && c.path != "target" && p.Line == 0 {
				t.Errorf("first problem has no line: %+v", p)
			}
		})
	}
	// Every file in testdata/bad is a tested case (other readers' cases
	// use other extensions).
	entries, err := os.ReadDir(filepath.Join("..", "..", "testdata", "bad"))
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".yaml") && !listed[e.Name()] {
			t.Errorf("testdata/bad/%s has no entry in badCases", e.Name())
		}
	}
}

// A file over MaxSpecBytes is refused before parsing, and a missing file
// names the file.
func TestLoadSpecLimits(t *testing.T) {
	dir := t.TempDir()
	big := filepath.Join(dir, "big.yaml")
	data := []byte("# " + strings.Repeat("x", MaxSpecBytes) + "\n")
	if err := os.WriteFile(big, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadSpec(big); err == nil || !strings.Contains(err.Error(), "larger than 1048576 bytes") {
		t.Errorf("big file: %v", err)
	}
	if _, err := ParseSpec(data, "big.yaml"); err == nil || !strings.Contains(err.Error(), "larger than") {
		t.Errorf("big data: %v", err)
	}
	missing := filepath.Join(dir, "nope.yaml")
	_, err := LoadSpec(missing)
	if err == nil || !strings.Contains(err.Error(), "spec "+missing+": ") || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}
