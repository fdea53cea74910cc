package dispersion

import (
	"fmt"
	"math"
)

// Raman describes a two-photon Raman coupling by two beams of wavelength
// Wavelength crossing at full angle Angle (DESIGN.md, "Raman scheme").
//
// The pair and the bias field do not change the effective model; they fix
// the spin matrix element and the single-photon detunings of the scattering
// estimate, the two-photon frequency the beams need and the isolation of the
// pair from the other sublevels. They are therefore not among Settings (map
// identities do not depend on them).
type Raman struct {
	Species    Species
	Wavelength float64 // vacuum wavelength of the beams, m (> 0)
	Angle      float64 // full crossing angle α, rad, in (0, π]
	RabiHz     float64 // two-photon Rabi frequency Ω/2π, Hz (≥ 0)
	DetuningHz float64 // two-photon detuning δ/2π, Hz
	// Up, Down: the pseudo-spin pair (valid sublevels of Species with
	// |Δm| ≤ 1, Δm = 0 only across the two manifolds). Both zero (the
	// default): no pair given; then the scattering estimate takes the
	// largest spin matrix element, 1, and detunings from the ground centre of
	// gravity, and the frequency and isolation figures are not computed.
	Up, Down Sublevel
	// Bias: the bias field B0 in T (≥ 0; with a pair). Default 0.
	Bias float64
}

// HasPair reports whether p names a pseudo-spin pair (Up, Down not both zero).
func (p Raman) HasPair() bool { return p.Up != (Sublevel{}) || p.Down != (Sublevel{}) }

// RamanResult holds the effective model of a Raman scheme, the two-line
// photon-scattering estimate and, with a pair, the two-photon frequency and
// the pair's isolation.
type RamanResult struct {
	Model Model
	// NearestLine and LineDetuningHz: the D line with the smaller |Δ| and Δ/2π
	// from it (Hz, signed: + = blue), as DetuningD1Hz/DetuningD2Hz.
	NearestLine    string
	LineDetuningHz float64
	// DetuningD1Hz, DetuningD2Hz: single-photon detunings Δ/2π from each line
	// as seen from ↑ (the ground centre of gravity without a pair), Hz.
	DetuningD1Hz, DetuningD2Hz float64
	// FineStructureHz: ν_D2 − ν_D1, Hz.
	FineStructureHz float64
	// MatrixElement: |⟨↓|σ_q|↑⟩| (SpinMatrixElement at Bias; 1 without a pair).
	MatrixElement float64
	// BeamIntensity: the intensity of each beam (equal intensities) that
	// gives Ω in the best linear-polarisation geometry, W/m².
	BeamIntensity float64
	// BeamRabiHz: the single-beam Rabi frequency Ω_b/2π on the doublet, Hz.
	BeamRabiHz float64
	// ScatterRate: photons scattered per atom per second from both beams, 1/s.
	ScatterRate float64
	// ScatterPerRabi: Γ_sc/Ω (Ω in rad/s), independent of the intensity.
	ScatterPerRabi float64
	// FineStructureLimit: Γ_sc/Ω for |Δ| ≫ Δ_FS at this wavelength,
	// 3Γ̄(ω/ω̄)²/(s·|Δ′_FS|) with Γ̄ = Γ(ω̄) ≈ (Γ₁ + 2Γ₂)/3 and Δ′_FS = Δ_FS +
	// η(ω̄² − ω²)/(2ω̄), η = x₁ − x₂ the lines' strength difference (the vector
	// coupling nearly cancels between the lines). Not a floor: far into the
	// red it falls as (ω/ω̄)² (and with η, for 87Rb, a little faster); in the
	// RWA (x₁Γ₁ + 2x₂Γ₂)/(s|Δ_FS − ηΔ|), Δ = ω − ω̄ (for η = 0 the constant
	// (Γ₁ + 2Γ₂)/(s·Δ_FS)).
	FineStructureLimit float64
	ScatterPerER       float64 // ħΓ_sc/E_R: scattering events per ħ/E_R
	// HeatingER: heating 2E_rec per scattered photon, E_rec = ħ²(2π/λ)²/2m
	// the single-photon recoil, in E_R per second.
	HeatingER float64
	// BeamIntensityRWA, ScatterPerRabiRWA: BeamIntensity and ScatterPerRabi
	// in the rotating-wave approximation (DLineShift.VectorRWA, ScatterRWA),
	// for comparison; near the lines they differ from the full values by
	// O(|Δ|/ω), at 1064 nm for 87Rb by −2.7 % and +83 %.
	BeamIntensityRWA, ScatterPerRabiRWA float64
	// TwoPhotonHz: |f₀| = |E↓ − E↑|/h at the bias (Breit–Rabi), the beams'
	// frequency difference at two-photon resonance, Hz (NaN without a pair).
	TwoPhotonHz float64
	// BeamDifferenceHz: the frequency difference that gives the planned
	// detuning, |f₀| + sgn(f₀)·δ/2π (δ/2π = sgn(f₀)(Δf − |f₀|), the sign
	// convention of the RF detuning), Hz (NaN without a pair).
	BeamDifferenceHz float64
	// QuadZeemanHz: q/h of the pair's manifold (pairs inside one manifold
	// with m = 0, ±1 in it), Hz; NaN otherwise.
	QuadZeemanHz float64
	// Neighbour: the nearest other two-photon (Δm = ±1) transition from ↑ or
	// ↓ inside the manifold, e.g. "|1,0> → |1,+1>" ("" if none);
	// NeighbourHz its distance from two-photon resonance, | |f_n| − |f₀| |
	// (2|q|/h in an F = 1 manifold); NeighbourRabiHz the Raman Rabi
	// frequency on it (Ω times the ratio of the spin matrix elements). NaN
	// without a neighbour.
	Neighbour                    string
	NeighbourHz, NeighbourRabiHz float64
	// Isolation: NeighbourHz/NeighbourRabiHz (+Inf at Ω = 0; NaN without a
	// neighbour). Leakage: the largest population an off-resonant Rabi
	// oscillation moves to the neighbour, Ω_n²/(Ω_n² + δ_n²) (two-level
	// estimate; the extra photon recoil of the neighbour, a few E_R, is not
	// included).
	Isolation, Leakage float64
	Warnings           []Warning // codes Warn… (WarnNearResonant, WarnNeighbour)
}

