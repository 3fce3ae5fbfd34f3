package spec

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

// Defaults of optional spec fields.
const (
	defaultHarmonics        = 3
	defaultVertices         = 6
	defaultRestarts         = 8
	defaultSeed             = 1
	defaultTargetInfidelity = 1e-6
	defaultEvaluations      = 20000
	defaultLoopPoints       = 4096
	defaultSweepPoints      = 41
	defaultAmplitudeSpan    = 0.1
	defaultMapPoints        = 41
	// defaultDetuningSpanFraction × the smallest max_rabi is the default
	// half-width of the detuning sweep.
	defaultDetuningSpanFraction = 0.1
)

// decoder turns schema-valid spec data into a Spec, collecting problems.
// It never panics on unexpected shapes: the schema should exclude them,
// but a mismatch between schema and decoder must still be an error value.
type decoder struct {
	idx   *index
	probs []Problem
}

func (d *decoder) bad(path, format string, args ...any) {
	d.probs = append(d.probs, Problem{Path: path, Msg: fmt.Sprintf(format, args...)})
}

func mapAt(m map[string]any, key string) map[string]any {
	v, _ := m[key].(map[string]any)
	return v
}

// integer reads a whole number at m[key]; ok is false when absent.
func (d *decoder) integer(m map[string]any, key, path string) (int64, bool) {
	v, present := m[key]
	if !present {
		return 0, false
	}
	switch x := v.(type) {
	case int64:
		return x, true
	case uint64:
		if x <= math.MaxInt64 {
			return int64(x), true
		}
	case float64:
		if x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return int64(x), true
		}
	}
	d.bad(childPath(path, key), "expected a whole number; found %s", describeValue(v))
	return 0, false
}

// quantity reads a quantity of dimension dim at m[key]; ok is false when
// absent or bad (a bad one is reported).
func (d *decoder) quantity(m map[string]any, key, path string, dim Dimension) (float64, bool) {
	v, present := m[key]
	if !present {
		return 0, false
	}
	return d.quantityValue(v, childPath(path, key), dim)
}

func (d *decoder) quantityValue(v any, path string, dim Dimension) (float64, bool) {
	switch x := v.(type) {
	case string:
		q, err := ParseQuantity(x, dim)
		if err != nil {
			d.bad(path, "%v", err)
			return 0, false
		}
		return q, true
	case int64:
		if dim == Bits || dim == Number {
			return float64(x), true
		}
	case uint64:
		if dim == Bits || dim == Number {
			return float64(x), true
		}
	case float64:
		if dim == Bits || dim == Number {
			if dim == Bits && x != math.Trunc(x) {
				d.bad(path, "%v is not a whole number of bits", x)
				return 0, false
			}
			return x, true
		}
	}
	d.bad(path, "expected %s written as a string with its unit, e.g. %q; found %s", dims[dim].noun, dims[dim].example, describeValue(v))
	return 0, false
}

// perChannel reads one value for every channel, or a map by channel name.
func (d *decoder) perChannel(m map[string]any, key, path string, dim Dimension, chans []string, def float64) []float64 {
	out := make([]float64, len(chans))
	for i := range out {
		out[i] = def
	}
	v, present := m[key]
	if !present {
		return out
	}
	p := childPath(path, key)
	mm, isMap := v.(map[string]any)
	if !isMap {
		if x, ok := d.quantityValue(v, p, dim); ok {
			for i := range out {
				out[i] = x
			}
		}
		return out
	}
	seen := make([]bool, len(chans))
	for _, name := range sortedKeys(mm) {
		i := indexOf(chans, name)
		if i < 0 {
			d.bad(childPath(p, name), "no channel %q in the scheme; its channels are %s", name, strings.Join(chans, ", "))
			continue
		}
		seen[i] = true
		if x, ok := d.quantityValue(mm[name], childPath(p, name), dim); ok {
			out[i] = x
		}
	}
	for i, ok := range seen {
		if !ok && math.IsNaN(def) {
			d.bad(p, "no value for channel %q; give one value for all channels or one for each of %s", chans[i], strings.Join(chans, ", "))
		}
	}
	return out
}

func indexOf(s []string, x string) int {
	for i, v := range s {
		if v == x {
			return i
		}
	}
	return -1
}

