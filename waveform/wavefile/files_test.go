package wavefile

import (
	"bytes"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"errors"
	"github.com/loopgate/loopgate/waveform"
	"github.com/loopgate/loopgate/waveform/internal/wavetest"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
	"github.com/loopgate/loopgate/schemas"
	"github.com/xeipuuv/gojsonschema"
)

const testSpec = "# invented demo spec for the tests\ngate: H\nscheme: tripod\n"

func testFile(t testing.TB, p *waveform.Plan, hw waveform.Hardware, m waveform.ErrorModel) *File {
	t.Helper()
	w := wavetest.MustBuild(t, p, hw)
	v := wavetest.MustVerify(t, w, m)
	return &File{ToolVersion: "test", SpecSHA256: SpecHash([]byte(testSpec)), Seed: 1<<63 + 5, Spec: testSpec, Waveform: w, Verification: v}
}

func encode(t testing.TB, f *File) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := f.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func validate(t *testing.T, schema, doc []byte) {
	t.Helper()
	res, err := gojsonschema.Validate(gojsonschema.NewBytesLoader(schema), gojsonschema.NewBytesLoader(doc))
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range res.Errors() {
		t.Errorf("schema: %v", e)
	}
}

// The schemas are valid draft-07 documents (gojsonschema compiles them)
// and document every property.
func TestSchemasCompileAndDescribe(t *testing.T) {
	for name, s := range map[string][]byte{"waveform": schemas.Waveform, "loop": schemas.Loop} {
		if _, err := gojsonschema.NewSchema(gojsonschema.NewBytesLoader(s)); err != nil {
			t.Errorf("%s schema: %v", name, err)
		}
		var walk func(path string, v any)
		walk = func(path string, v any) {
			m, ok := v.(map[string]any)
			if !ok {
				return
			}
			if props, ok := m["properties"].(map[string]any); ok {
				if m["additionalProperties"] != false {
					t.Errorf("%s %s: object without additionalProperties false", name, path)
				}
				for k, p := range props {
					pm := p.(map[string]any)
					if _, ok := pm["description"]; !ok {
						if ref, ok := pm["$ref"].(string); !ok || !described(s, ref) {
							t.Errorf("%s %s/%s: no description", name, path, k)
						}
					}
					walk(path+"/"+k, p)
				}
			}
			for _, key := range []string{"items", "definitions"} {
				if sub, ok := m[key].(map[string]any); ok {
					if key == "definitions" {
						for k, d := range sub {
							walk(path+"/definitions/"+k, d)
						}
					} else {
						walk(path+"/items", sub)
					}
				}
			}
		}
		var doc any
		if err := jsonUnmarshal(s, &doc); err != nil {
			t.Fatal(err)
		}
		walk("", doc)
	}
}

func described(schema []byte, ref string) bool {
	var doc map[string]any
	if jsonUnmarshal(schema, &doc) != nil {
		return false
	}
	name := strings.TrimPrefix(ref, "#/definitions/")
	d, ok := doc["definitions"].(map[string]any)[name].(map[string]any)
	_, has := d["description"]
	return ok && has
}

// Written files validate against the shipped schemas, for an adiabatic
// and a cyclic gate and a model with every error term.
func TestWrittenFilesValidate(t *testing.T) {
	full := waveform.ErrorModel{AmplitudeError: 0.01, ChannelErrors: []float64{0.01, -0.02, 0}, OnePhotonDetuning: 1e5, TwoPhotonDetuning: 1e3,
		Decay: 1e4, Dephasing: 1e3, RiseTime: 2e-9, SubSteps: 4}
	firstOrder := full
	firstOrder.Filter, firstOrder.PhaseStep = waveform.FirstOrderFilter, math.Pi
	files := []*File{
		testFile(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6), waveform.ErrorModel{}),
		testFile(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6), full),
		testFile(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6), firstOrder),
		testFile(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6), waveform.ErrorModel{}),
	}
	for _, f := range files {
		validate(t, schemas.Waveform, encode(t, f))
	}
	lf, err := NewLoopFile(wavetest.TripodPlan(math.Pi/4, 0.05), "slice", []float64{math.Pi / 4}, 48)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := lf.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	validate(t, schemas.Loop, b.Bytes())
}

