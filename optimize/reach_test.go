package optimize

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/loopgate/loopgate/holonomy"
)

// A spin-½ (or spin-1 with m = ±1 as the qubit) in a field of fixed
// magnitude has non-degenerate levels, so a loop of field directions gives
// only Berry phases (Berry, Proc. R. Soc. A 392, 45 (1984)): diagonal gates.
// The closest diagonal gate to a target T has fidelity
// (2 + (|T00| + |T11|)²)/6 (maximise |Tr(D†T)| over diagonal unitaries D in
// the formula of Pedersen et al., Phys. Lett. A 367, 47 (2007)); for H that
// is 2/3 (worked example).
func TestReachabilitySpinRefusesNonDiagonal(t *testing.T) {
	for _, sc := range []*holonomy.Scheme{holonomy.Spin(1, 0, 1), holonomy.Spin(2, 0, 2)} {
		sp, err := NewFieldSphere(sc)
		if err != nil {
			t.Fatal(err)
		}
		for _, name := range []string{"H", "X", "Y", "SX"} {
			r, err := Reachability(sc, sp, gate(name), 1e-6)
			var ue *UnreachableError
			if !errors.As(err, &ue) {
				t.Fatalf("%s %s: want *UnreachableError, got %v", sc.Name, name, err)
			}
			if r != ReachDiagonal || ue.Reach != ReachDiagonal {
				t.Errorf("%s %s: reach %v", sc.Name, name, r)
			}
			if !strings.Contains(err.Error(), "only diagonal gates") || !strings.Contains(err.Error(), "off-diagonal weight") {
				t.Errorf("%s %s: message does not say why: %v", sc.Name, name, err)
			}
			tt := gate(name)
			d := abs(tt.At(0, 0)) + abs(tt.At(1, 1))
			want := 1 - (2+d*d)/6
			if math.Abs(ue.BestInfidelity-want) > 1e-12 {
				t.Errorf("%s %s: best reachable infidelity %g, want %g", sc.Name, name, ue.BestInfidelity, want)
			}
		}
		if _, err := Reachability(sc, sp, gate("H"), 1e-6); err == nil || !strings.Contains(err.Error(), "0.5") {
			t.Errorf("H has off-diagonal weight 0.5: %v", err)
		}
		for _, name := range []string{"T", "S", "Z", "I"} {
			if r, err := Reachability(sc, sp, gate(name), 1e-6); err != nil || r != ReachDiagonal {
				t.Errorf("%s %s: %v, %v; want reachable diagonal", sc.Name, name, r, err)
			}
		}
	}
}

// With real drives the tripod's dark states are real, and the holonomy of a
// loop on the sphere is a rotation exp(−iβσ_y) (Duan, Cirac and Zoller,
// Science 292, 1695 (2001): the real loops give their Y rotations). X and
// H are reflections (det −1) and T is complex: refused with the closest
// rotation's infidelity, 1 − (2 + λ)/6 with λ = max_β |cos β Tr T +
// sin β (T10 − T01)|² (worked examples: X, H → 2/3; T → 1 − (4+√2)/6).
func TestReachabilityRealTripod(t *testing.T) {
	sc := holonomy.Tripod()
	sp, err := NewDriveSphere(sc, true)
	if err != nil {
		t.Fatal(err)
	}
	if r, err := Reachability(sc, sp, ry(0.4), 1e-6); err != nil || r != ReachRotations {
		t.Errorf("Y rotation: %v, %v", r, err)
	}
	for name, want := range map[string]float64{"X": 2.0 / 3, "H": 2.0 / 3, "T": 1 - (4+math.Sqrt2)/6, "Z": 2.0 / 3} {
		_, err := Reachability(sc, sp, gate(name), 1e-6)
		var ue *UnreachableError
		if !errors.As(err, &ue) {
			t.Fatalf("%s: want *UnreachableError, got %v", name, err)
		}
		if math.Abs(ue.BestInfidelity-want) > 1e-12 {
			t.Errorf("%s: best infidelity %.15g, want %.15g", name, ue.BestInfidelity, want)
		}
	}
}

// Complex tripod loops reach every gate (Duan, Cirac and Zoller 2001).
func TestReachabilityComplexTripod(t *testing.T) {
	sc := holonomy.Tripod()
	sp, err := NewDriveSphere(sc, false)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"H", "T", "SX", "X", "Y", "Z", "I"} {
		if r, err := Reachability(sc, sp, gate(name), 1e-6); err != nil || r != ReachAll {
			t.Errorf("%s: %v, %v", name, r, err)
		}
	}
	cl, err := BaseClusters(sc, sp)
	if err != nil || len(cl) != 1 || len(cl[0].Levels) != 2 || cl[0].Energy != 0 {
		t.Errorf("tripod base clusters %+v, %v; want one dark pair at energy 0", cl, err)
	}
}

func TestReachabilityBadInput(t *testing.T) {
	sc := holonomy.Tripod()
	sp, _ := NewDriveSphere(sc, false)
	notUnitary := holonomy.NewMatFrom(2, 2, []complex128{1, 0, 0, 0.9})
	_, err := Reachability(sc, sp, notUnitary, 1e-6)
	var ue *UnreachableError
	if err == nil || errors.As(err, &ue) || !strings.Contains(err.Error(), "not unitary") {
		t.Errorf("non-unitary target: %v", err)
	}
	if _, err := Reachability(sc, sp, holonomy.Identity(3), 1e-6); err == nil {
		t.Error("3×3 target on a qubit: want an error")
	}
	// A second auxiliary channel driven at the base point adds a third dark
	// state degenerate with the qubit: no gap.
	sc2 := holonomy.Tripod()
	sc2.Levels = append(sc2.Levels, holonomy.Level{Name: "b"})
	sc2.Channels = append(sc2.Channels, holonomy.Channel{Name: "pb", Lower: 4, Upper: 3, Factor: 1})
	sp2, err := NewDriveSphere(sc2, false)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := BaseClusters(sc2, sp2); err == nil || !strings.Contains(err.Error(), "no gap") {
		t.Errorf("degenerate base point: %v", err)
	}
}

func abs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }
