package report

// contourLines returns the level set z = level of a grid z[i][j] given at
// (x[j], y[i]) as polylines in data coordinates, found by marching squares
// with linear interpolation along cell edges (Lorensen and Cline, Computer
// Graphics 21(4), 163 (1987), in its two-dimensional form). Ambiguous saddle
// cells are resolved with the mean of the four corners.
//
// gonum's plotter.Contour joins its paths through map iteration, so its
// drawing order changes from run to run; this version walks the cells and
// joins the segments in a fixed order, so the same grid always gives the
// same polylines.
func contourLines(x, y []float64, z [][]float64, level float64) [][][2]float64 {
	type edge struct{ vertical, i, j int } // vertical: between (i,j) and (i+1,j); else (i,j)–(i,j+1)
	type seg struct{ a, b edge }
	point := func(e edge) [2]float64 {
		i, j := e.i, e.j
		if e.vertical == 1 {
			t := (level - z[i][j]) / (z[i+1][j] - z[i][j])
			return [2]float64{x[j], y[i] + t*(y[i+1]-y[i])}
		}
		t := (level - z[i][j]) / (z[i][j+1] - z[i][j])
		return [2]float64{x[j] + t*(x[j+1]-x[j]), y[i]}
	}
	var segs []seg
	for i := 0; i+1 < len(y); i++ {
		for j := 0; j+1 < len(x); j++ {
			// Corners counter-clockwise from (i,j): a, b, c, d.
			a, b, c, d := z[i][j], z[i][j+1], z[i+1][j+1], z[i+1][j]
			in := func(v float64) int {
				if v >= level {
					return 1
				}
				return 0
			}
			k := in(a) | in(b)<<1 | in(c)<<2 | in(d)<<3
			bottom := edge{0, i, j}
			right := edge{1, i, j + 1}
			top := edge{0, i + 1, j}
			left := edge{1, i, j}
			switch k {
			case 0, 15:
			case 1, 14:
				segs = append(segs, seg{left, bottom})
			case 2, 13:
				segs = append(segs, seg{bottom, right})
			case 3, 12:
				segs = append(segs, seg{left, right})
			case 4, 11:
				segs = append(segs, seg{right, top})
			case 6, 9:
				segs = append(segs, seg{bottom, top})
			case 7, 8:
				segs = append(segs, seg{left, top})
			case 5, 10:
				centreIn := (a+b+c+d)/4 >= level
				if (k == 5) == centreIn {
					// a and c joined through the centre.
					segs = append(segs, seg{left, top}, seg{bottom, right})
				} else {
					segs = append(segs, seg{left, bottom}, seg{right, top})
				}
			}
		}
	}
	// Join segments sharing an edge crossing into polylines.
	at := make(map[edge][]int, 2*len(segs))
	for n, s := range segs {
		at[s.a] = append(at[s.a], n)
		at[s.b] = append(at[s.b], n)
	}
	used := make([]bool, len(segs))
	next := func(e edge, from int) int {
		for _, n := range at[e] {
			if n != from && !used[n] {
				return n
			}
		}
		return -1
	}
	var lines [][][2]float64
	for n0, s0 := range segs {
		if used[n0] {
			continue
		}
		used[n0] = true
		// Walk forward from s0.b, then backward from s0.a.
		walk := func(e edge, cur int, out []edge) []edge {
			for {
				n := next(e, cur)
				if n < 0 {
					return out
				}
				used[n] = true
				if segs[n].a == e {
					e = segs[n].b
				} else {
					e = segs[n].a
				}
				out = append(out, e)
				cur = n
			}
		}
		fwd := walk(s0.b, n0, []edge{s0.a, s0.b})
		back := walk(s0.a, n0, nil)
		line := make([][2]float64, 0, len(back)+len(fwd))
		for k := len(back) - 1; k >= 0; k-- {
			line = append(line, point(back[k]))
		}
		for _, e := range fwd {
			line = append(line, point(e))
		}
		lines = append(lines, line)
	}
	return lines
}
