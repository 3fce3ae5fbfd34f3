package spec

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
)

// Dimension is the physical kind of a quantity written in a spec. Each
// dimension has a fixed set of accepted unit spellings and one SI unit in
// which ParseQuantity returns values.
//
// Frequencies are cycles per second: "5 MHz" as a Rabi frequency means
// Ω/2π = 5 MHz, and as a detuning Δ/2π = 5 MHz. Rates (decay Γ, dephasing
// γ_φ) may be written either way: with a frequency unit the number is Γ/2π
// (the linewidth, as atomic data tables quote it), with a per-time unit it
// is Γ itself. ParseQuantity always returns the rate Γ in 1/s, so "1 MHz"
// and "6.283185307e6 /s" are the same rate.
type Dimension int

// The dimensions of spec quantities, with the SI unit ParseQuantity returns.
const (
	// Frequency in Hz (cycles per second): Rabi frequencies Ω/2π and
	// detunings Δ/2π. Units Hz, kHz, MHz, GHz.
	Frequency Dimension = iota + 1
	// Rate in 1/s: decay Γ and dephasing γ_φ. "3 kHz" means Γ/2π = 3 kHz,
	// i.e. Γ = 2π·3000 /s; "1e6 /s" means Γ = 10⁶ /s.
	Rate
	// Time in seconds. Units s, ms, us (µs), ns, ps.
	Time
	// SampleRate in samples per second. Units S/s, kS/s, MS/s, GS/s.
	SampleRate
	// SlewRate of a Rabi frequency, in Hz per second: a frequency unit over
	// a time unit, as in "2 MHz/ns".
	SlewRate
	// Bits is a whole number of bits, written "14 bit", "14 bits" or 14.
	Bits
	// Angle in radians. Units deg (°), rad, and multiples of pi (π):
	// "90 deg", "pi/2", "0.25 pi", "-3pi/4".
	Angle
	// Number is a dimensionless number, written plain ("0.02"), in percent
	// ("2 %") or in parts per million ("20000 ppm").
	Number
)

// MaxQuantityLength is the longest quantity string ParseQuantity reads.
const MaxQuantityLength = 64

// unit is a unit spelling with its value in SI units, mul/div: keeping the
// divisor separate makes "200 ns" exactly the float64 nearest 2e-7.
type unit struct {
	name     string
	mul, div float64
}

func (u unit) scale() float64 { return u.mul / u.div }

func (u unit) apply(x float64) float64 { return x * u.mul / u.div }

type dimInfo struct {
	noun    string // with article, for "is not <noun>"
	units   []unit
	accept  string // accepted units as shown in messages
	example string
	plain   bool // a bare number (no unit) is accepted
}

var (
	freqUnits   = []unit{{"Hz", 1, 1}, {"kHz", 1e3, 1}, {"MHz", 1e6, 1}, {"GHz", 1e9, 1}}
	timeUnits   = []unit{{"s", 1, 1}, {"ms", 1, 1e3}, {"us", 1, 1e6}, {"µs", 1, 1e6}, {"μs", 1, 1e6}, {"ns", 1, 1e9}, {"ps", 1, 1e12}}
	sampleUnits = []unit{{"S/s", 1, 1}, {"kS/s", 1e3, 1}, {"MS/s", 1e6, 1}, {"GS/s", 1e9, 1}}
	bitUnits    = []unit{{"bit", 1, 1}, {"bits", 1, 1}}
	angleUnits  = []unit{{"deg", math.Pi, 180}, {"°", math.Pi, 180}, {"rad", 1, 1}, {"pi", math.Pi, 1}, {"π", math.Pi, 1}}
	numberUnits = []unit{{"%", 1, 100}, {"ppm", 1, 1e6}}
)

var (
	rateUnits = func() []unit {
		var us []unit
		for _, u := range freqUnits { // Γ/2π
			us = append(us, unit{u.name, 2 * math.Pi * u.mul, u.div})
		}
		for _, t := range timeUnits { // Γ: 1/(mul/div) = div/mul
			us = append(us, unit{"/" + t.name, t.div, t.mul}, unit{"1/" + t.name, t.div, t.mul})
		}
		return us
	}()
	slewUnits = func() []unit {
		var us []unit
		for _, f := range freqUnits {
			for _, t := range timeUnits {
				us = append(us, unit{f.name + "/" + t.name, f.mul * t.div, f.div * t.mul})
			}
		}
		return us
	}()
)

