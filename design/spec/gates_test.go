package spec

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

func gate(t *testing.T, name string) *holonomy.Mat {
	t.Helper()
	g, ok := LookupGate(name)
	if !ok {
		t.Fatalf("gate %q not found", name)
	}
	return g.Matrix()
}

func mul(ms ...*holonomy.Mat) *holonomy.Mat {
	out := holonomy.Identity(2)
	for _, m := range ms {
		p := holonomy.NewMat(2, 2)
		holonomy.Mul(p, out, m)
		out = p
	}
	return out
}

// phaseDist is min over φ of ‖a − e^{iφ} b‖_F for 2×2 matrices.
func phaseDist(a, b *holonomy.Mat) float64 {
	var ov complex128
	for i := range a.Data {
		ov += cmplx.Conj(b.Data[i]) * a.Data[i]
	}
	ph := complex(1, 0)
	if cmplx.Abs(ov) > 0 {
		ph = ov / complex(cmplx.Abs(ov), 0)
	}
	c := b.Clone()
	for i := range c.Data {
		c.Data[i] *= ph
	}
	return holonomy.FrobeniusDist(a, c)
}

const tol = 1e-14

// Textbook identities of the standard gates: Nielsen and Chuang, Quantum
// Computation and Quantum Information (Cambridge, 2000), §4.2 and the
// gate table of §4.2 (Fig. 4.2): T² = S, S² = Z, H X H = Z, H Z H = X,
// XY = iZ; and the defining property √X² = X. These hold exactly, not
// up to phase.
func TestGateIdentities(t *testing.T) {
	checks := []struct {
		name string
		got  *holonomy.Mat
		want *holonomy.Mat
	}{
		{"T·T = S", mul(gate(t, "T"), gate(t, "T")), gate(t, "S")},
		{"S·S = Z", mul(gate(t, "S"), gate(t, "S")), gate(t, "Z")},
		{"√X·√X = X", mul(gate(t, "SX"), gate(t, "SX")), gate(t, "X")},
		{"√Y·√Y = Y", mul(gate(t, "SY"), gate(t, "SY")), gate(t, "Y")},
		{"H·X·H = Z", mul(gate(t, "H"), gate(t, "X"), gate(t, "H")), gate(t, "Z")},
		{"H·Z·H = X", mul(gate(t, "H"), gate(t, "Z"), gate(t, "H")), gate(t, "X")},
		{"H·H = I", mul(gate(t, "H"), gate(t, "H")), gate(t, "I")},
		{"S·S† = I", mul(gate(t, "S"), gate(t, "Sdg")), gate(t, "I")},
		{"T·T† = I", mul(gate(t, "T"), gate(t, "Tdg")), gate(t, "I")},
		{"√X·√X† = I", mul(gate(t, "SX"), gate(t, "SXdg")), gate(t, "I")},
		{"√Y·√Y† = I", mul(gate(t, "SY"), gate(t, "SYdg")), gate(t, "I")},
	}
	for _, c := range checks {
		if d := holonomy.FrobeniusDist(c.got, c.want); d > tol {
			t.Errorf("%s: distance %g", c.name, d)
		}
	}
	// XY = iZ.
	iz := gate(t, "Z")
	for i := range iz.Data {
		iz.Data[i] *= 1i
	}
	if d := holonomy.FrobeniusDist(mul(gate(t, "X"), gate(t, "Y")), iz); d > tol {
		t.Errorf("XY = iZ: distance %g", d)
	}
}

func TestGatesUnitaryAndNamed(t *testing.T) {
	seen := map[string]bool{}
	for _, g := range Gates() {
		if e := holonomy.UnitarityError(g.Matrix()); e > tol {
			t.Errorf("%s: ‖U†U − I‖ = %g", g.Name, e)
		}
		if g.Description == "" || g.Title == "" || g.Symbol == "" {
			t.Errorf("%s: missing text", g.Name)
		}
		for _, n := range append([]string{g.Name, g.Symbol}, g.Aliases...) {
			k := lower(n)
			if seen[k] && n != g.Symbol {
				t.Errorf("name %q is used by two gates", n)
			}
			seen[k] = true
			if h, ok := LookupGate(n); !ok || h.Name != g.Name {
				t.Errorf("LookupGate(%q) = %q, %v; want %q", n, h.Name, ok, g.Name)
			}
		}
	}
	for _, n := range []string{"I", "X", "Y", "Z", "H", "S", "S†", "Sdg", "T", "T†", "Tdg", "√X", "SX", "√X†", "SXdg", "identity", " h "} {
		if _, ok := LookupGate(n); !ok {
			t.Errorf("LookupGate(%q) failed", n)
		}
	}
	if _, ok := LookupGate("CNOT"); ok {
		t.Error("LookupGate(CNOT) succeeded")
	}
	// Gates returns a copy.
	g := Gates()
	g[0].Aliases[0] = "changed"
	if Gates()[0].Aliases[0] == "changed" {
		t.Error("Gates shares its alias slices")
	}
}

func lower(s string) string {
	b := []rune(s)
	for i, r := range b {
		if r >= 'A' && r <= 'Z' {
			b[i] = r + 'a' - 'A'
		}
	}
	return string(b)
}

// R_n(θ) = exp(−iθ n·σ/2) (Nielsen and Chuang 2000, eq. 4.8 (from memory
// for the number)): the Pauli gates are π rotations and S, T, √X are π/2,
// π/4, π/2 rotations, each up to a global phase; H is a π rotation about
// (x+z)/√2.
func TestRotationMatchesGates(t *testing.T) {
	cases := []struct {
		gate  string
		axis  [3]float64
		angle float64
	}{
		{"I", [3]float64{0, 0, 1}, 0},
		{"X", [3]float64{1, 0, 0}, math.Pi},
		{"Y", [3]float64{0, 1, 0}, math.Pi},
		{"Z", [3]float64{0, 0, 1}, math.Pi},
		{"H", [3]float64{1, 0, 1}, math.Pi},
		{"S", [3]float64{0, 0, 1}, math.Pi / 2},
		{"Sdg", [3]float64{0, 0, 1}, -math.Pi / 2},
		{"T", [3]float64{0, 0, 2}, math.Pi / 4},
		{"Tdg", [3]float64{0, 0, -1}, math.Pi / 4},
		{"SX", [3]float64{1, 0, 0}, math.Pi / 2},
		{"SXdg", [3]float64{1, 0, 0}, -math.Pi / 2},
		{"SY", [3]float64{0, 1, 0}, math.Pi / 2},
		{"SYdg", [3]float64{0, 1, 0}, -math.Pi / 2},
	}
	for _, c := range cases {
		r, err := Rotation(c.axis, c.angle)
		if err != nil {
			t.Fatal(err)
		}
		if d := phaseDist(r, gate(t, c.gate)); d > 1e-14 {
			t.Errorf("R(%v, %v) differs from %s by %g (up to phase)", c.axis, c.angle, c.gate, d)
		}
	}
	// A wrong rotation must be detected by the same measure.
	r, _ := Rotation([3]float64{1, 0, 0}, math.Pi/2)
	if d := phaseDist(r, gate(t, "H")); d < 0.1 {
		t.Errorf("phaseDist cannot tell √X from H (%g)", d)
	}
	if _, err := Rotation([3]float64{}, 1); err == nil {
		t.Error("zero axis accepted")
	}
	if _, err := Rotation([3]float64{1, 0, 0}, math.NaN()); err == nil {
		t.Error("NaN angle accepted")
	}
}
