package dispersion

import "math"

// Model is the effective single-particle model
//
//	h = ħ²(k_x − k_R σ_z)²/2m + (ħΩ/2) σ_x + (ħδ/2) σ_z
//
// in the units of the solvers: energies in E_R = ħ²k_R²/2m, momenta in k_R.
type Model struct {
	Mass        float64 // kg
	KR          float64 // k_R, 1/m (signed: its sign is that of the momentum transfer k_t = 2k_R)
	ER          float64 // E_R, J
	OmegaOverER float64 // ħΩ/E_R
	DeltaOverER float64 // ħδ/E_R
}

// ERHz is E_R/h in Hz.
func (m Model) ERHz() float64 { return m.ER / Planck }

// LengthUnit is 1/|k_R| in m, the solvers' unit of length.
func (m Model) LengthUnit() float64 { return 1 / math.Abs(m.KR) }

// TimeUnit is ħ/E_R in s, the solvers' unit of time.
func (m Model) TimeUnit() float64 { return Hbar / m.ER }
