package report

import (
	"fmt"
	"image/color"
	"math"
	"testing"
)

// The contour of a linear field is exact under linear interpolation along
// cell edges; for z = x² + y² the level set is a circle, reproduced to the
// interpolation error O(h²).
func TestContourLines(t *testing.T) {
	const n = 41
	x, y := make([]float64, n), make([]float64, n)
	for i := range x {
		x[i] = -1 + 2*float64(i)/(n-1)
		y[i] = -1 + 2*float64(i)/(n-1)
	}
	h := x[1] - x[0]
	lin, quad := make([][]float64, n), make([][]float64, n)
	for i := range y {
		lin[i], quad[i] = make([]float64, n), make([]float64, n)
		for j := range x {
			lin[i][j] = x[j] + 2*y[i]
			quad[i][j] = x[j]*x[j] + y[i]*y[i]
		}
	}
	lines := contourLines(x, y, lin, 0.3)
	if len(lines) != 1 {
		t.Fatalf("linear field: %d lines; want 1", len(lines))
	}
	for _, p := range lines[0] {
		if e := math.Abs(p[0] + 2*p[1] - 0.3); e > 1e-12 {
			t.Fatalf("linear field: point %v off the line by %g", p, e)
		}
	}
	// The line crosses the whole square: from one boundary to another.
	first, last := lines[0][0], lines[0][len(lines[0])-1]
	onEdge := func(p [2]float64) bool {
		return math.Abs(math.Abs(p[0])-1) < 1e-12 || math.Abs(math.Abs(p[1])-1) < 1e-12
	}
	if !onEdge(first) || !onEdge(last) {
		t.Errorf("linear field: open line should end on the boundary, got %v … %v", first, last)
	}
	const r = 0.6
	lines = contourLines(x, y, quad, r*r)
	if len(lines) != 1 {
		t.Fatalf("circle: %d lines; want 1", len(lines))
	}
	c := lines[0]
	if c[0] != c[len(c)-1] {
		t.Errorf("circle: line not closed: %v … %v", c[0], c[len(c)-1])
	}
	if len(c) < 40 {
		t.Errorf("circle: only %d points", len(c))
	}
	for _, p := range c {
		if e := math.Abs(math.Hypot(p[0], p[1]) - r); e > h*h {
			t.Fatalf("circle: point %v is %g from radius %g (h² = %g)", p, e, r, h*h)
		}
	}
	// Two separate wells give two closed lines, in a fixed order.
	two := make([][]float64, n)
	for i := range y {
		two[i] = make([]float64, n)
		for j := range x {
			a := math.Hypot(x[j]-0.5, y[i])
			b := math.Hypot(x[j]+0.5, y[i])
			two[i][j] = math.Min(a, b)
		}
	}
	l1 := contourLines(x, y, two, 0.25)
	l2 := contourLines(x, y, two, 0.25)
	if len(l1) != 2 {
		t.Fatalf("two wells: %d lines; want 2", len(l1))
	}
	if fmt.Sprint(l1) != fmt.Sprint(l2) {
		t.Error("contour lines differ between runs")
	}
}

func TestSphereVectors(t *testing.T) {
	s := 1 / math.Sqrt2
	near := func(a, b [3]float64) bool {
		for i := range a {
			if math.Abs(a[i]-b[i]) > 1e-12 {
				return false
			}
		}
		return true
	}
	// Two channels: the Bloch map sends (1,0) to the north pole, equal
	// in-phase drives to +X and a quarter-period phase to +Y.
	l := &Loop{Channels: []string{"p0", "p1"}, Drive: [][]complex128{
		{1, 0}, {complex(s, 0), complex(s, 0)}, {complex(s, 0), complex(0, s)}, {0, 0}, {2, 0},
	}}
	v, ok, _, _ := sphereVectors(l)
	want := [][3]float64{{0, 0, 1}, {1, 0, 0}, {0, 1, 0}, {}, {0, 0, 1}}
	for k := range want {
		if k == 3 {
			if ok[k] {
				t.Error("zero drive not skipped")
			}
			continue
		}
		if !ok[k] || !near(v[k], want[k]) {
			t.Errorf("two channels, sample %d: got %v; want %v", k, v[k], want[k])
		}
	}
	// Three channels: moduli over the full norm, phases ignored.
	l = &Loop{Channels: []string{"p0", "p1", "pa"}, Drive: [][]complex128{
		{complex(0, 3), 0, -4}, {1, 1, 1},
	}}
	v, _, _, _ = sphereVectors(l)
	if !near(v[0], [3]float64{0.6, 0, 0.8}) {
		t.Errorf("three channels: got %v", v[0])
	}
	// Axial component: a spin field direction.
	l = &Loop{Channels: []string{"x0"}, Drive: [][]complex128{{complex(0, 3)}}, Axial: []float64{4}}
	v, _, _, _ = sphereVectors(l)
	if !near(v[0], [3]float64{0, 0.6, 0.8}) {
		t.Errorf("axial: got %v", v[0])
	}
}