// Evaluate computes k_R = (2π/λ) sin(α/2), E_R = ħ²k_R²/2m, Ω/E_R, δ/E_R,
// the photon scattering of the beams from the two D lines and, with a pair,
// the two-photon frequency and the isolation of the pair.
//
// Scattering (two-line model with both time orderings, see
// DLineLightShift). Between Zeeman sublevels the Raman coupling is the vector
// part of the light shift: for beam intensities I₁, I₂ and real (linear)
// polarisations ħΩ/2 = √(I₁I₂)|u_v|·s·|n|, n = ε₂×ε₁ with its component
// perpendicular (Δm = ±1) or parallel (Δm = 0) to the bias, s = |⟨↓|σ_q|↑⟩|.
// The estimate takes |n| = 1 (orthogonal polarisations, the best geometry:
// any other needs more intensity) and equal intensities (the least
// scattering for a given Ω₁Ω₂). With a_s, a_v the rank-0 and rank-1
// amplitudes of DLineLightShift (a_v = (1/3)[x₁(1/Δ₁ − 1/Δ̃₁) − x₂(1/Δ₂ − 1/Δ̃₂)],
// x_J' each line's own strength relative to the doublet's)
//
//	Ω = (Ω_b²/2) s |a_v|,   Γ_sc = (Ω_b²/2) Γ(ω)(a_s² + 2a_v²),
//	Γ_sc/Ω = Γ(ω)(a_s² + 2a_v²) / (s |a_v|)
//
// (all angular frequencies). In the RWA (1/Δ̃ dropped, each line decaying
// with its own Γ) Γ_sc/Ω = (x₁Γ₁/Δ₁² + 2x₂Γ₂/Δ₂²) / (s |x₁/Δ₁ − x₂/Δ₂|):
// near one line 2Γ/(s|Δ|) (D2) or Γ/(s|Δ|) (D1). Far from both lines (|Δ| ≫
// Δ_FS; Δ + Δ̃ = −2ω̄, Δ − Δ̃ = 2ω, Δ̄ = ω − ω̄), a_s ≈ 1/Δ + 1/Δ̃ = 2ω̄/(ω² − ω̄²)
// and (DLineLightShift) a_v ≈ (1/3)(2ω/|ω² − ω̄²|)·Δ′_FS·2ω̄/|ω̄² − ω²|, with
// Δ′_FS = Δ_FS + η(ω̄² − ω²)/(2ω̄) and η = x₁ − x₂, so Γ_sc/Ω → Γ(ω)a_s²/(s a_v)
// = 3Γ̄(ω/ω̄)²/(s|Δ′_FS|): for η = 0 the RWA's constant (Γ₁ + 2Γ₂)/(sΔ_FS)
// times (ω/ω̄)², 0.54 at 1064 nm for 87Rb; η (0.0025 for 87Rb) makes Δ′_FS
// 3.1 % larger than Δ_FS at 1064 nm, 5.1 % at 1560 nm (in the RWA Δ_FS −
// ηΔ̄). Warnings:
// WarnNearResonant when either |Δ_J'| is below NearResonanceLinewidths·Γ_J'
// or NearResonanceHFS times the hyperfine structure the model leaves out.
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
	case !(p.Bias >= 0) || math.IsInf(p.Bias, 0):
		return r, badf("bias field must be ≥ 0 and finite, got %g T", p.Bias)
	}
	sp := p.Species
	pair := p.HasPair()
	if pair {
		for _, l := range []Sublevel{p.Up, p.Down} {
			if err := sp.Validate(l); err != nil {
				return r, badf("%v", err)
			}
		}
		if err := RamanPairAllowed(p.Up, p.Down); err != nil {
			return r, err
		}
	}
	kR := 2 * math.Pi / p.Wavelength * math.Sin(p.Angle/2)
	m := sp.Mass
	eR := Hbar * Hbar * kR * kR / (2 * m)
	r.Model = Model{Mass: m, KR: kR, ER: eR, OmegaOverER: Planck * p.RabiHz / eR, DeltaOverER: Planck * p.DetuningHz / eR}
	nan := math.NaN()
	r.TwoPhotonHz, r.BeamDifferenceHz, r.QuadZeemanHz = nan, nan, nan
	r.NeighbourHz, r.NeighbourRabiHz, r.Isolation, r.Leakage = nan, nan, nan, nan
	r.LineDetuningHz, r.ScatterPerRabi, r.FineStructureLimit = nan, nan, nan
	r.DetuningD1Hz, r.DetuningD2Hz, r.FineStructureHz = nan, nan, nan
	r.BeamIntensity, r.BeamRabiHz = nan, nan
	r.BeamIntensityRWA, r.ScatterPerRabiRWA = nan, nan

	// The ground level the detunings are measured from, and the spin matrix element.
	groundJ, s := 0.0, 1.0
	if pair {
		groundJ = sp.Energy(p.Up, p.Bias)
		var err error
		if s, err = sp.SpinMatrixElement(p.Up, p.Down, p.Bias); err != nil {
			return r, err
		}
		f0 := sp.TransitionHz(p.Up, p.Down, p.Bias)
		r.TwoPhotonHz = math.Abs(f0)
		r.BeamDifferenceHz = math.Abs(f0) + math.Copysign(1, f0)*p.DetuningHz
		p.isolation(&r, s)
	}
	r.MatrixElement = s

	if d, err := sp.DLineLightShift(p.Wavelength, groundJ); err == nil {
		r.DetuningD1Hz, r.DetuningD2Hz, r.FineStructureHz = d.DetuningD1Hz, d.DetuningD2Hz, d.FineStructureHz
		r.NearestLine, r.LineDetuningHz = "D1", d.DetuningD1Hz
		if math.Abs(d.DetuningD2Hz) < math.Abs(d.DetuningD1Hz) {
			r.NearestLine, r.LineDetuningHz = "D2", d.DetuningD2Hz
		}
		omega := 2 * math.Pi * p.RabiHz
		// ħΩ/2 = I|u_v|s (equal intensities, |n| = 1).
		r.BeamIntensity = Hbar * omega / (2 * math.Abs(d.Vector) * s)
		r.BeamRabiHz = math.Sqrt(d.RabiSqPerIntensity*r.BeamIntensity) / (2 * math.Pi)
		r.ScatterRate = 2 * d.Scatter * r.BeamIntensity
		r.ScatterPerRabi = 2 * d.Scatter * Hbar / (2 * math.Abs(d.Vector) * s)
		r.BeamIntensityRWA = Hbar * omega / (2 * math.Abs(d.VectorRWA) * s)
		r.ScatterPerRabiRWA = 2 * d.ScatterRWA * Hbar / (2 * math.Abs(d.VectorRWA) * s)
		d1, d2, _ := sp.lines()
		// 3Γ(ω)(ω̄/ω)/(s Δ′_FS) = 3Γ̄(ω/ω̄)²/(s Δ′_FS), Δ′_FS = Δ_FS + η(ω̄² − ω²)/(2ω̄).
		nu := SpeedOfLight / p.Wavelength
		eta := d.WeightD1 - d.WeightD2
		fsEff := d.FineStructureHz + eta*(d.CentreHz*d.CentreHz-nu*nu)/(2*d.CentreHz)
		r.FineStructureLimit = 3 * d.GammaHz * d.CentreHz / nu / (s * math.Abs(fsEff))
		r.ScatterPerER = Hbar * r.ScatterRate / eR
		kL := 2 * math.Pi / p.Wavelength
		eRec := Hbar * Hbar * kL * kL / (2 * m)
		r.HeatingER = 2 * eRec / eR * r.ScatterRate
		p.resonanceWarnings(&r, d1, d2)
	}
	if !math.IsNaN(r.NeighbourHz) && p.RabiHz > 0 && r.NeighbourHz < NeighbourSeparation*r.NeighbourRabiHz {
		r.Warnings = append(r.Warnings, Warning{Code: WarnNeighbour, Text: fmt.Sprintf(
			"the nearest other two-photon transition %s is only %.3g kHz from resonance against its Raman Rabi frequency %.3g kHz (want ≥ %g×): atoms leak to the third sublevel (up to %.2g of them); raise the bias field (quadratic Zeeman shift) or lower Ω",
			r.Neighbour, r.NeighbourHz/1e3, r.NeighbourRabiHz/1e3, NeighbourSeparation, r.Leakage)})
	}
	return r, nil
}

