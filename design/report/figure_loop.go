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
		p, err := spherePanel(pi, pr, axes)
		if err != nil {
			return figure{}, err
		}
		hidden, err := drawLoopRuns(p, v, ok, pr, front, back)
		if err != nil {
			return figure{}, err
		}
		hiddenAny = hiddenAny || hidden
		// Direction arrows and the base point.
		for _, frac := range []float64{0.18, 0.52, 0.82} {
			if a := arrowhead(v, ok, pr, frac); a != nil {
				p.Add(a)
			}
		}
		s, err := drawBasePoint(p, v, ok, pr)
		if err != nil {
			return figure{}, err
		}
		if s != nil && pi == 0 {
			fl, _ := line([]float64{0, 1}, []float64{0, 0}, front, 1.6)
			key.Add("loop", fl)
			key.Add("start (s = 0)", s)
			key.Add("direction of travel", arrowThumb{})
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

// spherePanel returns projection panel pi (axes pr[0], pr[1]) with the
// unit circle and cross hairs drawn.
func spherePanel(pi int, pr [3]int, axes [3]string) (*plot.Plot, error) {
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
		return nil, err
	}
	hx, err := line([]float64{-1, 1}, []float64{0, 0}, seriesStyle{color: colFaint}, 0.6)
	if err != nil {
		return nil, err
	}
	hy, err := line([]float64{0, 0}, []float64{-1, 1}, seriesStyle{color: colFaint}, 0.6)
	if err != nil {
		return nil, err
	}
	p.Add(hx, hy, outline)
	return p, nil
}

// drawLoopRuns draws the loop on p, split into runs on the near side
// (front) and far side (back) of the dropped axis pr[2], and reports
// whether any part is on the far side.
func drawLoopRuns(p *plot.Plot, v [][3]float64, ok []bool, pr [3]int, front, back seriesStyle) (hiddenAny bool, err error) {
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
				return false, err
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
				return false, err
			}
			xs, ys = []float64{lx}, []float64{ly}
		}
		hidden = hk
		xs = append(xs, v[k][pr[0]])
		ys = append(ys, v[k][pr[1]])
	}
	if err := flush(); err != nil {
		return false, err
	}
	return hiddenAny, nil
}

// drawBasePoint marks the first valid sample of the loop on p and returns
// its marker (nil if there is none).
func drawBasePoint(p *plot.Plot, v [][3]float64, ok []bool, pr [3]int) (*plotter.Scatter, error) {
	for k := range v {
		if ok[k] {
			s, err := plotter.NewScatter(plotter.XYs{{X: v[k][pr[0]], Y: v[k][pr[1]]}})
			if err != nil {
				return nil, err
			}
			s.GlyphStyle = draw.GlyphStyle{Color: colInk, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
			ring, _ := plotter.NewScatter(plotter.XYs{{X: v[k][pr[0]], Y: v[k][pr[1]]}})
			ring.GlyphStyle = draw.GlyphStyle{Color: colorWhite, Radius: vg.Points(5.5), Shape: draw.CircleGlyph{}}
			p.Add(ring, s)
			return s, nil
		}
	}
	return nil, nil
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
