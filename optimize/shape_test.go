package optimize

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

func spheres(t *testing.T) map[string]*Sphere {
	t.Helper()
	cplx, err := NewDriveSphere(holonomy.Tripod(), false)
	if err != nil {
		t.Fatal(err)
	}
	rs, err := NewDriveSphere(holonomy.Tripod(), true)
	if err != nil {
		t.Fatal(err)
	}
	field, err := NewFieldSphere(holonomy.Spin(1, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	return map[string]*Sphere{"complex": cplx, "real": rs, "field": field}
}

// Every member of both families is closed, starts at the base point and
// stays on the unit sphere; drive points are normalised to Σ|Drive|² = 1.
func TestShapesClosedAndNormalised(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for name, sp := range spheres(t) {
		for _, sh := range []Shape{NewFourier(sp, 1), NewFourier(sp, 3), NewPolygon(sp, 2), NewPolygon(sp, 4)} {
			x := make([]float64, sh.NumParams())
			for i := range x {
				x[i] = 2*rng.Float64() - 1
			}
			sh.SetParams(x)
			v0 := make([]float64, sp.Dim())
			v1 := make([]float64, sp.Dim())
			sh.Vector(0, v0)
			sh.Vector(1, v1)
			for i := range v0 {
				if v0[i] != sp.Base[i] || v1[i] != sp.Base[i] {
					t.Errorf("%s %T: ends %v, %v; base %v", name, sh, v0, v1, sp.Base)
					break
				}
			}
			sc := holonomy.Tripod()
			if sp.Kind == FieldSphere {
				sc = holonomy.Spin(1, 0, 1)
			}
			p := sc.NewPoint()
			for i := 0; i < 50; i++ {
				s := rng.Float64()
				sh.Vector(s, v0)
				if n := math.Sqrt(dot(v0, v0)); math.Abs(n-1) > 1e-14 {
					t.Errorf("%s %T: |x(%g)| = %.17g", name, sh, s, n)
				}
				sh.Point(s, p)
				if sp.Kind != FieldSphere {
					var sum float64
					for _, d := range p.Drive {
						sum += real(d)*real(d) + imag(d)*imag(d)
					}
					if math.Abs(sum-1) > 1e-14 {
						t.Errorf("%s %T: Σ|Drive|² = %.17g at s = %g", name, sh, sum, s)
					}
				}
			}
			c := sh.Clone()
			x2 := c.Params()
			for i := range x {
				if x2[i] != x[i] {
					t.Fatalf("%s %T: clone parameters differ", name, sh)
				}
			}
		}
	}
}

// Elementary spherical geometry: the octant triangle base → x → y → base
// has three quarter great circles, length 3π/2, on the real drive sphere
// (where the Fubini–Study distance arccos|u·v| equals the arc for arcs up to
// π/2) and on the field sphere.
func TestPolygonOctantLength(t *testing.T) {
	sps := spheres(t)
	for _, name := range []string{"real", "field"} {
		pg := NewPolygon(sps[name], 2)
		pg.SetParams([]float64{1, 0, 0, 0, 1, 0})
		if l := Length(pg); math.Abs(l-3*math.Pi/2) > 1e-12 {
			t.Errorf("%s: octant length %.15g, want 3π/2", name, l)
		}
	}
}

// A loop that only turns the common phase of the drives is a point in the
// Fubini–Study metric: on the complex sphere w(s) = e^{iα(s)}·base has zero
// length (the dark states do not move), while its sphere length is not zero.
func TestFubiniStudyIgnoresCommonPhase(t *testing.T) {
	sp := spheres(t)["complex"]
	a := []float64{0, 0, 0, 0, 1, 0}
	b := []float64{0, 0, 0, 0, math.Cos(0.7), math.Sin(0.7)}
	if d := sp.Distance(a, b); d > 1e-15 {
		t.Errorf("FS distance between base and e^{0.7i}·base = %g, want 0", d)
	}
	c := []float64{0, 0, math.Sin(0.3), 0, math.Cos(0.3), 0}
	if d := sp.Distance(a, c); math.Abs(d-0.3) > 1e-15 {
		t.Errorf("FS distance = %.17g, want 0.3", d)
	}
}

func TestSpherePoints(t *testing.T) {
	sps := spheres(t)
	// Tripod base: only the auxiliary channel pa on, so g0 and g1 are dark.
	sc := holonomy.Tripod()
	p := sc.NewPoint()
	sps["complex"].Point(sps["complex"].Base, p)
	if p.Drive[0] != 0 || p.Drive[1] != 0 || p.Drive[2] != 1 {
		t.Errorf("tripod base drive %v, want (0, 0, 1)", p.Drive)
	}
	// Field sphere: x = (sinθcosφ, sinθsinφ, cosθ) gives SpinPoint(p, 1, θ, φ).
	sp := holonomy.Spin(1, 0, 1)
	q, r := sp.NewPoint(), sp.NewPoint()
	th, ph := 0.8, -2.1
	sps["field"].Point([]float64{math.Sin(th) * math.Cos(ph), math.Sin(th) * math.Sin(ph), math.Cos(th)}, q)
	holonomy.SpinPoint(r, 1, th, ph)
	if cmplx.Abs(q.Drive[0]-r.Drive[0]) > 1e-15 || math.Abs(q.Detuning[0]-r.Detuning[0]) > 1e-15 || math.Abs(q.Detuning[1]-r.Detuning[1]) > 1e-15 {
		t.Errorf("field point %v, SpinPoint %v", q, r)
	}
}

func TestSphereErrors(t *testing.T) {
	if _, err := NewDriveSphere(holonomy.Lambda(), false); err == nil {
		t.Error("Λ scheme: want an error (no drive leaves both qubit levels dark)")
	}
	if _, err := NewFieldSphere(holonomy.Tripod()); err == nil {
		t.Error("tripod as a field sphere: want an error")
	}
	if _, err := NewDriveSphere(&holonomy.Scheme{Name: "bad"}, false); err == nil {
		t.Error("invalid scheme: want an error")
	}
}
