package waveform

import (
	"fmt"
	"math"

	"github.com/loopgate/loopgate/holonomy"
)

// quantize computes the DAC codes of every sample.
func (w *Waveform) quantize() error {
	nch := len(w.I)
	w.CodeI, w.CodeQ = make([][]int32, nch), make([][]int32, nch)
	mc := w.Hardware.MaxCode()
	for c := 0; c < nch; c++ {
		w.CodeI[c], w.CodeQ[c] = make([]int32, w.Len()), make([]int32, w.Len())
		fs := w.Hardware.FullScale[c]
		for k := range w.I[c] {
			ci, err := DACCode(w.I[c][k], fs, mc)
			if err != nil {
				return fmt.Errorf("channel %q sample %d: %w", w.Scheme.Channels[c].Name, k, err)
			}
			cq, err := DACCode(w.Q[c][k], fs, mc)
			if err != nil {
				return fmt.Errorf("channel %q sample %d: %w", w.Scheme.Channels[c].Name, k, err)
			}
			w.CodeI[c][k], w.CodeQ[c][k] = ci, cq
		}
	}
	return nil
}

// DACCode returns round(x/fs·mc), halves away from zero. Codes outside the
// DAC range are returned as they are (a failed check, never clipped);
// codes beyond the int32 range are an error.
func DACCode(x, fs, mc float64) (int32, error) {
	v := math.Round(x / fs * mc)
	if !holonomy.Finite(v) || math.Abs(v) > math.MaxInt32 {
		return 0, fmt.Errorf("drive %g Hz is beyond any DAC code at full scale %g Hz", x, fs)
	}
	return int32(v), nil
}

func cabs(v complex128) float64 { return math.Hypot(real(v), imag(v)) }
