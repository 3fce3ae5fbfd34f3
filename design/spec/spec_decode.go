package spec

import (
	"fmt"
	"math"
	"sort"
	"strings"
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

// bad records an ErrInvalid problem.
func (d *decoder) bad(path, format string, args ...any) {
	d.badErr(path, ErrInvalid, format, args...)
}

// badErr records a problem of kind err (a sentinel).
func (d *decoder) badErr(path string, err error, format string, args ...any) {
	d.probs = append(d.probs, Problem{Path: path, Msg: fmt.Sprintf(format, args...), Err: err})
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
			d.badErr(path, ErrBadUnit, "%v", err)
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
			d.badErr(childPath(p, name), ErrUnknownKey, "no channel %q in the scheme; its channels are %s", name, strings.Join(chans, ", "))
			continue
		}
		seen[i] = true
		if x, ok := d.quantityValue(mm[name], childPath(p, name), dim); ok {
			out[i] = x
		}
	}
	for i, ok := range seen {
		if !ok && math.IsNaN(def) {
			d.badErr(p, ErrMissing, "no value for channel %q; give one value for all channels or one for each of %s", chans[i], strings.Join(chans, ", "))
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
	w.Amplitude = Sweep{HalfWidth: defaultAmplitudeSpan, Points: defaultSweepPoints}
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
	w.Detuning.HalfWidth = defaultDetuningSpanFraction * minRabi
	if m == nil {
		return
	}
	if a := mapAt(m, "amplitude"); a != nil {
		p := path + ".amplitude"
		if x, ok := d.quantity(a, "span", p, Number); ok {
			w.Amplitude.HalfWidth = x
		}
		if n, ok := d.integer(a, "points", p); ok {
			w.Amplitude.Points = clampInt(n)
		}
	}
	if a := mapAt(m, "detuning"); a != nil {
		p := path + ".detuning"
		if x, ok := d.quantity(a, "span", p, Frequency); ok {
			w.Detuning.HalfWidth = x
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
