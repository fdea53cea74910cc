package dispersion

import (
	"errors"
	"math"
)

// ThomasFermi is the Thomas–Fermi estimate for N atoms with contact coupling
// g (J m³) in a harmonic trap of frequencies f_x, f_y, f_z (Hz):
//
//	μ = (ħω̄/2)(15 N a/a_ho)^{2/5},  ω̄ = (ω_x ω_y ω_z)^{1/3},
//	a_ho = √(ħ/mω̄),  a = m g/(4πħ²),  n₀ = μ/g,  R_i = √(2μ/mω_i²)
//
// (C. J. Pethick and H. Smith, Bose–Einstein Condensation in Dilute Gases,
// chapter 6). For a balanced two-component gas use
// g = (g↑↑ + g↓↓ + 2g↑↓)/4, the coupling of the total density.
type ThomasFermi struct {
	Mu    float64    // chemical potential, J
	Peak  float64    // peak density n₀, m⁻³
	Radii [3]float64 // Thomas–Fermi radii, m
}

// NewThomasFermi evaluates the Thomas–Fermi estimate.
func NewThomasFermi(mass, g, atoms float64, trapHz [3]float64) (ThomasFermi, error) {
	var tf ThomasFermi
	if !(mass > 0) || !(g > 0) || !(atoms > 0) {
		return tf, errors.New("Thomas–Fermi estimate needs positive mass, coupling and atom number")
	}
	wbar := 1.0
	for _, f := range trapHz {
		if !(f > 0) || math.IsInf(f, 0) {
			return tf, errors.New("trap frequencies must be positive and finite")
		}
		wbar *= 2 * math.Pi * f
	}
	wbar = math.Cbrt(wbar)
	aho := math.Sqrt(Hbar / (mass * wbar))
	a := mass * g / (4 * math.Pi * Hbar * Hbar)
	tf.Mu = Hbar * wbar / 2 * math.Pow(15*atoms*a/aho, 0.4)
	tf.Peak = tf.Mu / g
	for i, f := range trapHz {
		w := 2 * math.Pi * f
		tf.Radii[i] = math.Sqrt(2 * tf.Mu / (mass * w * w))
	}
	return tf, nil
}

// PairCoupling is g = (g↑↑ + g↓↓ + 2g↑↓)/4, the coupling of the total
// density in a balanced two-component gas (n↑ = n↓ = n/2 in E_int).
func (c Couplings) PairCoupling() float64 { return (c.Guu + c.Gdd + 2*c.Gud) / 4 }