// Write → read → write reproduces every byte and every number, and
// verifying the waveform read from the file reproduces the recorded
// figures exactly.
func TestWaveformRoundTrip(t *testing.T) {
	p := wavetest.TripodPlan(math.Pi/4, 0.05)
	// A controlled detuning track on e exercises level_detunings.
	shape := p.Segments[0].Shape
	p.Segments[0].Shape = func(s float64, pt holonomy.Point) { shape(s, pt); pt.Detuning[3] = 0.01 * math.Sin(2*math.Pi*s) }
	p.Scheme.Levels[3].Detuning = 2 * math.Pi * 1.7e3
	f := testFile(t, p, wavetest.Hardware(3, 10e6), waveform.ErrorModel{AmplitudeError: 0.02, Decay: 1e3})
	b1 := encode(t, f)
	g, err := ReadWaveform(bytes.NewReader(b1), "round.json")
	if err != nil {
		t.Fatal(err)
	}
	b2 := encode(t, g)
	if !bytes.Equal(b1, b2) {
		t.Fatal("write → read → write changed the bytes")
	}
	w, r := f.Waveform, g.Waveform
	if !reflect.DeepEqual(w.I, r.I) || !reflect.DeepEqual(w.Q, r.Q) || !reflect.DeepEqual(w.CodeI, r.CodeI) ||
		!reflect.DeepEqual(w.CodeQ, r.CodeQ) || !reflect.DeepEqual(w.Detuning, r.Detuning) || !reflect.DeepEqual(w.Spans, r.Spans) ||
		!reflect.DeepEqual(w.Hardware, r.Hardware) || !reflect.DeepEqual(w.Scheme, r.Scheme) || !reflect.DeepEqual(w.Target, r.Target) ||
		w.Adiabaticity != r.Adiabaticity || w.MinFidelity != r.MinFidelity || !reflect.DeepEqual(w.LevelHz, r.LevelHz) {
		t.Error("waveform differs after the round trip")
	}
	if g.Seed != f.Seed || g.Spec != f.Spec || g.SpecSHA256 != f.SpecSHA256 || g.ToolVersion != f.ToolVersion {
		t.Error("provenance differs")
	}
	if r.Detuning[3] == nil {
		t.Error("detuning track lost")
	}
	v, err := waveform.Verify(r, g.Verification.Model)
	if err != nil {
		t.Fatal(err)
	}
	fv := f.Verification
	if !v.Same(fv) || !v.Same(g.Verification) {
		t.Error("re-verification is not the Same as the recorded one")
	}
	if v.Fidelity != fv.Fidelity || v.Leakage != fv.Leakage || v.Adiabaticity != fv.Adiabaticity ||
		!reflect.DeepEqual(v.PeakAux, fv.PeakAux) || !reflect.DeepEqual(v.Checks, fv.Checks) || !reflect.DeepEqual(v.Checks, g.Verification.Checks) {
		t.Errorf("re-verification differs: F %v vs %v, α %v vs %v", v.Fidelity, fv.Fidelity, v.Adiabaticity, fv.Adiabaticity)
	}
}

// The filter kind and the phase step round-trip: the file names the
// filter ("none" without a rise time, whatever the kind), write → read →
// write keeps every byte, the model read back is the one written, and
// re-verifying it reproduces the recorded figures bit for bit.
func TestModelFilterAndPhaseStepRoundTrip(t *testing.T) {
	for _, c := range []struct {
		m            waveform.ErrorModel
		filter, step string
	}{
		{waveform.ErrorModel{}, `"filter": "none"`, `"phase_step_rad": 0,`},
		{waveform.ErrorModel{Filter: waveform.FirstOrderFilter}, `"filter": "none"`, `"phase_step_rad": 0,`},
		{waveform.ErrorModel{RiseTime: 2e-9, SubSteps: 4}, `"filter": "gaussian"`, `"phase_step_rad": 0,`},
		{waveform.ErrorModel{Filter: waveform.FirstOrderFilter, RiseTime: 2e-9, PhaseStep: 2 * math.Pi / 1024, TwoPhotonDetuning: 1e4},
			`"filter": "first-order"`, `"phase_step_rad": 0.006135923151542565,`},
	} {
		f := testFile(t, wavetest.LambdaPlan(math.Pi/3, 0.7, wavetest.NDotSigma(math.Pi/3, 0.7)), wavetest.Hardware(2, 10e6), c.m)
		b1 := encode(t, f)
		if !bytes.Contains(b1, []byte(c.filter)) || !bytes.Contains(b1, []byte(c.step)) {
			t.Errorf("model %+v: file lacks %s or %s", c.m, c.filter, c.step)
		}
		g, err := ReadWaveform(bytes.NewReader(b1), "model.json")
		if err != nil {
			t.Fatal(err)
		}
		if b2 := encode(t, g); !bytes.Equal(b1, b2) {
			t.Errorf("model %+v: write → read → write changed the bytes", c.m)
		}
		gm := g.Verification.Model
		if gm.FilterName() != c.m.FilterName() || gm.RiseTime != c.m.RiseTime || gm.PhaseStep != c.m.PhaseStep || gm.SubSteps != c.m.SubSteps {
			t.Errorf("model %+v read back as %+v", c.m, gm)
		}
		v := wavetest.MustVerify(t, g.Waveform, gm)
		if !v.Same(f.Verification) || !v.Same(g.Verification) {
			t.Errorf("model %+v: re-verification differs (F %.17g vs %.17g)", c.m, v.Fidelity, f.Verification.Fidelity)
		}
	}
}

