// Package design runs loopgate's pipeline from a parsed spec to the output
// files. Given a spec (package design/spec), Design searches for a loop in
// control space whose holonomy is the target gate (package optimize),
// times and samples it for an AWG (package waveform), verifies the sampled
// waveform in the full level scheme (waveform/sim), computes the error
// budget and robustness analysis (waveform/robust, waveform/dynamical), and
// writes the output files atomically: the waveform file, CSV and NPY
// exports, the loop file (waveform/wavefile) and an HTML report (package
// design/report). VerifyFile and CheckLoopFile re-run the checks on a
// waveform file or a loop file.
//
// # Conventions
//
// Specs and files carry frequencies in Hz, meaning Ω/2π for Rabi
// frequencies and Δ/2π for detunings, and times in seconds. Rates written
// with a frequency unit ("4 MHz") are Γ/2π; written per time ("1e6 /s")
// they are Γ. Inside, ħ = 1 and everything is in rad/s (see package
// holonomy for the Hamiltonian convention). Average gate fidelity is that of
// Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47 (2007), on the qubit
// levels and including leakage.
//
// # Errors
//
// Functions return errors with context naming the file and the field,
// classified for the command's exit codes as *InputError (bad input),
// *InfeasibleError (unreachable target or impossible limits),
// *OutputError (outputs that exist or cannot be written),
// *ChecksFailedError (work done, a check failed) and context.Canceled
// (interrupted).
package design
