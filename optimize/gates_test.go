package optimize

import (
	"math"
	"math/cmplx"

	"github.com/loopgate/loopgate/holonomy"
)

// Standard single-qubit gates in the computational basis {|0⟩, |1⟩}
// (Nielsen and Chuang, Quantum Computation and Quantum Information,
// Cambridge University Press (2000), §4.2).
func gate(name string) *holonomy.Mat {
	r := complex(1/math.Sqrt2, 0)
	switch name {
	case "I":
		return holonomy.Identity(2)
	case "X":
		return holonomy.NewMatFrom(2, 2, []complex128{0, 1, 1, 0})
	case "Y":
		return holonomy.NewMatFrom(2, 2, []complex128{0, -1i, 1i, 0})
	case "Z":
		return holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, -1})
	case "H":
		return holonomy.NewMatFrom(2, 2, []complex128{r, r, r, -r})
	case "S":
		return holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, 1i})
	case "T":
		return holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, cmplx.Rect(1, math.Pi/4)})
	case "SX": // √X = e^{iπ/4} exp(−iπX/4)
		return holonomy.NewMatFrom(2, 2, []complex128{0.5 + 0.5i, 0.5 - 0.5i, 0.5 - 0.5i, 0.5 + 0.5i})
	}
	panic("unknown gate " + name)
}

// ry returns exp(−iβσ_y) = [[cos β, −sin β], [sin β, cos β]].
func ry(beta float64) *holonomy.Mat {
	c, s := complex(math.Cos(beta), 0), complex(math.Sin(beta), 0)
	return holonomy.NewMatFrom(2, 2, []complex128{c, -s, s, c})
}

// phaseGate returns diag(1, e^{iγ}).
func phaseGate(gamma float64) *holonomy.Mat {
	return holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, cmplx.Rect(1, gamma)})
}

func maxAbsDiff(a, b *holonomy.Mat) float64 {
	var m float64
	for i, v := range a.Data {
		m = math.Max(m, cmplx.Abs(v-b.Data[i]))
	}
	return m
}

// wrap reduces an angle to (−π, π].
func wrap(a float64) float64 {
	a = math.Mod(a, 2*math.Pi)
	if a <= -math.Pi {
		a += 2 * math.Pi
	} else if a > math.Pi {
		a -= 2 * math.Pi
	}
	return a
}