// Files written before the filter and phase-step fields existed still
// read: no filter means gaussian with a rise time and none without, no
// phase step means 0, and the recorded figures are reproduced.
func TestModelWithoutFilterFields(t *testing.T) {
	for _, m := range []waveform.ErrorModel{{}, {RiseTime: 2e-9}} {
		f := testFile(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6), m)
		doc := string(encode(t, f))
		old := doc
		for _, field := range []string{`"filter"`, `"phase_step_rad"`} {
			i := strings.Index(doc, field)
			j := strings.Index(doc[i:], "\n")
			k := strings.LastIndex(doc[:i], "\n")
			doc = doc[:k] + doc[i+j:]
		}
		if strings.Contains(doc, `"filter"`) || strings.Contains(doc, `"phase_step_rad"`) || len(doc) >= len(old) {
			t.Fatal("fields not removed")
		}
		g, err := ReadWaveform(strings.NewReader(doc), "old.json")
		if err != nil {
			t.Fatalf("rise time %g: a file without filter and phase step: %v", m.RiseTime, err)
		}
		gm := g.Verification.Model
		if gm.Filter != waveform.GaussianFilter || gm.PhaseStep != 0 || gm.RiseTime != m.RiseTime {
			t.Errorf("rise time %g: read %+v", m.RiseTime, gm)
		}
		if v := wavetest.MustVerify(t, g.Waveform, gm); !v.Same(f.Verification) {
			t.Errorf("rise time %g: re-verification differs", m.RiseTime)
		}
		// Written again, the file carries the fields.
		if b := encode(t, g); !bytes.Contains(b, []byte(`"filter": "`+m.FilterName()+`"`)) || !bytes.Contains(b, []byte(`"phase_step_rad": 0,`)) {
			t.Errorf("rise time %g: rewritten file lacks filter or phase step", m.RiseTime)
		}
	}
}

// Same compares the filter (when there is one) and the phase step.
func TestSameModelFields(t *testing.T) {
	base := waveform.Verification{Model: waveform.ErrorModel{RiseTime: 2e-9, PhaseStep: 0.01}, Adiabaticity: math.NaN()}
	for _, c := range []struct {
		name string
		edit func(*waveform.ErrorModel)
		same bool
	}{
		{"identical", func(m *waveform.ErrorModel) {}, true},
		{"filter kind", func(m *waveform.ErrorModel) { m.Filter = waveform.FirstOrderFilter }, false},
		{"phase step ulp", func(m *waveform.ErrorModel) { m.PhaseStep = math.Nextafter(m.PhaseStep, 1) }, false},
		{"no phase step", func(m *waveform.ErrorModel) { m.PhaseStep = 0 }, false},
		{"kind without rise time", func(m *waveform.ErrorModel) { m.RiseTime = 0; m.Filter = waveform.FirstOrderFilter }, false},
	} {
		o := base
		c.edit(&o.Model)
		if got := base.Same(&o); got != c.same {
			t.Errorf("%s: Same = %v", c.name, got)
		}
	}
	a := waveform.Verification{Model: waveform.ErrorModel{Filter: waveform.FirstOrderFilter}, Adiabaticity: math.NaN()}
	b := waveform.Verification{Model: waveform.ErrorModel{}, Adiabaticity: math.NaN()}
	if !a.Same(&b) {
		t.Error("a filter kind without a rise time (filter none) is not the Same as none")
	}
}

