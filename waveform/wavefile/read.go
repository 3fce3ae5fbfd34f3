package wavefile

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"github.com/loopgate/loopgate/waveform"
	"io"
	"math"
	"sort"
	"strings"
	"sync"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/schemas"
	"github.com/xeipuuv/gojsonschema"
)

// FileError reports a problem with a waveform or loop file: which file,
// where in it (a JSON pointer, RFC 6901; empty for the whole file) and
// what is wrong.
type FileError struct {
	// File is the name the reader was given.
	File string
	// Pointer is the JSON pointer of the offending value ("" for the
	// whole file, "/" never: the root is "").
	Pointer string
	// Msg says what is wrong and what was expected.
	Msg string
}

// Error formats the problem as "file: pointer: message".
func (e *FileError) Error() string {
	if e.Pointer == "" {
		return e.File + ": " + e.Msg
	}
	return e.File + ": " + e.Pointer + ": " + e.Msg
}

func ferr(file, ptr, format string, a ...any) error {
	return &FileError{File: file, Pointer: ptr, Msg: fmt.Sprintf(format, a...)}
}

var (
	compiled   = map[string]*gojsonschema.Schema{}
	compileMu  sync.Mutex
	schemaText = map[string][]byte{WaveformFormat: schemas.Waveform, LoopFormat: schemas.Loop}
)

// schemaFor returns the compiled schema of a format.
func schemaFor(format string) (*gojsonschema.Schema, error) {
	compileMu.Lock()
	defer compileMu.Unlock()
	if s, ok := compiled[format]; ok {
		return s, nil
	}
	s, err := gojsonschema.NewSchema(gojsonschema.NewBytesLoader(schemaText[format]))
	if err != nil {
		return nil, fmt.Errorf("compiling the %s schema: %w", format, err)
	}
	compiled[format] = s
	return s, nil
}

// readDoc reads a JSON file of the given format: size and emptiness
// checks, JSON syntax, format name and version, schema validation, then
// decoding into dst.
func readDoc(r io.Reader, name, format string, dst any) error {
	data, err := io.ReadAll(io.LimitReader(r, MaxFileBytes+1))
	if err != nil {
		return ferr(name, "", "cannot read: %v", err)
	}
	if len(data) > MaxFileBytes {
		return ferr(name, "", "file is larger than %d bytes, the limit for %s files", MaxFileBytes, format)
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return ferr(name, "", "empty file; expected a %s file (JSON)", format)
	}
	if !json.Valid(data) {
		var v any
		err := json.Unmarshal(data, &v)
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line, col := lineCol(data, se.Offset)
			return ferr(name, "", "not valid JSON at line %d, column %d: %v", line, col, se)
		}
		return ferr(name, "", "not valid JSON: %v", err)
	}
	var head struct {
		Format  *string      `json:"format"`
		Version *json.Number `json:"version"`
	}
	if json.Unmarshal(data, &head) == nil {
		if head.Format != nil && *head.Format != format {
			return ferr(name, "/format", "format is %q; expected %q", *head.Format, format)
		}
		if head.Version != nil && head.Version.String() != fmt.Sprint(FormatVersion) {
			return ferr(name, "/version", "format version %s is not supported; this build reads version %d", head.Version.String(), FormatVersion)
		}
	}
	sch, err := schemaFor(format)
	if err != nil {
		return err
	}
	res, err := sch.Validate(gojsonschema.NewBytesLoader(data))
	if err != nil {
		return ferr(name, "", "cannot validate: %v", err)
	}
	if !res.Valid() {
		return schemaError(name, res.Errors())
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(dst); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) {
			return ferr(name, "/"+strings.ReplaceAll(te.Field, ".", "/"), "value %s does not fit (%v)", te.Value, err)
		}
		return ferr(name, "", "cannot decode: %v", err)
	}
	return nil
}

