package optimize

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

// SphereKind says which control a Sphere describes.
type SphereKind int

const (
	// DriveSphere is the unit sphere of complex drive vectors: a point
	// w ∈ C^m (m channels) stored as 2m real coordinates
	// (Re w_0, Im w_0, Re w_1, ...), with Drive_c = w_c. The dark states
	// depend only on the ray of w, so its metric is the Fubini–Study one.
	DriveSphere SphereKind = iota
	// RealDriveSphere is the real subsphere of DriveSphere: m real
	// coordinates, Drive_c = w_c, all drive phases 0 or π. Its holonomies are
	// real orthogonal matrices.
	RealDriveSphere
	// FieldSphere is the sphere S² of field directions n of a spin scheme
	// made by holonomy.Spin, with H = ω n·S and ω = 1 (see
	// holonomy.SpinPoint). Its metric is the great-circle angle.
	FieldSphere
)

// String returns a short name of the sphere kind.
func (k SphereKind) String() string {
	switch k {
	case DriveSphere:
		return "complex drive sphere"
	case RealDriveSphere:
		return "real drive sphere"
	case FieldSphere:
		return "field-direction sphere"
	}
	return fmt.Sprintf("SphereKind(%d)", int(k))
}

// Sphere is the sphere of unit-scale controls on which loop shapes live,
// together with the map from its points to control points of a scheme.
// Create one with NewDriveSphere or NewFieldSphere; a Sphere is read-only
// after creation and may be shared.
type Sphere struct {
	// Kind selects the control the sphere describes.
	Kind SphereKind
	// Base is the base point, a unit vector of Dim() real coordinates, at
	// which the working subspace is spanned by the computational levels.
	// Every loop starts and ends there.
	Base []float64

	channels int
	levels   int
}

// Dim returns the number of real coordinates of a point on the sphere.
func (sp *Sphere) Dim() int { return len(sp.Base) }

// NewDriveSphere returns the sphere of normalised drive vectors of a
// dark-state scheme (tripod, or any coupling graph whose computational
// levels are dark at the base point), complex or real-only. The base point
// is BaseDrive(sc).
func NewDriveSphere(sc *holonomy.Scheme, realOnly bool) (*Sphere, error) {
	if err := sc.Validate(); err != nil {
		return nil, fmt.Errorf("optimize: drive sphere: %w", err)
	}
	base, err := BaseDrive(sc)
	if err != nil {
		return nil, err
	}
	m := len(sc.Channels)
	sp := &Sphere{Kind: DriveSphere, channels: m, levels: len(sc.Levels)}
	if realOnly {
		sp.Kind = RealDriveSphere
		sp.Base = make([]float64, m)
		for c, v := range base {
			sp.Base[c] = real(v)
		}
	} else {
		sp.Base = make([]float64, 2*m)
		for c, v := range base {
			sp.Base[2*c] = real(v)
		}
	}
	return sp, nil
}

// BaseDrive returns the unit-scale base drive vector of a dark-state scheme:
// equal real drives on every channel that touches no computational level,
// normalised to Σ|w_c|² = 1, and zero on the others. For the tripod this is
// the auxiliary channel pa alone, which leaves g0 and g1 dark. It fails when
// every channel touches a computational level (as in the Λ scheme, whose
// qubit levels cannot both be dark while it is driven).
func BaseDrive(sc *holonomy.Scheme) ([]complex128, error) {
	comp := make(map[int]bool, len(sc.Computational))
	for _, k := range sc.Computational {
		comp[k] = true
	}
	w := make([]complex128, len(sc.Channels))
	var on int
	for c, ch := range sc.Channels {
		if !comp[ch.Lower] && !comp[ch.Upper] {
			on++
			w[c] = 1
		}
	}
	if on == 0 {
		return nil, fmt.Errorf("optimize: scheme %q: every drive channel touches a computational level, "+
			"so no drive leaves the computational levels dark; an adiabatic loop cannot start on them "+
			"(for a Λ scheme use the nonadiabatic design)", sc.Name)
	}
	a := complex(1/math.Sqrt(float64(on)), 0)
	for c := range w {
		w[c] *= a
	}
	return w, nil
}

