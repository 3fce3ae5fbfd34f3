package report

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strings"
	"sync"
	"testing"
)

// element is a parsed XML element (the page is written as well-formed
// polyglot markup, so encoding/xml reads it in strict mode).
type element struct {
	name     string
	attr     map[string]string
	children []*element
	text     strings.Builder
}

func (e *element) find(pred func(*element) bool) []*element {
	var out []*element
	var walk func(*element)
	walk = func(x *element) {
		if pred(x) {
			out = append(out, x)
		}
		for _, c := range x.children {
			walk(c)
		}
	}
	walk(e)
	return out
}

func (e *element) byID(id string) *element {
	r := e.find(func(x *element) bool { return x.attr["id"] == id })
	if len(r) != 1 {
		return nil
	}
	return r[0]
}

func (e *element) count(name string) int {
	return len(e.find(func(x *element) bool { return x.name == name }))
}

func (e *element) allText() string {
	var b strings.Builder
	var walk func(*element)
	walk = func(x *element) {
		b.WriteString(x.text.String())
		for _, c := range x.children {
			walk(c)
		}
	}
	walk(e)
	return b.String()
}

// parsePage parses the page strictly: every tag must be closed and nested
// properly, attributes quoted, entities known to XML.
func parsePage(t *testing.T, page []byte) *element {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(page))
	dec.Strict = true
	root := &element{name: "#document"}
	stack := []*element{root}
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			line, col := dec.InputPos()
			t.Fatalf("page is not well formed at line %d, column %d: %v", line, col, err)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			e := &element{name: tok.Name.Local, attr: map[string]string{}}
			for _, a := range tok.Attr {
				e.attr[a.Name.Local] = a.Value
			}
			top := stack[len(stack)-1]
			top.children = append(top.children, e)
			stack = append(stack, e)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			stack[len(stack)-1].text.Write(tok)
		}
	}
	if len(stack) != 1 {
		t.Fatalf("page ends with %d unclosed elements", len(stack)-1)
	}
	return root
}

func render(t *testing.T, d *Data) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, d); err != nil {
		t.Fatalf("Write: %v", err)
	}
	return b.Bytes()
}

var (
	sectionIDs = []string{"sec-header", "sec-advantage", "sec-summary", "sec-loop", "sec-waveforms", "sec-populations",
		"sec-robustness", "sec-map", "sec-budget", "sec-hardware", "sec-cautions", "sec-provenance"}
	figureIDs = []string{"fig-loop", "fig-waveforms", "fig-populations", "fig-robustness", "fig-map"}
	tableIDs  = []string{"tab-advantage", "tab-verification", "tab-budget", "tab-hardware", "tab-provenance"}
)

func TestWriteFullReport(t *testing.T) {
	d := syntheticData()
	root := parsePage(t, render(t, d))
	for _, id := range sectionIDs {
		if root.byID(id) == nil {
			t.Errorf("section %s missing or not unique", id)
		}
	}
	for _, id := range figureIDs {
		f := root.byID(id)
		if f == nil {
			t.Errorf("figure %s missing", id)
			continue
		}
		svgs := f.find(func(x *element) bool { return x.name == "svg" })
		if len(svgs) != 1 {
			t.Errorf("figure %s has %d svg elements; want 1", id, len(svgs))
			continue
		}
		// Drawn content: many paths, and text for axes and key.
		if n := svgs[0].count("path"); n < 20 {
			t.Errorf("figure %s has %d paths; want a drawn figure", id, n)
		}
		if n := svgs[0].count("text"); n < 5 {
			t.Errorf("figure %s has %d text elements; want labelled axes", id, n)
		}
		if f.count("figcaption") != 1 {
			t.Errorf("figure %s has no caption", id)
		}
	}
	if n := root.byID("fig-map").count("image"); n != 2 {
		t.Errorf("map has %d images; want the heat map and the colour bar", n)
	}
	rows := func(id string) int {
		tab := root.byID(id)
		if tab == nil {
			t.Fatalf("table %s missing", id)
		}
		return len(tab.find(func(x *element) bool { return x.name == "tr" }))
	}
	for _, c := range []struct {
		id   string
		want int
	}{
		{"tab-advantage", len(d.Advantage) + 1},
		{"tab-verification", 6 + 1},
		{"tab-budget", len(d.Budget) + 1},
		{"tab-hardware", len(d.Checks) + 1},
		{"tab-provenance", 4},
	} {
		if got := rows(c.id); got != c.want {
			t.Errorf("table %s has %d rows; want %d", c.id, got, c.want)
		}
	}
	// The headline comes first after the header.
	main := root.find(func(x *element) bool { return x.name == "main" })[0]
	if main.children[1].attr["id"] != "sec-advantage" {
		t.Errorf("first section is %q; want the geometric advantage", main.children[1].attr["id"])
	}
	// Pass and fail in words, not only colour.
	hw := root.byID("tab-hardware").allText()
	if strings.Count(hw, "pass") != 3 || strings.Count(hw, "FAIL") != 1 {
		t.Errorf("hardware table words: %q", hw)
	}
	checkCautions(t, root, d)
}

