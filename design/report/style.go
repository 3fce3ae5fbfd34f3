package report

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The report's colours. Every series is also told apart by its dash pattern
// and marker, so the figures survive black-and-white printing.
var (
	colInk    = rgb(0x1e, 0x2a, 0x32)
	colMuted  = rgb(0x6b, 0x76, 0x7e)
	colFaint  = rgb(0xd4, 0xd9, 0xdd)
	colGeo    = rgb(0x1f, 0x5f, 0x99) // geometric gate
	colDyn    = rgb(0xc0, 0x56, 0x1d) // plain dynamical gate
	colThresh = rgb(0x4a, 0x4a, 0x4a) // the F = Threshold line
)

func rgb(r, g, b uint8) color.NRGBA { return color.NRGBA{R: r, G: g, B: b, A: 255} }

// seriesStyle is the look of one data series.
type seriesStyle struct {
	color color.Color
	dash  []vg.Length
	glyph draw.GlyphDrawer
}

// series is the cycle of styles for channels and levels.
var series = []seriesStyle{
	{rgb(0x1f, 0x5f, 0x99), nil, draw.CircleGlyph{}},
	{rgb(0xc0, 0x56, 0x1d), []vg.Length{vg.Points(6), vg.Points(3)}, draw.TriangleGlyph{}},
	{rgb(0x2f, 0x85, 0x52), []vg.Length{vg.Points(1.5), vg.Points(2.5)}, draw.SquareGlyph{}},
	{rgb(0x7a, 0x4f, 0xa0), []vg.Length{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}, draw.CrossGlyph{}},
	{rgb(0x9a, 0x7b, 0x16), []vg.Length{vg.Points(11), vg.Points(3)}, draw.PlusGlyph{}},
	{rgb(0x3d, 0x3d, 0x3d), []vg.Length{vg.Points(4), vg.Points(2), vg.Points(1), vg.Points(2), vg.Points(1), vg.Points(2)}, draw.RingGlyph{}},
	{rgb(0xb0, 0x35, 0x66), []vg.Length{vg.Points(2), vg.Points(4)}, draw.PyramidGlyph{}},
	{rgb(0x1f, 0x8f, 0x98), []vg.Length{vg.Points(9), vg.Points(2), vg.Points(2), vg.Points(2)}, draw.BoxGlyph{}},
}

// styleOf returns the style of series i. Past the first len(series) series
// the colour, dash and marker cycles are offset from each other, so the
// first len(series)² styles are all different.
func styleOf(i int) seriesStyle {
	n := len(series)
	r := i / n
	return seriesStyle{
		color: series[i%n].color,
		dash:  series[(i+r)%n].dash,
		glyph: series[(i+2*r)%n].glyph,
	}
}

var dashed = []vg.Length{vg.Points(5), vg.Points(3)}

// sans returns the report's plot font at the given size in points.
func sans(size float64) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, vg.Points(size))
}

// newPlot returns a plot with the report's fonts and axis styles.
func newPlot() *plot.Plot {
	p := plot.New()
	p.BackgroundColor = color.White
	p.Title.TextStyle.Font = sans(10.5)
	p.Title.TextStyle.Color = colInk
	p.Title.Padding = vg.Points(6)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sans(9.5)
		a.Label.TextStyle.Color = colInk
		a.Tick.Label.Font = sans(8.5)
		a.Tick.Label.Color = colInk
		a.Color = colMuted
		a.Tick.Color = colMuted
		a.Padding = vg.Points(3)
	}
	p.Legend = newLegend()
	return p
}

func newLegend() plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = sans(9)
	l.TextStyle.Color = colInk
	l.Top = true
	l.Left = true
	l.ThumbnailWidth = vg.Points(30)
	l.Padding = vg.Points(5)
	return l
}

// grid is a set of faint reference lines drawn under the data.
type grid struct{ vertical, horizontal bool }