func (d *decoder) spec(m map[string]any) *Spec {
	s := &Spec{}
	s.Title, _ = m["title"].(string)
	s.Target = d.target(mapAt(m, "target"), "target")
	d.scheme(s, mapAt(m, "scheme"), "scheme")
	switch m["method"] {
	case "adiabatic":
		s.Method = Adiabatic
	case "nonadiabatic":
		s.Method = Nonadiabatic
	default:
		d.bad("method", "expected adiabatic or nonadiabatic; found %s", describeValue(m["method"]))
	}
	var chans []string
	if s.Scheme != nil {
		for _, c := range s.Scheme.Channels {
			chans = append(chans, c.Name)
		}
	}
	d.hardware(s, mapAt(m, "hardware"), "hardware", chans)
	d.search(s, mapAt(m, "search"), "search")
	d.errorModel(s, mapAt(m, "errors"), "errors", chans)
	d.sweeps(s, mapAt(m, "sweeps"), "sweeps")
	return s
}

func (d *decoder) target(m map[string]any, path string) Target {
	var t Target
	if g, ok := m["gate"].(string); ok {
		gate, found := LookupGate(g)
		if !found {
			d.bad(path+".gate", "unknown gate %q; named gates are %s (the gates command lists aliases)", g, gateNames())
			return t
		}
		t.Name = gate.Name
		t.Label = gate.Symbol + " (" + gate.Title + ")"
		t.U = gate.Matrix()
		return t
	}
	if r := mapAt(m, "rotation"); r != nil {
		rp := path + ".rotation"
		var axis [3]float64
		switch a := r["axis"].(type) {
		case string:
			sign := 1.0
			name := a
			if strings.HasPrefix(a, "-") {
				sign, name = -1, a[1:]
			}
			name = strings.TrimPrefix(name, "+")
			k := strings.Index("xyz", name)
			if len(name) != 1 || k < 0 {
				d.bad(rp+".axis", "%q is not an axis; expected x, y, z (optionally signed) or [nx, ny, nz]", a)
				return t
			}
			axis[k] = sign
		case []any:
			if len(a) != 3 {
				d.bad(rp+".axis", "an axis vector has 3 components; found %d", len(a))
				return t
			}
			for i, c := range a {
				x, ok := toFloat(c)
				if !ok {
					d.bad(fmt.Sprintf("%s.axis[%d]", rp, i), "expected a number; found %s", describeValue(c))
					return t
				}
				axis[i] = x
			}
		default:
			d.bad(rp+".axis", "expected x, y, z or [nx, ny, nz]; found %s", describeValue(r["axis"]))
			return t
		}
		angle, ok := d.quantity(r, "angle", rp, Angle)
		if !ok {
			if _, present := r["angle"]; !present {
				d.bad(rp+".angle", "missing; give the rotation angle, e.g. \"90 deg\"")
			}
			return t
		}
		u, err := Rotation(axis, angle)
		if err != nil {
			d.bad(rp+".axis", "%v", err)
			return t
		}
		t.U = u
		t.Label = fmt.Sprintf("rotation by %s about (%g, %g, %g)", FormatQuantity(angle, Angle), axis[0], axis[1], axis[2])
		return t
	}
	if rows, ok := m["unitary"].([]any); ok {
		up := path + ".unitary"
		if len(rows) != 2 {
			d.bad(up, "a 2×2 unitary has 2 rows; found %d", len(rows))
			return t
		}
		u := holonomy.NewMat(2, 2)
		for i, r := range rows {
			row, ok := r.([]any)
			if !ok || len(row) != 2 {
				d.bad(fmt.Sprintf("%s[%d]", up, i), "a row of a 2×2 unitary has 2 entries")
				return t
			}
			for j, e := range row {
				z, err := complexValue(e)
				if err != nil {
					d.bad(fmt.Sprintf("%s[%d][%d]", up, i, j), "%v", err)
					return t
				}
				u.Set(i, j, z)
			}
		}
		t.U = u
		t.Label = "explicit unitary"
		return t
	}
	d.bad(path, "give exactly one of: gate, rotation, unitary")
	return t
}

func toFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case float64:
		return x, true
	case int64:
		return float64(x), true
	case uint64:
		return float64(x), true
	case json.Number:
		f, err := x.Float64()
		return f, err == nil
	}
	return 0, false
}

