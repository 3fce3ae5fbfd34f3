package report

import (
	"fmt"
	"html"
	"math"
	"strconv"
	"strings"
)

// The formatters below return HTML fragments: text is escaped and powers of
// ten are written with <sup>.

// esc escapes text for HTML.
func esc(s string) string { return html.EscapeString(s) }

// minus replaces ASCII hyphen-minus signs in a formatted number by the
// typographic minus.
func minus(s string) string { return strings.ReplaceAll(s, "-", "−") }

// num formats x with sig significant digits, switching to a×10ⁿ notation
// for very small or large magnitudes.
func num(x float64, sig int) string {
	switch {
	case math.IsNaN(x):
		return "—"
	case math.IsInf(x, 1):
		return "∞"
	case math.IsInf(x, -1):
		return "−∞"
	case x == 0:
		return "0"
	}
	a := math.Abs(x)
	if a >= 1e-3 && a < 1e5 {
		// Keep trailing zeros: they carry the precision.
		s := fmt.Sprintf("%#.*g", sig, x)
		if strings.Contains(s, "e") {
			s = strconv.FormatFloat(x, 'f', 0, 64)
		}
		return minus(strings.TrimSuffix(s, "."))
	}
	e := int(math.Floor(math.Log10(a)))
	m := x / math.Pow(10, float64(e))
	ms := strconv.FormatFloat(m, 'f', sig-1, 64)
	if ms == "10" || strings.HasPrefix(ms, "10.") || ms == "-10" || strings.HasPrefix(ms, "-10.") {
		e++
		ms = strconv.FormatFloat(x/math.Pow(10, float64(e)), 'f', sig-1, 64)
	}
	return minus(ms) + "×10<sup>" + minus(strconv.Itoa(e)) + "</sup>"
}

// fidelity formats a fidelity close to 1 with enough digits to show the
// infidelity.
func fidelity(f float64) string {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return num(f, 4)
	}
	d := 4
	if inf := 1 - f; inf > 0 {
		d = max(4, min(9, int(math.Ceil(-math.Log10(inf)))+1))
	}
	return minus(strconv.FormatFloat(f, 'f', d, 64))
}

// qty formats x in unit with a prefix for "Hz" and "s".
func qty(x float64, unit string, sig int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return num(x, sig)
	}
	f, u := unitScale(unit, math.Abs(x))
	s := num(x*f, sig)
	if u == "" {
		return s
	}
	if u == "%" {
		return s + "&#160;%"
	}
	return s + "&#160;" + esc(u)
}

// percent formats a fraction as a percentage with one decimal.
func percent(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return num(x, 3)
	}
	return minus(fmt.Sprintf("%+.1f", 100*x)) + "&#160;%"
}

// ratio formats a width ratio as "3.4×".
func ratio(r float64) string {
	switch {
	case math.IsNaN(r):
		return "—"
	case math.IsInf(r, 1):
		return "∞"
	}
	if r >= 100 {
		return strconv.FormatFloat(r, 'f', 0, 64) + "×"
	}
	return strconv.FormatFloat(r, 'f', 1, 64) + "×"
}
