// Package optimize searches for closed loops in control space whose
// holonomy is a requested single-qubit gate.
//
// # Unit scale
//
// Everything here works on unit-scale controls: a loop maps s ∈ [0, 1] to a
// control point whose drive vector is normalised, Σ_c |Drive_c|² = 1, in
// units where the peak Rabi frequency is 1 (so detunings and times are in
// units of the peak Rabi frequency and its inverse). The waveform stage later
// multiplies the drive by a physical amplitude envelope A(t) and chooses the
// schedule s(t).
//
// # Loops
//
// A Sphere describes the control sphere: the unit sphere of complex drive
// vectors over a scheme's channels (dark-state schemes such as the tripod),
// its real subsphere, or the sphere of field directions of a spin scheme.
// Every sphere has a base point where the working subspace is the
// computational pair. Shapes (Fourier and Polygon) are loop families on a
// sphere, closed by construction, starting and ending at the base point.
//
// # Search
//
// Search minimises the holonomy infidelity plus penalties over a Shape's
// parameters with the Nelder–Mead simplex method (Nelder and Mead,
// Comput. J. 7, 308 (1965)) from gonum, restarted from seeded random points.
// Before it searches it decides with Reachability whether the scheme's loops
// can produce the target at all, and refuses with an *UnreachableError when
// they cannot. LambdaSearch designs the nonadiabatic Λ gate (Sjöqvist et al.,
// New J. Phys. 14, 103035 (2012); Herterich and Sjöqvist, Phys. Rev. A 94,
// 052310 (2016)), for which LambdaClosedForm gives the exact answer.
//
// An Ensemble of perturbations (amplitude scale errors, detunings) turns either
// search into a robust design that minimises the mean infidelity over the
// ensemble, and reports the change against the nominal design.
//
// Package optimize imports only package holonomy of loopgate.
package optimize