// A cyclic gate has no adiabaticity (NaN); Same still matches it.
func TestSameWithoutAdiabaticity(t *testing.T) {
	f := testFile(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6), waveform.ErrorModel{})
	g, err := ReadWaveform(bytes.NewReader(encode(t, f)), "lambda.json")
	if err != nil {
		t.Fatal(err)
	}
	v := wavetest.MustVerify(t, g.Waveform, g.Verification.Model)
	if !math.IsNaN(v.Adiabaticity) || !v.Same(g.Verification) || !v.Same(f.Verification) {
		t.Errorf("re-verification of a cyclic gate differs")
	}
	v.Fidelity = math.Nextafter(v.Fidelity, 0)
	if v.Same(f.Verification) {
		t.Error("Same ignores a one-ulp change of the fidelity")
	}
}

// Same plan ⇒ byte-identical files.
func TestDeterministic(t *testing.T) {
	a := encode(t, testFile(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6), waveform.ErrorModel{}))
	b := encode(t, testFile(t, wavetest.TripodPlan(math.Pi/4, 0.05), wavetest.Hardware(3, 10e6), waveform.ErrorModel{}))
	if !bytes.Equal(a, b) {
		t.Error("two builds of the same plan differ")
	}
}

func TestLoopFileRoundTrip(t *testing.T) {
	p := wavetest.TripodPlan(math.Pi/4, 0.05)
	lf, err := NewLoopFile(p, "slice", []float64{0.25, -1e-300, 3}, 96)
	if err != nil {
		t.Fatal(err)
	}
	lf.ToolVersion, lf.Seed, lf.SpecSHA256 = "test", 7, SpecHash(nil)
	var b1, b2 bytes.Buffer
	if err := lf.WriteJSON(&b1); err != nil {
		t.Fatal(err)
	}
	g, err := ReadLoop(bytes.NewReader(b1.Bytes()), "loop.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := g.WriteJSON(&b2); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b1.Bytes(), b2.Bytes()) {
		t.Fatal("write → read → write changed the loop file")
	}
	if !reflect.DeepEqual(lf.Segments, g.Segments) || !reflect.DeepEqual(lf.Parameters, g.Parameters) {
		t.Error("points or parameters differ")
	}
	// The loop rebuilt from 96 points (corners at s = 1/3, 2/3 fall on
	// points) gives the same holonomy and a gate that verifies.
	res, err := holonomy.NewWilson(g.Scheme).Adaptive(g.Shape(0), holonomy.AdaptiveOptions{Points: 96, Tol: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if d := holonomy.FrobeniusDist(res.U, wavetest.Rotation(math.Pi/4)); d > 1e-7 {
		t.Errorf("holonomy of the read loop off by %g", d)
	}
	w := wavetest.MustBuild(t, g.Plan(0.05, 0), wavetest.Hardware(3, 10e6))
	if v := wavetest.MustVerify(t, w, waveform.ErrorModel{}); v.Fidelity < 0.9999 {
		t.Errorf("gate from the loop file: F = %.8f", v.Fidelity)
	}
	// A cyclic segment is one point with its area.
	lc, err := NewLoopFile(wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), "lambda", nil, 8)
	if err != nil {
		t.Fatal(err)
	}
	if len(lc.Segments[0].Points) != 1 || lc.Segments[0].Area != 2*math.Pi {
		t.Errorf("cyclic segment: %+v", lc.Segments[0])
	}
}

// The NPY header decodes as NumPy format 1.0 with the documented shape,
// the data start on a 64-byte boundary and the values read back exactly.
func TestNPY(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6))
	var b bytes.Buffer
	if err := WriteNPY(&b, w); err != nil {
		t.Fatal(err)
	}
	data := b.Bytes()
	if string(data[:6]) != "\x93NUMPY" || data[6] != 1 || data[7] != 0 {
		t.Fatalf("magic/version % x", data[:8])
	}
	hl := int(binary.LittleEndian.Uint16(data[8:10]))
	off := 10 + hl
	if off%64 != 0 || data[off-1] != '\n' {
		t.Errorf("data offset %d, last header byte %q", off, data[off-1])
	}
	hdr := strings.TrimRight(string(data[10:off]), " \n")
	cols := NPYColumns(w)
	want := "{'descr': '<f8', 'fortran_order': False, 'shape': (" + strconv.Itoa(w.Len()) + ", " + strconv.Itoa(len(cols)) + "), }"
	if hdr != want {
		t.Errorf("header %q; want %q", hdr, want)
	}
	if len(data) != off+8*w.Len()*len(cols) {
		t.Fatalf("%d bytes; want %d", len(data), off+8*w.Len()*len(cols))
	}
	at := func(r, c int) float64 {
		return math.Float64frombits(binary.LittleEndian.Uint64(data[off+8*(r*len(cols)+c):]))
	}
	if cols[1] != "p0_i_hz" || cols[5] != "p0_i_code" {
		t.Errorf("columns %v", cols)
	}
	for k := 0; k < w.Len(); k++ {
		if at(k, 0) != float64(k)/w.Hardware.SampleRate || at(k, 1) != w.I[0][k] || at(k, 4) != w.Q[1][k] || at(k, 6) != float64(w.CodeQ[0][k]) {
			t.Fatalf("row %d differs", k)
		}
	}
}