// schemaError turns the schema violations into one error naming the first
// (in pointer order) and counting the rest.
func schemaError(name string, errs []gojsonschema.ResultError) error {
	type item struct{ ptr, msg string }
	items := make([]item, 0, len(errs))
	for _, e := range errs {
		ptr := pointer(e.Context())
		if p, ok := e.Details()["property"].(string); ok && (e.Type() == "required" || e.Type() == "additional_property_not_allowed") {
			ptr += "/" + escapePointer(p)
		}
		items = append(items, item{ptr, e.Description()})
	}
	sort.Slice(items, func(i, j int) bool {
		if items[i].ptr != items[j].ptr {
			return items[i].ptr < items[j].ptr
		}
		return items[i].msg < items[j].msg
	})
	msg := "does not match the schema: " + items[0].msg
	if len(items) > 1 {
		msg += fmt.Sprintf(" (and %d more problems)", len(items)-1)
	}
	return &FileError{File: name, Pointer: items[0].ptr, Msg: msg}
}

// pointer converts a gojsonschema context "(root).a.0.b" to "/a/0/b".
func pointer(c *gojsonschema.JsonContext) string {
	if c == nil {
		return ""
	}
	parts := strings.Split(c.String("\x00"), "\x00")
	var b strings.Builder
	for _, p := range parts[1:] {
		b.WriteByte('/')
		b.WriteString(escapePointer(p))
	}
	return b.String()
}

func escapePointer(s string) string {
	return strings.ReplaceAll(strings.ReplaceAll(s, "~", "~0"), "/", "~1")
}

// lineCol returns the 1-based line and column of byte offset off.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	line, col := 1, 1
	for _, c := range data[:off] {
		if c == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return line, col
}

// ReadWaveform reads a waveform file. It validates the file against
// schemas.Waveform (after checking its size, that it is not empty, that it
// is JSON, and its format name and version), then checks what the schema
// cannot: level and channel names, array lengths against the declared
// sample count, the target's shape and unitarity, the segments' layout, the
// DAC codes against the samples and the consistency of the verification.
// Every error is a *FileError naming the file and the JSON pointer of the
// problem. name is used in messages only.
func ReadWaveform(r io.Reader, name string) (*File, error) {
	var d waveDoc
	if err := readDoc(r, name, WaveformFormat, &d); err != nil {
		return nil, err
	}
	return d.file(name)
}

// parseScheme checks a scheme document and builds the scheme.
func parseScheme(name, ptr string, d *schemeDoc) (*holonomy.Scheme, []float64, error) {
	idx := map[string]int{}
	s := &holonomy.Scheme{Name: d.Name}
	hz := make([]float64, len(d.Levels))
	for k, l := range d.Levels {
		if _, dup := idx[l.Name]; dup {
			return nil, nil, ferr(name, fmt.Sprintf("%s/levels/%d/name", ptr, k), "level name %q is used twice", l.Name)
		}
		idx[l.Name] = k
		hz[k] = l.Detuning
		s.Levels = append(s.Levels, holonomy.Level{Name: l.Name, Decay: l.Decay})
	}
	level := func(p, n string) (int, error) {
		k, ok := idx[n]
		if !ok {
			return 0, ferr(name, p, "level %q is not in the scheme", n)
		}
		return k, nil
	}
	chans := map[string]bool{}
	for c, ch := range d.Channels {
		p := fmt.Sprintf("%s/channels/%d", ptr, c)
		if chans[ch.Name] {
			return nil, nil, ferr(name, p+"/name", "channel name %q is used twice", ch.Name)
		}
		chans[ch.Name] = true
		lo, err := level(p+"/lower", ch.Lower)
		if err != nil {
			return nil, nil, err
		}
		up, err := level(p+"/upper", ch.Upper)
		if err != nil {
			return nil, nil, err
		}
		if lo == up {
			return nil, nil, ferr(name, p, "channel %q couples level %q to itself", ch.Name, ch.Lower)
		}
		if ch.Factor == 0 {
			return nil, nil, ferr(name, p+"/factor", "matrix-element factor must be non-zero")
		}
		s.Channels = append(s.Channels, holonomy.Channel{Name: ch.Name, Lower: lo, Upper: up, Factor: ch.Factor})
	}
	for q, n := range d.Qubit {
		k, err := level(fmt.Sprintf("%s/qubit_levels/%d", ptr, q), n)
		if err != nil {
			return nil, nil, err
		}
		s.Computational = append(s.Computational, k)
	}
	s = waveform.SchemeFromHz(s, hz)
	if err := s.Validate(); err != nil {
		return nil, nil, ferr(name, ptr, "%v", err)
	}
	return s, hz, nil
}

