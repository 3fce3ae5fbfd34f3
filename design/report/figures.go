package report

import (
	"fmt"
	"math"
	"math/cmplx"

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

// sphereVectors maps the loop's drive vectors to unit 3-vectors as
// documented on Loop. Samples with a vanishing drive give ok[k] = false.
func sphereVectors(l *Loop) (v [][3]float64, ok []bool, axes [3]string, mapping string) {
	nc := len(l.Channels)
	v = make([][3]float64, len(l.Drive))
	ok = make([]bool, len(l.Drive))
	switch {
	case l.Axial != nil:
		axes = [3]string{"Re Ω/|Ω|", "Im Ω/|Ω|", "axial"}
		mapping = fmt.Sprintf("v = (Re Ω, Im Ω, axial component) of channel %s, normalised", l.Channels[0])
	case nc == 1:
		axes = [3]string{"Re Ω/|Ω|", "Im Ω/|Ω|", "—"}
		mapping = "v = (Re Ω, Im Ω, 0)/|Ω|: the drive phase on the unit circle"
	case nc == 2:
		axes = [3]string{"X", "Y", "Z"}
		mapping = fmt.Sprintf("Bloch map of the two drives: X + iY = 2Ω*(%s)Ω(%s)/Ω², Z = (|Ω(%s)|² − |Ω(%s)|²)/Ω², with Ω² = |Ω(%s)|² + |Ω(%s)|²",
			l.Channels[0], l.Channels[1], l.Channels[0], l.Channels[1], l.Channels[0], l.Channels[1])
	default:
		axes = [3]string{"|Ω(" + l.Channels[0] + ")|/Ω", "|Ω(" + l.Channels[1] + ")|/Ω", "|Ω(" + l.Channels[2] + ")|/Ω"}
		mapping = fmt.Sprintf("v = (|Ω(%s)|, |Ω(%s)|, |Ω(%s)|)/Ω with Ω the norm of the drive vector; relative phases appear in the waveform phase panel",
			l.Channels[0], l.Channels[1], l.Channels[2])
	}
	for k, d := range l.Drive {
		var x [3]float64
		switch {
		case l.Axial != nil:
			x = [3]float64{real(d[0]), imag(d[0]), l.Axial[k]}
		case nc == 1:
			x = [3]float64{real(d[0]), imag(d[0]), 0}
		case nc == 2:
			p := cmplx.Conj(d[0]) * d[1]
			a0, a1 := cmplx.Abs(d[0]), cmplx.Abs(d[1])
			x = [3]float64{2 * real(p), 2 * imag(p), a0*a0 - a1*a1}
			// The Bloch map is quadratic: divide by |d|² below via the
			// norm of x, which equals |d₀|² + |d₁|².
		default:
			norm := 0.0
			for _, c := range d {
				a := cmplx.Abs(c)
				norm += a * a
			}
			norm = math.Sqrt(norm)
			if norm > 0 {
				x = [3]float64{cmplx.Abs(d[0]) / norm, cmplx.Abs(d[1]) / norm, cmplx.Abs(d[2]) / norm}
			}
		}
		n := math.Sqrt(x[0]*x[0] + x[1]*x[1] + x[2]*x[2])
		if n == 0 || math.IsNaN(n) {
			continue
		}
		if nc < 3 || l.Axial != nil {
			x[0], x[1], x[2] = x[0]/n, x[1]/n, x[2]/n
		}
		v[k], ok[k] = x, true
	}
	return v, ok, axes, mapping
}

// loopFigure draws the loop on the sphere in two projections.
func loopFigure(l *Loop) (figure, error) {
	v, ok, axes, mapping := sphereVectors(l)
	// Projections: (axis a, axis b), hidden when the dropped axis is < 0.
	proj := [2][3]int{{0, 1, 2}, {0, 2, 1}}
	const w, h = figW, 300.0
	var hiddenAny bool
	key := newLegend()
	front := seriesStyle{color: colGeo, glyph: draw.CircleGlyph{}}
	back := seriesStyle{color: colGeo, dash: []vg.Length{vg.Points(2), vg.Points(2.5)}}
	var ps []*plot.Plot
	for pi, pr := range proj {
		p := newPlot()
		p.Title.Text = fmt.Sprintf("%s projection: %s – %s plane", []string{"A", "B"}[pi], axes[pr[0]], axes[pr[1]])
		p.Title.TextStyle.Font = sans(9.5)
		p.X.Label.Text, p.Y.Label.Text = axes[pr[0]], axes[pr[1]]
		p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = -1.12, 1.12, -1.12, 1.12
		p.X.Padding, p.Y.Padding = 0, 0
		ticks := plot.ConstantTicks{{Value: -1, Label: "−1"}, {Value: -0.5}, {Value: 0, Label: "0"}, {Value: 0.5}, {Value: 1, Label: "1"}}
		p.X.Tick.Marker, p.Y.Tick.Marker = ticks, ticks
		// Sphere outline and cross hairs.
		circle := make([]float64, 0, 2*181)
		for i := 0; i <= 180; i++ {
			s, c := math.Sincos(2 * math.Pi * float64(i) / 180)
			circle = append(circle, c, s)
		}
		cx, cy := make([]float64, 181), make([]float64, 181)
		for i := range cx {
			cx[i], cy[i] = circle[2*i], circle[2*i+1]
		}
		outline, err := line(cx, cy, seriesStyle{color: colMuted}, 0.8)
		if err != nil {
			return figure{}, err
		}
		hx, err := line([]float64{-1, 1}, []float64{0, 0}, seriesStyle{color: colFaint}, 0.6)
		if err != nil {
			return figure{}, err
		}
		hy, err := line([]float64{0, 0}, []float64{-1, 1}, seriesStyle{color: colFaint}, 0.6)
		if err != nil {
			return figure{}, err
		}
		p.Add(hx, hy, outline)
		// The loop, split into runs on the near (front) and far side.
		var xs, ys []float64
		hidden := false
		flush := func() error {
			if len(xs) >= 2 {
				st := front
				if hidden {
					st = back
					hiddenAny = true
				}
				ln, err := line(xs, ys, st, 1.6)
				if err != nil {
					return err
				}
				p.Add(ln)
			}
			return nil
		}
		for k := range v {
			if !ok[k] {
				if err := flush(); err != nil {
					return figure{}, err
				}
				xs, ys = nil, nil
				continue
			}
			hk := v[k][pr[2]] < -1e-9
			if hk != hidden && len(xs) > 0 {
				// Start the new run at the last point so the curve is
				// continuous.
				lx, ly := xs[len(xs)-1], ys[len(ys)-1]
				if err := flush(); err != nil {
					return figure{}, err
				}
				xs, ys = []float64{lx}, []float64{ly}
			}
			hidden = hk
			xs = append(xs, v[k][pr[0]])
			ys = append(ys, v[k][pr[1]])
		}
		if err := flush(); err != nil {
			return figure{}, err
		}
		// Direction arrows and the base point.
		for _, frac := range []float64{0.18, 0.52, 0.82} {
			if a := arrowhead(v, ok, pr, frac); a != nil {
				p.Add(a)
			}
		}
		for k := range v {
			if ok[k] {
				s, err := plotter.NewScatter(plotter.XYs{{X: v[k][pr[0]], Y: v[k][pr[1]]}})
				if err != nil {
					return figure{}, err
				}
				s.GlyphStyle = draw.GlyphStyle{Color: colInk, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
				ring, _ := plotter.NewScatter(plotter.XYs{{X: v[k][pr[0]], Y: v[k][pr[1]]}})
				ring.GlyphStyle = draw.GlyphStyle{Color: colorWhite, Radius: vg.Points(5.5), Shape: draw.CircleGlyph{}}
				p.Add(ring, s)
				if pi == 0 {
					fl, _ := line([]float64{0, 1}, []float64{0, 0}, front, 1.6)
					key.Add("loop", fl)
					key.Add("start (s = 0)", s)
					key.Add("direction of travel", arrowThumb{})
				}
				break
			}
		}
		ps = append(ps, p)
	}
	if hiddenAny {
		bl, _ := line([]float64{0, 1}, []float64{0, 0}, back, 1.6)
		key.Add("loop, far side", bl)
	}
	ol, _ := line([]float64{0, 1}, []float64{0, 0}, seriesStyle{color: colMuted}, 0.8)
	key.Add("unit sphere", ol)
	svg, err := renderSVG(w, h, "Control loop on the sphere of normalised drive vectors, two projections", func(dc draw.Canvas) error {
		area, kc := panels(dc)
		// Two square panels side by side.
		half := (area.Max.X - area.Min.X) / 2
		for i, p := range ps {
			c := draw.Crop(area, 0, -half, 0, 0)
			if i == 1 {
				c = draw.Crop(area, half, 0, 0, 0)
			}
			p.Draw(squareData(p, c))
		}
		drawKey(kc, key)
		return nil
	})
	if err != nil {
		return figure{}, err
	}
	caption := "The control loop on the sphere of normalised drive vectors, seen in two projections. " + mapping + "."
	if hiddenAny {
		caption += " Dashed parts lie on the far side of the sphere (dropped coordinate negative)."
	}
	return figure{svg: svg, caption: caption, w: w, h: h}, nil
}

var colorWhite = rgb(0xff, 0xff, 0xff)

// squareData crops c so that p's data area is square and centred.
func squareData(p *plot.Plot, c draw.Canvas) draw.Canvas {
	d := p.DataCanvas(c)
	dw, dh := d.Max.X-d.Min.X, d.Max.Y-d.Min.Y
	if dw > dh {
		e := (dw - dh) / 2
		return draw.Crop(c, e, -e, 0, 0)
	}
	e := (dh - dw) / 2
	return draw.Crop(c, 0, 0, e, -e)
}

// arrowhead returns a small filled triangle on the loop at fraction frac of
// the samples, pointing along the direction of travel in projection pr, or
// nil where the loop moves mostly out of the projection plane.
func arrowhead(v [][3]float64, ok []bool, pr [3]int, frac float64) plot.Plotter {
	n := len(v)
	k := int(frac * float64(n-1))
	if k < 1 || k+1 >= n || !ok[k-1] || !ok[k] || !ok[k+1] {
		return nil
	}
	dx := v[k+1][pr[0]] - v[k-1][pr[0]]
	dy := v[k+1][pr[1]] - v[k-1][pr[1]]
	l := math.Hypot(dx, dy)
	if l < 1e-9 {
		return nil
	}
	// Ignore arrows where the in-plane motion is small compared with the
	// full motion on the sphere.
	var full float64
	for i := 0; i < 3; i++ {
		d := v[k+1][i] - v[k-1][i]
		full += d * d
	}
	if l < 0.35*math.Sqrt(full) {
		return nil
	}
	ux, uy := dx/l, dy/l
	const size = 0.075
	x0, y0 := v[k][pr[0]], v[k][pr[1]]
	tip := plotter.XY{X: x0 + size*ux, Y: y0 + size*uy}
	b1 := plotter.XY{X: x0 - size*ux + 0.6*size*uy, Y: y0 - size*uy - 0.6*size*ux}
	b2 := plotter.XY{X: x0 - size*ux - 0.6*size*uy, Y: y0 - size*uy + 0.6*size*ux}
	poly, err := plotter.NewPolygon(plotter.XYs{tip, b1, b2})
	if err != nil {
		return nil
	}
	poly.Color = colGeo
	poly.LineStyle.Width = 0
	return poly
}

// arrowThumb draws the arrowhead in the key.
type arrowThumb struct{}

func (arrowThumb) Thumbnail(c *draw.Canvas) {
	cx, cy := (c.Min.X+c.Max.X)/2, (c.Min.Y+c.Max.Y)/2
	s := vg.Points(5)
	c.FillPolygon(colGeo, []vg.Point{{X: cx + s, Y: cy}, {X: cx - s, Y: cy + 0.7*s}, {X: cx - s, Y: cy - 0.7*s}})
}

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
	pa, pp := newPlot(), newPlot()
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
	key := newLegend()
	// Limits: one shared line if all channels share it, else one per channel.
	shared := true
	var lim0 float64
	nlim := 0
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
	var t0, t1 float64 = math.Inf(1), math.Inf(-1)
	for _, wf := range ws {
		if len(wf.Time) > 0 {
			t0 = math.Min(t0, wf.Time[0]*tf)
			t1 = math.Max(t1, wf.Time[len(wf.Time)-1]*tf)
		}
	}
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
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, wf := range ws {
		for _, x := range wf.Phase {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if !(hi > lo) {
		lo, hi = lo-math.Pi/2, hi+math.Pi/2
	}
	pad := 0.06 * (hi - lo)
	pp.Y.Min, pp.Y.Max = lo-pad, hi+pad
	svg, err := renderSVG(w, h, "Waveforms per channel: Rabi frequency and phase against time", func(dc draw.Canvas) error {
		area, kc := panels(dc)
		alignPanels([]*plot.Plot{pa, pp}, 2, 1, area)
		drawKey(kc, key)
		return nil
	})
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
	svg, err := renderSVG(w, h, "Level populations over time for each computational input state", func(dc draw.Canvas) error {
		area, kc := panels(dc)
		alignPanels(ps, rows, cols, area)
		drawKey(kc, key)
		return nil
	})
	if err != nil {
		return figure{}, err
	}
	return figure{svg: svg, caption: "Populations of all levels during the gate, one panel per computational input state.", w: w, h: h}, nil
}

// ---------------------------------------------------------------- robustness

// infidelityFloor is the smallest infidelity drawn on logarithmic axes.
const infidelityFloor = 1e-8

// logInfidelities returns log10(1 − F), floored at infidelityFloor.
func logInfidelities(f []float64) []float64 {
	out := make([]float64, len(f))
	for i, x := range f {
		out[i] = math.Log10(math.Max(1-x, infidelityFloor))
	}
	return out
}

// sweepFigure draws the one-dimensional robustness curves.
func sweepFigure(sw []Sweep) (figure, error) {
	rows, cols := gridLayout(len(sw), 3)
	w, h := figW, 30.0+250.0*float64(rows)
	key := newLegend()
	geo := seriesStyle{color: colGeo, glyph: draw.CircleGlyph{}}
	dyn := seriesStyle{color: colDyn, dash: dashed, glyph: draw.TriangleGlyph{}}
	thr := seriesStyle{color: colThresh, dash: []vg.Length{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}}
	var ps []*plot.Plot
	var anyDyn bool
	for i, s := range sw {
		f, u := unitScale(s.Unit, maxAbs(s.X))
		xs := scaled(s.X, f)
		p := newPlot()
		p.Title.Text = s.Axis
		p.X.Label.Text = axisLabel(s.Axis, u)
		p.Y.Label.Text = "infidelity 1 − F"
		p.Y.Tick.Marker = decadeTicks{}
		p.X.Tick.Marker = niceTicks{4}
		th := math.Log10(1 - Threshold)
		gi := logInfidelities(s.Geometric)
		lo, hi := th, th
		for _, v := range gi {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		var di []float64
		if s.Dynamical != nil {
			di = logInfidelities(s.Dynamical)
			for _, v := range di {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		p.Y.Min = math.Floor(lo)
		p.Y.Max = math.Max(math.Ceil(hi+1e-9), p.Y.Min+1)
		p.X.Min, p.X.Max = xs[0], xs[len(xs)-1]
		p.Add(grid{vertical: true, horizontal: true})
		tl, err := line([]float64{xs[0], xs[len(xs)-1]}, []float64{th, th}, thr, 1.1)
		if err != nil {
			return figure{}, err
		}
		p.Add(tl)
		if di != nil {
			anyDyn = true
			ld, err := line(xs, di, dyn, lineW)
			if err != nil {
				return figure{}, fmt.Errorf("report: sweep %q dynamical: %w", s.Axis, err)
			}
			md, err := markers(xs, di, dyn, 1, 2)
			if err != nil {
				return figure{}, err
			}
			p.Add(ld, md)
		}
		lg, err := line(xs, gi, geo, lineW+0.2)
		if err != nil {
			return figure{}, fmt.Errorf("report: sweep %q geometric: %w", s.Axis, err)
		}
		mg, err := markers(xs, gi, geo, 0, 2)
		if err != nil {
			return figure{}, err
		}
		p.Add(lg, mg)
		if i == 0 {
			key.Add("geometric gate", lg, mg)
		}
		ps = append(ps, p)
	}
	if anyDyn {
		ld, _ := line([]float64{0, 1}, []float64{0, 0}, dyn, lineW)
		md, _ := markers([]float64{0.5}, []float64{0}, dyn, 0, 1)
		key.Add("dynamical gate", ld, md)
	}
	tl, _ := line([]float64{0, 1}, []float64{0, 0}, thr, 1.1)
	key.Add(fmt.Sprintf("F = %g", Threshold), tl)
	svg, err := renderSVG(w, h, "Robustness curves: infidelity against each error for the geometric and the dynamical gate", func(dc draw.Canvas) error {
		area, kc := panels(dc)
		alignPanels(ps, rows, cols, area)
		drawKey(kc, key)
		return nil
	})
	if err != nil {
		return figure{}, err
	}
	caption := fmt.Sprintf("Infidelity 1 − F against each error, on a logarithmic scale; the region below the dash-dot line has F ≥ %g. Values below 1e−8 are drawn at 1e−8.", Threshold)
	return figure{svg: svg, caption: caption, w: w, h: h}, nil
}

// ---------------------------------------------------------------- map

// gridZ adapts a fidelity grid to plotter.GridXYZ, showing log10(1 − F).
type gridZ struct {
	x, y []float64
	z    [][]float64
}

func (g gridZ) Dims() (c, r int)   { return len(g.x), len(g.y) }
func (g gridZ) Z(c, r int) float64 { return g.z[r][c] }
func (g gridZ) X(c int) float64    { return g.x[c] }
func (g gridZ) Y(r int) float64    { return g.y[r] }

// mapFigure draws the two-dimensional robustness map with the Threshold
// contours.
func mapFigure(m *Map) (figure, error) {
	const w, h = figW, 380.0
	fx, ux := unitScale(m.XUnit, maxAbs(m.X))
	fy, uy := unitScale(m.YUnit, maxAbs(m.Y))
	xs, ys := scaled(m.X, fx), scaled(m.Y, fy)
	z := make([][]float64, len(ys))
	zlo, zhi := math.Inf(1), math.Inf(-1)
	for i := range z {
		z[i] = make([]float64, len(xs))
		for j := range z[i] {
			v := math.Log10(math.Max(1-m.Geometric[i][j], infidelityFloor))
			z[i][j] = v
			zlo, zhi = math.Min(zlo, v), math.Max(zhi, v)
		}
	}
	// Colour range: whole decades, always including the threshold decade.
	zlo = math.Min(math.Floor(zlo), -4)
	zhi = math.Max(math.Ceil(zhi), -2)
	cm := &mapColors{min: zlo, max: zhi}
	hm := plotter.NewHeatMap(gridZ{xs, ys, z}, cm.Palette(256))
	hm.Min, hm.Max = zlo, zhi
	hm.Rasterized = true
	p := newPlot()
	p.Title.Text = "geometric gate"
	p.X.Label.Text = axisLabel(m.XAxis, ux)
	p.Y.Label.Text = axisLabel(m.YAxis, uy)
	p.X.Padding, p.Y.Padding = 0, 0
	p.X.Tick.Marker, p.Y.Tick.Marker = niceTicks{6}, niceTicks{5}
	p.Add(hm)
	key := newLegend()
	addContour := func(g [][]float64, dash []vg.Length, name string) error {
		var first *plotter.Line
		for _, cl := range contourLines(xs, ys, g, Threshold) {
			cx, cy := make([]float64, len(cl)), make([]float64, len(cl))
			for k, pt := range cl {
				cx[k], cy[k] = pt[0], pt[1]
			}
			under, err := line(cx, cy, seriesStyle{color: colorWhite, dash: dash}, 3.4)
			if err != nil {
				return err
			}
			over, err := line(cx, cy, seriesStyle{color: colInk, dash: dash}, 1.5)
			if err != nil {
				return err
			}
			p.Add(under, over)
			if first == nil {
				first = over
			}
		}
		if first == nil {
			ln, _ := line([]float64{0, 1}, []float64{0, 0}, seriesStyle{color: colInk, dash: dash}, 1.5)
			key.Add(name+" (none in range)", ln)
			return nil
		}
		key.Add(name, first)
		return nil
	}
	if err := addContour(m.Geometric, nil, fmt.Sprintf("geometric F = %g", Threshold)); err != nil {
		return figure{}, err
	}
	if m.Dynamical != nil {
		if err := addContour(m.Dynamical, []vg.Length{vg.Points(6), vg.Points(3.5)}, fmt.Sprintf("dynamical F = %g", Threshold)); err != nil {
			return figure{}, err
		}
	}
	cb := newPlot()
	cb.HideX()
	cb.X.Padding = 0
	cb.Y.Padding = 0
	cb.Y.Label.Text = "infidelity 1 − F"
	cb.Y.Tick.Marker = decadeTicks{}
	cb.Add(&plotter.ColorBar{ColorMap: cm, Vertical: true, Colors: 256})
	// Mark the threshold on the colour bar.
	th := math.Log10(1 - Threshold)
	under, err := line([]float64{0, 1}, []float64{th, th}, seriesStyle{color: colorWhite}, 3.4)
	if err != nil {
		return figure{}, err
	}
	over, err := line([]float64{0, 1}, []float64{th, th}, seriesStyle{color: colInk}, 1.5)
	if err != nil {
		return figure{}, err
	}
	cb.Add(under, over)
	cb.X.Min, cb.X.Max = 0, 1
	svg, err := renderSVG(w, h, "Robustness map: infidelity over two errors with the fidelity threshold contours", func(dc draw.Canvas) error {
		area, kc := panels(dc)
		const barW = 70.0
		mc := draw.Crop(area, 0, -vg.Points(barW+12), 0, 0)
		p.Draw(mc)
		d := p.DataCanvas(mc)
		bc := draw.Crop(area, area.Max.X-area.Min.X-vg.Points(barW), 0, 0, 0)
		bc.Min.Y, bc.Max.Y = d.Min.Y, d.Max.Y
		bd := cb.DataCanvas(bc)
		bc.Min.Y += d.Min.Y - bd.Min.Y
		bc.Max.Y += d.Max.Y - bd.Max.Y
		bc.Min.X += bd.Max.X - bd.Min.X - vg.Points(16)
		cb.Draw(bc)
		drawKey(kc, key)
		return nil
	})
	if err != nil {
		return figure{}, err
	}
	caption := fmt.Sprintf("Infidelity 1 − F of the geometric gate over both errors (colour, logarithmic; light is better; values below 1e−8 drawn at 1e−8). The solid line encloses the region with F ≥ %g, also marked on the colour scale", Threshold)
	if m.Dynamical != nil {
		caption += "; the dashed line is the same contour for the dynamical gate"
	}
	caption += "."
	return figure{svg: svg, caption: caption, w: w, h: h}, nil
}
