package spec

import (
	"encoding/json"
	"fmt"
	"math"
	"math/big"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/xeipuuv/gojsonschema"

	"github.com/loopgate/loopgate/schemas"
)

var specSchema = sync.OnceValues(func() (*gojsonschema.Schema, map[string]any) {
	s, err := gojsonschema.NewSchema(gojsonschema.NewBytesLoader(schemas.Spec))
	if err != nil {
		panic("design: the embedded spec schema does not compile: " + err.Error())
	}
	var doc map[string]any
	if err := json.Unmarshal(schemas.Spec, &doc); err != nil {
		panic("design: the embedded spec schema is not JSON: " + err.Error())
	}
	return s, doc
})

// namePattern is the schema pattern of level and channel names.
const namePattern = `^[A-Za-z0-9_+=/-]{1,24}$`

var dimByPattern = func() map[string]Dimension {
	m := map[string]Dimension{}
	for _, d := range []Dimension{Frequency, Rate, Time, SampleRate, SlewRate, Bits, Angle, Number} {
		m[d.Pattern()] = d
	}
	return m
}()

// validateSchema checks doc against schemas.Spec and returns the problems
// in plain words, located in the YAML file.
func validateSchema(doc any, idx *index) []Problem {
	s, sdoc := specSchema()
	res, err := s.Validate(gojsonschema.NewGoLoader(doc))
	if err != nil {
		return []Problem{{Msg: "cannot check the spec against its schema: " + err.Error()}}
	}
	if res.Valid() {
		return nil
	}
	var probs []Problem
	errs := res.Errors()
	for _, re := range errs {
		t := re.Type()
		segs := re.Context().String(segSep)
		if t == "number_one_of" || t == "number_any_of" {
			if hasDeeper(errs, segs) {
				continue
			}
		}
		probs = append(probs, schemaProblem(re, segs, idx, sdoc))
	}
	return probs
}

func hasDeeper(errs []gojsonschema.ResultError, segs string) bool {
	for _, e := range errs {
		t := e.Type()
		if t == "number_one_of" || t == "number_any_of" {
			continue
		}
		if c := e.Context().String(segSep); c == segs || strings.HasPrefix(c, segs+segSep) {
			return true
		}
	}
	return false
}

func schemaProblem(re gojsonschema.ResultError, segs string, idx *index, sdoc map[string]any) Problem {
	p := idx.bySegs[segs]
	prob := Problem{Path: p.path, Line: p.line, Col: p.col}
	sub := schemaAt(sdoc, segs)
	det := re.Details()
	switch re.Type() {
	case "additional_property_not_allowed":
		key := fmt.Sprint(det["property"])
		kp := idx.bySegs[segs+segSep+key]
		prob.Path, prob.Line, prob.Col = childPath(p.path, key), kp.keyLine, kp.keyCol
		keys := propertyNames(sub)
		prob.Msg = fmt.Sprintf("unknown key %q", key)
		if g := closest(key, keys); g != "" {
			prob.Msg += fmt.Sprintf(" (did you mean %q?)", g)
		}
		if len(keys) > 0 {
			prob.Msg += "; accepted keys here: " + strings.Join(keys, ", ")
		}
	case "required":
		key := fmt.Sprint(det["property"])
		prob.Path = childPath(p.path, key)
		if p.path == "" {
			prob.Line, prob.Col = 0, 0
		}
		prob.Msg = "missing"
		if d := describe(schemaChild(sdoc, sub, key)); d != "" {
			prob.Msg += "; expected: " + d
		}
	case "invalid_type":
		prob.Msg = fmt.Sprintf("expected %s; found %s", expectedType(sub), describeValue(re.Value()))
		if d := quantityDim(sub); d != 0 {
			prob.Msg = fmt.Sprintf("expected %s written as a string with its unit, e.g. %q; found %s", dims[d].noun, dims[d].example, describeValue(re.Value()))
		}
	case "pattern":
		v := fmt.Sprint(re.Value())
		pat := fmt.Sprint(det["pattern"])
		if d, ok := dimByPattern[pat]; ok {
			if _, err := ParseQuantity(v, d); err != nil {
				prob.Msg = err.Error()
				break
			}
		}
		switch pat {
		case namePattern:
			prob.Msg = fmt.Sprintf("%q is not a valid name; use 1 to 24 letters, digits or the characters _ + = / -", v)
		default:
			prob.Msg = fmt.Sprintf("%q is not accepted here; expected: %s", v, describe(sub))
		}
	case "enum":
		prob.Msg = fmt.Sprintf("%s is not accepted; expected one of: %s", describeValue(re.Value()), enumList(sub))
	case "number_gte", "number_gt":
		prob.Msg = fmt.Sprintf("%s is too small; the least accepted value is %s", describeValue(re.Value()), fmtNum(det["min"]))
	case "number_lte", "number_lt":
		prob.Msg = fmt.Sprintf("%s is too large; the largest accepted value is %s (a documented bound)", describeValue(re.Value()), fmtNum(det["max"]))
	case "array_min_items":
		prob.Msg = fmt.Sprintf("a list of %d items is too short; expected at least %v", listLen(re.Value()), det["min"])
	case "array_max_items":
		prob.Msg = fmt.Sprintf("a list of %d items is too long; expected at most %v", listLen(re.Value()), det["max"])
	case "array_min_properties", "array_max_properties":
		if keys := propertyNames(sub); len(keys) > 0 && sub["maxProperties"] == 1.0 {
			prob.Msg = fmt.Sprintf("give exactly one of: %s", strings.Join(keys, ", "))
		} else {
			prob.Msg = "an empty mapping; expected at least one entry"
		}
	case "string_lte":
		prob.Msg = fmt.Sprintf("the text is too long; at most %v characters", det["max"])
	default:
		prob.Msg = re.Description()
		if d := describe(sub); d != "" {
			prob.Msg += "; expected: " + d
		}
	}
	return prob
}