// complexValue reads a unitary entry: a number, a string such as
// "0.5+0.5i", or a mapping {re, im}.
func complexValue(v any) (complex128, error) {
	if x, ok := toFloat(v); ok {
		return complex(x, 0), nil
	}
	switch x := v.(type) {
	case string:
		s := strings.ReplaceAll(x, " ", "")
		z, err := strconv.ParseComplex(s, 128)
		if err != nil || s == "" || strings.ContainsAny(strings.ToLower(s), "nx_") {
			return 0, fmt.Errorf("%q is not a complex number; write e.g. \"0.5+0.5i\", \"-1i\" or {re: 0.5, im: 0.5}", x)
		}
		if math.IsNaN(real(z)) || math.IsNaN(imag(z)) || math.IsInf(real(z), 0) || math.IsInf(imag(z), 0) {
			return 0, fmt.Errorf("%q is not a finite complex number", x)
		}
		return z, nil
	case map[string]any:
		re, okr := toFloat(x["re"])
		im, oki := toFloat(x["im"])
		_, hasr := x["re"]
		_, hasi := x["im"]
		if (hasr && !okr) || (hasi && !oki) || (!hasr && !hasi) {
			return 0, fmt.Errorf("expected {re: number, im: number}")
		}
		return complex(re, im), nil
	}
	return 0, fmt.Errorf("expected a complex number; found %s", describeValue(v))
}

func levelNames(sc *holonomy.Scheme) string {
	n := make([]string, len(sc.Levels))
	for i, l := range sc.Levels {
		n[i] = l.Name
	}
	return strings.Join(n, ", ")
}

func levelIndex(sc *holonomy.Scheme, name string) int {
	for i, l := range sc.Levels {
		if l.Name == name {
			return i
		}
	}
	return -1
}

func (d *decoder) scheme(s *Spec, m map[string]any, path string) {
	preset, hasPreset := m["preset"].(string)
	_, hasLevels := m["levels"]
	_, hasChannels := m["channels"]
	switch {
	case hasPreset && (hasLevels || hasChannels):
		d.bad(path, "give either preset or levels and channels, not both")
		return
	case hasPreset:
		d.preset(s, m, path, preset)
	case hasLevels || hasChannels:
		d.graph(s, m, path, hasLevels, hasChannels)
	default:
		d.bad(path, "give a preset (tripod, lambda, spin-1/2 or spin) or an explicit coupling graph (levels and channels)")
		return
	}
	if s.Scheme == nil {
		return
	}
	sc := s.Scheme
	if q, ok := m["qubit"].([]any); ok {
		sc.Computational = sc.Computational[:0]
		for i, v := range q {
			name, _ := v.(string)
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(fmt.Sprintf("%s.qubit[%d]", path, i), "no level %q in the scheme; its levels are %s", name, levelNames(sc))
				continue
			}
			sc.Computational = append(sc.Computational, k)
		}
	} else if !hasPreset {
		d.bad(path+".qubit", "missing; name the two qubit levels, |0⟩ first, e.g. [g0, g1]")
	}
	if !IsSpinPreset(s.Preset) {
		s.Excited = sc.ExcitedLevels()
	}
}

func contains(s []int, x int) bool {
	for _, v := range s {
		if v == x {
			return true
		}
	}
	return false
}

func (d *decoder) preset(s *Spec, m map[string]any, path, preset string) {
	for _, k := range []string{"name"} {
		if _, ok := m[k]; ok {
			d.bad(path+"."+k, "only used with an explicit coupling graph (levels and channels)")
		}
	}
	if _, ok := m["spin"]; ok && preset != "spin" {
		d.bad(path+".spin", "only used with preset: spin")
	}
	switch preset {
	case "tripod":
		s.Scheme = holonomy.Tripod()
	case "lambda":
		s.Scheme = holonomy.Lambda()
	case "spin-1/2":
		s.Scheme = holonomy.Spin(1, 0, 1)
	case "spin":
		v, ok := m["spin"]
		if !ok {
			d.bad(path+".spin", "missing; the spin preset needs the spin s, e.g. spin: 1 or spin: \"3/2\"")
			return
		}
		twoS, err := parseSpin(v)
		if err != nil {
			d.bad(path+".spin", "%v", err)
			return
		}
		s.Scheme = holonomy.Spin(twoS, 0, 1)
	default:
		d.bad(path+".preset", "unknown preset %q; presets are tripod, lambda, spin-1/2, spin", preset)
		return
	}
	s.Preset = preset
	sc := s.Scheme
	if det := mapAt(m, "detuning"); det != nil {
		for _, name := range sortedKeys(det) {
			p := path + ".detuning." + name
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(p, "no level %q in the %s preset; its levels are %s", name, preset, levelNames(sc))
				continue
			}
			if x, ok := d.quantityValue(det[name], p, Frequency); ok {
				sc.Levels[k].Detuning = 2 * math.Pi * x
			}
		}
	}
	if dec := mapAt(m, "decay"); dec != nil {
		for _, name := range sortedKeys(dec) {
			p := path + ".decay." + name
			k := levelIndex(sc, name)
			if k < 0 {
				d.bad(p, "no level %q in the %s preset; its levels are %s", name, preset, levelNames(sc))
				continue
			}
			if x, ok := d.quantityValue(dec[name], p, Rate); ok {
				sc.Levels[k].Decay = x
			}
		}
	}
}