var dims = map[Dimension]*dimInfo{
	Frequency:  {noun: "a frequency", units: freqUnits, accept: "Hz, kHz, MHz, GHz", example: "5 MHz"},
	Rate:       {noun: "a rate", units: rateUnits, accept: "Hz, kHz, MHz, GHz (meaning Γ/2π) or /s, /ms, /us, /ns (meaning Γ)", example: "3 kHz"},
	Time:       {noun: "a time", units: timeUnits, accept: "s, ms, us (or µs), ns, ps", example: "800 ns"},
	SampleRate: {noun: "a sample rate", units: sampleUnits, accept: "S/s, kS/s, MS/s, GS/s", example: "1.2 GS/s"},
	SlewRate:   {noun: "a slew rate", units: slewUnits, accept: "a frequency unit over a time unit: Hz, kHz, MHz, GHz per s, ms, us (or µs), ns", example: "2 MHz/ns"},
	Bits:       {noun: "a number of bits", units: bitUnits, accept: "bit, bits, or a plain whole number", example: "14 bit", plain: true},
	Angle:      {noun: "an angle", units: angleUnits, accept: "deg (or °), rad, pi (or π), as in 90 deg, pi/2, 0.25 pi", example: "90 deg"},
	Number:     {noun: "a number", units: numberUnits, accept: "a plain number, %, ppm", example: "0.02", plain: true},
}

// String returns the name of the dimension ("frequency", "sample rate", ...).
func (d Dimension) String() string {
	if i, ok := dims[d]; ok {
		return strings.TrimPrefix(strings.TrimPrefix(i.noun, "a "), "an ")
	}
	return fmt.Sprintf("Dimension(%d)", int(d))
}

// Units returns the accepted unit spellings of d, as a new slice. An empty
// string among them means a bare number is accepted.
func (d Dimension) Units() []string {
	i := mustDim(d)
	var u []string
	if i.plain {
		u = append(u, "")
	}
	for _, x := range i.units {
		u = append(u, x.name)
	}
	return u
}

// numberRE is the number syntax of quantity strings: an optional sign,
// decimal digits with an optional fraction, and an optional exponent. It is
// valid both as a Go (RE2) and as an ECMA-262 regular expression, so the
// JSON Schema patterns built from it mean the same in every validator.
const numberRE = `[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?`

// Pattern returns the regular expression (valid in Go and ECMA-262 syntax)
// that a quantity string of dimension d matches; the spec's JSON Schema uses
// exactly these patterns. ParseQuantity accepts only strings matching it,
// and may reject some that do (a fractional number of bits, say).
func (d Dimension) Pattern() string {
	i := mustDim(d)
	alts := make([]string, len(i.units))
	for k, u := range i.units {
		alts[k] = regexp.QuoteMeta(u.name)
	}
	us := "(?:" + strings.Join(alts, "|") + ")"
	switch d {
	case Angle:
		return `^ *(?:` + numberRE + `|[+-])? *` + us + `(?: */ *[0-9]+)? *$`
	case Bits, Number:
		return `^ *` + numberRE + ` *` + us + `? *$`
	}
	return `^ *` + numberRE + ` *` + us + ` *$`
}

func mustDim(d Dimension) *dimInfo {
	i, ok := dims[d]
	if !ok {
		panic(fmt.Sprintf("design: unknown Dimension %d", int(d)))
	}
	return i
}

var quantityRE = regexp.MustCompile(`^([+-]?)((?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)? *(.*?) *$`)

