package spec

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/loopgate/loopgate/holonomy"
)

func (d *decoder) target(m map[string]any, path string) Target {
	var t Target
	if g, ok := m["gate"].(string); ok {
		gate, found := LookupGate(g)
		if !found {
			d.bad(path+".gate", "unknown gate %q; named gates are %s (the gates command lists aliases)", g, gateNames())
			return t
		}
		t.Name = gate.Name
		t.Label = gate.Symbol + " (" + gate.Title + ")"
		t.U = gate.Matrix()
		return t
	}
	if r := mapAt(m, "rotation"); r != nil {
		return d.rotation(r, path+".rotation")
	}
	if rows, ok := m["unitary"].([]any); ok {
		return d.unitary(rows, path+".unitary")
	}
	d.bad(path, "give exactly one of: gate, rotation, unitary")
	return t
}

// rotation decodes a target given as a rotation (axis and angle) at rp.
func (d *decoder) rotation(r map[string]any, rp string) Target {
	var t Target
	var axis [3]float64
	switch a := r["axis"].(type) {
	case string:
		sign := 1.0
		name := a
		if strings.HasPrefix(a, "-") {
			sign, name = -1, a[1:]
		}
		name = strings.TrimPrefix(name, "+")
		k := strings.Index("xyz", name)
		if len(name) != 1 || k < 0 {
			d.bad(rp+".axis", "%q is not an axis; expected x, y, z (optionally signed) or [nx, ny, nz]", a)
			return t
		}
		axis[k] = sign
	case []any:
		if len(a) != 3 {
			d.bad(rp+".axis", "an axis vector has 3 components; found %d", len(a))
			return t
		}
		for i, c := range a {
			x, ok := toFloat(c)
			if !ok {
				d.bad(fmt.Sprintf("%s.axis[%d]", rp, i), "expected a number; found %s", describeValue(c))
				return t
			}
			axis[i] = x
		}
	default:
		d.bad(rp+".axis", "expected x, y, z or [nx, ny, nz]; found %s", describeValue(r["axis"]))
		return t
	}
	angle, ok := d.quantity(r, "angle", rp, Angle)
	if !ok {
		if _, present := r["angle"]; !present {
			d.bad(rp+".angle", "missing; give the rotation angle, e.g. \"90 deg\"")
		}
		return t
	}
	u, err := Rotation(axis, angle)
	if err != nil {
		d.bad(rp+".axis", "%v", err)
		return t
	}
	t.U = u
	t.Label = fmt.Sprintf("rotation by %s about (%g, %g, %g)", FormatQuantity(angle, Angle), axis[0], axis[1], axis[2])
	return t
}

// unitary decodes a target given as an explicit 2×2 matrix at up.
func (d *decoder) unitary(rows []any, up string) Target {
	var t Target
	if len(rows) != 2 {
		d.bad(up, "a 2×2 unitary has 2 rows; found %d", len(rows))
		return t
	}
	u := holonomy.NewMat(2, 2)
	for i, r := range rows {
		row, ok := r.([]any)
		if !ok || len(row) != 2 {
			d.bad(fmt.Sprintf("%s[%d]", up, i), "a row of a 2×2 unitary has 2 entries")
			return t
		}
		for j, e := range row {
			z, err := complexValue(e)
			if err != nil {
				d.bad(fmt.Sprintf("%s[%d][%d]", up, i, j), "%v", err)
				return t
			}
			u.Set(i, j, z)
		}
	}
	t.U = u
	t.Label = "explicit unitary"
	return t
}

func toFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case float64:
		return x, true
	case int64:
		return float64(x), true
	case uint64:
		return float64(x), true
	case json.Number:
		f, err := x.Float64()
		return f, err == nil
	}
	return 0, false
}

// complexValue reads a unitary entry: a number, a string such as
// "0.5+0.5i", or a mapping {re, im}.
func complexValue(v any) (complex128, error) {
	if x, ok := toFloat(v); ok {
		return complex(x, 0), nil
	}
	switch x := v.(type) {
	case string:
		s := strings.ReplaceAll(x, " ", "")
		z, err := strconv.ParseComplex(s, 128)
		if err != nil || s == "" || strings.ContainsAny(strings.ToLower(s), "nx_") {
			return 0, fmt.Errorf("%q is not a complex number; write e.g. \"0.5+0.5i\", \"-1i\" or {re: 0.5, im: 0.5}", x)
		}
		if math.IsNaN(real(z)) || math.IsNaN(imag(z)) || math.IsInf(real(z), 0) || math.IsInf(imag(z), 0) {
			return 0, fmt.Errorf("%q is not a finite complex number", x)
		}
		return z, nil
	case map[string]any:
		re, okr := toFloat(x["re"])
		im, oki := toFloat(x["im"])
		_, hasr := x["re"]
		_, hasi := x["im"]
		if (hasr && !okr) || (hasi && !oki) || (!hasr && !hasi) {
			return 0, fmt.Errorf("expected {re: number, im: number}")
		}
		return complex(re, im), nil
	}
	return 0, fmt.Errorf("expected a complex number; found %s", describeValue(v))
}