// The CSV parses with encoding/csv, has the documented header and one row
// per sample, and its numbers read back exactly.
func TestCSV(t *testing.T) {
	w := wavetest.MustBuild(t, wavetest.LambdaPlan(math.Pi/4, 0.3, wavetest.NDotSigma(math.Pi/4, 0.3)), wavetest.Hardware(2, 10e6))
	var b bytes.Buffer
	if err := WriteCSV(&b, w); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(rows[0], CSVColumns(w)) || len(rows) != w.Len()+1 {
		t.Fatalf("header %v, %d rows", rows[0], len(rows))
	}
	for k, r := range rows[1:] {
		i, _ := strconv.ParseFloat(r[2], 64)
		a, _ := strconv.ParseFloat(r[4], 64)
		ph, _ := strconv.ParseFloat(r[5], 64)
		code, _ := strconv.Atoi(r[7])
		if i != w.I[0][k] || code != int(w.CodeQ[0][k]) || a != math.Hypot(w.I[0][k], w.Q[0][k]) || ph != math.Atan2(w.Q[0][k], w.I[0][k]) {
			t.Fatalf("row %d: %v", k, r)
		}
	}
}

// Bad waveform files: each gets a *FileError naming the file and the
// offending place.
func TestReadWaveformErrors(t *testing.T) {
	good := string(encode(t, testFile(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6), waveform.ErrorModel{})))
	f := testFile(t, wavetest.LambdaPlan(math.Pi/4, 0, wavetest.Hadamard()), wavetest.Hardware(2, 10e6), waveform.ErrorModel{})
	f.Waveform.I[1] = f.Waveform.I[1][:10]
	short := string(encode(t, f))
	cases := []struct{ name, doc, ptr, msg string }{
		{"empty", "", "", "empty file"},
		{"blank", " \n\t", "", "empty file"},
		{"not JSON", "{\"format\": ", "", "not valid JSON at line 1"},
		{"trailing data", good + "{}", "", "not valid JSON"},
		{"NaN", strings.Replace(good, `"fidelity": `, `"fidelity": NaN, "x": `, 1), "", "not valid JSON"},
		{"array", "[1, 2]", "", "does not match the schema"},
		{"other format", strings.Replace(good, WaveformFormat, "other", 1), "/format", `format is "other"`},
		{"loop file", `{"format": "loopgate-loop", "version": 1}`, "/format", "expected \"loopgate-waveform\""},
		{"version 2", strings.Replace(good, `"version": 1,`, `"version": 2,`, 1), "/version", "format version 2 is not supported"},
		{"missing field", strings.Replace(good, `"seed"`, `"sead"`, 1), "/sead", "Additional property"},
		{"wrong type", strings.Replace(good, `"samples": `, `"samples": "many", "x": `, 1), "", "does not match the schema"},
		{"zero sample rate", strings.Replace(good, `"sample_rate_hz": 1000000000`, `"sample_rate_hz": 0`, 1), "/sample_rate_hz", "greater than 0"},
		{"huge number", strings.Replace(good, `"sample_rate_hz": 1000000000`, `"sample_rate_hz": 1e400`, 1), "/sample_rate_hz", "does not fit"},
		{"samples mismatch", short, "/channels/1/i_hz", "10 samples where the file declares 192"},
		{"unknown level", strings.Replace(good, `"upper": "e"`, `"upper": "f"`, 1), "/scheme/channels/0/upper", `level "f" is not in the scheme`},
		{"self coupling", strings.Replace(good, `"upper": "e"`, `"upper": "g0"`, 1), "/scheme/channels/0", "to itself"},
		{"not unitary", strings.Replace(good, `"im": [`, `"im": [[0.5, 0], [0, 0]], "x": [`, 1), "", "does not match the schema"},
		{"edited code", editCode(good), "/channels/0/i_code/", "does not match the sample"},
		{"filter without rise time", strings.Replace(good, `"filter": "none"`, `"filter": "first-order"`, 1), "/verification/model/rise_time_s", "the first-order filter needs a positive rise time"},
		{"rise time without filter", strings.Replace(good, `"rise_time_s": 0,`, `"rise_time_s": 2e-9,`, 1), "/verification/model/filter", "filter is none but rise_time_s is 2e-09 s"},
		{"unknown filter", strings.Replace(good, `"filter": "none"`, `"filter": "rc"`, 1), "/verification/model/filter", "does not match the schema"},
		{"phase step above π", strings.Replace(good, `"phase_step_rad": 0,`, `"phase_step_rad": 3.1415926535897936,`, 1), "/verification/model/phase_step_rad", "does not match the schema"},
		{"negative phase step", strings.Replace(good, `"phase_step_rad": 0,`, `"phase_step_rad": -0.1,`, 1), "/verification/model/phase_step_rad", "does not match the schema"},
		{"pass flag", strings.Replace(good, `"pass": true
  }`, `"pass": false
  }`, 1), "/verification/pass", "the checks say true"},
	}
	for _, c := range cases {
		_, err := ReadWaveform(strings.NewReader(c.doc), "bad.json")
		var fe *FileError
		if !errors.As(err, &fe) {
			t.Errorf("%s: error %v is not a *FileError", c.name, err)
			continue
		}
		if fe.File != "bad.json" || !strings.HasPrefix(fe.Pointer, c.ptr) || !strings.Contains(fe.Msg, c.msg) {
			t.Errorf("%s: got %q; want pointer %q and %q", c.name, err, c.ptr, c.msg)
		}
		t.Logf("%s: %v", c.name, err)
	}
	// Non-unitary target with a valid shape.
	nu := strings.Replace(good, `[0.7071067811865476,0.7071067811865476]`, `[0.9,0.7071067811865476]`, 1)
	if nu == good {
		t.Fatal("target not found in the file")
	}
	if _, err := ReadWaveform(strings.NewReader(nu), "bad.json"); err == nil || !strings.Contains(err.Error(), "/target: target is not unitary") {
		t.Errorf("non-unitary target: %v", err)
	}
}

