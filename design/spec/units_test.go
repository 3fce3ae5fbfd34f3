package spec

import (
	"math"
	"regexp"
	"strings"
	"testing"
)

func TestParseQuantity(t *testing.T) {
	twoPi := 2 * math.Pi
	tests := []struct {
		in   string
		dim  Dimension
		want float64
	}{
		{"5 MHz", Frequency, 5e6},
		{"5MHz", Frequency, 5e6},
		{"  -2.5 kHz ", Frequency, -2500},
		{"+.5 GHz", Frequency, 5e8},
		{"1e3 Hz", Frequency, 1000},
		{"0 Hz", Frequency, 0},
		{"-0 Hz", Frequency, 0},
		{"1.2 GS/s", SampleRate, 1.2e9},
		{"250 MS/s", SampleRate, 2.5e8},
		{"800 ns", Time, 8e-7},
		{"200 ns", Time, 2e-7}, // exactly the float64 nearest 2e-7
		{"5 us", Time, 5e-6},
		{"5 µs", Time, 5e-6},
		{"5 μs", Time, 5e-6},
		{"1.5 ms", Time, 1.5e-3},
		{"2 s", Time, 2},
		{"10 ps", Time, 1e-11},
		{"2 MHz/us", SlewRate, 2e12},
		{"2 MHz/ns", SlewRate, 2e15},
		{"3 GHz/s", SlewRate, 3e9},
		{"14 bit", Bits, 14},
		{"14 bits", Bits, 14},
		{"14", Bits, 14},
		// Rates: a frequency unit means Γ/2π, a per-time unit means Γ.
		{"3 kHz", Rate, twoPi * 3e3},
		{"1 MHz", Rate, twoPi * 1e6},
		{"1e6 /s", Rate, 1e6},
		{"1e6/s", Rate, 1e6},
		{"2 /us", Rate, 2e6},
		{"2 1/us", Rate, 2e6},
		{"90 deg", Angle, math.Pi / 2},
		{"90°", Angle, math.Pi / 2},
		{"pi/2", Angle, math.Pi / 2},
		{"π/4", Angle, math.Pi / 4},
		{"-pi/2", Angle, -math.Pi / 2},
		{"3pi/4", Angle, 3 * math.Pi / 4},
		{"0.25 pi", Angle, math.Pi / 4},
		{"1 rad", Angle, 1},
		{"pi", Angle, math.Pi},
		{"0.02", Number, 0.02},
		{"2 %", Number, 0.02},
		{"20000 ppm", Number, 0.02},
		{"1e-6", Number, 1e-6},
	}
	for _, tt := range tests {
		got, err := ParseQuantity(tt.in, tt.dim)
		if err != nil {
			t.Errorf("ParseQuantity(%q, %v): %v", tt.in, tt.dim, err)
			continue
		}
		if got != tt.want && math.Abs(got-tt.want) > 1e-15*math.Abs(tt.want) {
			t.Errorf("ParseQuantity(%q, %v) = %v, want %v", tt.in, tt.dim, got, tt.want)
		}
		if math.Signbit(got) && got == 0 {
			t.Errorf("ParseQuantity(%q, %v) returned negative zero", tt.in, tt.dim)
		}
	}
}

