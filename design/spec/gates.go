package spec

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

// Gate is a named single-qubit gate. Matrices are written in the
// computational basis {|0⟩, |1⟩} with the conventions of Nielsen and Chuang,
// Quantum Computation and Quantum Information (Cambridge, 2000), §4.2.
// A design reaches a gate only up to a global phase.
type Gate struct {
	// Name is the canonical ASCII name ("H", "Sdg", "SX").
	Name string
	// Symbol is the name as printed in texts ("H", "S†", "√X").
	Symbol string
	// Title is the gate's common name ("Hadamard", "π/8 gate").
	Title string
	// Aliases are further accepted spellings; lookup ignores case.
	Aliases []string
	// Description is a one-line explanation for gate listings.
	Description string
	// U is the 2×2 unitary, U[row][column].
	U [2][2]complex128
}

// Matrix returns the gate's unitary as a new 2×2 holonomy.Mat.
func (g Gate) Matrix() *holonomy.Mat {
	return holonomy.NewMatFrom(2, 2, []complex128{g.U[0][0], g.U[0][1], g.U[1][0], g.U[1][1]})
}

var (
	r2   = complex(1/math.Sqrt2, 0)
	eipi = cmplx.Exp(complex(0, math.Pi/4)) // e^{iπ/4}
	hp   = complex(0.5, 0.5)                // (1+i)/2
	hm   = complex(0.5, -0.5)               // (1−i)/2
)

var gates = []Gate{
	{Name: "I", Title: "identity", Symbol: "I", Aliases: []string{"identity", "id"},
		Description: "identity: leaves the qubit unchanged (a loop with no net holonomy)",
		U:           [2][2]complex128{{1, 0}, {0, 1}}},
	{Name: "X", Title: "Pauli X", Symbol: "X", Aliases: []string{"NOT", "pauli-x"},
		Description: "Pauli X, bit flip: rotation by π about x up to a global phase",
		U:           [2][2]complex128{{0, 1}, {1, 0}}},
	{Name: "Y", Title: "Pauli Y", Symbol: "Y", Aliases: []string{"pauli-y"},
		Description: "Pauli Y: rotation by π about y up to a global phase",
		U:           [2][2]complex128{{0, -1i}, {1i, 0}}},
	{Name: "Z", Title: "Pauli Z", Symbol: "Z", Aliases: []string{"pauli-z"},
		Description: "Pauli Z, phase flip: rotation by π about z up to a global phase",
		U:           [2][2]complex128{{1, 0}, {0, -1}}},
	{Name: "H", Title: "Hadamard", Symbol: "H", Aliases: []string{"hadamard"},
		Description: "Hadamard: exchanges the Z and X bases; rotation by π about (x+z)/√2",
		U:           [2][2]complex128{{r2, r2}, {r2, -r2}}},
	{Name: "S", Title: "phase gate", Symbol: "S", Aliases: []string{"phase", "sqrtZ", "√Z", "sqrt(Z)"},
		Description: "phase gate S = √Z: rotation by π/2 about z up to a global phase",
		U:           [2][2]complex128{{1, 0}, {0, 1i}}},
	{Name: "Sdg", Title: "inverse phase gate", Symbol: "S†", Aliases: []string{"S†", "Sdag", "S^-1", "Sinv"},
		Description: "inverse phase gate S†: rotation by −π/2 about z up to a global phase",
		U:           [2][2]complex128{{1, 0}, {0, -1i}}},
	{Name: "T", Title: "π/8 gate", Symbol: "T", Aliases: []string{"π/8", "pi/8", "sqrtS", "√S"},
		Description: "π/8 gate T = √S: rotation by π/4 about z up to a global phase",
		U:           [2][2]complex128{{1, 0}, {0, eipi}}},
	{Name: "Tdg", Title: "inverse π/8 gate", Symbol: "T†", Aliases: []string{"T†", "Tdag", "T^-1", "Tinv"},
		Description: "inverse π/8 gate T†: rotation by −π/4 about z up to a global phase",
		U:           [2][2]complex128{{1, 0}, {0, cmplx.Conj(eipi)}}},
	{Name: "SX", Title: "square root of X", Symbol: "√X", Aliases: []string{"√X", "sqrtX", "sqrt(X)"},
		Description: "square root of X (√X·√X = X): rotation by π/2 about x up to a global phase",
		U:           [2][2]complex128{{hp, hm}, {hm, hp}}},
	{Name: "SXdg", Title: "inverse square root of X", Symbol: "√X†", Aliases: []string{"√X†", "sqrtXdg", "sqrt(X)†", "SXdag"},
		Description: "inverse of √X: rotation by −π/2 about x up to a global phase",
		U:           [2][2]complex128{{hm, hp}, {hp, hm}}},
	{Name: "SY", Title: "square root of Y", Symbol: "√Y", Aliases: []string{"√Y", "sqrtY", "sqrt(Y)"},
		Description: "square root of Y (√Y·√Y = Y): rotation by π/2 about y up to a global phase",
		U:           [2][2]complex128{{hp, -hp}, {hp, hp}}},
	{Name: "SYdg", Title: "inverse square root of Y", Symbol: "√Y†", Aliases: []string{"√Y†", "sqrtYdg", "sqrt(Y)†", "SYdag"},
		Description: "inverse of √Y: rotation by −π/2 about y up to a global phase",
		U:           [2][2]complex128{{hm, hm}, {-hm, hm}}},
}

// Gates returns the named gates in listing order (a new slice; the caller
// may modify it).
func Gates() []Gate {
	out := make([]Gate, len(gates))
	for i, g := range gates {
		g.Aliases = append([]string(nil), g.Aliases...)
		out[i] = g
	}
	return out
}

// LookupGate finds a named gate by its name, symbol or an alias, ignoring
// case and surrounding spaces.
func LookupGate(name string) (Gate, bool) {
	name = strings.TrimSpace(name)
	for _, g := range gates {
		if strings.EqualFold(g.Name, name) || strings.EqualFold(g.Symbol, name) {
			return g, true
		}
		for _, a := range g.Aliases {
			if strings.EqualFold(a, name) {
				return g, true
			}
		}
	}
	return Gate{}, false
}

// gateNames returns the canonical gate names for messages.
func gateNames() string {
	n := make([]string, len(gates))
	for i, g := range gates {
		n[i] = g.Name
	}
	return strings.Join(n, ", ")
}

// Rotation returns R_n(θ) = exp(−iθ n·σ/2) = cos(θ/2) I − i sin(θ/2) n·σ
// (Nielsen and Chuang 2000, §4.2) for an axis n, which is normalised here.
// It returns an error for a zero or non-finite axis or angle.
func Rotation(axis [3]float64, angle float64) (*holonomy.Mat, error) {
	norm := math.Sqrt(axis[0]*axis[0] + axis[1]*axis[1] + axis[2]*axis[2])
	if math.IsNaN(norm) || math.IsInf(norm, 0) || norm == 0 {
		return nil, fmt.Errorf("rotation axis %v has no direction (need a finite, non-zero vector)", axis)
	}
	if math.IsNaN(angle) || math.IsInf(angle, 0) {
		return nil, fmt.Errorf("rotation angle %v is not finite", angle)
	}
	nx, ny, nz := axis[0]/norm, axis[1]/norm, axis[2]/norm
	s, c := math.Sincos(angle / 2)
	return holonomy.NewMatFrom(2, 2, []complex128{
		complex(c, -s*nz), complex(-s*ny, -s*nx),
		complex(s*ny, -s*nx), complex(c, s*nz),
	}), nil
}
