package batch

import (
	"bytes"
	"fmt"
	"html/template"
	"math"
	"strings"
)

// The chip figure: one panel per gate, each a grid of the qubits in table
// order, coloured by the error-model infidelity 1 − F on a log scale.
const (
	panelWidth = 300.0 // px, the grid of one panel
	panelGap   = 24.0
	labelSpace = 22.0
	legendH    = 46.0
)

// cell is one qubit × gate square of the figure.
type cell struct {
	X, Y, Size float64
	Fill       string
	Link       string
	Title      string
	Label      string
	Mark       string
}

type panel struct {
	X, Y   float64
	Width  float64
	Height float64
	Gate   string
	Cells  []cell
}

type legendStop struct {
	X      float64
	Width  float64
	Fill   string
	Label  string
	LabelX float64
}

type figure struct {
	Width, Height float64
	Panels        []panel
	Legend        []legendStop
	LegendY       float64
	Missing       bool
}

// colourRamp goes from low infidelity (green) through yellow to high
// infidelity (red).
var colourRamp = [][3]float64{{26, 152, 80}, {254, 224, 139}, {215, 48, 39}}

func rampColour(t float64) string {
	t = math.Max(0, math.Min(1, t)) * float64(len(colourRamp)-1)
	i := min(int(t), len(colourRamp)-2)
	f := t - float64(i)
	var c [3]int
	for k := range c {
		c[k] = int(math.Round(colourRamp[i][k]*(1-f) + colourRamp[i+1][k]*f))
	}
	return fmt.Sprintf("#%02x%02x%02x", c[0], c[1], c[2])
}

// decades returns the log10 range of the figure: whole decades around the
// infidelities present (at least one decade).
func decades(s *Summary) (lo, hi int) {
	lo, hi = math.MaxInt, math.MinInt
	for _, r := range s.Tasks {
		if r.ErrorModelInfidelity != nil {
			l := math.Log10(math.Max(*r.ErrorModelInfidelity, 1e-12))
			lo, hi = min(lo, int(math.Floor(l))), max(hi, int(math.Ceil(l)))
		}
	}
	if lo > hi {
		return -4, 0
	}
	if lo == hi {
		hi = lo + 1
	}
	return lo, hi
}

func chipFigure(s *Summary) figure {
	n := len(s.Qubits)
	cols := max(1, int(math.Ceil(math.Sqrt(float64(n)))))
	rows := (n + cols - 1) / cols
	size := math.Min(40, panelWidth/float64(cols))
	lo, hi := decades(s)
	var f figure
	x := 0.0
	for gi, g := range s.Gates {
		p := panel{X: x, Y: labelSpace, Width: size * float64(cols), Height: size * float64(rows), Gate: g}
		for qi := range s.Qubits {
			r := s.Tasks[qi*len(s.Gates)+gi]
			c := cell{X: p.X + size*float64(qi%cols), Y: p.Y + size*float64(qi/cols), Size: size, Link: r.Report}
			if size >= 30 {
				c.Label = r.Qubit
			}
			if r.ErrorModelInfidelity != nil {
				v := *r.ErrorModelInfidelity
				t := (math.Log10(math.Max(v, 1e-12)) - float64(lo)) / float64(hi-lo)
				c.Fill = rampColour(t)
				c.Title = fmt.Sprintf("%s, gate %s: 1 − F = %.3g under the error model (ideal F = %.6f), %s", r.Qubit, r.Gate, v, *r.IdealFidelity, r.Status)
			} else {
				c.Fill, c.Mark = "#bdbdbd", "×"
				c.Title = fmt.Sprintf("%s, gate %s: %s", r.Qubit, r.Gate, r.Status)
				f.Missing = true
			}
			p.Cells = append(p.Cells, c)
		}
		f.Panels = append(f.Panels, p)
		x += p.Width + panelGap
	}
	f.Width = math.Max(x-panelGap, 360) // room for the legend's last label
	f.LegendY = labelSpace + size*float64(rows) + 14
	f.Height = f.LegendY + legendH
	w := math.Min(f.Width, 320) / float64(hi-lo)
	for d := lo; d < hi; d++ {
		for k := 0; k < 4; k++ {
			t := (float64(d-lo) + float64(k)/4 + 0.125) / float64(hi-lo)
			f.Legend = append(f.Legend, legendStop{X: float64(d-lo)*w + float64(k)*w/4, Width: w / 4, Fill: rampColour(t)})
		}
	}
	for d := lo; d <= hi; d++ {
		f.Legend = append(f.Legend, legendStop{LabelX: float64(d-lo) * w, Label: fmt.Sprintf("1e%d", d)})
	}
	return f
}