// checkCautions checks the cautions section (the required topics and the
// data's extra caution), the synthetic-data notice and that the page has
// no scripts.
func checkCautions(t *testing.T, root *element, d *Data) {
	t.Helper()
	ct := root.byID("sec-cautions").allText()
	for _, w := range []string{"calibration", "damage", "Laser safety", "safety rules", "licensed practice"} {
		if !strings.Contains(ct, w) {
			t.Errorf("cautions do not mention %q", w)
		}
	}
	if !strings.Contains(ct, d.Cautions[0]) {
		t.Error("extra caution missing")
	}
	if !strings.Contains(root.byID("notice").allText(), "SYNTHETIC") {
		t.Error("notice missing")
	}
	if root.count("script") != 0 {
		t.Error("page has scripts")
	}
}

func TestWriteDeterministic(t *testing.T) {
	first := render(t, syntheticData())
	// Concurrent writers must not disturb each other or the output.
	var wg sync.WaitGroup
	pages := make([][]byte, 2)
	for i := range pages {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b bytes.Buffer
			if err := Write(&b, syntheticData()); err != nil {
				t.Error(err)
			}
			pages[i] = b.Bytes()
		}()
	}
	wg.Wait()
	for i, p := range pages {
		if !bytes.Equal(first, p) {
			t.Fatalf("run %d differs from the first run (%d vs %d bytes)", i+1, len(p), len(first))
		}
	}
	for _, bad := range []string{"<?xml", "Generated by", "data:image/jpg"} {
		if bytes.Contains(first, []byte(bad)) {
			t.Errorf("page contains %q", bad)
		}
	}
}

// remote matches URL-like attribute values and CSS references that would
// make the browser fetch something.
var (
	attrRef  = regexp.MustCompile(`(?i)\b(?:src|href|xlink:href|srcset|poster|data|action)\s*=\s*"([^"]*)"`)
	cssFetch = regexp.MustCompile(`(?i)url\(\s*['"]?([^'")]*)|@import`)
)

func TestNoRemoteReferences(t *testing.T) {
	page := string(render(t, syntheticData()))
	refs := attrRef.FindAllStringSubmatch(page, -1)
	if len(refs) == 0 {
		t.Fatal("found no references at all; the check is not looking at the page")
	}
	for _, m := range refs {
		v := m[1]
		if !strings.HasPrefix(v, "#") && !strings.HasPrefix(v, "data:image/png;base64,") {
			t.Errorf("reference to something outside the page: %.80s", m[0])
		}
	}
	for _, m := range cssFetch.FindAllStringSubmatch(page, -1) {
		if m[0] == "@import" || !strings.HasPrefix(m[1], "#") {
			t.Errorf("style fetches: %q", m[0])
		}
	}
	for _, tag := range []string{"<script", "<link", "<iframe", "<object", "<embed", "<img"} {
		if strings.Contains(page, tag) {
			t.Errorf("page contains %s", tag)
		}
	}
	// Namespaces name the SVG vocabulary; they are never fetched.
	rest := strings.NewReplacer(`xmlns="http://www.w3.org/2000/svg"`, "", `xmlns:xlink="http://www.w3.org/1999/xlink"`, "").Replace(page)
	if strings.Contains(rest, "http://") || strings.Contains(rest, "https://") {
		t.Error("page contains a URL outside the SVG namespace declarations")
	}
}