// parseSpin reads s as "1/2", "1", "3/2", 0.5, 1, ... and returns 2s.
func parseSpin(v any) (int, error) {
	var twoS float64
	switch x := v.(type) {
	case string:
		t := strings.ReplaceAll(x, " ", "")
		if num, ok := strings.CutSuffix(t, "/2"); ok {
			n, err := strconv.Atoi(num)
			if err != nil {
				return 0, fmt.Errorf("%q is not a spin; expected 1/2, 1, 3/2, ... up to 15/2", x)
			}
			twoS = float64(n)
		} else {
			n, err := strconv.Atoi(t)
			if err != nil {
				return 0, fmt.Errorf("%q is not a spin; expected 1/2, 1, 3/2, ... up to 15/2", x)
			}
			twoS = 2 * float64(n)
		}
	default:
		f, ok := toFloat(v)
		if !ok {
			return 0, fmt.Errorf("expected a spin such as 1/2, 1, 3/2; found %s", describeValue(v))
		}
		twoS = 2 * f
	}
	if twoS != math.Trunc(twoS) || twoS < 1 || twoS > holonomy.MaxLevels-1 {
		return 0, fmt.Errorf("spin %v is not one of 1/2, 1, 3/2, ..., 15/2 (a ladder of 2 to %d levels)", twoS/2, holonomy.MaxLevels)
	}
	return int(twoS), nil
}

func (d *decoder) graph(s *Spec, m map[string]any, path string, hasLevels, hasChannels bool) {
	if !hasLevels {
		d.bad(path+".levels", "missing; an explicit coupling graph needs levels and channels")
		return
	}
	if !hasChannels {
		d.bad(path+".channels", "missing; an explicit coupling graph needs levels and channels")
		return
	}
	for _, k := range []string{"detuning", "decay", "spin"} {
		if _, ok := m[k]; ok {
			d.bad(path+"."+k, "only used with a preset; in an explicit coupling graph give detuning and decay in each level's entry")
		}
	}
	sc := &holonomy.Scheme{Name: "custom"}
	if name, ok := m["name"].(string); ok && name != "" {
		sc.Name = name
	}
	levels, _ := m["levels"].([]any)
	first := map[string]int{}
	for i, v := range levels {
		lm, _ := v.(map[string]any)
		p := fmt.Sprintf("%s.levels[%d]", path, i)
		name, _ := lm["name"].(string)
		if j, dup := first[name]; dup {
			d.bad(p+".name", "level name %q is used twice (also %s.levels[%d])", name, path, j)
		}
		first[name] = i
		l := holonomy.Level{Name: name}
		if x, ok := d.quantity(lm, "detuning", p, Frequency); ok {
			l.Detuning = 2 * math.Pi * x
		}
		if x, ok := d.quantity(lm, "decay", p, Rate); ok {
			l.Decay = x
		}
		sc.Levels = append(sc.Levels, l)
	}
	chans, _ := m["channels"].([]any)
	firstC := map[string]int{}
	for i, v := range chans {
		cm, _ := v.(map[string]any)
		p := fmt.Sprintf("%s.channels[%d]", path, i)
		name, _ := cm["name"].(string)
		if j, dup := firstC[name]; dup {
			d.bad(p+".name", "channel name %q is used twice (also %s.channels[%d])", name, path, j)
		}
		firstC[name] = i
		c := holonomy.Channel{Name: name, Lower: -1, Upper: -1, Factor: 1}
		for _, end := range []string{"lower", "upper"} {
			ln, _ := cm[end].(string)
			k := levelIndex(sc, ln)
			if k < 0 {
				d.bad(p+"."+end, "channel %q names level %q, which does not exist; levels are %s", name, ln, levelNames(sc))
				continue
			}
			if end == "lower" {
				c.Lower = k
			} else {
				c.Upper = k
			}
		}
		if f, ok := cm["factor"]; ok {
			x, ok := toFloat(f)
			if !ok {
				d.bad(p+".factor", "expected a number; found %s", describeValue(f))
			}
			c.Factor = x
		}
		sc.Channels = append(sc.Channels, c)
	}
	s.Scheme = sc
}

