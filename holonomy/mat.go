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
	if n == 4 && m == 4 && p == 4 {
		mul4(dst.Data, a.Data, b.Data)
		return
	}
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
	if n == 4 && m == 4 && p == 4 {
		mul4AH(dst.Data, a.Data, b.Data)
		return
	}
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
	if a.R == 4 && a.C == 4 && b.R == 4 {
		mul4BH(dst.Data, a.Data, b.Data)
		return
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

// mul4 sets dst = a·b for 4×4 row-major matrices, fully unrolled (the
// tripod and other 4-level schemes spend their time here).
func mul4(dst, a, b []complex128) {
	dst, a, b = dst[:16:16], a[:16:16], b[:16:16]
	b00, b01, b02, b03 := b[0], b[1], b[2], b[3]
	b10, b11, b12, b13 := b[4], b[5], b[6], b[7]
	b20, b21, b22, b23 := b[8], b[9], b[10], b[11]
	b30, b31, b32, b33 := b[12], b[13], b[14], b[15]
	for i := 0; i < 16; i += 4 {
		r := a[i : i+4 : i+4]
		a0, a1, a2, a3 := r[0], r[1], r[2], r[3]
		d := dst[i : i+4 : i+4]
		d[0] = a0*b00 + a1*b10 + a2*b20 + a3*b30
		d[1] = a0*b01 + a1*b11 + a2*b21 + a3*b31
		d[2] = a0*b02 + a1*b12 + a2*b22 + a3*b32
		d[3] = a0*b03 + a1*b13 + a2*b23 + a3*b33
	}
}

// mul4AH sets dst = a†·b for 4×4 row-major matrices, fully unrolled.
func mul4AH(dst, a, b []complex128) {
	dst, a, b = dst[:16:16], a[:16:16], b[:16:16]
	b00, b01, b02, b03 := b[0], b[1], b[2], b[3]
	b10, b11, b12, b13 := b[4], b[5], b[6], b[7]
	b20, b21, b22, b23 := b[8], b[9], b[10], b[11]
	b30, b31, b32, b33 := b[12], b[13], b[14], b[15]
	for i := 0; i < 4; i++ {
		a0, a1, a2, a3 := cconj(a[i]), cconj(a[4+i]), cconj(a[8+i]), cconj(a[12+i])
		d := dst[4*i : 4*i+4 : 4*i+4]
		d[0] = a0*b00 + a1*b10 + a2*b20 + a3*b30
		d[1] = a0*b01 + a1*b11 + a2*b21 + a3*b31
		d[2] = a0*b02 + a1*b12 + a2*b22 + a3*b32
		d[3] = a0*b03 + a1*b13 + a2*b23 + a3*b33
	}
}

// mul4BH sets dst = a·b† for 4×4 row-major matrices, fully unrolled.
func mul4BH(dst, a, b []complex128) {
	dst, a, b = dst[:16:16], a[:16:16], b[:16:16]
	b00, b01, b02, b03 := cconj(b[0]), cconj(b[4]), cconj(b[8]), cconj(b[12])
	b10, b11, b12, b13 := cconj(b[1]), cconj(b[5]), cconj(b[9]), cconj(b[13])
	b20, b21, b22, b23 := cconj(b[2]), cconj(b[6]), cconj(b[10]), cconj(b[14])
	b30, b31, b32, b33 := cconj(b[3]), cconj(b[7]), cconj(b[11]), cconj(b[15])
	for i := 0; i < 16; i += 4 {
		r := a[i : i+4 : i+4]
		a0, a1, a2, a3 := r[0], r[1], r[2], r[3]
		d := dst[i : i+4 : i+4]
		d[0] = a0*b00 + a1*b10 + a2*b20 + a3*b30
		d[1] = a0*b01 + a1*b11 + a2*b21 + a3*b31
		d[2] = a0*b02 + a1*b12 + a2*b22 + a3*b32
		d[3] = a0*b03 + a1*b13 + a2*b23 + a3*b33
	}
}

// mulSqBH sets dst = a·b† for n×n row-major matrices; dst must not share
// storage with a or b.
func mulSqBH(dst, a, b []complex128, n int) {
	if n == 4 {
		mul4BH(dst, a, b)
		return
	}
	dst, a, b = dst[:n*n], a[:n*n], b[:n*n]
	for i := 0; i < n; i++ {
		arow := a[i*n : i*n+n]
		for j := 0; j < n; j++ {
			brow := b[j*n : j*n+n]
			brow = brow[:len(arow)]
			var s complex128
			for k, v := range arow {
				s += v * cconj(brow[k])
			}
			dst[i*n+j] = s
		}
	}
}

// cconj returns the complex conjugate of x (inlined, unlike cmplx.Conj in
// older compilers).
func cconj(x complex128) complex128 { return complex(real(x), -imag(x)) }