func TestParseQuantityErrors(t *testing.T) {
	tests := []struct {
		in   string
		dim  Dimension
		frag []string
	}{
		{"1.2 GHz", SampleRate, []string{`"1.2 GHz" is not a sample rate`, "GHz is a unit of frequency", "accepted units: S/s, kS/s, MS/s, GS/s"}},
		{"5 mhz", Frequency, []string{"did you mean MHz?", "accepted units: Hz, kHz, MHz, GHz"}},
		{"5", Frequency, []string{"it has no unit"}},
		{"fast", SampleRate, []string{"expected a number and a unit", `"1.2 GS/s"`}},
		{"", Time, []string{"expected a number and a unit"}},
		{"NaN MHz", Frequency, []string{"expected a number and a unit"}},
		{"Inf MHz", Frequency, []string{"expected a number and a unit"}},
		{"1e400 Hz", Frequency, []string{"out of range"}},
		{"1e300 GHz", Frequency, []string{"out of range"}},
		{"800 ns", Frequency, []string{"ns is a unit of time"}},
		{"5 MHz", Time, []string{"MHz is a unit of frequency"}},
		{"2 MHz", SlewRate, []string{"is not a slew rate", "frequency unit over a time unit"}},
		{"14.5 bit", Bits, []string{"whole number of bits"}},
		{"-3 bit", Bits, []string{"whole number of bits"}},
		{"deg", Angle, []string{"expected a number and a unit"}},
		{"pi/0", Angle, []string{"positive whole number"}},
		{"pi x", Angle, []string{"is not an angle"}},
		{"90", Angle, []string{"it has no unit"}},
		{"3 furlongs", Time, []string{`unknown unit "furlongs"`}},
		{"1 MHz MHz", Frequency, []string{`unknown unit "MHz MHz"`}},
		{strings.Repeat("9", 100) + " Hz", Frequency, []string{"too long"}},
	}
	for _, tt := range tests {
		_, err := ParseQuantity(tt.in, tt.dim)
		if err == nil {
			t.Errorf("ParseQuantity(%q, %v): no error", tt.in, tt.dim)
			continue
		}
		for _, f := range tt.frag {
			if !strings.Contains(err.Error(), f) {
				t.Errorf("ParseQuantity(%q, %v) error %q does not contain %q", tt.in, tt.dim, err, f)
			}
		}
	}
}

var allDims = []Dimension{Frequency, Rate, Time, SampleRate, SlewRate, Bits, Angle, Number}

// The schema's patterns are the dimensions' patterns; whatever ParseQuantity
// accepts must match them, or the schema would reject valid specs.
func TestPatternCoversParser(t *testing.T) {
	inputs := []string{"5 MHz", "5MHz", " 1e6 /s ", "2 1/us", "1.2 GS/s", "2 MHz/µs", "14 bit", "14", "pi/2", "-pi / 2",
		"3pi/4", "0.25 π", "90 °", "2 %", "0.1", "800 ns", "5 μs", ".5 kHz", "5. Hz", "+1 rad"}
	for _, d := range allDims {
		re := regexp.MustCompile(d.Pattern())
		for _, in := range inputs {
			if _, err := ParseQuantity(in, d); err == nil && !re.MatchString(in) {
				t.Errorf("%v: ParseQuantity accepts %q but the pattern %s does not", d, in, d.Pattern())
			}
		}
		for _, u := range d.Units() {
			in := "3 " + u
			if u == "" {
				in = "2"
			}
			if _, err := ParseQuantity(in, d); err != nil {
				t.Errorf("%v: unit %q listed but rejected: %v", d, u, err)
			}
			if !re.MatchString(in) {
				t.Errorf("%v: pattern rejects %q", d, in)
			}
		}
	}
}

func TestFormatQuantityRoundTrip(t *testing.T) {
	values := []float64{0, 1, 2.5e-9, 2e-7, 5e-6, 20e6, -3.3e3, 1.2e9, 6.283185307179586e6, 2e15, 14, math.Pi / 2, 0.02}
	for _, d := range allDims {
		for _, v := range values {
			if d == Bits && (v != math.Trunc(v) || v < 0) {
				continue
			}
			s := FormatQuantity(v, d)
			got, err := ParseQuantity(s, d)
			if err != nil {
				t.Errorf("FormatQuantity(%v, %v) = %q does not parse: %v", v, d, s, err)
				continue
			}
			if math.Abs(got-v) > 1e-5*math.Abs(v) {
				t.Errorf("FormatQuantity(%v, %v) = %q reads back as %v", v, d, s, got)
			}
		}
	}
	if got := FormatQuantity(2e7, Frequency); got != "20 MHz" {
		t.Errorf("FormatQuantity(2e7, Frequency) = %q, want 20 MHz", got)
	}
	if got := FormatQuantity(2e-7, Time); got != "200 ns" {
		t.Errorf("FormatQuantity(2e-7, Time) = %q, want 200 ns", got)
	}
}

func TestDimensionString(t *testing.T) {
	if SampleRate.String() != "sample rate" || Angle.String() != "angle" {
		t.Errorf("got %q, %q", SampleRate, Angle)
	}
	if s := Dimension(99).String(); s != "Dimension(99)" {
		t.Errorf("got %q", s)
	}
}
