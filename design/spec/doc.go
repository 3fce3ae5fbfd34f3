// Package spec reads loopgate's design specs: YAML is checked against the
// JSON Schema (schemas/spec.schema.json) and then for meaning, quantities
// with units become SI numbers, named gates become matrices, and starter
// specs are embedded here.
//
// Specs carry frequencies in Hz (Ω/2π, Δ/2π) and times in seconds. Rates
// written with a frequency unit ("4 MHz") are Γ/2π; written per time
// ("1e6 /s") they are Γ.
//
// Bad input gives a *SpecError listing every Problem with file, field
// path, line and column.
package spec
