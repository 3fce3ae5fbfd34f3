package report

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Figure geometry, in points. The page shows figures 960 CSS pixels wide.
const (
	figW     = 720.0 // full figure width
	keyW     = 138.0 // key column at the right of each figure
	keyGap   = 14.0  // space between the panels and the key
	keyTop   = 18.0  // key offset from the top of the figure
	lineW    = 1.4   // data line width
	markerR  = 2.6   // marker radius
	nMarkers = 9     // markers per series
)

// figure is one rendered figure.
type figure struct {
	svg     string
	caption string
	w, h    float64 // points
}

// panels splits the figure canvas into the panel area and the key column.
func panels(dc draw.Canvas) (area, key draw.Canvas) {
	area = draw.Crop(dc, 0, -vg.Points(keyW+keyGap), 0, 0)
	key = draw.Crop(dc, dc.Max.X-dc.Min.X-vg.Points(keyW), 0, 0, -vg.Points(keyTop))
	return area, key
}

// keyHeight returns the figure height in points needed by a key of n
// entries.
func keyHeight(n int) float64 { return keyTop + 16 + 13.5*float64(n) + 8 }

// drawKey draws the legend l at the top left of the key column, under a
// small heading.
func drawKey(key draw.Canvas, l plot.Legend) {
	head := draw.TextStyle{Color: colMuted, Font: sans(8.5), Handler: plot.DefaultTextHandler, XAlign: draw.XLeft, YAlign: draw.YTop}
	key.FillText(head, vg.Point{X: key.Min.X, Y: key.Max.Y}, "KEY")
	l.Draw(draw.Crop(key, 0, 0, 0, -vg.Points(16)))
}

// line returns a plotter.Line in style st (dashes only if dash is true).
func line(xs, ys []float64, st seriesStyle, width float64) (*plotter.Line, error) {
	pts := make(plotter.XYs, len(xs))
	for i := range xs {
		pts[i] = plotter.XY{X: xs[i], Y: ys[i]}
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.Color = st.color
	l.Width = vg.Points(width)
	l.Dashes = st.dash
	return l, nil
}

// markers returns a sparse scatter of glyphs along a series so that series
// stay distinguishable in black and white. Series k of n places its markers
// shifted by k/n of the spacing so that markers of different series do not
// sit on top of each other.
func markers(xs, ys []float64, st seriesStyle, k, n int) (*plotter.Scatter, error) {
	var pts plotter.XYs
	if len(xs) > 0 {
		step := float64(len(xs)-1) / nMarkers
		off := step * (float64(k) + 0.5) / float64(max(n, 1))
		for m := 0; m < nMarkers; m++ {
			i := int(math.Round(off + float64(m)*step))
			if i >= 0 && i < len(xs) {
				pts = append(pts, plotter.XY{X: xs[i], Y: ys[i]})
			}
		}
	}
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	s.GlyphStyle = draw.GlyphStyle{Color: st.color, Radius: vg.Points(markerR), Shape: st.glyph}
	return s, nil
}

// scaled returns xs multiplied by f.
func scaled(xs []float64, f float64) []float64 {
	out := make([]float64, len(xs))
	for i, x := range xs {
		out[i] = x * f
	}
	return out
}

// gridLayout returns rows and columns for n panels, at most maxCols wide.
func gridLayout(n, maxCols int) (rows, cols int) {
	cols = min(n, maxCols)
	rows = (n + cols - 1) / cols
	return rows, cols
}

// renderGrid renders plots laid out in a rows×cols grid (alignPanels)
// with the key beside them, as an SVG of w×h points labelled label.
func renderGrid(w, h float64, label string, ps []*plot.Plot, rows, cols int, key plot.Legend) (string, error) {
	return renderSVG(w, h, label, func(dc draw.Canvas) error {
		area, kc := panels(dc)
		alignPanels(ps, rows, cols, area)
		drawKey(kc, key)
		return nil
	})
}

// alignPanels lays out plots in a grid in area, aligning their data areas.
func alignPanels(ps []*plot.Plot, rows, cols int, area draw.Canvas) {
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
		for c := range grid[r] {
			if k := r*cols + c; k < len(ps) {
				grid[r][c] = ps[k]
			}
		}
	}
	t := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(18), PadY: vg.Points(12), PadTop: vg.Points(2), PadRight: vg.Points(4)}
	cs := plot.Align(grid, t, area)
	for r := range grid {
		for c, p := range grid[r] {
			if p != nil {
				p.Draw(cs[r][c])
			}
		}
	}
}