// parseTarget checks a d×d matrix document; the target must be unitary
// to 1e-6 in the Frobenius norm of T†T − I.
func parseTarget(name, ptr string, m *matDoc, d int) (*holonomy.Mat, error) {
	if len(m.Re) != d || len(m.Im) != d {
		return nil, ferr(name, ptr, "target has %d real and %d imaginary rows; need %d for %d qubit levels", len(m.Re), len(m.Im), d, d)
	}
	t := holonomy.NewMat(d, d)
	for i := 0; i < d; i++ {
		if len(m.Re[i]) != d || len(m.Im[i]) != d {
			return nil, ferr(name, fmt.Sprintf("%s/re/%d", ptr, i), "row %d has %d real and %d imaginary entries; need %d", i, len(m.Re[i]), len(m.Im[i]), d)
		}
		for j := 0; j < d; j++ {
			t.Set(i, j, complex(m.Re[i][j], m.Im[i][j]))
		}
	}
	if e := holonomy.UnitarityError(t); !(e <= 1e-6) {
		return nil, ferr(name, ptr, "target is not unitary: ‖T†T − I‖ = %.3g exceeds the tolerance 1e-6", e)
	}
	return t, nil
}

// file checks the document and builds the File.
func (d *waveDoc) file(name string) (*File, error) {
	sc, hz, err := parseScheme(name, "/scheme", &d.Scheme)
	if err != nil {
		return nil, err
	}
	nq, nch, nlev := len(sc.Computational), len(sc.Channels), sc.Dim()
	target, err := parseTarget(name, "/target", &d.Target, nq)
	if err != nil {
		return nil, err
	}
	h := d.Hardware
	hw := waveform.Hardware{
		MaxRabi: h.MaxRabi, MaxSlew: h.MaxSlew, SampleRate: d.SampleRate, Granularity: h.Granularity,
		MaxSamples: h.MaxSamples, DACBits: h.DACBits, FullScale: h.FullScale, MinDuration: h.MinDuration, MaxDuration: h.MaxDuration,
	}
	if err := hw.Validate(nch); err != nil {
		return nil, ferr(name, "/hardware", "%v", err)
	}
	n := d.Samples
	if dur := float64(n) / d.SampleRate; dur != d.Duration {
		return nil, ferr(name, "/duration_s", "duration %g s does not equal samples/sample_rate_hz = %g s", d.Duration, dur)
	}
	if len(d.Channels) != nch {
		return nil, ferr(name, "/channels", "%d channels of samples for %d channels in the scheme", len(d.Channels), nch)
	}
	w := &waveform.Waveform{
		Scheme: sc, Target: target, Hardware: hw, LevelHz: hz,
		Adiabaticity: d.Goals.Adiabaticity, MinFidelity: d.Goals.MinFidelity,
		I: make([][]float64, nch), Q: make([][]float64, nch),
		CodeI: make([][]int32, nch), CodeQ: make([][]int32, nch),
		Detuning: make([][]float64, nlev),
	}
	mc := hw.MaxCode()
	for c, ch := range d.Channels {
		p := fmt.Sprintf("/channels/%d", c)
		if ch.Name != sc.Channels[c].Name {
			return nil, ferr(name, p+"/name", "channel %q where the scheme has %q", ch.Name, sc.Channels[c].Name)
		}
		for _, a := range []struct {
			key string
			n   int
		}{{"i_hz", len(ch.I)}, {"q_hz", len(ch.Q)}, {"i_code", len(ch.CodeI)}, {"q_code", len(ch.CodeQ)}} {
			if a.n != n {
				return nil, ferr(name, p+"/"+a.key, "%d samples where the file declares %d", a.n, n)
			}
		}
		fs := hw.FullScale[c]
		for k := 0; k < n; k++ {
			for _, x := range []struct {
				key  string
				v    float64
				code int32
			}{{"i_code", ch.I[k], ch.CodeI[k]}, {"q_code", ch.Q[k], ch.CodeQ[k]}} {
				want, err := waveform.DACCode(x.v, fs, mc)
				if err != nil || want != x.code {
					return nil, ferr(name, fmt.Sprintf("%s/%s/%d", p, x.key, k), "DAC code %d does not match the sample: round(x/full_scale × %g) = %d", x.code, mc, want)
				}
			}
		}
		w.I[c], w.Q[c], w.CodeI[c], w.CodeQ[c] = ch.I, ch.Q, ch.CodeI, ch.CodeQ
	}
	for i, t := range d.LevelDetunings {
		p := fmt.Sprintf("/level_detunings/%d", i)
		k := sc.LevelIndex(t.Level)
		if k < 0 {
			return nil, ferr(name, p+"/level", "level %q is not in the scheme", t.Level)
		}
		if w.Detuning[k] != nil {
			return nil, ferr(name, p+"/level", "level %q has two detuning tracks", t.Level)
		}
		if len(t.Hz) != n {
			return nil, ferr(name, p+"/hz", "%d samples where the file declares %d", len(t.Hz), n)
		}
		w.Detuning[k] = t.Hz
	}
	at := 0
	for i, s := range d.Segments {
		p := fmt.Sprintf("/segments/%d", i)
		kind, err := waveform.ParseKind(s.Kind)
		if err != nil {
			return nil, ferr(name, p+"/kind", "%v", err)
		}
		if s.First != at {
			return nil, ferr(name, p+"/first_sample", "segment starts at sample %d; expected %d (segments are contiguous from sample 0)", s.First, at)
		}
		if s.Samples > n-at {
			return nil, ferr(name, p+"/samples", "segment of %d samples from sample %d runs past the end (%d samples)", s.Samples, at, n)
		}
		if kind == waveform.Adiabatic && (s.Ramp < 1 || 2*s.Ramp >= s.Samples) {
			return nil, ferr(name, p+"/ramp_samples", "adiabatic segment of %d samples needs ramps of at least 1 and less than half of it each, has %d", s.Samples, s.Ramp)
		}
		if kind == waveform.Cyclic && s.Ramp != 0 {
			return nil, ferr(name, p+"/ramp_samples", "cyclic segments have no ramps")
		}
		w.Spans = append(w.Spans, waveform.Span{Kind: kind, First: s.First, Len: s.Samples, Ramp: s.Ramp, Area: s.Area, Amplitude: s.Amplitude, MinGap: s.MinGap})
		at += s.Samples
	}
	for c := range w.I {
		for k := at; k < n; k++ {
			if w.I[c][k] != 0 || w.Q[c][k] != 0 {
				return nil, ferr(name, fmt.Sprintf("/channels/%d/i_hz/%d", c, k), "sample %d lies in the padding after the last segment but is not zero", k)
			}
		}
	}
	v, err := d.Verification.parse(name, nq, nch)
	if err != nil {
		return nil, err
	}
	return &File{ToolVersion: d.ToolVersion, SpecSHA256: d.SpecSHA256, Seed: d.Seed, Spec: d.Spec, Waveform: w, Verification: v}, nil
}

