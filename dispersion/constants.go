// Package dispersion turns the settings of a spin–orbit-coupling scheme into
// the parameters of the effective model and computes its single-particle bands.
//
// The effective model (DESIGN.md §1) is
//
//	h = ħ²(k_x − k_R σ_z)²/2m + ħ²k_⊥²/2m + V(r) + (ħΩ/2) σ_x + (ħδ/2) σ_z,
//
// with recoil energy E_R = ħ²k_R²/2m. Two schemes lead to it: gradient shaking
// with phase-locked RF pulses (Shake) and a two-beam Raman scheme (Raman).
// Atomic data and the Breit–Rabi formula for the J = 1/2 ground state are in
// atoms.go. SI units throughout, unless a name says otherwise (…Hz, …OverER).
package dispersion

import "math"

// Physical constants, CODATA 2018 recommended values (exact where the 2019 SI
// fixes them). Checked against scipy.constants (SciPy's CODATA 2018 table) by
// testdata/ref_constants.py.
const (
	Planck             = 6.62607015e-34                // h, J s (exact)
	Hbar               = Planck / (2 * math.Pi)        // ħ, J s
	SpeedOfLight       = 299792458.0                   // c, m/s (exact)
	BohrMagneton       = 9.2740100783e-24              // μ_B, J/T
	AtomicMass         = 1.66053906660e-27             // u, kg
	BohrRadius         = 5.29177210903e-11             // a_B, m
	Boltzmann          = 1.380649e-23                  // k_B, J/K (exact)
	Gauss              = 1e-4                          // T
	BohrMagnetonHzPerG = BohrMagneton * Gauss / Planck // μ_B/h ≈ 1.399 624 MHz/G
)
