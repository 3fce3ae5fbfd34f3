package spec

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/schemas"
)

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