// schemaAt walks the schema document along gojsonschema context segments.
func schemaAt(sdoc map[string]any, segs string) map[string]any {
	parts := strings.Split(segs, segSep)
	cur := resolve(sdoc, sdoc)
	for _, seg := range parts[1:] {
		if cur == nil {
			return nil
		}
		cur = schemaChild(sdoc, cur, seg)
	}
	return cur
}

// schemaChild returns the subschema that applies to member key (or array
// index) of a value described by s.
func schemaChild(sdoc, s map[string]any, key string) map[string]any {
	if s == nil {
		return nil
	}
	if props, ok := s["properties"].(map[string]any); ok {
		if c, ok := props[key].(map[string]any); ok {
			return resolve(sdoc, c)
		}
	}
	if ap, ok := s["additionalProperties"].(map[string]any); ok {
		return resolve(sdoc, ap)
	}
	if it, ok := s["items"].(map[string]any); ok {
		return resolve(sdoc, it)
	}
	return nil
}

// resolve follows a local "$ref" ("#/definitions/x"), keeping the
// referring schema's description when it has one.
func resolve(sdoc, s map[string]any) map[string]any {
	ref, ok := s["$ref"].(string)
	if !ok {
		return s
	}
	name := strings.TrimPrefix(ref, "#/definitions/")
	defs, _ := sdoc["definitions"].(map[string]any)
	d, _ := defs[name].(map[string]any)
	if d == nil {
		return nil
	}
	out := make(map[string]any, len(d)+1)
	for k, v := range d {
		out[k] = v
	}
	if desc, ok := s["description"]; ok {
		out["description"] = desc
	}
	return out
}

func propertyNames(s map[string]any) []string {
	props, _ := s["properties"].(map[string]any)
	keys := make([]string, 0, len(props))
	for k := range props {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

func describe(s map[string]any) string {
	d, _ := s["description"].(string)
	return d
}

func quantityDim(s map[string]any) Dimension {
	if s == nil {
		return 0
	}
	pat, _ := s["pattern"].(string)
	d := dimByPattern[pat]
	if d == Bits || d == Number {
		return 0 // a bare number is fine for these
	}
	return d
}

func enumList(s map[string]any) string {
	vals, _ := s["enum"].([]any)
	out := make([]string, len(vals))
	for i, v := range vals {
		out[i] = fmt.Sprint(v)
	}
	return strings.Join(out, ", ")
}

func expectedType(s map[string]any) string {
	var ts []string
	switch t := s["type"].(type) {
	case string:
		ts = []string{t}
	case []any:
		for _, x := range t {
			ts = append(ts, fmt.Sprint(x))
		}
	}
	words := map[string]string{
		"object": "a mapping", "array": "a list", "string": "a text string",
		"integer": "a whole number", "number": "a number", "boolean": "true or false", "null": "nothing",
	}
	out := make([]string, len(ts))
	for i, t := range ts {
		out[i] = words[t]
	}
	if len(out) == 0 {
		return "a different value"
	}
	return strings.Join(out, " or ")
}

func describeValue(v any) string {
	switch x := v.(type) {
	case nil:
		return "an empty value"
	case bool:
		return fmt.Sprintf("the boolean %v", x)
	case json.Number, float64, int64, uint64, int:
		return fmt.Sprintf("the number %v", x)
	case string:
		if len(x) > 40 {
			x = x[:40] + "…"
		}
		return fmt.Sprintf("the text %q", x)
	case map[string]any:
		return "a mapping"
	case []any:
		return fmt.Sprintf("a list of %d items", len(x))
	}
	return fmt.Sprintf("%v", v)
}

// fmtNum writes a schema bound without exponent when it is a whole number.
func fmtNum(v any) string {
	if b, ok := v.(*big.Float); ok && b != nil {
		v, _ = b.Float64()
	}
	if f, ok := toFloat(v); ok {
		if f == math.Trunc(f) && math.Abs(f) < 1<<53 {
			return strconv.FormatFloat(f, 'f', -1, 64)
		}
		return strconv.FormatFloat(f, 'g', -1, 64)
	}
	return fmt.Sprint(v)
}

func listLen(v any) int {
	if s, ok := v.([]any); ok {
		return len(s)
	}
	return 0
}

// closest returns the candidate within edit distance 2 of key, if one.
func closest(key string, cands []string) string {
	best, bd := "", 3
	for _, c := range cands {
		if d := editDistance(strings.ToLower(key), c); d < bd {
			best, bd = c, d
		}
	}
	return best
}

func editDistance(a, b string) int {
	if len(a) > 64 || len(b) > 64 {
		return 99
	}
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
