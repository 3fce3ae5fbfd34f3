// Package waveform turns a loop in control space into a timed, sampled,
// DAC-quantised drive waveform, verifies it by exact propagation in the full
// level scheme and checks it against the hardware limits.
//
// # Pipeline
//
// A Plan (level scheme, target gate, segments with unit-scale shapes) and a
// Hardware description go into Build, which chooses the timing, samples the
// drive at the AWG rate and converts it to DAC codes. Verify propagates the
// quantised waveform with the holonomy engine's exact per-step propagator
// under an ErrorModel and returns the fidelity, leakage, peak population of
// the non-qubit levels, the adiabaticity parameter and a Check for every
// goal and hardware limit. A failed check is reported, never repaired: the
// samples are not clipped.
//
// # Units
//
// Inside the package, as in package holonomy, ħ = 1 and the Hamiltonian is
// in rad/s. Everything that faces files and users is in Hz meaning Ω/2π:
// the samples (I, Q), Hardware limits and calibration, ErrorModel
// detunings. Decay and dephasing rates are in 1/s and times in seconds.
// A channel's samples are its Rabi frequency Ω_c (the drive before the
// channel's matrix-element factor f_c), so that the channel adds
//
//	(f_c/2)·2π(I + iQ)|u⟩⟨l| + h.c.
//
// to H. The physical control point of a segment at time t is A(t) times the
// unit point of its shape (drives and controlled detunings alike) plus the
// static level detunings of the scheme.
//
// # Timing of adiabatic segments
//
// An adiabatic segment has three parts: an amplitude ramp A(t) = A sin²(πt/2T_r)
// at the base point, the loop traversed at constant amplitude A, and the
// mirror-image ramp down. A is the largest amplitude that keeps every
// channel below its Rabi limit and the DAC full scale (less one code step).
// The loop is traversed on a local-adiabatic schedule (Roland and Cerf,
// Phys. Rev. A 65, 042308 (2002), generalised to a degenerate working
// subspace): with
//
//	κ(s) = max over working clusters C and states n outside C of ‖P_C ∂_sH |n⟩‖ / (E_C − E_n)²,
//
// the local cost density is c(s) = max(κ(s)/α*, A·max_c|∂_s u_c|/(2π·MaxSlew)),
// so that both the adiabaticity target α* and the slew limit bind locally.
// The loop is cut at its corners (where the direction of motion turns by
// more than 0.1 rad between neighbouring grid secants) into smooth pieces;
// each piece is run with the normalised clock τ(s) = ∫c ds / ∫c ds and the
// time warp τ = x − sin(2πx)/2π, x = t/T_piece, so that the speed in
// control space rises from and returns to zero at every corner and at both
// ends. This keeps the adiabaticity parameter
//
//	α = max_t |⟨m|∂_tH|n⟩| / (E_m − E_n)²
//
// (m working, n any state outside m's cluster; for a degenerate cluster the
// numerator is the norm ‖P_C ∂_tH|n⟩‖) at or below α* with the shortest
// loop time 2∫c ds, and α falls as 1/T when the duration grows.
//
// When the working subspace consists of two non-degenerate clusters (for
// example both levels of a spin-½, whose holonomy is a pair of Berry
// phases), their dynamical phase difference would add to the gate. The
// timing then lengthens the loop and trims the amplitude until that
// difference, including the second-order adiabatic level shift
// Σ_n |⟨n|∂_tH|m⟩|²/(E_m − E_n)³, is a whole multiple of 2π on the
// sampled waveform, so that the gate is the geometric one up to a global
// phase. With more than two clusters no such matching is attempted.
//
// # Cyclic (nonadiabatic) segments
//
// A cyclic segment holds a fixed unit drive direction u with the envelope
// A(t) = A_p sin²(πt/T) and a prescribed pulse area Σ_k A_k Δt, for example
// 2π for the Λ-scheme gate of Sjöqvist et al., New J. Phys. 14, 103035
// (2012), where the bright state completes one cycle (with the unit vector
// normalised so that Σ_c f_c²|u_c|² = 1), or π per segment for the
// single-loop variant of Herterich and Sjöqvist, Phys. Rev. A 94, 052310
// (2016). After sampling the envelope is rescaled so that the sampled area
// equals the prescribed one to rounding.
//
// # Samples and DAC codes
//
// Sample k holds over [kΔt, (k+1)Δt) (zero-order hold) and carries the
// value of the continuous design at the middle of that interval. Segments
// start on sample boundaries; the total is padded with zero samples at the
// end to a multiple of Hardware.Granularity. DAC codes are signed
// two's-complement integers code = round(x/FullScale·(2^(b−1)−1)) for
// x = I or Q, with halves rounded away from zero; the drive the DAC emits,
// and the one Verify propagates, is code·FullScale/(2^(b−1)−1).
//
// # Verification
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
// # Files
//
// The file formats live in package waveform/wavefile.
package waveform