// ---------------------------------------------------------------- loop

// ---------------------------------------------------------------- waveforms

// waveformFigure draws amplitude and phase per channel with the hardware
// limits.
func waveformFigure(ws []Waveform) (figure, error) {
	w, h := figW, math.Max(400, keyHeight(2*len(ws)))
	tf, tu := unitScale("s", maxAbs(timesOf(ws)...))
	var amps []float64
	for _, wf := range ws {
		amps = append(amps, maxAbs(wf.Amplitude), wf.MaxRabi)
	}
	af, au := unitScale("Hz", maxAbs(amps))
	pa, pp := waveformPlots(au, tu)
	key := newLegend()
	shared, lim0, nlim := sharedLimit(ws)
	t0, t1 := timeSpan(ws, tf)
	var ymax float64
	for i, wf := range ws {
		st := styleOf(i)
		ts := scaled(wf.Time, tf)
		a := scaled(wf.Amplitude, af)
		la, err := line(ts, a, st, lineW)
		if err != nil {
			return figure{}, fmt.Errorf("report: waveform %q amplitude: %w", wf.Channel, err)
		}
		ma, err := markers(ts, a, st, i, len(ws))
		if err != nil {
			return figure{}, err
		}
		lp, err := line(ts, wf.Phase, st, lineW)
		if err != nil {
			return figure{}, fmt.Errorf("report: waveform %q phase: %w", wf.Channel, err)
		}
		mp, err := markers(ts, wf.Phase, st, i, len(ws))
		if err != nil {
			return figure{}, err
		}
		pa.Add(la, ma)
		pp.Add(lp, mp)
		key.Add("channel "+wf.Channel, la, ma)
		ymax = math.Max(ymax, maxAbs(a))
		if wf.MaxRabi > 0 && !shared {
			lim := wf.MaxRabi * af
			ll, err := line([]float64{t0, t1}, []float64{lim, lim}, seriesStyle{color: st.color, dash: dashed}, 1)
			if err != nil {
				return figure{}, err
			}
			pa.Add(ll)
			key.Add("limit "+wf.Channel, ll)
			ymax = math.Max(ymax, lim)
		}
	}
	if shared && nlim > 0 {
		lim := lim0 * af
		ll, err := line([]float64{t0, t1}, []float64{lim, lim}, seriesStyle{color: colThresh, dash: dashed}, 1.1)
		if err != nil {
			return figure{}, err
		}
		pa.Add(ll)
		key.Add("hardware limit", ll)
		ymax = math.Max(ymax, lim)
	}
	if ymax == 0 {
		ymax = 1
	}
	pa.Y.Min, pa.Y.Max = 0, ymax*1.08
	pa.X.Min, pa.X.Max = t0, t1
	pp.X.Min, pp.X.Max = t0, t1
	pp.Y.Min, pp.Y.Max = phaseRange(ws)
	svg, err := renderGrid(w, h, "Waveforms per channel: Rabi frequency and phase against time", []*plot.Plot{pa, pp}, 2, 1, key)
	if err != nil {
		return figure{}, err
	}
	caption := "Control waveforms per channel: Rabi frequency Ω/2π (top) and drive phase φ (bottom)."
	if nlim > 0 {
		caption += " Dashed horizontal lines mark the hardware limits on Ω/2π."
	} else {
		caption += " No hardware limits were given."
	}
	return figure{svg: svg, caption: caption, w: w, h: h}, nil
}

// waveformPlots returns the amplitude and phase panels of the waveform
// figure, with amplitude unit au and time unit tu.
func waveformPlots(au, tu string) (pa, pp *plot.Plot) {
	pa, pp = newPlot(), newPlot()
	pa.Title.Text = "Rabi frequency Ω/2π"
	pp.Title.Text = "Phase φ"
	pa.Y.Label.Text = axisLabel("Ω/2π", au)
	pp.Y.Label.Text = "φ (rad)"
	pp.X.Label.Text = axisLabel("time", tu)
	pa.X.Tick.Marker, pp.X.Tick.Marker = niceTicks{8}, niceTicks{8}
	pa.Y.Tick.Marker = niceTicks{5}
	pp.Y.Tick.Marker = piTicks{}
	pa.Add(grid{vertical: true, horizontal: true})
	pp.Add(grid{vertical: true, horizontal: true})
	return pa, pp
}