func (g grid) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := draw.LineStyle{Color: colFaint, Width: vg.Points(0.5)}
	if g.vertical {
		for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
			if t.IsMinor() || t.Value < p.X.Min || t.Value > p.X.Max {
				continue
			}
			x := trX(t.Value)
			c.StrokeLine2(sty, x, c.Min.Y, x, c.Max.Y)
		}
	}
	if g.horizontal {
		for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
			if t.IsMinor() || t.Value < p.Y.Min || t.Value > p.Y.Max {
				continue
			}
			y := trY(t.Value)
			c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
		}
	}
}

// unitScale picks a display prefix for a quantity in unit whose values reach
// maxAbs: it returns the factor that values are multiplied by and the unit
// shown. Only "Hz" and "s" get prefixes; other units are shown as given.
func unitScale(unit string, maxAbs float64) (factor float64, shown string) {
	type step struct {
		f float64
		p string
	}
	var steps []step
	switch unit {
	case "Hz":
		steps = []step{{1e-9, "GHz"}, {1e-6, "MHz"}, {1e-3, "kHz"}, {1, "Hz"}}
	case "S/s":
		steps = []step{{1e-9, "GS/s"}, {1e-6, "MS/s"}, {1e-3, "kS/s"}, {1, "S/s"}}
	case "s":
		steps = []step{{1, "s"}, {1e3, "ms"}, {1e6, "µs"}, {1e9, "ns"}}
	default:
		return 1, unit
	}
	for _, s := range steps {
		if maxAbs*s.f >= 1 {
			return s.f, s.p
		}
	}
	last := steps[len(steps)-1]
	return last.f, last.p
}

// axisLabel joins a quantity name and a unit: "detuning δ (kHz)".
func axisLabel(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// maxAbs returns the largest |x| over all slices (0 for none).
func maxAbs(xs ...[]float64) float64 {
	m := 0.0
	for _, s := range xs {
		for _, x := range s {
			if a := math.Abs(x); a > m {
				m = a
			}
		}
	}
	return m
}

// piTicks marks multiples of π/2 (or of π, 2π, … when the range is wide),
// labelled in units of π.
type piTicks struct{}

func (piTicks) Ticks(min, max float64) []plot.Tick {
	step := math.Pi / 2
	for (max-min)/step > 8 {
		step *= 2
	}
	var ticks []plot.Tick
	for k := math.Ceil(min/step - 1e-9); k*step <= max+1e-9; k++ {
		v := k * step
		ticks = append(ticks, plot.Tick{Value: v, Label: piLabel(v / math.Pi)})
	}
	return ticks
}

// piLabel formats q·π for q a multiple of 1/2.
func piLabel(q float64) string {
	h := int(math.Round(2 * q)) // q = h/2
	if h == 0 {
		return "0"
	}
	sign := ""
	if h < 0 {
		sign = "−"
		h = -h
	}
	if h%2 == 0 {
		n := h / 2
		if n == 1 {
			return sign + "π"
		}
		return sign + strconv.Itoa(n) + "π"
	}
	if h == 1 {
		return sign + "π/2"
	}
	return sign + strconv.Itoa(h) + "π/2"
}

// decadeTicks marks decades on an axis that shows log10 of a quantity,
// labelled "1e−3" style (the plot font has no superscript minus), with
// unlabelled ticks at 2…9 times each decade. The axis itself stays linear
// in the logarithm, which keeps gonum's label placement right.
type decadeTicks struct{}

func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	lo := int(math.Floor(min + 1e-9))
	hi := int(math.Ceil(max - 1e-9))
	every := 1
	for (hi-lo)/every > 7 {
		every++
	}
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		if (e-lo)%every == 0 || e == hi {
			ticks = append(ticks, plot.Tick{Value: float64(e), Label: decadeLabel(e)})
		} else {
			ticks = append(ticks, plot.Tick{Value: float64(e)})
		}
		if e < hi && every == 1 {
			for m := 2; m < 10; m++ {
				ticks = append(ticks, plot.Tick{Value: float64(e) + math.Log10(float64(m))})
			}
		}
	}
	return ticks
}

func decadeLabel(e int) string {
	switch {
	case e == 0:
		return "1"
	case e < 0 && e >= -2:
		return strconv.FormatFloat(math.Pow(10, float64(e)), 'f', -1, 64)
	}
	return "1e" + strings.ReplaceAll(strconv.Itoa(e), "-", "−")
}