func TestFormatting(t *testing.T) {
	cases := []struct{ got, want string }{
		{num(6.9e-5, 2), "6.9×10<sup>−5</sup>"},
		{num(9.99e-6, 2), "1.0×10<sup>−5</sup>"},
		{num(0.031, 3), "0.0310"},
		{num(12, 3), "12.0"},
		{num(100, 3), "100"},
		{num(-2.5, 2), "−2.5"},
		{num(math.Inf(1), 2), "∞"},
		{fidelity(0.999931), "0.999931"},
		{fidelity(0.5), "0.5000"},
		{qty(2.17e6, "Hz", 3), "2.17&#160;MHz"},
		{qty(4e-6, "s", 3), "4.00&#160;µs"},
		{qty(11.97, "%", 3), "12.0&#160;%"},
		{percent(-0.3333), "−33.3&#160;%"},
		{ratio(4.02), "4.0×"},
		{ratio(math.Inf(1)), "∞"},
		{piLabel(-1), "−π"},
		{piLabel(1.5), "3π/2"},
		{piLabel(2), "2π"},
		{decadeLabel(-3), "1e−3"},
		{decadeLabel(-2), "0.01"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("got %q; want %q", c.got, c.want)
		}
	}
}

func TestDecadeTicks(t *testing.T) {
	labels := map[float64]string{}
	minor := 0
	for _, tk := range (decadeTicks{}).Ticks(-3, -1) {
		if tk.Label != "" {
			labels[tk.Value] = tk.Label
			continue
		}
		minor++
		e := math.Floor(tk.Value)
		m := math.Pow(10, tk.Value-e)
		if math.Abs(m-math.Round(m)) > 1e-9 || m < 2-1e-9 || m > 9+1e-9 {
			t.Errorf("minor tick at 10^%g is not a whole multiple of a decade", tk.Value)
		}
	}
	want := map[float64]string{-3: "1e−3", -2: "0.01", -1: "0.1"}
	if fmt.Sprint(labels) != fmt.Sprint(want) || minor != 16 {
		t.Errorf("labels %v and %d minor ticks; want %v and 16", labels, minor, want)
	}
}

// relLum is the relative luminance of sRGB colour c (ITU-R BT.709 weights
// on linearised channels, as in the sRGB standard IEC 61966-2-1).
func relLum(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	lin := func(v uint32) float64 {
		x := float64(v) / 0xffff
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(r) + 0.7152*lin(g) + 0.0722*lin(b)
}

// The map's colour scale must read as a grey ramp in black-and-white print:
// luminance falls strictly from the best to the worst infidelity.
func TestMapColoursMonotoneInGrey(t *testing.T) {
	cm := &mapColors{min: -6, max: 0}
	cs := cm.Palette(64).Colors()
	for i := 1; i < len(cs); i++ {
		if !(relLum(cs[i]) < relLum(cs[i-1])) {
			t.Fatalf("luminance does not fall at step %d: %.4f then %.4f", i, relLum(cs[i-1]), relLum(cs[i]))
		}
	}
	if relLum(cs[0])-relLum(cs[len(cs)-1]) < 0.8 {
		t.Errorf("grey range too small: %.3f to %.3f", relLum(cs[0]), relLum(cs[len(cs)-1]))
	}
}

// Every series style differs from every other in dash pattern and in
// marker, so no series relies on colour alone.
func TestSeriesStylesDistinctWithoutColour(t *testing.T) {
	for i := range series {
		for j := i + 1; j < len(series); j++ {
			if fmt.Sprint(series[i].dash) == fmt.Sprint(series[j].dash) {
				t.Errorf("series %d and %d share a dash pattern", i, j)
			}
			if fmt.Sprintf("%T", series[i].glyph) == fmt.Sprintf("%T", series[j].glyph) {
				t.Errorf("series %d and %d share a marker", i, j)
			}
		}
	}
}
