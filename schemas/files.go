package schemas

import _ "embed" // for go:embed

// Waveform is the JSON Schema (draft-07) of a loopgate waveform file
// (format "loopgate-waveform", version 1): the sampled drive of every
// channel, the level scheme and Hamiltonian convention needed to replay it,
// the verification results and the hardware checks.
//
//go:embed waveform.schema.json
var Waveform []byte

// Loop is the JSON Schema (draft-07) of a loopgate loop file (format
// "loopgate-loop", version 1): a loop in control space as unit-scale
// sampled points, with its family, parameters, target gate and level scheme.
//
//go:embed loop.schema.json
var Loop []byte
