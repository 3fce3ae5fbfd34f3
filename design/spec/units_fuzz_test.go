package spec

import (
	"math"
	"regexp"
	"testing"
)

// FuzzParseQuantity checks that ParseQuantity never panics, returns a
// finite value or an error, and accepts only strings matching the
// dimension's schema pattern.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{"5 MHz", "1.2 GS/s", "800 ns", "14 bit", "2 MHz/us", "3 kHz", "1e6 /s", "pi/2",
		"-3pi/4", "90 deg", "2 %", "0.02", "1.2 GHz", "", " ", "1e400 Hz", "NaN", "π/", "5 µs", "1/ns"} {
		for d := range allDims {
			f.Add(s, d)
		}
	}
	res := make(map[Dimension]*regexp.Regexp)
	for _, d := range allDims {
		res[d] = regexp.MustCompile(d.Pattern())
	}
	f.Fuzz(func(t *testing.T, s string, k int) {
		if k < 0 {
			k = -k
		}
		d := allDims[k%len(allDims)]
		v, err := ParseQuantity(s, d)
		if err != nil {
			if err.Error() == "" {
				t.Fatalf("empty error for %q", s)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("ParseQuantity(%q, %v) = %v, not finite", s, d, v)
		}
		if !res[d].MatchString(s) {
			t.Fatalf("ParseQuantity(%q, %v) accepted a string its pattern rejects", s, d)
		}
	})
}
