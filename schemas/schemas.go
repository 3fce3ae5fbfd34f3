// Package schemas holds the JSON Schemas (draft-07) of the files loopgate
// reads and writes, embedded in the binary so that the tool can validate
// its input and print the schemas without any file beside it.
package schemas

import _ "embed" // for go:embed

// Spec is the JSON Schema of a design spec (schemas/spec.schema.json).
// A YAML spec is validated against it after conversion to JSON data.
// Callers must not modify the slice.
//
//go:embed spec.schema.json
var Spec []byte