func (d *decoder) hardware(s *Spec, m map[string]any, path string, chans []string) {
	h := &s.Hardware
	nan := math.NaN()
	if s.Scheme != nil { // else the scheme's problems are reported; channel names are unknown
		h.MaxRabi = d.perChannel(m, "max_rabi", path, Frequency, chans, nan)
		h.MaxSlew = d.perChannel(m, "max_slew", path, SlewRate, chans, nan)
		h.FullScale = d.perChannel(m, "full_scale", path, Frequency, chans, nan)
	}
	h.SampleRate, _ = d.quantity(m, "sample_rate", path, SampleRate)
	h.Granularity = 1
	if g, ok := d.integer(m, "granularity", path); ok {
		h.Granularity = clampInt(g)
	}
	if n, ok := d.integer(m, "max_samples", path); ok {
		h.MaxSamples = clampInt(n)
	}
	if b, ok := d.quantity(m, "dac_bits", path, Bits); ok {
		h.DACBits = clampInt(int64(math.Min(b, 1<<30)))
	}
	h.MinDuration, _ = d.quantity(m, "min_duration", path, Time)
	h.MaxDuration, _ = d.quantity(m, "max_duration", path, Time)
}

// clampInt keeps a decoded integer within a range where later bound checks
// see it as too large rather than wrapping.
func clampInt(x int64) int {
	const lim = 1 << 40
	if x > lim {
		return lim
	}
	if x < -lim {
		return -lim
	}
	return int(x)
}

func (d *decoder) search(s *Spec, m map[string]any, path string) {
	r := &s.Search
	*r = Search{Family: Fourier, Harmonics: defaultHarmonics, Vertices: defaultVertices, Restarts: defaultRestarts,
		Seed: defaultSeed, TargetInfidelity: defaultTargetInfidelity, Evaluations: defaultEvaluations, LoopPoints: defaultLoopPoints}
	r.Robust.DetuningKind = defaultKind(s)
	if m == nil {
		return
	}
	switch m["family"] {
	case nil, "fourier":
		if _, ok := m["vertices"]; ok {
			d.bad(path+".vertices", "only used with family: polygon")
		}
	case "polygon":
		r.Family = Polygon
		if _, ok := m["harmonics"]; ok {
			d.bad(path+".harmonics", "only used with family: fourier")
		}
	default:
		d.bad(path+".family", "expected fourier or polygon; found %s", describeValue(m["family"]))
	}
	if v, ok := d.integer(m, "harmonics", path); ok {
		r.Harmonics = clampInt(v)
	}
	if v, ok := d.integer(m, "vertices", path); ok {
		r.Vertices = clampInt(v)
	}
	if v, ok := d.integer(m, "restarts", path); ok {
		r.Restarts = clampInt(v)
	}
	if v, present := m["seed"]; present {
		switch x := v.(type) {
		case int64:
			if x >= 0 {
				r.Seed = uint64(x)
			} else {
				d.bad(path+".seed", "a seed is a whole number from 0 to %d; found %d", uint64(MaxSeed), x)
			}
		case uint64:
			r.Seed = x
		case float64:
			if x >= 0 && x == math.Trunc(x) && x <= MaxSeed {
				r.Seed = uint64(x)
			} else {
				d.bad(path+".seed", "a seed is a whole number from 0 to %d; found %v", uint64(MaxSeed), x)
			}
		default:
			d.bad(path+".seed", "expected a whole number; found %s", describeValue(v))
		}
	}
	if x, ok := d.quantity(m, "target_infidelity", path, Number); ok {
		r.TargetInfidelity = x
	}
	if v, ok := d.integer(m, "evaluations", path); ok {
		r.Evaluations = clampInt(v)
	}
	if v, ok := d.integer(m, "loop_points", path); ok {
		r.LoopPoints = clampInt(v)
	}
	if rb := mapAt(m, "robust"); rb != nil {
		rp := path + ".robust"
		if x, ok := d.quantity(rb, "amplitude", rp, Number); ok {
			r.Robust.Amplitude = x
		}
		if x, ok := d.quantity(rb, "detuning", rp, Frequency); ok {
			r.Robust.Detuning = x
		}
		if k, ok := d.kind(rb, "detuning_kind", rp); ok {
			r.Robust.DetuningKind = k
		}
	}
}

