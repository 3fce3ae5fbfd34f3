// Package sim simulates a sampled waveform under an error model and
// verifies it against its goals and the hardware limits.
//
// # Method
//
// Simulate and Simulator.Run propagate the zero-order-hold waveform with
// holonomy.Propagator.Step (exact per step, unitary), StepDecay when the
// model has excited-level decay, and holonomy.Lindblad when it has qubit
// dephasing; an ErrorModel adds amplitude and detuning errors, decay,
// dephasing, a Gaussian or first-order low-pass model of the analog
// bandwidth and a finite drive-phase resolution. Runs of
// identical samples reuse one step propagator. The figures are the average
// gate fidelity and leakage of Pedersen, Møller and Mølmer (Phys. Lett. A
// 367, 47 (2007)), the peak population of the non-computational and of the
// excited levels for each computational input, and optional decimated
// population traces.
//
// Verify adds to these figures the adiabaticity parameter
// (waveform.MeasureAdiabaticity) and a waveform.Check for the fidelity goal,
// the adiabaticity goal and every hardware limit.
package sim