var indexTmpl = template.Must(template.New("index").Funcs(template.FuncMap{
	"f":    func(x float64) string { return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.2f", x), "0"), ".") },
	"num":  func(x *float64, prec int) string { return fmtFigure(x, prec) },
	"add":  func(a, b float64) float64 { return a + b },
	"half": func(a float64) float64 { return a / 2 },
	"cls":  func(s string) string { return strings.ReplaceAll(s, " ", "-") },
	"join": func(s []string) string { return strings.Join(s, "; ") },
}).Parse(indexHTML))

// fmtFigure formats a figure with prec significant digits, or "–".
func fmtFigure(x *float64, prec int) string {
	if x == nil {
		return "–"
	}
	return fmt.Sprintf("%.*g", prec, *x)
}

// indexPage returns index.html: counts, the chip figure and a table of
// every task linking its report.
func indexPage(s *Summary) ([]byte, error) {
	var buf bytes.Buffer
	err := indexTmpl.Execute(&buf, struct {
		S       *Summary
		Fig     figure
		Caution string
	}{s, chipFigure(s), caution})
	return buf.Bytes(), err
}

const indexHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>Gate set: {{.S.Table}} × {{len .S.Gates}} gates</title>
<style>
body { font: 14px/1.4 system-ui, sans-serif; margin: 2em; color: #222; max-width: 1100px; }
table { border-collapse: collapse; margin-top: 1em; }
th, td { padding: 3px 8px; border-bottom: 1px solid #ddd; text-align: right; }
th:first-child, td:first-child, .t { text-align: left; }
.passed { color: #1a7f37; } .failed, .not-run { color: #b42318; } .checks-failed { color: #b54708; }
svg text { font: 11px system-ui, sans-serif; }
.caution { border-left: 4px solid #b54708; padding: 0.5em 1em; background: #fff8f0; }
</style>
</head>
<body>
<h1>Gate set for {{len .S.Qubits}} qubits × {{len .S.Gates}} gates</h1>
<p>Base spec <code>{{.S.Base}}</code>, table <code>{{.S.Table}}</code>, loopgate {{.S.ToolVersion}}.
{{.S.Counts.Tasks}} tasks: {{.S.Counts.Passed}} passed, {{.S.Counts.ChecksFailed}} with failed checks,
{{.S.Counts.Failed}} failed, {{.S.Counts.NotRun}} not run. Data: <a href="summary.csv">summary.csv</a>, <a href="summary.json">summary.json</a>.</p>
<h2>Infidelity under the error model, per qubit and gate</h2>
<p>Each panel is one gate; each square one qubit, in table order, row by row. Colour: 1 − F of the sampled waveform
under the spec's error model (log scale). Click a square for its report.{{if .Fig.Missing}} Grey squares with × have no result.{{end}}</p>
<svg xmlns="http://www.w3.org/2000/svg" width="{{f .Fig.Width}}" height="{{f .Fig.Height}}" viewBox="0 0 {{f .Fig.Width}} {{f .Fig.Height}}" role="img" aria-label="error-model infidelity per qubit and gate">
{{- range .Fig.Panels}}
<text x="{{f .X}}" y="14">gate {{.Gate}}</text>
{{- range .Cells}}
{{if .Link}}<a href="{{.Link}}">{{end}}<rect x="{{f .X}}" y="{{f .Y}}" width="{{f .Size}}" height="{{f .Size}}" fill="{{.Fill}}" stroke="#fff"><title>{{.Title}}</title></rect>
{{- if .Mark}}<text x="{{f (add .X (half .Size))}}" y="{{f (add .Y (half .Size))}}" text-anchor="middle" dominant-baseline="central">{{.Mark}}</text>{{end}}
{{- if .Label}}<text x="{{f (add .X 3)}}" y="{{f (add .Y 12)}}" font-size="9">{{.Label}}</text>{{end}}{{if .Link}}</a>{{end}}
{{- end}}
{{- end}}
{{- $y := .Fig.LegendY}}
{{- range .Fig.Legend}}{{if .Fill}}
<rect x="{{f .X}}" y="{{f $y}}" width="{{f .Width}}" height="12" fill="{{.Fill}}"/>{{else}}
<text x="{{f .LabelX}}" y="{{f (add $y 26)}}">{{.Label}}</text>{{end}}{{end}}
<text x="0" y="{{f (add $y 42)}}">1 − F under the error model</text>
</svg>
<h2>Every task</h2>
<table>
<tr><th>qubit</th><th class="t">gate</th><th>row</th><th class="t">status</th><th>ideal F</th><th>F, error model</th><th>1 − F, error model</th><th>duration (s)</th><th>report</th></tr>
{{- range .S.Tasks}}
<tr><td>{{.Qubit}}</td><td class="t">{{.Gate}}</td><td>{{.Row}}</td><td class="t {{.Status | printf "%s" | cls}}">{{.Status}}{{if .FailedChecks}}: {{join .FailedChecks}}{{end}}{{if .Message}}: {{.Message}}{{end}}</td>
<td>{{num .IdealFidelity 8}}</td><td>{{num .ErrorModelFidelity 8}}</td><td>{{num .ErrorModelInfidelity 3}}</td><td>{{num .Duration 4}}</td>
<td class="t">{{if .Report}}<a href="{{.Report}}">report</a>{{end}}</td></tr>
{{- end}}
</table>
<p class="caution">{{.Caution}}</p>
</body>
</html>
`
