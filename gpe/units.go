package gpe

import (
	"fmt"
	"math"

	"socmap/dispersion"
)

// Units converts between the internal units (k_R, 1/k_R, E_R, ħ/E_R) and SI
// for one recoil momentum k_R (in 1/m) and recoil energy E_R (in J). The SI
// constants are the project's one set, in package dispersion (CODATA 2018).
type Units struct {
	KR float64 // recoil wavenumber k_R in 1/m
	ER float64 // recoil energy E_R in J
}

// NewUnits returns Units for k_R in 1/m and E_R in joule.
func NewUnits(kR, eRJoule float64) (Units, error) {
	if !(kR > 0) || !(eRJoule > 0) || math.IsInf(kR, 0) || math.IsInf(eRJoule, 0) {
		return Units{}, fmt.Errorf("gpe: units need k_R > 0 and E_R > 0 (got %g 1/m, %g J)", kR, eRJoule)
	}
	return Units{KR: kR, ER: eRJoule}, nil
}

// UnitsHz returns Units for k_R in 1/m and E_R/h in Hz.
func UnitsHz(kR, eRHz float64) (Units, error) { return NewUnits(kR, eRHz*dispersion.Planck) }

// UnitsMass returns Units for k_R in 1/m and the atomic mass in kg, with
// E_R = ħ²k_R²/2m.
func UnitsMass(kR, massKg float64) (Units, error) {
	return NewUnits(kR, dispersion.Hbar*dispersion.Hbar*kR*kR/(2*massKg))
}

// Mass returns the atomic mass m = ħ²k_R²/(2E_R) in kg.
func (u Units) Mass() float64 { return dispersion.Hbar * dispersion.Hbar * u.KR * u.KR / (2 * u.ER) }

// LengthSI converts a length from 1/k_R to metres.
func (u Units) LengthSI(x float64) float64 { return x / u.KR }

// Length converts metres to 1/k_R.
func (u Units) Length(m float64) float64 { return m * u.KR }

// EnergyHz converts an energy from E_R to Hz (E/h).
func (u Units) EnergyHz(e float64) float64 { return e * u.ER / dispersion.Planck }

// EnergyFromHz converts E/h in Hz to E_R.
func (u Units) EnergyFromHz(f float64) float64 { return f * dispersion.Planck / u.ER }

// TimeSI converts a time from ħ/E_R to seconds.
func (u Units) TimeSI(t float64) float64 { return t * dispersion.Hbar / u.ER }

// AngularFromHz converts a trap frequency f (Hz, ω = 2πf) to ω in E_R/ħ:
// ħω/E_R = h f/E_R.
func (u Units) AngularFromHz(f float64) float64 { return f * dispersion.Planck / u.ER }

// Coupling3D returns g = 4πħ²a/m for an s-wave scattering length a (m) in
// internal units E_R·(1/k_R)³: g/(E_R k_R⁻³) = 8π a k_R (since
// ħ²/m = 2E_R/k_R²). Source of g: DESIGN.md §1 and C. J. Pethick and
// H. Smith, Bose–Einstein Condensation in Dilute Gases (2002), eq. (5.34)
// (equation number from memory).
func (u Units) Coupling3D(a float64) float64 { return 8 * math.Pi * a * u.KR }

// OscillatorLength returns a_ho = √(ħ/mω) in 1/k_R for ω in E_R/ħ: √(2/ω).
func OscillatorLength(omega float64) float64 { return math.Sqrt(2 / omega) }

// Reduce1D converts a 3D coupling g (E_R k_R⁻³) to the 1D coupling of a gas
// in a tight transverse harmonic trap of frequency ωperp (E_R/ħ):
// g_1D = g/(2π a⊥²) (DESIGN.md §1; M. Olshanii, Phys. Rev. Lett. 81, 938 (1998), citation from memory,
// weak-coupling limit), in E_R·(1/k_R).
func Reduce1D(g, omegaPerp float64) float64 {
	a := OscillatorLength(omegaPerp)
	return g / (2 * math.Pi * a * a)
}

// Reduce2D converts a 3D coupling g to the 2D coupling of a gas in a tight
// axial harmonic trap of frequency ωz (E_R/ħ): g_2D = g/(√(2π) a_z)
// (DESIGN.md §1; D. S. Petrov, M. Holzmann, G. V. Shlyapnikov,
// Phys. Rev. Lett. 84, 2551 (2000), citation from memory, weak-coupling limit), in E_R·(1/k_R)².
func Reduce2D(g, omegaZ float64) float64 {
	return g / (math.Sqrt(2*math.Pi) * OscillatorLength(omegaZ))
}