// RamanPairAllowed checks that a far-detuned two-beam Raman transition
// couples up and down: different sublevels with |Δm| = 1, or Δm = 0 across
// the two manifolds (the coupling is the rank-1 part of the light shift;
// the rank-2 part that would give |Δm| = 2 vanishes when the excited
// hyperfine structure is unresolved).
func RamanPairAllowed(up, down Sublevel) error {
	dm := absInt(up.M - down.M)
	switch {
	case up == down:
		return badf("the two sublevels are the same (%v)", up)
	case dm > 1:
		return badf("sublevels %v and %v differ by |Δm| = %d: a far-detuned Raman pair needs |Δm| = 1 (or Δm = 0 between the two manifolds)", up, down, dm)
	case dm == 0 && up.F == down.F:
		return badf("sublevels %v and %v: Δm = 0 inside one manifold is not a Raman pair", up, down)
	}
	return nil
}

// isolation fills the two-photon neighbour of an intra-manifold |Δm| = 1 pair.
func (p Raman) isolation(r *RamanResult, s float64) {
	sp := p.Species
	up, down := p.Up, p.Down
	if up.F != down.F || absInt(up.M-down.M) != 1 {
		return
	}
	if up.F >= 1 {
		r.QuadZeemanHz = sp.QuadraticZeemanHz(up.F, p.Bias)
	}
	f0 := math.Abs(sp.TransitionHz(up, down, p.Bias))
	best := math.Inf(1)
	var from, to Sublevel
	for _, st := range []Sublevel{up, down} {
		for _, dm := range []int{-1, 1} {
			o := Sublevel{st.F, st.M + dm}
			if o == up || o == down || o.M < -o.F || o.M > o.F {
				continue
			}
			if d := math.Abs(math.Abs(sp.TransitionHz(st, o, p.Bias)) - f0); d < best {
				best, from, to = d, st, o
			}
		}
	}
	if math.IsInf(best, 1) {
		return
	}
	sn, err := sp.SpinMatrixElement(from, to, p.Bias)
	if err != nil {
		return
	}
	r.Neighbour = fmt.Sprintf("%v → %v", from, to)
	r.NeighbourHz = best
	r.NeighbourRabiHz = p.RabiHz * sn / s
	r.Isolation = math.Inf(1)
	if r.NeighbourRabiHz > 0 {
		r.Isolation = best / r.NeighbourRabiHz
	}
	on2 := r.NeighbourRabiHz * r.NeighbourRabiHz
	r.Leakage = on2 / (on2 + best*best)
}

// resonanceWarnings adds WarnNearResonant for either line.
func (p Raman) resonanceWarnings(r *RamanResult, d1, d2 Line) {
	ground := 0.0
	if !p.HasPair() || p.Up.F != p.Down.F {
		ground = p.Species.HFSHz
	}
	for _, x := range []struct {
		l   Line
		det float64
	}{{d1, r.DetuningD1Hz}, {d2, r.DetuningD2Hz}} {
		lim := math.Max(NearResonanceLinewidths*x.l.GammaHz, NearResonanceHFS*(x.l.HFSSpanHz+ground))
		if math.Abs(x.det) < lim {
			from := "↑"
			if !p.HasPair() {
				from = "the ground centre of gravity"
			}
			r.Warnings = append(r.Warnings, Warning{Code: WarnNearResonant, Text: fmt.Sprintf(
				"the beams are only %+.4g GHz from the %s line (seen from %s; need |Δ| ≥ %.3g GHz = max(%g Γ, %g × the unresolved hyperfine structure)): near-resonant light, strong heating, and the far-detuned scattering estimate does not hold",
				x.det/1e9, x.l.Name, from, lim/1e9, NearResonanceLinewidths, NearResonanceHFS)})
		}
	}
}
