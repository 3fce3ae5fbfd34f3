package waveform

import (
	"fmt"
	"math"
)

// FormatSI is the one formatter of physical values in messages and
// printed outcomes. It formats v with four significant digits and an SI prefix on unit
// ("96 ns", "20 MHz"); slew rates in Hz/s are shown in MHz/µs, and with
// an empty unit it formats the plain number.
func FormatSI(v float64, unit string) string {
	switch unit {
	case "":
		return fmt.Sprintf("%.6g", v)
	case "Hz/s": // slew rates read best as MHz per µs
		return fmt.Sprintf("%.4g MHz/µs", v/1e12)
	}
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprintf("%g %s", v, unit)
	}
	prefixes := []struct {
		f float64
		p string
	}{{1e12, "T"}, {1e9, "G"}, {1e6, "M"}, {1e3, "k"}, {1, ""}, {1e-3, "m"}, {1e-6, "µ"}, {1e-9, "n"}, {1e-12, "p"}}
	a := math.Abs(v)
	for _, p := range prefixes {
		if a >= p.f*0.99995 {
			return fmt.Sprintf("%.4g %s%s", v/p.f, p.p, unit)
		}
	}
	return fmt.Sprintf("%.4g %s", v, unit)
}
