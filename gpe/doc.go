// Package gpe finds ground states of the spinor (two-component)
// Gross–Pitaevskii equation of a spin–orbit-coupled condensate on a periodic
// grid in one, two or three dimensions.
//
// # Units and conventions
//
// Internal units (DESIGN.md §1): momentum in k_R, length in 1/k_R, energy in
// E_R = ħ²k_R²/2m, time in ħ/E_R. In these units ħ = 1 and the atomic mass is
// m = 1/2, and the single-particle Hamiltonian reads
//
//	h = (k_x − σ_z)² + k_y² + k_z² + V(r) + (Ω/2) σ_x + (δ/2) σ_z
//
// (component 0 = |↑⟩ with σ_z = +1, component 1 = |↓⟩). A harmonic trap
// ½mω²x² is V = ω²x²/4 with ω in E_R/ħ, and its oscillator length is
// a_ho = √(2/ω) in 1/k_R.
//
// The energy functional is
//
//	E[ψ] = ∫ ψ† h ψ + ½g↑↑|ψ↑|⁴ + ½g↓↓|ψ↓|⁴ + g↑↓|ψ↑|²|ψ↓|²  dV
//
// with the wavefunction normalised to ∫(|ψ↑|²+|ψ↓|²) dV = Model.Norm
// (normally the atom number N) and the couplings g_ij in E_R·(1/k_R)^d,
// d the dimension of the grid. This is the one convention of the package.
// Two helpers fill a Model in it:
//
//   - UniformBox: for a uniform system given n·g_ij in E_R, the norm is set to
//     the box volume (mean density 1) and g_ij = n·g_ij, so that the energy per
//     particle is the usual uniform-gas energy per particle.
//   - Trapped: N atoms with g's from s-wave scattering lengths in SI, in 3D or
//     with the reduced 1D/2D couplings for tight transverse confinement.
//
// Energies reported per particle are E/Norm. The chemical potential is
// μ = ⟨ψ, H[ψ]ψ⟩/Norm with H[ψ] the Gross–Pitaevskii operator
// h + diag(g↑↑n↑ + g↑↓n↓, g↓↓n↓ + g↑↓n↑). The residual is
//
//	‖H[ψ]ψ − μψ‖ = ( ∫ |H[ψ]ψ − μψ|² dV / ∫ |ψ|² dV )^{1/2}   (in E_R),
//
// independent of the normalisation; it vanishes exactly at a stationary state.
//
// # Solver
//
// Solve runs Strang split-step imaginary-time evolution with renormalisation
// (normalised gradient flow), lowering Δτ as it converges, and finishes with a
// preconditioned nonlinear conjugate gradient on the constraint sphere
// (X. Antoine, A. Levitt, Q. Tang, J. Comput. Phys. 343 (2017) 92) whose fixed
// point is the exact discrete stationary state; see Settings.
package gpe