// sharedLimit reports whether every channel has the same Rabi limit
// (drawn as one line, else one per channel), that limit and how many
// channels have one.
func sharedLimit(ws []Waveform) (shared bool, lim0 float64, nlim int) {
	shared = true
	for _, wf := range ws {
		if wf.MaxRabi > 0 {
			if nlim > 0 && math.Abs(wf.MaxRabi-lim0) > 1e-12*lim0 {
				shared = false
			}
			lim0 = wf.MaxRabi
			nlim++
		}
	}
	if nlim < len(ws) {
		shared = false
	}
	return shared, lim0, nlim
}

// timeSpan returns the first and last sample time of all waveforms,
// scaled by tf.
func timeSpan(ws []Waveform, tf float64) (t0, t1 float64) {
	t0, t1 = math.Inf(1), math.Inf(-1)
	for _, wf := range ws {
		if len(wf.Time) > 0 {
			t0 = math.Min(t0, wf.Time[0]*tf)
			t1 = math.Max(t1, wf.Time[len(wf.Time)-1]*tf)
		}
	}
	return t0, t1
}

// phaseRange returns the phase axis range: the phases' span padded by 6 %
// (±π/2 around a constant phase).
func phaseRange(ws []Waveform) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, wf := range ws {
		for _, x := range wf.Phase {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if !(hi > lo) {
		lo, hi = lo-math.Pi/2, hi+math.Pi/2
	}
	pad := 0.06 * (hi - lo)
	return lo - pad, hi + pad
}

func timesOf(ws []Waveform) [][]float64 {
	var out [][]float64
	for _, w := range ws {
		out = append(out, w.Time)
	}
	return out
}

// ---------------------------------------------------------------- populations

// populationFigure draws level populations over time, one panel per input.
func populationFigure(pops []Populations) (figure, error) {
	rows, cols := gridLayout(len(pops), 3)
	var all [][]float64
	for _, p := range pops {
		all = append(all, p.Time)
	}
	tf, tu := unitScale("s", maxAbs(all...))
	// One style per level name, in order of first appearance.
	index := map[string]int{}
	var names []string
	for _, p := range pops {
		for _, n := range p.Levels {
			if _, ok := index[n]; !ok {
				index[n] = len(names)
				names = append(names, n)
			}
		}
	}
	w, h := figW, math.Max(40+200*float64(rows), keyHeight(len(names)))
	key := newLegend()
	keyed := make([]bool, len(names))
	var ps []*plot.Plot
	for _, pop := range pops {
		p := newPlot()
		p.Title.Text = "input " + pop.Input
		p.X.Label.Text = axisLabel("time", tu)
		p.Y.Label.Text = "population"
		p.Y.Min, p.Y.Max = 0, 1
		p.Y.Padding = vg.Points(4)
		p.X.Tick.Marker = niceTicks{4}
		p.Y.Tick.Marker = niceTicks{4}
		p.Add(grid{vertical: true, horizontal: true})
		ts := scaled(pop.Time, tf)
		if len(ts) > 0 {
			p.X.Min, p.X.Max = ts[0], ts[len(ts)-1]
		}
		for l, lev := range pop.Levels {
			k := index[lev]
			st := styleOf(k)
			ln, err := line(ts, pop.P[l], st, lineW)
			if err != nil {
				return figure{}, fmt.Errorf("report: populations of input %q, level %q: %w", pop.Input, lev, err)
			}
			mk, err := markers(ts, pop.P[l], st, k, len(names))
			if err != nil {
				return figure{}, err
			}
			p.Add(ln, mk)
			if !keyed[k] {
				keyed[k] = true
				key.Add("level "+lev, ln, mk)
			}
		}
		ps = append(ps, p)
	}
	svg, err := renderGrid(w, h, "Level populations over time for each computational input state", ps, rows, cols, key)
	if err != nil {
		return figure{}, err
	}
	return figure{svg: svg, caption: "Populations of all levels during the gate, one panel per computational input state.", w: w, h: h}, nil
}

// ---------------------------------------------------------------- robustness

// ---------------------------------------------------------------- map