// editCode changes the first non-zero I code of channel 0.
func editCode(doc string) string {
	i := strings.Index(doc, `"i_code": [`)
	j := i + len(`"i_code": [`)
	end := strings.Index(doc[j:], ",")
	return doc[:j] + "12345" + doc[j+end:]
}

func TestReadLoopErrors(t *testing.T) {
	lf, err := NewLoopFile(wavetest.TripodPlan(math.Pi/4, 0.05), "slice", nil, 8)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := lf.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	good := b.String()
	cases := []struct{ name, doc, ptr, msg string }{
		{"empty", "", "", "empty file"},
		{"waveform file", `{"format": "loopgate-waveform"}`, "/format", "expected \"loopgate-loop\""},
		{"version", strings.Replace(good, `"version": 1`, `"version": 7`, 1), "/version", "version 7"},
		{"decreasing s", strings.Replace(good, `"s": 0.25`, `"s": 0.1`, 1), "/segments/0/points/2/s", "must increase"},
		{"first s", strings.Replace(good, `"s": 0,`, `"s": 0.01,`, 1), "/segments/0/points/0/s", "first point"},
		{"s out of range", strings.Replace(good, `"s": 0.25`, `"s": 1.25`, 1), "/segments/0/points/2/s", "does not match the schema"},
		{"channels", strings.Replace(good, `"re": [0,0,1]`, `"re": [0,0,0,1]`, 1), "/segments/0/points/0", "4 real and 3 imaginary"},
		{"cyclic points", strings.Replace(good, `"kind": "adiabatic"`, `"kind": "cyclic"`, 1), "/segments/0/points", "exactly one point"},
		{"kind", strings.Replace(good, `"kind": "adiabatic"`, `"kind": "fast"`, 1), "/segments/0/kind", "does not match the schema"},
	}
	for _, c := range cases {
		_, err := ReadLoop(strings.NewReader(c.doc), "bad-loop.json")
		var fe *FileError
		if !errors.As(err, &fe) || !strings.HasPrefix(fe.Pointer, c.ptr) || !strings.Contains(fe.Msg, c.msg) {
			t.Errorf("%s: got %v; want pointer %q and %q", c.name, err, c.ptr, c.msg)
			continue
		}
		t.Logf("%s: %v", c.name, err)
	}
}

func jsonUnmarshal(b []byte, v any) error { return json.Unmarshal(b, v) }
