package gpe

import (
	"math"

	"socmap/dispersion"
)

// LowerBand returns the lower single-particle band of the uniform SOC
// Hamiltonian at momentum k (k_R) and its spinor (ψ↑, ψ↓):
//
//	h(k) = k² + 1 + h_z σ_z + h_x σ_x,  h_z = δ/2 − 2k,  h_x = Ω/2,
//	E₋(k) = k² + 1 − √(h_z² + h_x²)
//
// (expanding (k − σ_z)² = k² + 1 − 2kσ_z; DESIGN.md §1). The spinor is real,
// normalised, with ψ↑ ≥ 0.
func LowerBand(k, omega, delta float64) (e float64, up, down float64) {
	hz, hx := delta/2-2*k, omega/2
	b := math.Hypot(hz, hx)
	e = k*k + 1 - b
	// two forms of the eigenvector of eigenvalue −b; take the better
	// conditioned one.
	u1, d1 := hx, -(hz + b)
	u2, d2 := b-hz, -hx
	if u1*u1+d1*d1 >= u2*u2+d2*d2 {
		up, down = u1, d1
	} else {
		up, down = u2, d2
	}
	n := math.Hypot(up, down)
	up, down = up/n, down/n
	if up < 0 || (up == 0 && down < 0) {
		up, down = -up, -down
	}
	return
}

// BandMinima returns the momenta (k_R, ascending) of the local minima of the
// lower band, one or two, from dispersion.Bands (the one band analysis of the
// project). At δ = 0 they are ±√(1 − (Ω/4)²) for Ω < 4 and 0 otherwise
// (DESIGN.md §1; Y.-J. Lin, K. Jiménez-García, I. B. Spielman, Nature 471, 83
// (2011); citation from memory).
func BandMinima(omega, delta float64) []float64 {
	info, err := dispersion.Bands{Omega: omega, Delta: delta}.Analyze()
	if err != nil {
		return nil
	}
	out := make([]float64, len(info.Minima))
	for i, m := range info.Minima {
		out[i] = m.K
	}
	return out
}
