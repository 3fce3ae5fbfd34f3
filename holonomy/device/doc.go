// Package device is the physical model a waveform is verified in: levels with
// energies, drive tones with carriers that couple several transitions
// (crosstalk, spectator levels), per-level dissipation in Lindblad form, and
// exact-enough propagation of zero-order-hold waveforms in a rotating frame.
// The holonomy search keeps working on the resonant single-transition
// holonomy.Scheme; a Scheme maps onto a Device exactly (FromScheme), so the
// difference between the two is the effect of everything the Scheme leaves
// out.
//
// # Design note (for wiring into spec language, simulator, budget, report)
//
// Flow: a Device is declared (by a preset or a spec file) → Compile validates
// it and resolves the frame into a Model (immutable, shareable) → a
// Simulator (one per goroutine, allocation-free) propagates control samples
// holonomy.Point{Drive: one complex Ω e^{iφ} per tone, Detuning: one
// controlled detuning per level or nil}, each held dt seconds.
//
// Units: ħ = 1, energies, carriers, Rabi frequencies and detunings in rad/s,
// rates in 1/s, times in s. Files carry frequencies in Hz (HzToRad).
//
// Laboratory Hamiltonian (rotating-wave part): tone j with carrier ω_j and
// complex envelope Ω_j(t) adds, for each listed coupling l→u with factor f,
// (f/2)(Ω_j e^{−iω_j t}|u⟩⟨l| + h.c.) to Σ_k E_k|k⟩⟨k|. Either level of a
// coupling may be any level; u is the one the tone raises.
//
// Frame: one frame frequency F_k per level, ψ_frame,k = e^{iF_k t}ψ_lab,k.
// In the frame
//
//	H(t) = Σ_k (E_k − F_k + δ_k)|k⟩⟨k| + Σ_{j,(l,u)} (f/2)(Ω_j e^{iδ_{j,lu} t}|u⟩⟨l| + h.c.),
//	δ_{j,lu} = (F_u − F_l) − ω_j,
//
// so every coupling of every tone enters with its detuning as a phase e^{iδt}
// (t from the start of the waveform). Device.Frame sets F explicitly;
// DefaultFrame co-rotates with each tone's primary transition (its pinned
// one, else its nearest listed one), which makes resonant tones static and
// crosstalk rotate at its detuning. With CounterRotating each coupling gains
// (f/2)(Ω_j* e^{i(F_u − F_l + ω_j)t}|u⟩⟨l| + h.c.), the other half of a linear
// drive Ω cos(ωt − φ). A Device with Rotating set (FromScheme) is already
// written in a rotating frame: energies are static detunings, carriers 0.
// Model.Terms lists every term with its detuning for reports.
//
// Sub-steps: a sample whose Hamiltonian does not rotate is one exact step
// (this keeps resonant schemes bit for bit as before). Otherwise the sample is
// split into N sub-steps of the fourth-order commutator-free Magnus
// integrator with ν·h ≤ κ (StepPhase, default 1/4), ν the fastest rate in the
// sample; the error is ≤ C κ⁴ ∫a dt with C ≤ 1/1000 (asserted by tests; see
// Simulator for the derivation and the measured values). The total count is
// bounded by MaxSubsteps (default 2²²); past it every method returns a
// *StepLimitError with the numbers before doing any work. A frame far from
// the carriers (the laboratory frame) is what usually trips it.
//
// Dissipation: each level has its own total decay rate Γ_k (Level.Decay), a
// list of destinations with branching ratios (Level.Branches; the remainder
// leaves the model) and its own pure dephasing γ_k (Level.Dephasing,
// collapse operator √(2γ_k)|k⟩⟨k|). The master equation is the Lindblad form
// of holonomy.Lindblad with Decay = Γ, Dephasing = γ and one holonomy.Jump
// (collapse operator √(Γ_k b_km)|m⟩⟨k|) per branch. Nothing is merged: every
// declared rate is one term of its own level, so a budget can switch one
// level's rates off at a time and name the line after the level.
// Simulator.Channel and Simulator.Evolve always use the Lindblad form;
// Simulator.Propagate (pure states) uses the non-Hermitian −iΓ/2 shortcut and
// is refused (ErrNeedsDensityMatrix) unless it is exact: no dephasing and no
// decay that returns to a modelled level (Model.PureStateExact).
// SetQubitT1T2 turns a qubit's T1 and T2 into these rates.
//
// Bad input: Validate and Compile return *FieldError (or *FarCarrierError)
// whose Field is a path in the device's own words ("levels[2].branches",
// "tones[0].carrier"), wrapping one sentinel (ErrShape, ErrValue,
// ErrSelfDecay, ErrBranching, ErrFarCarrier, ErrT2); a spec reader maps the
// path to its file, line and key. A carrier is far from a transition when
// |ω − ω_t| > FarFraction·max(|ω|, |ω_t|) (FarFraction = 1/2); a tone far from
// every transition it lists is refused.
//
// Presets: Transmon (anharmonic ladder with spectator levels, √(n+1)
// factors, tones pinned to 0↔1 and 1↔2 that each drive every transition),
// NV (spin-1, zero-field splitting, one tone per m=0↔±1 transition, each
// driving both; m=0 is the lower level and, for the default {−1, +1} qubit,
// auxiliary), and Tripod, Lambda and Spin, the holonomy presets through
// FromScheme.
package device
