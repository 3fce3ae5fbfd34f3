package optimize

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// Shape is a family of closed loops on a control Sphere, parametrised by a
// vector of reals. Every member starts and ends at the sphere's base point,
// so closure and the starting working subspace hold by construction.
//
// A Shape holds its current parameters and scratch space: it is not safe
// for concurrent use; Clone gives an independent copy.
type Shape interface {
	// Control returns the sphere the loop lives on.
	Control() *Sphere
	// NumParams returns the number of real parameters.
	NumParams() int
	// SetParams copies x (of length NumParams) into the shape.
	SetParams(x []float64)
	// Params returns a newly allocated copy of the current parameters.
	Params() []float64
	// Vector writes the unit vector on the sphere at loop parameter
	// s ∈ [0, 1] into dst (length Control().Dim()). Vector(0) and
	// Vector(1) are both exactly the base point. It does not allocate.
	Vector(s float64, dst []float64)
	// Point writes the control point at s into p; its method value is a
	// holonomy.Loop. It does not allocate.
	Point(s float64, p holonomy.Point)
	// Points returns the number of loop points suggested for a fixed-size
	// Wilson loop of this shape during a search.
	NumPoints() int
	// Clone returns an independent copy with the same parameters.
	Clone() Shape
}

// LengthPoints is the least number of chords Length sums.
const LengthPoints = 256

// lengthPoints returns the number of chords for sh: the smallest multiple
// of sh.NumPoints() (so that polygon corners are samples) not below
// LengthPoints.
func lengthPoints(sh Shape) int {
	p := max(sh.NumPoints(), 1)
	return p * ((LengthPoints + p - 1) / p)
}

// Length returns the length of the shape's current loop in its sphere's
// control metric (Fubini–Study for drive vectors, great-circle angle for
// field directions), in radians, summed over at least LengthPoints chords
// between samples that include the corners of a polygon. At a fixed
// adiabaticity the loop's duration grows with this length. It allocates
// only a small scratch vector.
func Length(sh Shape) float64 {
	d := sh.Control().Dim()
	buf := make([]float64, 2*d)
	return length(sh, lengthPoints(sh), buf[:d], buf[d:])
}

func length(sh Shape, n int, a, b []float64) float64 {
	sp := sh.Control()
	sh.Vector(0, a)
	var l float64
	for i := 1; i <= n; i++ {
		sh.Vector(float64(i)/float64(n), b)
		l += sp.Distance(a, b)
		a, b = b, a
	}
	return l
}

// Fourier is the family of smooth truncated Fourier loops on a Sphere:
//
//	w(s) = base + Σ_{k=1..K} [a_k (1 − cos 2πks) + b_k sin 2πks],
//	x(s) = w(s)/|w(s)|,
//
// with real coefficient vectors a_k, b_k of the sphere's dimension (for the
// complex drive sphere they hold real and imaginary parts of complex drive
// vectors). w(0) = w(1) = base, so every member is closed, smooth and starts
// at the base point. The normalisation is singular where w = 0; loops that
// come near it move fast on the sphere and are penalised through their
// length.
type Fourier struct {
	// Sphere is the control sphere; its Base is the loop's start and end.
	Sphere *Sphere
	// Harmonics is the number K ≥ 1 of harmonics.
	Harmonics int
	// Coef holds a_1, b_1, a_2, b_2, ..., a_K, b_K, each Sphere.Dim()
	// values: NumParams() = 2·K·Sphere.Dim() values in all.
	Coef []float64

	w []float64
}

// NewFourier returns the Fourier family with the given number of harmonics
// on sp, with zero coefficients (the loop that stays at the base point).
func NewFourier(sp *Sphere, harmonics int) *Fourier {
	if sp == nil || harmonics < 1 {
		panic("optimize: NewFourier: need a sphere and at least one harmonic")
	}
	return &Fourier{Sphere: sp, Harmonics: harmonics, Coef: make([]float64, 2*harmonics*sp.Dim()), w: make([]float64, sp.Dim())}
}

// Control returns f.Sphere.
func (f *Fourier) Control() *Sphere { return f.Sphere }

// NumParams returns 2·Harmonics·Sphere.Dim().
func (f *Fourier) NumParams() int { return 2 * f.Harmonics * f.Sphere.Dim() }

// SetParams copies x into Coef.
func (f *Fourier) SetParams(x []float64) {
	if len(x) != f.NumParams() {
		panic(fmt.Sprintf("optimize: Fourier.SetParams: %d values for %d parameters", len(x), f.NumParams()))
	}
	if len(f.Coef) != len(x) {
		f.Coef = make([]float64, len(x))
	}
	copy(f.Coef, x)
}

// Params returns a copy of Coef.
func (f *Fourier) Params() []float64 { return append([]float64(nil), f.Coef...) }

// Vector writes x(s) into dst.
func (f *Fourier) Vector(s float64, dst []float64) {
	d := f.Sphere.Dim()
	if len(dst) != d || len(f.Coef) != 2*f.Harmonics*d {
		panic("optimize: Fourier.Vector: dimension mismatch")
	}
	s -= math.Floor(s) // s = 1 maps to 0 exactly
	copy(dst, f.Sphere.Base)
	if s == 0 {
		return
	}
	s1, c1 := math.Sincos(2 * math.Pi * s)
	sk, ck := s1, c1
	for k := 0; k < f.Harmonics; k++ {
		a := f.Coef[2*k*d : (2*k+1)*d]
		b := f.Coef[(2*k+1)*d : (2*k+2)*d]
		oc := 1 - ck
		for i := range dst {
			dst[i] += a[i]*oc + b[i]*sk
		}
		sk, ck = sk*c1+ck*s1, ck*c1-sk*s1
	}
	if normalize(dst) == 0 {
		copy(dst, f.Sphere.Base)
	}
}

