package report

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Write writes the report for d to w as one self-contained HTML page: the
// figures are inline SVG drawn with gonum/plot, the styles are in the page,
// and nothing is fetched from anywhere. The same Data always gives the same
// bytes. The page is built in memory first, so when Write returns an error
// nothing has been written to w.
func Write(w io.Writer, d *Data) error {
	if err := validate(d); err != nil {
		return err
	}
	var b bytes.Buffer
	if err := page(&b, d); err != nil {
		return err
	}
	if _, err := w.Write(b.Bytes()); err != nil {
		return fmt.Errorf("report: writing page: %w", err)
	}
	return nil
}

// section is one numbered section of the page.
type section struct {
	id, title string
	body      func(b *bytes.Buffer, d *Data) error
}

var sections = []section{
	{"sec-advantage", "Geometric advantage", advantageSection},
	{"sec-summary", "Verification summary", summarySection},
	{"sec-loop", "Control loop", loopSection},
	{"sec-waveforms", "Waveforms", waveformSection},
	{"sec-populations", "Level populations", populationSection},
	{"sec-robustness", "Robustness curves", sweepSection},
	{"sec-map", "Robustness map", mapSection},
	{"sec-budget", "Error budget", budgetSection},
	{"sec-hardware", "Hardware checks", hardwareSection},
	{"sec-cautions", "Cautions", cautionSection},
	{"sec-provenance", "Provenance", provenanceSection},
}

func page(b *bytes.Buffer, d *Data) error {
	title := d.Title
	if title == "" {
		title = "Holonomic gate report"
	}
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n")
	b.WriteString("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n")
	b.WriteString("<meta name=\"generator\" content=\"loopgate\"/>\n")
	fmt.Fprintf(b, "<title>%s</title>\n<style>\n%s</style>\n</head>\n<body>\n<main class=\"page\">\n", esc(title), css)

	b.WriteString("<header id=\"sec-header\" class=\"top\">\n<p class=\"kicker\">loopgate · holonomic gate report</p>\n")
	fmt.Fprintf(b, "<h1>%s</h1>\n", esc(title))
	if d.Subtitle != "" {
		fmt.Fprintf(b, "<p class=\"subtitle\">%s</p>\n", esc(d.Subtitle))
	}
	b.WriteString("<dl class=\"facts\">\n")
	fact := func(k, v string) {
		if v != "" {
			fmt.Fprintf(b, "<div><dt>%s</dt><dd>%s</dd></div>\n", k, esc(v))
		}
	}
	fact("Target gate", d.Gate)
	fact("Level scheme", d.Scheme)
	fact("Compared with", d.DynamicalGate)
	b.WriteString("</dl>\n")
	if d.Notice != "" {
		fmt.Fprintf(b, "<p class=\"notice\" id=\"notice\">%s</p>\n", esc(d.Notice))
	}
	b.WriteString("<p class=\"safety\">These waveforms drive lasers or microwave sources: read the <a href=\"#sec-cautions\">cautions</a> before sending them to hardware.</p>\n")
	b.WriteString("<nav class=\"toc\"><ol>\n")
	for _, s := range sections {
		fmt.Fprintf(b, "<li><a href=\"#%s\">%s</a></li>\n", s.id, esc(s.title))
	}
	b.WriteString("</ol></nav>\n</header>\n")

	for i, s := range sections {
		class := ""
		if s.id == "sec-advantage" {
			class = " class=\"headline\""
		}
		fmt.Fprintf(b, "<section id=\"%s\"%s>\n<h2><span class=\"num\">%d</span>%s</h2>\n", s.id, class, i+1, esc(s.title))
		if err := s.body(b, d); err != nil {
			return err
		}
		b.WriteString("</section>\n")
	}
	b.WriteString("<footer><p>Made by loopgate")
	if d.Provenance.Version != "" {
		fmt.Fprintf(b, " %s", esc(d.Provenance.Version))
	}
	b.WriteString(". A self-contained page: figures are inline SVG and nothing is loaded from elsewhere.</p></footer>\n")
	b.WriteString("</main>\n</body>\n</html>\n")
	return nil
}

// missing writes the one-line note for an omitted section.
func missing(b *bytes.Buffer, what string) {
	fmt.Fprintf(b, "<p class=\"missing\">%s</p>\n", esc(what))
}

