package holonomy

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Mat is a dense, row-major complex matrix sized for the small (2–16 level)
// problems of quantum control. Element (i, j) is Data[i*C+j].
//
// The methods and functions on Mat never allocate unless their doc comment
// says so; destinations are supplied by the caller so that hot loops run
// without garbage. Dimension mismatches are programmer errors and panic.
type Mat struct {
	R, C int
	Data []complex128
}

// NewMat returns a zeroed r×c matrix.
func NewMat(r, c int) *Mat {
	if r < 0 || c < 0 {
		panic("holonomy: negative dimension")
	}
	return &Mat{R: r, C: c, Data: make([]complex128, r*c)}
}

// Identity returns a new n×n identity matrix.
func Identity(n int) *Mat {
	m := NewMat(n, n)
	for i := 0; i < n; i++ {
		m.Data[i*n+i] = 1
	}
	return m
}

// NewMatFrom returns an r×c matrix holding a copy of the row-major data.
func NewMatFrom(r, c int, data []complex128) *Mat {
	if len(data) != r*c {
		panic(fmt.Sprintf("holonomy: NewMatFrom: %d values for %d×%d", len(data), r, c))
	}
	m := NewMat(r, c)
	copy(m.Data, data)
	return m
}

// At returns element (i, j).
func (m *Mat) At(i, j int) complex128 { return m.Data[i*m.C+j] }

// Set sets element (i, j) to v.
func (m *Mat) Set(i, j int, v complex128) { m.Data[i*m.C+j] = v }

// Zero sets every element to zero.
func (m *Mat) Zero() {
	for i := range m.Data {
		m.Data[i] = 0
	}
}

// SetIdentity makes the square matrix m the identity.
func (m *Mat) SetIdentity() {
	mustSquare(m)
	m.Zero()
	for i := 0; i < m.R; i++ {
		m.Data[i*m.C+i] = 1
	}
}

// Copy copies src into m; the shapes must match.
func (m *Mat) Copy(src *Mat) {
	mustSame(m, src)
	copy(m.Data, src.Data)
}

// Clone returns a newly allocated copy of m.
func (m *Mat) Clone() *Mat {
	c := NewMat(m.R, m.C)
	copy(c.Data, m.Data)
	return c
}

// String formats m for diagnostics.
func (m *Mat) String() string {
	s := ""
	for i := 0; i < m.R; i++ {
		s += "["
		for j := 0; j < m.C; j++ {
			if j > 0 {
				s += " "
			}
			v := m.At(i, j)
			s += fmt.Sprintf("%+.6f%+.6fi", real(v), imag(v))
		}
		s += "]\n"
	}
	return s
}

// Mul sets dst = a·b. dst must not share storage with a or b.
func Mul(dst, a, b *Mat) {
	if a.C != b.R || dst.R != a.R || dst.C != b.C {
		panic(fmt.Sprintf("holonomy: Mul: %d×%d · %d×%d into %d×%d", a.R, a.C, b.R, b.C, dst.R, dst.C))
	}
	n, m, p := a.R, a.C, b.C
	for i := 0; i < n; i++ {
		row := dst.Data[i*p : (i+1)*p]
		for j := range row {
			row[j] = 0
		}
		for k := 0; k < m; k++ {
			aik := a.Data[i*m+k]
			if aik == 0 {
				continue
			}
			brow := b.Data[k*p : (k+1)*p]
			for j, bkj := range brow {
				row[j] += aik * bkj
			}
		}
	}
}

// MulAH sets dst = a†·b. dst must not share storage with a or b.
func MulAH(dst, a, b *Mat) {
	if a.R != b.R || dst.R != a.C || dst.C != b.C {
		panic(fmt.Sprintf("holonomy: MulAH: (%d×%d)† · %d×%d into %d×%d", a.R, a.C, b.R, b.C, dst.R, dst.C))
	}
	n, m, p := a.C, a.R, b.C
	for i := 0; i < n; i++ {
		row := dst.Data[i*p : (i+1)*p]
		for j := range row {
			row[j] = 0
		}
	}
	for k := 0; k < m; k++ {
		brow := b.Data[k*p : (k+1)*p]
		for i := 0; i < n; i++ {
			aki := cmplx.Conj(a.Data[k*a.C+i])
			if aki == 0 {
				continue
			}
			row := dst.Data[i*p : (i+1)*p]
			for j, bkj := range brow {
				row[j] += aki * bkj
			}
		}
	}
}

// MulBH sets dst = a·b†. dst must not share storage with a or b.
func MulBH(dst, a, b *Mat) {
	if a.C != b.C || dst.R != a.R || dst.C != b.R {
		panic(fmt.Sprintf("holonomy: MulBH: %d×%d · (%d×%d)† into %d×%d", a.R, a.C, b.R, b.C, dst.R, dst.C))
	}
	for i := 0; i < a.R; i++ {
		arow := a.Data[i*a.C : (i+1)*a.C]
		for j := 0; j < b.R; j++ {
			brow := b.Data[j*b.C : (j+1)*b.C]
			var s complex128
			for k, v := range arow {
				s += v * cmplx.Conj(brow[k])
			}
			dst.Data[i*dst.C+j] = s
		}
	}
}

// Adjoint sets dst = a† (conjugate transpose). dst must not share storage with a.
func Adjoint(dst, a *Mat) {
	if dst.R != a.C || dst.C != a.R {
		panic("holonomy: Adjoint: shape mismatch")
	}
	for i := 0; i < a.R; i++ {
		for j := 0; j < a.C; j++ {
			dst.Data[j*dst.C+i] = cmplx.Conj(a.Data[i*a.C+j])
		}
	}
}

// Trace returns the trace of the square matrix m.
func Trace(m *Mat) complex128 {
	mustSquare(m)
	var t complex128
	for i := 0; i < m.R; i++ {
		t += m.Data[i*m.C+i]
	}
	return t
}

// FrobeniusDist returns ‖a − b‖ in the Frobenius norm.
func FrobeniusDist(a, b *Mat) float64 {
	mustSame(a, b)
	var s float64
	for i, v := range a.Data {
		d := v - b.Data[i]
		s += real(d)*real(d) + imag(d)*imag(d)
	}
	return math.Sqrt(s)
}

// FrobeniusNorm returns ‖m‖ in the Frobenius norm.
func FrobeniusNorm(m *Mat) float64 {
	var s float64
	for _, v := range m.Data {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return math.Sqrt(s)
}

// UnitarityError returns ‖U†U − I‖ in the Frobenius norm. It allocates.
func UnitarityError(u *Mat) float64 {
	p := NewMat(u.C, u.C)
	MulAH(p, u, u)
	for i := 0; i < u.C; i++ {
		p.Data[i*u.C+i]--
	}
	return FrobeniusNorm(p)
}

func mustSquare(m *Mat) {
	if m.R != m.C {
		panic(fmt.Sprintf("holonomy: matrix is %d×%d, not square", m.R, m.C))
	}
}

func mustSame(a, b *Mat) {
	if a.R != b.R || a.C != b.C {
		panic(fmt.Sprintf("holonomy: shapes %d×%d and %d×%d differ", a.R, a.C, b.R, b.C))
	}
}