// niceTicks marks about n labelled ticks at steps of 1, 2 or 5 times a
// power of ten, with unlabelled ticks half-way, labelled with a true minus.
type niceTicks struct{ n int }

func (t niceTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) {
		return []plot.Tick{{Value: min, Label: tickLabel(min, 0)}}
	}
	raw := (max - min) / float64(t.n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, f := range []float64{2, 5, 10} {
		if raw/mag > f*0.75 {
			step = f * mag
		}
	}
	dec := max0(-int(math.Floor(math.Log10(step) + 1e-9)))
	var ticks []plot.Tick
	half := step / 2
	for k := math.Ceil(min/half - 1e-9); k*half <= max+1e-9*step; k++ {
		v := k * half
		if math.Abs(v) < 1e-12*step {
			v = 0
		}
		if int(math.Round(k))%2 == 0 {
			ticks = append(ticks, plot.Tick{Value: v, Label: tickLabel(v, dec)})
		} else {
			ticks = append(ticks, plot.Tick{Value: v})
		}
	}
	return ticks
}

func max0(i int) int {
	if i < 0 {
		return 0
	}
	return i
}

// tickLabel formats a tick value with dec decimals and a true minus sign.
func tickLabel(v float64, dec int) string {
	return strings.ReplaceAll(strconv.FormatFloat(v, 'f', dec, 64), "-", "−")
}

// mapColors is the report's sequential colour map for infidelity: light
// cream for small infidelity through teal to dark navy for large. Its
// lightness falls steadily along the map, so it reads as a grey ramp in
// black-and-white print.
type mapColors struct {
	min, max float64
}

var mapAnchors = []color.NRGBA{
	rgb(0xfb, 0xf7, 0xdc),
	rgb(0xc9, 0xe2, 0x9d),
	rgb(0x74, 0xbc, 0x9e),
	rgb(0x3a, 0x8a, 0x9b),
	rgb(0x2c, 0x5a, 0x86),
	rgb(0x1f, 0x2c, 0x55),
	rgb(0x10, 0x12, 0x28),
}

var _ palette.ColorMap = (*mapColors)(nil)

// At returns the colour of v; values outside [min, max] are clamped.
func (m *mapColors) At(v float64) (color.Color, error) {
	if math.IsNaN(v) {
		return nil, fmt.Errorf("report: colour of NaN")
	}
	t := 0.0
	if m.max > m.min {
		t = (v - m.min) / (m.max - m.min)
	}
	t = math.Max(0, math.Min(1, t))
	x := t * float64(len(mapAnchors)-1)
	i := int(x)
	if i >= len(mapAnchors)-1 {
		return mapAnchors[len(mapAnchors)-1], nil
	}
	f := x - float64(i)
	a, b := mapAnchors[i], mapAnchors[i+1]
	mix := func(p, q uint8) uint8 { return uint8(math.Round(float64(p) + f*(float64(q)-float64(p)))) }
	return color.NRGBA{R: mix(a.R, b.R), G: mix(a.G, b.G), B: mix(a.B, b.B), A: 255}, nil
}

func (m *mapColors) Max() float64     { return m.max }
func (m *mapColors) SetMax(v float64) { m.max = v }
func (m *mapColors) Min() float64     { return m.min }
func (m *mapColors) SetMin(v float64) { m.min = v }
func (m *mapColors) Alpha() float64   { return 1 }
func (m *mapColors) SetAlpha(a float64) {
	if a != 1 {
		panic("report: mapColors is opaque")
	}
}

// Palette returns n colours evenly spaced from min to max.
func (m *mapColors) Palette(n int) palette.Palette {
	cs := make([]color.Color, n)
	for i := range cs {
		v := m.min
		if n > 1 {
			v += (m.max - m.min) * float64(i) / float64(n-1)
		}
		cs[i], _ = m.At(v)
	}
	return colorList(cs)
}

type colorList []color.Color

func (c colorList) Colors() []color.Color { return c }
