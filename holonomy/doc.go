// Package holonomy is the numerical core of loopgate: level schemes as
// coupling graphs, small complex Hermitian eigendecompositions, Wilczek–Zee
// holonomies of closed loops in control space, curvature and flux, and exact
// propagation of piecewise-constant Hamiltonians.
//
// # Conventions
//
// ħ = 1: Hamiltonians, Rabi frequencies and detunings are angular
// frequencies in rad/s and times are in seconds. (Files written by loopgate
// carry frequencies in Hz, meaning Ω/2π, and are converted at the boundary.)
// A drive channel c joining a lower level l to an upper level u, with Rabi
// frequency Ω_c, phase φ_c and matrix-element factor f_c, adds
//
//	(f_c Ω_c/2)(e^{iφ_c}|u⟩⟨l| + e^{−iφ_c}|l⟩⟨u|)
//
// to H, and a level detuning Δ_k adds Δ_k|k⟩⟨k|. Propagators are
// U = T exp(−i∫H dt); a zero-order-hold waveform gives U = Π_k exp(−iH_kΔt).
//
// Geometric phases follow Berry, Proc. R. Soc. A 392, 45 (1984): an
// eigenstate carried adiabatically around a closed loop C acquires
// γ = i∮⟨n|∇n⟩·dR, and the non-Abelian generalisation (Wilczek and Zee,
// Phys. Rev. Lett. 52, 2111 (1984)) is the path-ordered exponential of the
// connection A_ab = i⟨a|∇b⟩ over a degenerate subspace. With these signs a
// spin-½ aligned with a field whose direction circles a cone of polar angle θ
// acquires γ = −π(1 − cos θ), i.e. minus half the solid angle.
//
// Average gate fidelity on the computational subspace, including leakage,
// follows Pedersen, Møller and Mølmer, Phys. Lett. A 367, 47 (2007):
//
//	F = (Tr(M†M) + |Tr M|²) / (d(d+1)),  M = P U_target† U P,
//
// and leakage is 1 − Tr(M†M)/d.
package holonomy
