package dispersion

import (
	"fmt"
	"math"
)

// Raman describes a two-photon Raman coupling by two beams of wavelength
// Wavelength crossing at full angle Angle (DESIGN.md §1).
type Raman struct {
	Species    Species
	Wavelength float64 // m (> 0)
	Angle      float64 // full crossing angle α, rad, in (0, π]
	RabiHz     float64 // two-photon Rabi frequency Ω/2π, Hz (≥ 0)
	DetuningHz float64 // two-photon detuning δ/2π, Hz
}

// RamanResult holds the effective model of a Raman scheme and a photon-scattering estimate.
type RamanResult struct {
	Model Model
	// Single-photon detuning Δ/2π from the nearest D line (Hz, signed:
	// positive = blue of the line) and that line's name.
	NearestLine    string
	LineDetuningHz float64
	ScatterRate    float64   // photon scattering rate estimate, 1/s
	ScatterPerER   float64   // ħΓ_sc/E_R: scattering events per ħ/E_R
	HeatingER      float64   // heating rate estimate, E_R per second (2E_R recoil per scattered photon)
	Warnings       []Warning // codes Warn… (WarnNearResonant)
}

// Evaluate computes k_R = (2π/λ) sin(α/2), E_R = ħ²k_R²/2m, Ω/E_R, δ/E_R, and
// a two-level estimate of the photon scattering rate.
//
// Scattering estimate: with two beams of equal single-photon Rabi frequency
// Ω₁ detuned by Δ from one line of width Γ, the two-photon Rabi frequency is
// Ω = Ω₁²/(2Δ) and each beam scatters at Γ Ω₁²/(4Δ²), so the total is
// Γ_sc ≈ Γ Ω/|Δ| (standard far-detuned two-level result, e.g. R. Grimm,
// M. Weidemüller, Yu. B. Ovchinnikov, Adv. At. Mol. Opt. Phys. 42, 95 (2000)).
// It uses the nearest D line only, so it is an order-of-magnitude estimate;
// between D1 and D2 the fine-structure interference makes the true rate for a
// given Ω higher.
func (p Raman) Evaluate() (RamanResult, error) {
	var r RamanResult
	switch {
	case !(p.Wavelength > 0) || math.IsInf(p.Wavelength, 0):
		return r, badf("wavelength must be positive and finite, got %g m", p.Wavelength)
	case !(p.Angle > 0) || p.Angle > math.Pi:
		return r, badf("crossing angle must be in (0, 180] deg, got %g deg", p.Angle*180/math.Pi)
	case !(p.RabiHz >= 0) || math.IsInf(p.RabiHz, 0):
		return r, badf("Rabi frequency must be ≥ 0 and finite, got %g Hz", p.RabiHz)
	case math.IsNaN(p.DetuningHz) || math.IsInf(p.DetuningHz, 0):
		return r, badf("detuning must be finite, got %g Hz", p.DetuningHz)
	}
	kR := 2 * math.Pi / p.Wavelength * math.Sin(p.Angle/2)
	m := p.Species.Mass
	eR := Hbar * Hbar * kR * kR / (2 * m)
	r.Model = Model{Mass: m, KR: kR, ER: eR, OmegaOverER: Planck * p.RabiHz / eR, DeltaOverER: Planck * p.DetuningHz / eR}

	fL := SpeedOfLight / p.Wavelength
	best := math.Inf(1)
	var gamma float64
	for _, l := range p.Species.Lines {
		d := fL - SpeedOfLight/l.Wavelength
		if math.Abs(d) < math.Abs(best) {
			best, gamma, r.NearestLine = d, l.GammaHz, l.Name
		}
	}
	if len(p.Species.Lines) > 0 {
		r.LineDetuningHz = best
		r.ScatterRate = 2 * math.Pi * gamma * p.RabiHz / math.Abs(best)
		r.ScatterPerER = Hbar * r.ScatterRate / eR
		r.HeatingER = 2 * r.ScatterRate
		if math.Abs(best) < 100*gamma {
			r.Warnings = append(r.Warnings, Warning{Code: WarnNearResonant, Text: fmt.Sprintf("the beams are only %.3g GHz from the %s line: near-resonant light, strong heating", best/1e9, r.NearestLine)})
		}
	}
	return r, nil
}
