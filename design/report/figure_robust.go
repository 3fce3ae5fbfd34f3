package report

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

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
	svg, err := renderGrid(w, h, "Robustness curves: infidelity against each error for the geometric and the dynamical gate", ps, rows, cols, key)
	if err != nil {
		return figure{}, err
	}
	caption := fmt.Sprintf("Infidelity 1 − F against each error, on a logarithmic scale; the region below the dash-dot line has F ≥ %g. Values below 1e−8 are drawn at 1e−8.", Threshold)
	return figure{svg: svg, caption: caption, w: w, h: h}, nil
}

// gridZ adapts a fidelity grid to plotter.GridXYZ, showing log10(1 − F).
type gridZ struct {
	x, y []float64
	z    [][]float64
}

func (g gridZ) Dims() (c, r int) { return len(g.x), len(g.y) }

func (g gridZ) Z(c, r int) float64 { return g.z[r][c] }

func (g gridZ) X(c int) float64 { return g.x[c] }

func (g gridZ) Y(r int) float64 { return g.y[r] }

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
		return drawContour(p, &key, xs, ys, g, dash, name)
	}
	if err := addContour(m.Geometric, nil, fmt.Sprintf("geometric F = %g", Threshold)); err != nil {
		return figure{}, err
	}
	if m.Dynamical != nil {
		if err := addContour(m.Dynamical, []vg.Length{vg.Points(6), vg.Points(3.5)}, fmt.Sprintf("dynamical F = %g", Threshold)); err != nil {
			return figure{}, err
		}
	}
	cb, err := colourBar(cm)
	if err != nil {
		return figure{}, err
	}
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

// drawContour draws the Threshold contour of the grid g on p, white under
// ink so that it shows on any colour, and adds it to key as name ("none in
// range" when the grid never crosses the threshold).
func drawContour(p *plot.Plot, key *plot.Legend, xs, ys []float64, g [][]float64, dash []vg.Length, name string) error {
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

// colourBar returns the vertical colour bar of the map with the threshold
// marked on it.
func colourBar(cm *mapColors) (*plot.Plot, error) {
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
		return nil, err
	}
	over, err := line([]float64{0, 1}, []float64{th, th}, seriesStyle{color: colInk}, 1.5)
	if err != nil {
		return nil, err
	}
	cb.Add(under, over)
	cb.X.Min, cb.X.Max = 0, 1
	return cb, nil
}
