package gpe

import "math"

// ThomasFermiMu returns the Thomas–Fermi chemical potential (E_R, measured
// from the bottom of the trap) of Norm atoms with coupling g in the harmonic
// trap of m, for a condensate in one state with coupling g. With V = Σ ω_a²x_a²/4 and
// n = (μ − V)/g inside the cloud, integrating n over the ellipsoid gives
//
//	1D: N = 8μ^{3/2}/(3gω)               → μ = (3Ngω/8)^{2/3}
//	2D: N = 2πμ²/(g ω_x ω_y)             → μ = (Ng ω_x ω_y/2π)^{1/2}
//	3D: N = 64πμ^{5/2}/(15 g ω_xω_yω_z)  → μ = (15Ng ω_xω_yω_z/64π)^{2/5}
//
// (derived here; the 3D form equals μ = ½ħω̄(15Na/ā)^{2/5} of C. J. Pethick
// and H. Smith, Bose–Einstein Condensation in Dilute Gases (2002), eq. (6.35),
// equation number from memory). The coupling used is Model.Guu (the state
// the TF checks fill); use ThomasFermiMuG for another one. Returns 0 when
// the model has no harmonic trap or g ≤ 0.
func ThomasFermiMu(dim int, m Model) float64 {
	return ThomasFermiMuG(dim, m, m.Guu)
}

// ThomasFermiMuG is ThomasFermiMu with an explicit coupling g.
func ThomasFermiMuG(dim int, m Model, g float64) float64 {
	if m.Potential.Kind != Harmonic || !(g > 0) {
		return 0
	}
	w := m.Potential.AngularFreq
	N := m.Norm
	switch dim {
	case 1:
		return math.Pow(3*N*g*w[0]/8, 2.0/3)
	case 2:
		return math.Sqrt(N * g * w[0] * w[1] / (2 * math.Pi))
	case 3:
		return math.Pow(15*N*g*w[0]*w[1]*w[2]/(64*math.Pi), 0.4)
	}
	return 0
}

// ThomasFermiRadii returns the TF radii R_a = 2√μ/ω_a (1/k_R) for μ in E_R.
func ThomasFermiRadii(dim int, m Model, mu float64) [3]float64 {
	var r [3]float64
	for a := 0; a < dim; a++ {
		r[a] = 2 * math.Sqrt(mu) / m.Potential.AngularFreq[a]
	}
	return r
}
