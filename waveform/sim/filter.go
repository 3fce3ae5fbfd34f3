package sim

import (
	"fmt"
	"math"
)

// FilterKind is the shape of the low-pass filter that models the analog
// bandwidth of the drive chain (ErrorModel.Filter).
type FilterKind int

// String returns "gaussian" or "first-order", the names used in waveform
// files.
func (k FilterKind) String() string {
	switch k {
	case GaussianFilter:
		return "gaussian"
	case FirstOrderFilter:
		return "first-order"
	}
	return fmt.Sprintf("FilterKind(%d)", int(k))
}

// FilterName returns the name of m's filter as written in waveform files:
// "none" without a rise time, else the filter kind's name.
func (m *ErrorModel) FilterName() string {
	if m.RiseTime == 0 {
		return "none"
	}
	return m.Filter.String()
}

// gaussRise is the 10–90% rise time of Φ(t/σ) in units of σ: 2·z₀.₉ with
// z₀.₉ = 1.2815515655446004 the 90% point of the standard normal
// distribution.
const gaussRise = 2 * 1.2815515655446004

// ln9 is ln 9, the 10–90% rise time of 1 − e^{−t/τ} in units of τ:
// ln 10 − ln(10/9).
const ln9 = 2.1972245773362196

// filterReachSamples returns the reach of a filter kernel in samples: 6σ
// for the Gaussian, 27.6τ for the first-order filter.
func filterReachSamples(k FilterKind, rise, rate float64) float64 {
	if k == FirstOrderFilter {
		return rise / ln9 * firstOrderReach * rate
	}
	return rise / gaussRise * filterReach * rate
}

// reachText describes a filter's reach for messages.
func reachText(k FilterKind) string {
	if k == FirstOrderFilter {
		return "27.6 time constants, τ = rise time/ln 9"
	}
	return "6σ, σ = rise time/2.5631"
}

// setKernel computes the weights of the held samples q+r, r = −back …
// ahead, in the filtered signal at the midpoint x = (o + ½)/sub of
// sub-step o of sample q, for a filter of the given kind and 10–90% rise
// time. With S the filter's step response and Δt the sample interval,
// w_o(r) = S((x − r)Δt) − S((x − r − 1)Δt) (the response at time x Δt
// to a unit sample held over [rΔt, (r+1)Δt)).
//
// Gaussian: S(t) = Φ(t/σ), back = ahead = ⌈6σ/Δt⌉ + 1.
//
// First order: S(t) = 1 − e^{−t/τ} for t > 0 and 0 before, so future
// samples weigh nothing (ahead = 0), w_o(0) = 1 − e^{−a x} and, for
// r < 0, w_o(r) = e^{−a(x − r − 1)}(1 − e^{−a}) with a = Δt/τ, both
// computed with expm1 to keep their relative accuracy; back =
// ⌈27.6τ/Δt⌉ + 1. The weights of a row sum to 1 − e^{−a(x + back)}, the
// neglected tail being below 1e−12.
func (s *Simulator) setKernel(kind FilterKind, rise float64, sub int) {
	if s.kerKind == kind && s.kerRise == rise && s.kerSub == sub && len(s.kernel) > 0 {
		return
	}
	var back, ahead int
	switch kind {
	case FirstOrderFilter:
		a := s.w.Dt() / (rise / ln9)
		back, ahead = int(math.Ceil(firstOrderReach/a))+1, 0
		width := back + 1
		s.kernel = growF(s.kernel, sub*width)[:sub*width]
		g := -math.Expm1(-a) // 1 − e^{−a}
		for o := 0; o < sub; o++ {
			x := (float64(o) + 0.5) / float64(sub)
			row := s.kernel[o*width : (o+1)*width]
			for r := -back; r < 0; r++ {
				row[r+back] = math.Exp(-a*(x-float64(r)-1)) * g
			}
			row[back] = -math.Expm1(-a * x)
		}
	default:
		dts := s.w.Dt() / (rise / gaussRise)
		R := int(math.Ceil(filterReach/dts)) + 1
		back, ahead = R, R
		width := 2*R + 1
		s.kernel = growF(s.kernel, sub*width)[:sub*width]
		phi := func(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }
		for o := 0; o < sub; o++ {
			x := (float64(o) + 0.5) / float64(sub)
			for r := -R; r <= R; r++ {
				s.kernel[o*width+r+R] = phi((x-float64(r))*dts) - phi((x-float64(r)-1)*dts)
			}
		}
	}
	s.back, s.ahead = back, ahead
	s.kerKind, s.kerRise, s.kerSub = kind, rise, sub
}

const (
	// maxFilterSamples bounds the reach of a filter kernel in samples.
	maxFilterSamples = 4096
	// filterReach is the half-width of the Gaussian filter kernel in σ;
	// the neglected tails hold Φ(−6) ≈ 1e−9 of the pulse area.
	filterReach = 6
	// firstOrderReach is the reach of the first-order filter kernel in τ,
	// 12 ln 10: the neglected tail holds e^{−12 ln 10} = 1e−12 of the
	// pulse area.
	firstOrderReach = 12 * math.Ln10
)