// NewFieldSphere returns the sphere of field directions of a spin scheme made
// by holonomy.Spin, with base point +z (field along the quantisation axis,
// where every Zeeman level is an eigenstate).
func NewFieldSphere(sc *holonomy.Scheme) (*Sphere, error) {
	if err := sc.Validate(); err != nil {
		return nil, fmt.Errorf("optimize: field sphere: %w", err)
	}
	n := len(sc.Levels)
	if !strings.HasPrefix(sc.Name, "spin-") || len(sc.Channels) != n-1 {
		return nil, fmt.Errorf("optimize: scheme %q is not a spin ladder made by holonomy.Spin; "+
			"a field-direction loop needs one", sc.Name)
	}
	for k, ch := range sc.Channels {
		if ch.Lower != k+1 || ch.Upper != k {
			return nil, fmt.Errorf("optimize: scheme %q: channel %q does not join levels %d and %d as a spin ladder does",
				sc.Name, ch.Name, k+1, k)
		}
	}
	return &Sphere{Kind: FieldSphere, Base: []float64{0, 0, 1}, channels: n - 1, levels: n}, nil
}

// Point writes into p the control point of the unit vector x on the sphere.
// For drive spheres it sets p.Drive and leaves p.Detuning alone; for the
// field sphere it calls holonomy.SpinPoint with ω = 1, which sets both.
// x must be a unit vector of Dim() coordinates. It does not allocate.
func (sp *Sphere) Point(x []float64, p holonomy.Point) {
	if len(x) != len(sp.Base) || len(p.Drive) != sp.channels {
		panic("optimize: Sphere.Point: dimension mismatch")
	}
	switch sp.Kind {
	case DriveSphere:
		for c := range p.Drive {
			p.Drive[c] = complex(x[2*c], x[2*c+1])
		}
	case RealDriveSphere:
		for c := range p.Drive {
			p.Drive[c] = complex(x[c], 0)
		}
	case FieldSphere:
		theta := math.Acos(math.Max(-1, math.Min(1, x[2])))
		phi := math.Atan2(x[1], x[0])
		holonomy.SpinPoint(p, 1, theta, phi)
	default:
		panic("optimize: Sphere.Point: unknown sphere kind")
	}
}

// Distance returns the distance between unit vectors x and y in the
// sphere's control metric, in radians: the Fubini–Study distance
// arccos|⟨x, y⟩| between the rays of the drive vectors for drive spheres
// (the dark states depend only on the ray, and a common phase of all drives
// does not couple dark to bright states), and the great-circle angle
// between field directions for the field sphere.
func (sp *Sphere) Distance(x, y []float64) float64 {
	switch sp.Kind {
	case DriveSphere:
		// ⟨x, y⟩ = Σ conj(x_c) y_c; the perpendicular part y − ⟨x,y⟩x
		// gives the sine accurately for short steps.
		var re, im float64
		for c := 0; c < len(x); c += 2 {
			xr, xi, yr, yi := x[c], x[c+1], y[c], y[c+1]
			re += xr*yr + xi*yi
			im += xr*yi - xi*yr
		}
		var perp float64
		for c := 0; c < len(x); c += 2 {
			xr, xi := x[c], x[c+1]
			pr := y[c] - (re*xr - im*xi)
			pi := y[c+1] - (re*xi + im*xr)
			perp += pr*pr + pi*pi
		}
		return math.Atan2(math.Sqrt(perp), math.Hypot(re, im))
	case RealDriveSphere:
		d := dot(x, y)
		return math.Atan2(perpNorm(x, y, d), math.Abs(d))
	default:
		d := dot(x, y)
		return math.Atan2(perpNorm(x, y, d), d)
	}
}

func dot(x, y []float64) float64 {
	var s float64
	for i, v := range x {
		s += v * y[i]
	}
	return s
}

// perpNorm returns |y − d x| for d = x·y.
func perpNorm(x, y []float64, d float64) float64 {
	var s float64
	for i, v := range y {
		r := v - d*x[i]
		s += r * r
	}
	return math.Sqrt(s)
}

// normalize scales x to unit length in place and reports its former norm.
func normalize(x []float64) float64 {
	n := math.Sqrt(dot(x, x))
	if n > 0 {
		inv := 1 / n
		for i := range x {
			x[i] *= inv
		}
	}
	return n
}

var errNoShape = errors.New("optimize: no loop shape given")
