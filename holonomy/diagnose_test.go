package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

func geoKinds(fs []Finding) map[FindingKind]string {
	m := map[FindingKind]string{}
	for _, f := range fs {
		m[f.Kind] = f.Message
	}
	return m
}

func TestRealLoopFinding(t *testing.T) {
	// Common practice (Berry, Proc. R. Soc. A 392, 45 (1984)): along a
	// loop on which H stays real the holonomy is real orthogonal; one state
	// picks up 0 or π, π exactly when the loop encircles a degeneracy
	// (Herzberg and Longuet-Higgins, Discuss. Faraday Soc. 35, 77 (1963);
	// reference from memory).
	circle := func(cz, r float64) Loop { // field (B_x, B_z) on a circle in the xz plane
		return func(s float64, p Point) {
			bx, bz := r*math.Sin(2*math.Pi*s), cz+r*math.Cos(2*math.Pi*s)
			SpinPoint(p, geoOmega*math.Hypot(bx, bz), math.Atan2(bx, bz), 0)
		}
	}
	for _, c := range []struct {
		name string
		loop Loop
		want complex128
	}{
		{"encircles B = 0", circle(0.5, 1), -1},
		{"does not encircle B = 0", circle(2, 1), 1},
	} {
		res, err := NewWilson(Spin(1, 0)).Adaptive(c.loop, AdaptiveOptions{Tol: 1e-11, Extrapolate: true})
		if err != nil {
			t.Fatal(err)
		}
		if _, ok := geoKinds(res.Findings)[RealLoop]; !ok {
			t.Errorf("%s: no real-loop finding in %v", c.name, res.Findings)
		}
		if d := cmplx.Abs(res.U.Data[0] - c.want); d > 1e-9 {
			t.Errorf("%s: U = %v, want %v", c.name, res.U.Data[0], c.want)
		}
	}
	// Tripod with real couplings (Duan, Cirac and Zoller 2001): a real
	// orthogonal 2×2 holonomy.
	w := NewWilson(Tripod())
	res, err := w.Adaptive(geoSector(1, 2, geoTripodDCZ), AdaptiveOptions{Points: 48, Tol: 1e-10, Extrapolate: true})
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := geoKinds(res.Findings)[RealLoop]; !ok {
		t.Errorf("DCZ loop: findings %v", res.Findings)
	}
	for _, x := range res.U.Data {
		if math.Abs(imag(x)) > 1e-12 {
			t.Errorf("DCZ holonomy not real:\n%v", res.U)
			break
		}
	}
	// Fixed drive phases are fixed level phases: still real.
	phased := func(s float64, p Point) {
		geoSector(1, 2, geoTripodDCZ)(s, p)
		p.Drive[0] *= cmplx.Exp(0.4i)
		p.Drive[1] *= cmplx.Exp(-2.1i)
		p.Drive[2] *= cmplx.Exp(1i)
	}
	fs, err := w.Diagnose(phased, 96)
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := geoKinds(fs)[RealLoop]; !ok {
		t.Errorf("fixed drive phases: findings %v", fs)
	}
	// Drive phases that change along the loop: not real.
	fs, err = w.Diagnose(geoSmoothTripod, 96)
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := geoKinds(fs)[RealLoop]; ok {
		t.Errorf("complex loop reported real: %v", fs)
	}
	// A coupling cycle: three levels in a ring. Fixed drive phases are
	// removable by level phases only if they add up to 0 or π around the
	// ring (otherwise a flux threads it).
	ring := &Scheme{
		Name:   "ring",
		Levels: []Level{{Name: "x"}, {Name: "y", Detuning: geoOmega}, {Name: "z", Detuning: 2.5 * geoOmega}},
		Channels: []Channel{
			{Name: "xy", Lower: 0, Upper: 1, Factor: 1},
			{Name: "yz", Lower: 1, Upper: 2, Factor: 1},
			{Name: "xz", Lower: 0, Upper: 2, Factor: 1},
		},
		Computational: []int{0},
	}
	for _, c := range []struct {
		total float64
		real  bool
	}{{0, true}, {math.Pi, true}, {0.5, false}} {
		loop := func(s float64, p Point) {
			a := 0.3 * geoOmega * (1 + 0.5*math.Sin(2*math.Pi*s))
			b := 0.2 * geoOmega * (1 + 0.5*math.Cos(2*math.Pi*s))
			p.Drive[0] = cmplx.Rect(a, 0.7)
			p.Drive[1] = cmplx.Rect(b, -0.2)
			// x→z phase φ_xz with φ_xy + φ_yz − φ_xz = total around the ring.
			p.Drive[2] = cmplx.Rect(0.25*geoOmega, 0.7-0.2-c.total)
		}
		fs, err := NewWilson(ring).Diagnose(loop, 64)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok := geoKinds(fs)[RealLoop]; ok != c.real {
			t.Errorf("ring with phase %g: real-loop finding %v, want %v", c.total, ok, c.real)
		}
	}
}