func TestWriteMissingSections(t *testing.T) {
	d := &Data{Title: "Only a title"}
	root := parsePage(t, render(t, d))
	for _, id := range sectionIDs {
		if root.byID(id) == nil {
			t.Errorf("section %s missing", id)
		}
	}
	for _, id := range []string{"sec-advantage", "sec-summary", "sec-loop", "sec-waveforms", "sec-populations", "sec-robustness", "sec-map", "sec-budget", "sec-hardware"} {
		s := root.byID(id)
		notes := s.find(func(x *element) bool { return x.attr["class"] == "missing" })
		if len(notes) != 1 || !strings.HasPrefix(notes[0].allText(), "No ") {
			t.Errorf("section %s: want one line saying it is omitted", id)
		}
	}
	if n := root.count("svg"); n != 0 {
		t.Errorf("%d figures drawn for empty data", n)
	}
	if !strings.Contains(root.byID("sec-cautions").allText(), "Laser safety") {
		t.Error("cautions must be shown even for empty data")
	}
	// Partial data: a map without dynamical grid, sweeps without the
	// dynamical curve, one waveform without limit.
	d = syntheticData()
	d.Map.Dynamical = nil
	for i := range d.Sweeps {
		d.Sweeps[i].Dynamical = nil
	}
	d.Waveforms = d.Waveforms[:1]
	d.Waveforms[0].MaxRabi = 0
	d.Populations = d.Populations[:1]
	page := render(t, d)
	root = parsePage(t, page)
	for _, id := range figureIDs {
		if root.byID(id) == nil {
			t.Errorf("figure %s missing with partial data", id)
		}
	}
	if bytes.Contains(page, []byte("dynamical F = ")) || bytes.Contains(page, []byte(">dynamical gate<")) {
		t.Error("dynamical series drawn although absent")
	}
}

func TestWriteRejectsBadData(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(d *Data)
		field string
	}{
		{"nil", nil, "nil *Data"},
		{"waveform lengths", func(d *Data) { d.Waveforms[1].Phase = d.Waveforms[1].Phase[:5] }, `Waveforms[1] ("p1")`},
		{"waveform NaN", func(d *Data) { d.Waveforms[2].Amplitude[7] = math.NaN() }, `Waveforms[2] ("pa").Amplitude[7]`},
		{"time order", func(d *Data) { d.Waveforms[0].Time[3] = d.Waveforms[0].Time[2] }, `Waveforms[0] ("p0").Time is not increasing at index 3`},
		{"loop shape", func(d *Data) { d.Loop.Drive[4] = d.Loop.Drive[4][:2] }, "Loop.Drive[4] has 2 channels"},
		{"loop zero", func(d *Data) {
			for k := range d.Loop.Drive {
				d.Loop.Drive[k] = make([]complex128, 3)
			}
		}, "Loop.Drive is zero at every sample"},
		{"population rows", func(d *Data) { d.Populations[1].P = d.Populations[1].P[:3] }, `Populations[1] (input "g1")`},
		{"sweep inf", func(d *Data) { d.Sweeps[1].Geometric[0] = math.Inf(1) }, `Sweeps[1] ("detuning δ").Geometric[0]`},
		{"map shape", func(d *Data) { d.Map.Geometric[3] = d.Map.Geometric[3][1:] }, "Map.Geometric[3] has 40 columns"},
		{"map dynamical rows", func(d *Data) { d.Map.Dynamical = d.Map.Dynamical[1:] }, "Map.Dynamical has 40 rows"},
		{"negative width", func(d *Data) { d.Advantage[0].Dynamical = -1 }, `Advantage[0] ("amplitude error ε")`},
		{"check NaN", func(d *Data) { d.Checks[2].Margin = math.NaN() }, `Checks[2] ("peak Rabi frequency pa").Margin`},
	}
	for _, c := range cases {
		var d *Data
		if c.edit != nil {
			d = syntheticData()
			c.edit(d)
		}
		var b bytes.Buffer
		err := Write(&b, d)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.field) {
			t.Errorf("%s: error %q does not name %q", c.name, err, c.field)
		}
		if b.Len() != 0 {
			t.Errorf("%s: %d bytes written despite the error", c.name, b.Len())
		}
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteReportsWriterError(t *testing.T) {
	err := Write(failWriter{}, &Data{})
	if err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Fatalf("got %v; want the writer's error", err)
	}
}