// writeFigure writes a rendered figure with its id and caption.
func writeFigure(b *bytes.Buffer, id string, f figure) {
	fmt.Fprintf(b, "<figure id=\"%s\" class=\"fig\" style=\"max-width:%dpx\">\n%s\n<figcaption>%s</figcaption>\n</figure>\n",
		id, int(math.Round(f.w*pxPerPt)), f.svg, esc(f.caption))
}

// ---------------------------------------------------------------- sections

func advantageSection(b *bytes.Buffer, d *Data) error {
	if len(d.Advantage) == 0 {
		if d.DynamicalGate != "" {
			missing(b, "No geometric-advantage comparison: the plain dynamical gate needs no pulse here ("+d.DynamicalGate+").")
			return nil
		}
		missing(b, "No geometric-advantage comparison in this report (no robustness sweeps were run).")
		return nil
	}
	fmt.Fprintf(b, "<p class=\"lead\">Width of the region along each error axis where the average gate fidelity stays at or above F&#160;=&#160;%g, for the geometric gate and for the plain dynamical gate with the same target and hardware limits.</p>\n", Threshold)
	b.WriteString("<div class=\"cards\">\n")
	for _, r := range d.Advantage {
		var word, detail string
		switch {
		case r.Geometric == 0 && r.Dynamical == 0:
			word = "neither gate reaches the threshold"
		case r.Dynamical == 0:
			word = "only the geometric gate reaches the threshold"
		case r.Ratio >= 1:
			word = "wider robust region"
		default:
			word = "narrower robust region"
		}
		geo, dyn, rat := r.widths()
		detail = fmt.Sprintf("geometric %s · dynamical %s", geo, dyn)
		fmt.Fprintf(b, "<div class=\"card\"><p class=\"axis\">%s</p><p class=\"big\">%s</p><p class=\"word\">%s</p><p class=\"detail\">%s</p></div>\n",
			esc(r.Axis), rat, esc(word), detail)
	}
	b.WriteString("</div>\n")
	b.WriteString("<table id=\"tab-advantage\">\n<thead><tr><th>Error axis</th><th class=\"num\">Geometric gate</th><th class=\"num\">Dynamical gate</th><th class=\"num\">Ratio</th></tr></thead>\n<tbody>\n")
	for _, r := range d.Advantage {
		geo, dyn, rat := r.widths()
		fmt.Fprintf(b, "<tr><td>%s</td><td class=\"num\">%s</td><td class=\"num\">%s</td><td class=\"num strong\">%s</td></tr>\n",
			esc(r.Axis), geo, dyn, rat)
	}
	b.WriteString("</tbody>\n</table>\n")
	note := "Widths are measured with the other errors off; ≥ marks a width whose edge lies beyond the range examined (a lower bound)."
	if d.DynamicalGate != "" {
		note += " Dynamical gate: " + d.DynamicalGate + "."
	}
	fmt.Fprintf(b, "<p class=\"note\">%s</p>\n", esc(note))
	return nil
}

func summarySection(b *bytes.Buffer, d *Data) error {
	v := d.Verification
	if v == nil {
		missing(b, "No verification results in this report.")
		return nil
	}
	b.WriteString("<table id=\"tab-verification\" class=\"kv\">\n<thead><tr><th>Quantity</th><th class=\"num\">Value</th><th>Note</th></tr></thead>\n<tbody>\n")
	row := func(k, val, note string) {
		fmt.Fprintf(b, "<tr><td>%s</td><td class=\"num\">%s</td><td>%s</td></tr>\n", esc(k), val, note)
	}
	goal, what := v.Goal, "the design goal"
	if goal == 0 {
		goal, what = Threshold, "the threshold"
	}
	meets := "<span class=\"pass\">meets</span>"
	if v.Fidelity < goal {
		meets = "<span class=\"fail\">BELOW</span>"
	}
	row("Average gate fidelity F", fidelity(v.Fidelity), fmt.Sprintf("1 − F = %s; %s %s F&#160;≥&#160;%g", num(1-v.Fidelity, 2), meets, what, goal))
	row("Leakage", num(v.Leakage, 3), "population leaving the computational levels, averaged over inputs")
	if math.IsNaN(v.Adiabaticity) {
		row("Adiabaticity", "—", esc(v.AdiabaticityNote))
	} else {
		row("Adiabaticity", num(v.Adiabaticity, 3), esc(v.AdiabaticityNote))
	}
	row("Gate duration", qty(v.Duration, "s", 4), "")
	samples := strconv.Itoa(v.Samples)
	sn := ""
	if v.SampleRate > 0 {
		sn = "at " + qty(v.SampleRate, "S/s", 4)
	}
	row("Samples per channel", samples, sn)
	if len(d.Checks) > 0 {
		fails := 0
		for _, c := range d.Checks {
			if !c.Pass {
				fails++
			}
		}
		val := fmt.Sprintf("<span class=\"pass\">%d of %d pass</span>", len(d.Checks), len(d.Checks))
		if fails > 0 {
			val = fmt.Sprintf("<span class=\"fail\">%d of %d FAIL</span>", fails, len(d.Checks))
		}
		row("Hardware checks", val, "see <a href=\"#sec-hardware\">hardware checks</a>")
	}
	b.WriteString("</tbody>\n</table>\n")
	return nil
}

