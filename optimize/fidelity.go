package optimize

import (
	"fmt"

	"github.com/loopgate/loopgate/holonomy"
)

// unitarityError returns ‖t†t − I‖_F.
func unitarityError(t *holonomy.Mat) float64 { return holonomy.UnitarityError(t) }

// checkTarget reports whether target is a k×k unitary.
func checkTarget(target *holonomy.Mat, k int) error {
	if target == nil {
		return fmt.Errorf("optimize: no target gate given")
	}
	if target.R != k || target.C != k {
		return fmt.Errorf("optimize: target gate is %d×%d but the scheme has %d computational levels", target.R, target.C, k)
	}
	if e := unitarityError(target); e > 1e-9 {
		return fmt.Errorf("optimize: target gate is not unitary: ‖T†T − I‖ = %.3g (tolerance 1e-9)", e)
	}
	return nil
}
