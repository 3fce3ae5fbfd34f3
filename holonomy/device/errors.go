package device

import (
	"errors"
	"fmt"
)

// Sentinels for errors.Is. Every error returned by Validate, Compile and the
// Simulator wraps exactly one of them inside a *FieldError (bad input, with
// the field that holds it) or a *StepLimitError (a sub-step count past the
// bound).
var (
	// ErrShape: a count, index or name is wrong (too few levels, a
	// coupling joining a level that does not exist, a name used twice, a
	// control sample not shaped for the device).
	ErrShape = errors.New("device shape")
	// ErrValue: a number is not finite or out of its documented range.
	ErrValue = errors.New("value out of range")
	// ErrSelfDecay: a level lists itself as a decay destination.
	ErrSelfDecay = errors.New("level decays into itself")
	// ErrBranching: the branching ratios of one level sum above 1.
	ErrBranching = errors.New("branching ratios sum above 1")
	// ErrFarCarrier: a tone's carrier is far (see FarFraction) from every
	// transition it lists.
	ErrFarCarrier = errors.New("tone carrier far from every transition it lists")
	// ErrT2 : a qubit's T2 exceeds 2·T1, which no Lindblad model allows.
	ErrT2 = errors.New("T2 longer than 2·T1")
	// ErrStepLimit: propagation would need more sub-steps than allowed.
	ErrStepLimit = errors.New("sub-step count past the bound")
	// ErrNeedsDensityMatrix: a propagator (pure-state) simulation was asked
	// of a device with dephasing or decay that returns to a modelled level,
	// which only the density-matrix (Lindblad) path represents exactly.
	ErrNeedsDensityMatrix = errors.New("dissipation needs density-matrix propagation")
)

// FieldError is bad input found in one field of a Device. Field is a path in
// the device's own words ("levels[2].decay.to", "tones[1].carrier") so the
// file reader that built the device can map it to a file, line and key.
type FieldError struct {
	// Field is the path of the offending field.
	Field string
	// Msg states what is wrong, with the numbers.
	Msg string
	// Err is one of the sentinels above.
	Err error
}

func (e *FieldError) Error() string { return e.Field + ": " + e.Msg }

// Unwrap returns the sentinel.
func (e *FieldError) Unwrap() error { return e.Err }

func fieldErr(sentinel error, field, format string, a ...any) error {
	return &FieldError{Field: field, Msg: fmt.Sprintf(format, a...), Err: sentinel}
}

// FarCarrierError is the detail of an ErrFarCarrier (it is the Err of no
// FieldError; it is returned itself, and unwraps to ErrFarCarrier).
type FarCarrierError struct {
	// Field is "tones[i].carrier".
	Field string
	// Tone is the tone's name.
	Tone string
	// Carrier is the carrier in rad/s.
	Carrier float64
	// Nearest names the nearest listed transition ("0→1") and Transition
	// is its frequency E_upper − E_lower in rad/s.
	Nearest    string
	Transition float64
	// Limit is the largest allowed |carrier − transition| in rad/s.
	Limit float64
}

func (e *FarCarrierError) Error() string {
	const mhz = 2e6 * 3.141592653589793
	return fmt.Sprintf("%s: tone %q carrier %.6g MHz is %.6g MHz from its nearest listed transition %s (%.6g MHz); the limit is %.6g MHz (%.3g of the larger of the two frequencies)",
		e.Field, e.Tone, e.Carrier/mhz, (e.Carrier-e.Transition)/mhz, e.Nearest, e.Transition/mhz, e.Limit/mhz, FarFraction)
}

// Unwrap returns ErrFarCarrier.
func (e *FarCarrierError) Unwrap() error { return ErrFarCarrier }

// StepLimitError reports a simulation that would need more sub-steps than
// the simulator's MaxSubsteps. It carries the numbers that set the count.
type StepLimitError struct {
	// Needed is the total number of sub-steps the samples would need, Limit
	// the bound.
	Needed, Limit int64
	// Sample is the sample needing the most sub-steps, SampleSteps that
	// count and Rate its rate ν (rad/s, see Simulator) with Dt the sample
	// length (s) and StepPhase the allowed ν·h.
	Sample      int
	SampleSteps int64
	Rate, Dt    float64
	StepPhase   float64
}

func (e *StepLimitError) Error() string {
	return fmt.Sprintf("propagation needs at least %d sub-steps, more than the limit %d: sample %d alone needs %d (fastest rate ν = %.4g rad/s = 2π·%.4g MHz over %.4g s at ν·h ≤ %g); choose a frame closer to the carriers or turn counter-rotating terms off",
		e.Needed, e.Limit, e.Sample, e.SampleSteps, e.Rate, e.Rate/(2e6*3.141592653589793), e.Dt, e.StepPhase)
}

// Unwrap returns ErrStepLimit.
func (e *StepLimitError) Unwrap() error { return ErrStepLimit }