func loopSection(b *bytes.Buffer, d *Data) error {
	if d.Loop == nil {
		missing(b, "No control loop in this report (the waveforms were verified without their design).")
		return nil
	}
	f, err := loopFigure(d.Loop)
	if err != nil {
		return fmt.Errorf("report: loop figure: %w", err)
	}
	writeFigure(b, "fig-loop", f)
	return nil
}

func waveformSection(b *bytes.Buffer, d *Data) error {
	if len(d.Waveforms) == 0 {
		missing(b, "No waveforms in this report.")
		return nil
	}
	f, err := waveformFigure(d.Waveforms)
	if err != nil {
		return fmt.Errorf("report: waveform figure: %w", err)
	}
	writeFigure(b, "fig-waveforms", f)
	return nil
}

func populationSection(b *bytes.Buffer, d *Data) error {
	if len(d.Populations) == 0 {
		missing(b, "No level populations in this report.")
		return nil
	}
	f, err := populationFigure(d.Populations)
	if err != nil {
		return fmt.Errorf("report: population figure: %w", err)
	}
	writeFigure(b, "fig-populations", f)
	return nil
}

func sweepSection(b *bytes.Buffer, d *Data) error {
	if len(d.Sweeps) == 0 {
		missing(b, "No robustness curves in this report (no one-dimensional sweeps were run).")
		return nil
	}
	f, err := sweepFigure(d.Sweeps)
	if err != nil {
		return fmt.Errorf("report: robustness figure: %w", err)
	}
	writeFigure(b, "fig-robustness", f)
	return nil
}

func mapSection(b *bytes.Buffer, d *Data) error {
	if d.Map == nil {
		missing(b, "No two-dimensional robustness map in this report (none was requested).")
		return nil
	}
	f, err := mapFigure(d.Map)
	if err != nil {
		return fmt.Errorf("report: robustness map: %w", err)
	}
	writeFigure(b, "fig-map", f)
	return nil
}

// barPx is the width of the error-budget bars: a logarithmic scale from
// budgetFloor to 1.
const (
	barPx       = 150
	budgetFloor = 1e-8
)

func budgetSection(b *bytes.Buffer, d *Data) error {
	if len(d.Budget) == 0 {
		missing(b, "No error budget in this report.")
		return nil
	}
	b.WriteString("<p class=\"lead\">The first line is the infidelity 1&#160;−&#160;F of the ideal model (no errors); each further line is the infidelity one error term adds when it alone is switched on; the total has every term on. A negative value means the term happened to help. The bars use a logarithmic scale from 10<sup>−8</sup> to 1.</p>\n")
	b.WriteString("<table id=\"tab-budget\">\n<thead><tr><th>Error term</th><th class=\"num\">Infidelity</th><th class=\"barcol\">Scale</th><th>Note</th></tr></thead>\n<tbody>\n")
	for _, r := range d.Budget {
		class := ""
		if r.Total {
			class = " class=\"total\""
		}
		w := 0
		if r.Infidelity > budgetFloor {
			w = int(math.Round(barPx * (math.Log10(math.Min(r.Infidelity, 1)) - math.Log10(budgetFloor)) / -math.Log10(budgetFloor)))
		}
		fmt.Fprintf(b, "<tr%s><td>%s</td><td class=\"num\">%s</td><td class=\"barcol\"><span class=\"bar\" style=\"width:%dpx\"></span></td><td>%s</td></tr>\n",
			class, esc(r.Term), num(r.Infidelity, 2), w, esc(r.Note))
	}
	b.WriteString("</tbody>\n</table>\n")
	return nil
}