// defaultKind is one-photon when the scheme has excited levels, else
// two-photon.
func defaultKind(s *Spec) DetuningKind {
	if s.Scheme != nil && len(s.Excited) == 0 {
		return TwoPhoton
	}
	return OnePhoton
}

// IsSpinPreset reports whether preset is a spin ladder.
func IsSpinPreset(preset string) bool { return preset == "spin" || preset == "spin-1/2" }

func (d *decoder) kind(m map[string]any, key, path string) (DetuningKind, bool) {
	switch v := m[key]; v {
	case nil:
		return 0, false
	case "one-photon":
		return OnePhoton, true
	case "two-photon":
		return TwoPhoton, true
	default:
		d.bad(childPath(path, key), "expected one-photon or two-photon; found %s", describeValue(v))
		return 0, false
	}
}

func (d *decoder) errorModel(s *Spec, m map[string]any, path string, chans []string) {
	e := &s.Errors
	e.Quantise = true
	if s.Scheme != nil {
		e.Amplitude = d.perChannel(m, "amplitude", path, Number, chans, 0)
	}
	if m == nil {
		return
	}
	e.OnePhoton, _ = d.quantity(m, "one_photon_detuning", path, Frequency)
	e.TwoPhoton, _ = d.quantity(m, "two_photon_detuning", path, Frequency)
	e.Dephasing, _ = d.quantity(m, "dephasing", path, Rate)
	switch m["filter"] {
	case nil, "none":
		e.Filter = NoFilter
	case "gaussian":
		e.Filter = GaussianFilter
	case "first-order":
		e.Filter = FirstOrderFilter
	default:
		d.bad(path+".filter", "expected none, gaussian or first-order; found %s", describeValue(m["filter"]))
	}
	e.RiseTime, _ = d.quantity(m, "rise_time", path, Time)
	if q, ok := m["quantise"].(bool); ok {
		e.Quantise = q
	}
	e.PhaseStep, _ = d.quantity(m, "phase_step", path, Angle)
}

func (d *decoder) sweeps(s *Spec, m map[string]any, path string) {
	w := &s.Sweeps
	w.Amplitude = Sweep{Span: defaultAmplitudeSpan, Points: defaultSweepPoints}
	w.Detuning = Sweep{Points: defaultSweepPoints}
	w.DetuningKind = defaultKind(s)
	w.MapAmplitude, w.MapDetuning = defaultMapPoints, defaultMapPoints
	minRabi := math.Inf(1)
	for _, r := range s.Hardware.MaxRabi {
		if r > 0 {
			minRabi = math.Min(minRabi, r)
		}
	}
	if math.IsInf(minRabi, 1) {
		minRabi = 1e6 // hardware.max_rabi is bad and reported; any positive span will do
	}
	w.Detuning.Span = defaultDetuningSpanFraction * minRabi
	if m == nil {
		return
	}
	if a := mapAt(m, "amplitude"); a != nil {
		p := path + ".amplitude"
		if x, ok := d.quantity(a, "span", p, Number); ok {
			w.Amplitude.Span = x
		}
		if n, ok := d.integer(a, "points", p); ok {
			w.Amplitude.Points = clampInt(n)
		}
	}
	if a := mapAt(m, "detuning"); a != nil {
		p := path + ".detuning"
		if x, ok := d.quantity(a, "span", p, Frequency); ok {
			w.Detuning.Span = x
		}
		if n, ok := d.integer(a, "points", p); ok {
			w.Detuning.Points = clampInt(n)
		}
		if k, ok := d.kind(a, "kind", p); ok {
			w.DetuningKind = k
		}
	}
	if a := mapAt(m, "map"); a != nil {
		p := path + ".map"
		if n, ok := d.integer(a, "amplitude_points", p); ok {
			w.MapAmplitude = clampInt(n)
		}
		if n, ok := d.integer(a, "detuning_points", p); ok {
			w.MapDetuning = clampInt(n)
		}
	}
}

func sortedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