// parse checks the verification document.
func (d *verificationDoc) parse(name string, nq, nch int) (*waveform.Verification, error) {
	p := "/verification"
	if len(d.PeakAux) != nq || len(d.PeakExcited) != nq {
		return nil, ferr(name, p+"/peak_aux_population", "%d and %d peak populations for %d qubit levels", len(d.PeakAux), len(d.PeakExcited), nq)
	}
	m := d.Model
	if len(m.ChannelErrors) != 0 && len(m.ChannelErrors) != nch {
		return nil, ferr(name, p+"/model/channel_amplitude_errors", "%d channel errors for %d channels; give one per channel or none", len(m.ChannelErrors), nch)
	}
	filter, err := parseFilter(name, p+"/model", &m)
	if err != nil {
		return nil, err
	}
	if !(m.PhaseStep >= 0 && m.PhaseStep <= math.Pi) {
		return nil, ferr(name, p+"/model/phase_step_rad", "phase step %g rad; need 0 (exact phases) to π", m.PhaseStep)
	}
	v := &waveform.Verification{
		Model: waveform.ErrorModel{
			AmplitudeError: m.AmplitudeError, OnePhotonDetuning: m.OnePhotonDetuning, TwoPhotonDetuning: m.TwoPhotonDetuning,
			Decay: m.Decay, Dephasing: m.Dephasing, RiseTime: m.RiseTime, Filter: filter, SubSteps: m.SubSteps,
			PhaseStep: m.PhaseStep, Unquantized: !m.Quantized,
		},
		Fidelity: d.Fidelity, Leakage: d.Leakage, PeakAux: d.PeakAux, PeakExcited: d.PeakExcited,
		Adiabaticity: math.NaN(),
	}
	if len(m.ChannelErrors) > 0 {
		v.Model.ChannelErrors = m.ChannelErrors
	}
	if d.Adiabaticity != nil {
		v.Adiabaticity = *d.Adiabaticity
	}
	for i, c := range d.Checks {
		lower := c.Bound == "min"
		want := waveform.NewCheck(c.Name, c.Value, c.Limit, c.Unit, lower)
		if want.Margin != c.Margin || want.Pass != c.Pass {
			return nil, ferr(name, fmt.Sprintf("%s/checks/%d", p, i), "check %q: margin %g and pass %v do not follow from value %g and limit %g", c.Name, c.Margin, c.Pass, c.Value, c.Limit)
		}
		v.Checks = append(v.Checks, want)
	}
	if v.Pass() != d.Pass {
		return nil, ferr(name, p+"/pass", "pass is %v but the checks say %v", d.Pass, v.Pass())
	}
	return v, nil
}

// parseFilter checks the filter of a model document against its rise
// time and returns the filter kind. An absent filter (a file written
// before the field existed) means gaussian with a rise time, none
// without.
func parseFilter(name, ptr string, m *modelDoc) (waveform.FilterKind, error) {
	switch m.Filter {
	case "":
		return waveform.GaussianFilter, nil
	case "none":
		if m.RiseTime != 0 {
			return 0, ferr(name, ptr+"/filter", "filter is none but rise_time_s is %g s; give gaussian or first-order, or a rise time of 0", m.RiseTime)
		}
		return waveform.GaussianFilter, nil
	}
	var k waveform.FilterKind
	switch m.Filter {
	case waveform.GaussianFilter.String():
		k = waveform.GaussianFilter
	case waveform.FirstOrderFilter.String():
		k = waveform.FirstOrderFilter
	default:
		return 0, ferr(name, ptr+"/filter", "filter %q; expected none, gaussian or first-order", m.Filter)
	}
	if !(m.RiseTime > 0) {
		return 0, ferr(name, ptr+"/rise_time_s", "the %s filter needs a positive rise time; found %g s", m.Filter, m.RiseTime)
	}
	return k, nil
}