// Text from the specification reaches the page escaped, in HTML and in the
// SVG figures alike.
func TestWriteEscapesText(t *testing.T) {
	const evil = `<script>x</script> & "q" 'a'`
	d := syntheticData()
	d.Title, d.Subtitle, d.Notice, d.Gate, d.Scheme, d.DynamicalGate = evil, evil, evil, evil, evil, evil
	d.Loop.Channels[0] = evil
	d.Waveforms[0].Channel = evil
	d.Populations[0].Input = evil
	d.Populations[0].Levels[2] = evil
	d.Sweeps[0].Axis = evil
	d.Map.XAxis = evil
	d.Advantage[0].Axis = evil
	d.Budget[0].Term, d.Budget[0].Note = evil, evil
	d.Checks[0].Name = evil
	d.Verification.AdiabaticityNote = evil
	d.Provenance = Provenance{Version: evil, SpecHash: evil, Source: evil}
	d.Cautions = []string{evil}
	page := render(t, d)
	root := parsePage(t, page)
	if bytes.Contains(page, []byte("<script")) {
		t.Fatal("unescaped markup from input text")
	}
	if root.count("script") != 0 {
		t.Fatal("script element from input text")
	}
	if n := strings.Count(root.allText(), evil); n < 10 {
		t.Errorf("input text shown %d times; want it shown (escaped) in every field", n)
	}
}

// A spin-15/2 ladder: one axial loop, 15 channels, 16 levels. Every channel
// and level gets its own entry in the key, and the figure is tall enough to
// hold it.
func TestWriteManyLevels(t *testing.T) {
	d := &Data{Title: "spin ladder"}
	l := &Loop{Channels: []string{"x0"}}
	for k := 0; k <= 100; k++ {
		s := float64(k) / 100
		th := 0.4 * math.Sin(math.Pi*s)
		l.Drive = append(l.Drive, []complex128{complex(math.Sin(th)*math.Cos(2*math.Pi*s), math.Sin(th)*math.Sin(2*math.Pi*s))})
		l.Axial = append(l.Axial, math.Cos(th))
	}
	d.Loop = l
	levels := make([]string, 16)
	for i := range levels {
		levels[i] = fmt.Sprintf("m=%d/2", 15-2*i)
	}
	time := []float64{0, 1e-6, 2e-6}
	for c := 0; c < 15; c++ {
		d.Waveforms = append(d.Waveforms, Waveform{Channel: fmt.Sprintf("x%d", c), Time: time,
			Amplitude: []float64{0, 1e6, 0}, Phase: []float64{0, 0, 0}, MaxRabi: float64(c+1) * 1e6})
	}
	p := Populations{Input: "m=15/2", Time: time, Levels: levels}
	for range levels {
		p.P = append(p.P, []float64{1 / 16.0, 1 / 16.0, 1 / 16.0})
	}
	d.Populations = []Populations{p}
	root := parsePage(t, render(t, d))
	pop := root.byID("fig-populations").allText()
	for _, lv := range levels {
		if !strings.Contains(pop, "level "+lv) {
			t.Errorf("key lacks level %s", lv)
		}
	}
	wf := root.byID("fig-waveforms").allText()
	for c := 0; c < 15; c++ {
		if !strings.Contains(wf, fmt.Sprintf("limit x%d", c)) {
			t.Errorf("key lacks the limit of channel x%d", c)
		}
	}
	// Every text of the figures lies inside the drawing (vgsvg writes text
	// at y = −height above the bottom edge, under a flip).
	for _, id := range []string{"fig-populations", "fig-waveforms"} {
		svg := root.byID(id).find(func(x *element) bool { return x.name == "svg" })[0]
		var vx, vy, vw, vh float64
		if _, err := fmt.Sscanf(svg.attr["viewBox"], "%g %g %g %g", &vx, &vy, &vw, &vh); err != nil {
			t.Fatalf("%s viewBox %q: %v", id, svg.attr["viewBox"], err)
		}
		rotated := map[*element]bool{}
		for _, g := range svg.find(func(x *element) bool { return x.name == "g" && strings.Contains(x.attr["transform"], "rotate") }) {
			for _, tx := range g.find(func(x *element) bool { return x.name == "text" }) {
				rotated[tx] = true
			}
		}
		for _, tx := range svg.find(func(x *element) bool { return x.name == "text" }) {
			if rotated[tx] {
				continue
			}
			var y float64
			fmt.Sscanf(tx.attr["y"], "%g", &y)
			if -y < 0 || -y > vh {
				t.Errorf("%s: text %q at height %g outside the %g pt figure", id, tx.allText(), -y, vh)
			}
		}
	}
	seen := map[string]bool{}
	for i := 0; i < 30; i++ {
		s := styleOf(i)
		k := fmt.Sprintf("%v %v %T", s.color, s.dash, s.glyph)
		if seen[k] {
			t.Errorf("style %d repeats an earlier one", i)
		}
		seen[k] = true
	}
}