func hardwareSection(b *bytes.Buffer, d *Data) error {
	if len(d.Checks) == 0 {
		missing(b, "No hardware checks in this report (no hardware limits were given).")
		return nil
	}
	b.WriteString("<table id=\"tab-hardware\">\n<thead><tr><th>Check</th><th class=\"num\">Value</th><th class=\"num\">Limit</th><th class=\"num\">Margin</th><th>Result</th></tr></thead>\n<tbody>\n")
	for _, c := range d.Checks {
		res := "<span class=\"pass\">✓ pass</span>"
		class := ""
		if !c.Pass {
			res = "<span class=\"fail\">✗ FAIL</span>"
			class = " class=\"failed\""
		}
		fmt.Fprintf(b, "<tr%s><td>%s</td><td class=\"num\">%s</td><td class=\"num\">%s</td><td class=\"num\">%s</td><td>%s</td></tr>\n",
			class, esc(c.Name), qty(c.Value, c.Unit, 3), qty(c.Limit, c.Unit, 3), percent(c.Margin), res)
	}
	b.WriteString("</tbody>\n</table>\n")
	b.WriteString("<p class=\"note\">Margin is the headroom below each limit as a fraction of the limit; a negative margin means the limit is exceeded.</p>\n")
	return nil
}

// standardCautions are always shown.
var standardCautions = []struct{ head, text string }{
	{"Amplitude calibration.", "Amplitudes here are Rabi frequencies, not instrument settings. Convert them to DAC codes, voltages or powers only through a calibration measured on your own apparatus, for example from Rabi oscillations on each transition, and repeat it whenever the setup changes. An uncalibrated scale acts directly as the amplitude error studied in this report."},
	{"Hardware damage thresholds.", "Before sending a waveform to amplifiers, modulators, antennas, coils or optics, confirm that peak and average power, voltage and duty cycle stay within the rated limits of every component in the chain. The hardware checks above compare only with the limits given in the specification; they do not know the ratings of your equipment."},
	{"Laser safety.", "Where these waveforms control laser light, the resulting beam powers may be hazardous. Follow your laboratory's laser safety rules, the classification of your lasers and the instructions of your laser safety officer, including the required eyewear and interlocks."},
	{"Your rules come first.", "These waveforms are computed from a model and are offered without warranty. Your laboratory's own safety rules and licensed practice take precedence over anything in this report; try new waveforms at reduced power first."},
}

func cautionSection(b *bytes.Buffer, d *Data) error {
	b.WriteString("<div class=\"cautions\" id=\"cautions\">\n")
	for _, c := range standardCautions {
		fmt.Fprintf(b, "<p><strong>%s</strong> %s</p>\n", esc(c.head), esc(c.text))
	}
	for _, c := range d.Cautions {
		if strings.TrimSpace(c) != "" {
			fmt.Fprintf(b, "<p>%s</p>\n", esc(c))
		}
	}
	b.WriteString("</div>\n")
	return nil
}

func provenanceSection(b *bytes.Buffer, d *Data) error {
	p := d.Provenance
	or := func(s string) string {
		if s == "" {
			return "<span class=\"missing\">not recorded</span>"
		}
		return "<code>" + esc(s) + "</code>"
	}
	b.WriteString("<table id=\"tab-provenance\" class=\"kv\">\n<tbody>\n")
	fmt.Fprintf(b, "<tr><th scope=\"row\">loopgate version</th><td>%s</td></tr>\n", or(p.Version))
	fmt.Fprintf(b, "<tr><th scope=\"row\">Input</th><td>%s</td></tr>\n", or(p.Source))
	fmt.Fprintf(b, "<tr><th scope=\"row\">Specification hash</th><td>%s</td></tr>\n", or(p.SpecHash))
	fmt.Fprintf(b, "<tr><th scope=\"row\">Seed</th><td><code>%d</code></td></tr>\n", p.Seed)
	b.WriteString("</tbody>\n</table>\n")
	b.WriteString("<p class=\"note\">The same specification and seed give the same waveforms and a byte-identical report.</p>\n")
	return nil
}

// widths formats the row's widths and ratio, marking lower bounds with ≥.
func (r AdvantageRow) widths() (geo, dyn, rat string) {
	geo, dyn, rat = qty(r.Geometric, r.Unit, 3), qty(r.Dynamical, r.Unit, 3), ratio(r.Ratio)
	if r.GeometricOpen {
		geo = "≥&#160;" + geo
		if !r.DynamicalOpen {
			rat = "≥&#160;" + rat
		}
	}
	if r.DynamicalOpen {
		dyn = "≥&#160;" + dyn
		if !r.GeometricOpen {
			rat = "≤&#160;" + rat
		}
	}
	return geo, dyn, rat
}