func TestNoAreaFinding(t *testing.T) {
	// Common practice (Berry 1984): a loop enclosing no area has the
	// identity as holonomy.
	th0, ph0 := 1.1, 1.7
	quarter := func(s float64) (int, float64) { // leg index and position in it
		k := min(int(4*s), 3)
		return k, 4*s - float64(k)
	}
	cases := []struct {
		name  string
		loop  Loop
		match string
	}{
		{"one angle out and back", func(s float64, p Point) {
			x := math.Sin(math.Pi * s)
			TripodPoint(p, geoOmega, th0*x*x, 0.7)
		}, "retraces"},
		{"both angles out and back, unequal speeds", func(s float64, p Point) {
			g := math.Sin(math.Pi * s * s)
			g *= g
			TripodPoint(p, geoOmega, th0*g, ph0*g)
		}, "retraces"},
		{"L-shaped path and back", func(s float64, p Point) {
			switch k, x := quarter(s); k {
			case 0:
				TripodPoint(p, geoOmega, th0*x, 0)
			case 1:
				TripodPoint(p, geoOmega, th0, ph0*x)
			case 2:
				TripodPoint(p, geoOmega, th0, ph0*(1-x))
			default:
				TripodPoint(p, geoOmega, th0*(1-x), 0)
			}
		}, "retraces"},
		{"there, half back, there again and back", func(s float64, p Point) {
			var g float64
			switch k, x := quarter(s); k {
			case 0:
				g = x
			case 1:
				g = 1 - x/2
			case 2:
				g = 0.5 + x/2
			default:
				g = 1 - x
			}
			TripodPoint(p, geoOmega, th0*g, ph0*g*g)
		}, "retraces"},
		{"amplitude only", func(s float64, p Point) {
			TripodPoint(p, geoOmega*(1+0.5*math.Sin(2*math.Pi*s)), 0.3, 0.2)
		}, "straight line"},
		{"constant", func(s float64, p Point) { TripodPoint(p, geoOmega, 0.3, 0.2) }, "do not change"},
	}
	w := NewWilson(Tripod())
	for _, c := range cases {
		res, err := w.Adaptive(c.loop, AdaptiveOptions{Points: 64, Tol: 1e-10, Extrapolate: true})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		msg, ok := geoKinds(res.Findings)[NoArea]
		if !ok || !strings.Contains(msg, c.match) {
			t.Errorf("%s: findings %v, want no-area (%q)", c.name, res.Findings, c.match)
		}
		if c.name != "amplitude only" && c.name != "constant" {
			// these are based at θ = 0 where the qubit levels are dark
			if d := FrobeniusDist(res.U, Identity(2)); d > 1e-9 {
				t.Errorf("%s: U =\n%vwant the identity (‖ΔU‖ = %.2g)", c.name, res.U, d)
			}
		}
	}
	// Loops that do enclose area are not reported: the sector loop, a
	// figure-eight whose lobes are traversed in opposite senses, and a thin
	// loop that comes back 1e-6 rad beside its outward path.
	eight := func(s float64, p Point) {
		TripodPoint(p, geoOmega, 0.6+0.3*math.Sin(4*math.Pi*s)+0.3*math.Sin(2*math.Pi*s), 0.8*math.Sin(2*math.Pi*s))
	}
	thin := func(s float64, p Point) { // out and back 1e-6 rad apart in φ
		x := math.Sin(math.Pi * s)
		TripodPoint(p, geoOmega, th0*x*x, 0.7+1e-6*math.Sin(2*math.Pi*s))
	}
	for name, loop := range map[string]Loop{"sector": geoSector(th0, ph0, geoTripodDCZ), "figure-eight": eight, "thin": thin} {
		fs, err := w.Diagnose(loop, 96)
		if err != nil {
			t.Fatal(err)
		}
		if m, ok := geoKinds(fs)[NoArea]; ok {
			t.Errorf("%s reported as enclosing no area: %s", name, m)
		}
	}
}

func TestBaseLeakageFinding(t *testing.T) {
	// On a cone of polar angle θ the field-aligned spin-½ state has weight
	// cos²(θ/2) on |m=+½⟩ (the computational level).
	th := 0.7
	fs, err := NewWilson(Spin(1, 0)).Diagnose(geoCone(th, 1), 64)
	if err != nil {
		t.Fatal(err)
	}
	msg, ok := geoKinds(fs)[BaseLeakage]
	want := 100 * math.Pow(math.Cos(th/2), 2)
	if !ok || !strings.Contains(msg, fmt.Sprintf("%.4g%%", want)) {
		t.Errorf("findings %v, want base-leakage with %.4g%%", fs, want)
	}
	// Based at the pole: no leakage.
	fs, err = NewWilson(Spin(1, 0)).Diagnose(geoSector(0.7, 1, func(p Point, a, b float64) { SpinPoint(p, geoOmega, a, b) }), 96)
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := geoKinds(fs)[BaseLeakage]; ok || len(fs) != 0 {
		t.Errorf("pole-based loop: findings %v", fs)
	}
	if RealLoop.String() != "real-loop" || NoArea.String() != "no-area" || BaseLeakage.String() != "base-leakage" || FindingKind(9).String() != "FindingKind(9)" {
		t.Error("FindingKind names")
	}
	if s := (Finding{NoArea, "x"}).String(); s != "no-area: x" {
		t.Errorf("Finding.String = %q", s)
	}
}