// ParseQuantity reads a quantity such as "5 MHz", "1.2 GS/s", "800 ns",
// "14 bit", "2 MHz/us" or "pi/2" and returns its value in the SI unit of
// dim (see Dimension): Hz for Frequency, 1/s for Rate (Γ, not Γ/2π), s for
// Time, samples/s for SampleRate, Hz/s for SlewRate, a count for Bits,
// radians for Angle and a plain number for Number. Unit spellings are case
// sensitive ("MHz", not "mhz"); the space between number and unit is
// optional. The error says what was expected and lists the accepted units.
// Sign and range checks (a Rabi frequency must be positive) are the
// caller's; ParseQuantity only guarantees a finite result.
func ParseQuantity(s string, dim Dimension) (float64, error) {
	info := mustDim(dim)
	if len(s) > MaxQuantityLength {
		return 0, fmt.Errorf("%q is too long for %s (at most %d characters)", s[:16]+"…", info.noun, MaxQuantityLength)
	}
	bad := func(why string) error {
		if why != "" {
			why = " " + why
		}
		return fmt.Errorf("%q is not %s%s; accepted units: %s", s, info.noun, why, info.accept)
	}
	m := quantityRE.FindStringSubmatch(strings.Trim(s, " "))
	if m == nil {
		return 0, bad(fmt.Sprintf("(expected a number and a unit, e.g. %q)", info.example))
	}
	sign, num, u := m[1], m[2], m[3]
	if num == "" && !(dim == Angle && (strings.HasPrefix(u, "pi") || strings.HasPrefix(u, "π"))) {
		return 0, bad(fmt.Sprintf("(expected a number and a unit, e.g. %q)", info.example))
	}
	x := 1.0
	if num != "" {
		v, err := strconv.ParseFloat(num, 64)
		if err != nil {
			return 0, bad("(the number is out of range)")
		}
		x = v
	}
	if sign == "-" {
		x = -x
	}
	div := 1.0
	if dim == Angle && (strings.HasPrefix(u, "pi") || strings.HasPrefix(u, "π")) {
		rest := strings.TrimPrefix(strings.TrimPrefix(u, "pi"), "π")
		if rest = strings.TrimLeft(rest, " "); rest != "" {
			if rest[0] != '/' {
				return 0, bad("")
			}
			n, err := strconv.ParseUint(strings.TrimLeft(rest[1:], " "), 10, 31)
			if err != nil || n == 0 {
				return 0, bad("(a multiple of pi may be divided only by a positive whole number, as in pi/2)")
			}
			div = float64(n)
			u = u[:len(u)-len(rest)]
			u = strings.TrimRight(u, " ")
		}
	}
	if u == "" {
		if info.plain {
			return checkQuantity(s, x, dim, info)
		}
		return 0, bad("(it has no unit)")
	}
	for _, un := range info.units {
		if un.name == u {
			return checkQuantity(s, un.apply(x)/div, dim, info)
		}
	}
	// A unit of another dimension, or a misspelt one: say so.
	for _, d := range []Dimension{Frequency, Time, SampleRate, SlewRate, Rate, Bits, Angle} {
		for _, un := range dims[d].units {
			if un.name == u {
				return 0, bad(fmt.Sprintf("(%s is a unit of %s)", u, d))
			}
		}
	}
	for _, un := range info.units {
		if strings.EqualFold(un.name, u) {
			return 0, bad(fmt.Sprintf("(unknown unit %q; did you mean %s?)", u, un.name))
		}
	}
	return 0, bad(fmt.Sprintf("(unknown unit %q)", u))
}

func checkQuantity(s string, v float64, dim Dimension, info *dimInfo) (float64, error) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fmt.Errorf("%q is not %s (the value is out of range); accepted units: %s", s, info.noun, info.accept)
	}
	if dim == Bits && (v != math.Trunc(v) || v < 0) {
		return 0, fmt.Errorf("%q is not %s (expected a whole number of bits, e.g. %q)", s, info.noun, info.example)
	}
	if v == 0 {
		v = 0 // no negative zero
	}
	return v, nil
}

// FormatQuantity writes v (in the SI unit of dim, see ParseQuantity) as a
// short quantity string with a unit prefix chosen for readability and six
// significant digits, e.g. FormatQuantity(2e7, Frequency) == "20 MHz".
// Rates are written per second ("2.51327e+07 /s"), slew rates per
// microsecond. ParseQuantity reads the result back.
func FormatQuantity(v float64, dim Dimension) string {
	mustDim(dim)
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
	pick := func(us []unit, suffix string) string {
		a := math.Abs(v)
		var best *unit
		for i := range us {
			if us[i].scale() <= a*(1+1e-12) && (best == nil || us[i].scale() > best.scale()) {
				best = &us[i]
			}
		}
		if best == nil { // below the smallest unit, or zero
			for i := range us {
				if best == nil || (a == 0 && us[i].scale() == 1) || (a != 0 && us[i].scale() < best.scale()) {
					best = &us[i]
				}
			}
		}
		return g(v*best.div/best.mul) + " " + best.name + suffix
	}
	switch dim {
	case Frequency:
		return pick(freqUnits, "")
	case Rate:
		return g(v) + " /s"
	case Time:
		return pick([]unit{{"ps", 1, 1e12}, {"ns", 1, 1e9}, {"µs", 1, 1e6}, {"ms", 1, 1e3}, {"s", 1, 1}}, "")
	case SampleRate:
		return pick(sampleUnits, "")
	case SlewRate:
		v *= 1e-6 // per µs
		return pick(freqUnits, "/µs")
	case Bits:
		return g(v) + " bit"
	case Angle:
		return g(v*180/math.Pi) + " deg"
	}
	return g(v)
}