// Point writes the control point at s into p.
func (f *Fourier) Point(s float64, p holonomy.Point) {
	if len(f.w) != f.Sphere.Dim() {
		f.w = make([]float64, f.Sphere.Dim())
	}
	f.Vector(s, f.w)
	f.Sphere.Point(f.w, p)
}

// Points returns 128 points per harmonic, at most 512.
func (f *Fourier) NumPoints() int { return min(128*f.Harmonics, 512) }

// Clone returns an independent copy.
func (f *Fourier) Clone() Shape {
	c := NewFourier(f.Sphere, f.Harmonics)
	copy(c.Coef, f.Coef)
	return c
}

// Polygon is the family of closed piecewise-geodesic polygons on a Sphere
// with the base point as first and last vertex:
//
//	base → v_1 → v_2 → … → v_V → base,
//
// where v_j = c_j/|c_j| for free coordinate vectors c_j (the parameters).
// Each of the V+1 edges is a great-circle arc of the sphere, traversed at
// constant speed over an equal share 1/(V+1) of s. The loop turns sharply at
// the vertices; the waveform stage slows down there.
type Polygon struct {
	// Sphere is the control sphere; its Base is the first and last vertex.
	Sphere *Sphere
	// Vertices is the number V ≥ 2 of free vertices.
	Vertices int
	// Coef holds c_1, ..., c_V, each Sphere.Dim() values (normalised on use).
	Coef []float64

	u, v, w []float64
}

// NewPolygon returns the polygon family with the given number of free
// vertices on sp. Its zero coefficients are replaced by the base point
// when used, giving the loop that stays at the base point.
func NewPolygon(sp *Sphere, vertices int) *Polygon {
	if sp == nil || vertices < 2 {
		panic("optimize: NewPolygon: need a sphere and at least two free vertices")
	}
	d := sp.Dim()
	return &Polygon{Sphere: sp, Vertices: vertices, Coef: make([]float64, vertices*d),
		u: make([]float64, d), v: make([]float64, d), w: make([]float64, d)}
}

// Control returns pg.Sphere.
func (pg *Polygon) Control() *Sphere { return pg.Sphere }

// NumParams returns Vertices·Sphere.Dim().
func (pg *Polygon) NumParams() int { return pg.Vertices * pg.Sphere.Dim() }

// SetParams copies x into Coef.
func (pg *Polygon) SetParams(x []float64) {
	if len(x) != pg.NumParams() {
		panic(fmt.Sprintf("optimize: Polygon.SetParams: %d values for %d parameters", len(x), pg.NumParams()))
	}
	if len(pg.Coef) != len(x) {
		pg.Coef = make([]float64, len(x))
	}
	copy(pg.Coef, x)
}

// Params returns a copy of Coef.
func (pg *Polygon) Params() []float64 { return append([]float64(nil), pg.Coef...) }

// vertex writes vertex j (0 and V+1 are the base point) into dst.
func (pg *Polygon) vertex(j int, dst []float64) {
	d := pg.Sphere.Dim()
	if j == 0 || j == pg.Vertices+1 {
		copy(dst, pg.Sphere.Base)
		return
	}
	copy(dst, pg.Coef[(j-1)*d:j*d])
	if normalize(dst) == 0 {
		copy(dst, pg.Sphere.Base)
	}
}

// Vector writes the point at s into dst.
func (pg *Polygon) Vector(s float64, dst []float64) {
	d := pg.Sphere.Dim()
	if len(dst) != d || len(pg.Coef) != pg.Vertices*d {
		panic("optimize: Polygon.Vector: dimension mismatch")
	}
	if len(pg.u) != d {
		pg.u, pg.v = make([]float64, d), make([]float64, d)
	}
	edges := pg.Vertices + 1
	s -= math.Floor(s)
	t := s * float64(edges)
	j := int(t)
	if j >= edges {
		j = edges - 1
	}
	f := t - float64(j)
	pg.vertex(j, pg.u)
	if f == 0 {
		copy(dst, pg.u)
		return
	}
	pg.vertex(j+1, pg.v)
	slerp(dst, pg.u, pg.v, f)
}

// slerp writes the point a fraction f along the great-circle arc from unit
// vector u to unit vector v into dst.
func slerp(dst, u, v []float64, f float64) {
	c := dot(u, v)
	sn := perpNorm(u, v, c)
	omega := math.Atan2(sn, c)
	if sn < 1e-12 {
		// Coincident (or antipodal, where the arc is not unique): go
		// straight and renormalise.
		for i := range dst {
			dst[i] = (1-f)*u[i] + f*v[i]
		}
		if normalize(dst) == 0 {
			copy(dst, u)
		}
		return
	}
	a := math.Sin((1-f)*omega) / sn
	b := math.Sin(f*omega) / sn
	for i := range dst {
		dst[i] = a*u[i] + b*v[i]
	}
}

// Point writes the control point at s into p.
func (pg *Polygon) Point(s float64, p holonomy.Point) {
	if len(pg.w) != pg.Sphere.Dim() {
		pg.w = make([]float64, pg.Sphere.Dim())
	}
	pg.Vector(s, pg.w)
	pg.Sphere.Point(pg.w, p)
}

// Points returns a multiple of the number of edges near 128, so that every
// vertex is a loop point.
func (pg *Polygon) NumPoints() int {
	e := pg.Vertices + 1
	return e * ((128 + e - 1) / e)
}

// Clone returns an independent copy.
func (pg *Polygon) Clone() Shape {
	c := NewPolygon(pg.Sphere, pg.Vertices)
	copy(c.Coef, pg.Coef)
	return c
}
