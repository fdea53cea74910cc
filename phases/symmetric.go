package phases

import "math"

// Closed forms of the symmetric case g↑↑ = g↓↓ = g, δ = 0, in E_R with
// G1 = n(g+g↑↓)/4 and G2 = n(g−g↑↓)/4. Derivation (this project; the stripe
// ansatz and the results agree with Y. Li, L. P. Pitaevskii, S. Stringari,
// Phys. Rev. Lett. 108, 225301 (2012)):
//
// The interaction energy per particle of any state is
// ε_int = G1⟨ñ²⟩ + G2⟨s²⟩ (ñ, s total and spin density over n).
//
// Plane wave e^{ikx}(cos θ, sin θ), c = cos 2θ: ε = k² + 1 − 2kc −
// (|Ω|/2)√(1−c²) + G1 + G2c². With k = c and u = √(1−c²):
//
//	ε_PW(u) = G1 + G2 + (1 − G2)u² − (|Ω|/2)u,  minimal at u = |Ω|/(4(1 − G2)),
//	ε_PW = G1 + G2 − Ω²/(16(1 − G2)),  k₁ = √(1 − u²),  ⟨σ_z⟩ = ±k₁,
//
// as long as u < 1; otherwise u = 1 (k = 0, single minimum) with
// ε_SM = G1 + 1 − |Ω|/2. Hence the plane-wave ↔ single-minimum boundary
// (second order) ħΩ = 4(E_R − G2).
//
// Stripe: ψ = √(n/2)[(cos θ, −sin θ)e^{ik₁x} + (sin θ, −cos θ)e^{−ik₁x}]
// has n↑ = n↓ = (n/2)(1 + sin 2θ cos 2k₁x), so ⟨s²⟩ = 0, ⟨ñ²⟩ = 1 + s²/2
// (s = sin 2θ), and ε = k₁² + 1 − 2k₁c − (|Ω|/2)s + G1(1 + s²/2). With k₁ = c:
//
//	ε_ST(s) = G1 + (1 + G1/2)s² − (|Ω|/2)s,  s = |Ω|/(2(2 + G1)),
//	ε_ST = G1 − Ω²/(8(2 + G1)),  k₁ = √(1 − s²),  contrast = s,
//
// valid for s < 1 (|Ω| < 2(2 + G1)). The minimiser of the general two-wave
// ansatz reproduces this state in the symmetric case (tested).
//
// Stripe ↔ plane wave (first order), ε_ST = ε_PW:
//
//	Ω² (G1 + 2G2) / (16(1 − G2)(2 + G1)) = G2
//	⇒ Ω_c = 4 √( G2 (1 − G2)(2 + G1) / (G1 + 2G2) ).
//
// Stripe ↔ single minimum (first order), ε_ST = ε_SM:
// Ω² − 4(2+G1)Ω + 8(2+G1) = 0 ⇒ Ω_s = 2(2 + G1) − 2√(G1(2 + G1)).
//
// Tricritical point, where Ω_c = 4(1 − G2) (then also = Ω_s):
// (1 − G2)(G1 + 2G2) = G2(2 + G1) ⇔ 2G2² + 2G1G2 − G1 = 0 ⇒
// G2* = (√(G1² + 2G1) − G1)/2, Ω* = 4(1 − G2*).

// PlaneWaveSingleMinimumOmega returns the plane-wave ↔ single-minimum
// boundary Ω = 4(1 − G2) (E_R) of the symmetric case (independent of G1).
// It applies where the plane wave beats the stripe, G2 ≤ TricriticalG2(G1);
// beyond that the stripe goes directly to the single minimum at
// StripeSingleMinimumOmega.
func PlaneWaveSingleMinimumOmega(g2 float64) float64 { return 4 * (1 - g2) }

// SingleMinimumLabelOmega returns the Ω (E_R) above which the classifier
// labels the symmetric plane-wave state single-minimum: its momentum
// k = √(1 − (Ω/(4(1 − G2)))²) falls below the threshold kThreshold (k_R,
// label.Thresholds.SingleMinimumK) at Ω = 4(1 − G2)√(1 − kThreshold²),
// slightly below the true boundary 4(1 − G2) (by 0.5 % for the default 0.1).
// This is where numerical (GPE) states change name; the variational theory
// labels by the optimum's own landscape (Uniform.SingleWaveBistable) and
// changes at 4(1 − G2).
func SingleMinimumLabelOmega(g2, kThreshold float64) float64 {
	return 4 * (1 - g2) * math.Sqrt(1-kThreshold*kThreshold)
}

// StripePlaneWaveOmega returns the first-order stripe ↔ plane-wave boundary
//
//	Ω_c = 4 √( G2 (1 − G2)(2 + G1) / (G1 + 2G2) )   (E_R)
//
// of the symmetric case: stripes for |Ω| < Ω_c. It returns 0 for G2 ≤ 0 (no
// stripe phase when g↑↓ ≥ g) and NaN for G2 ≥ 1 or G1 + 2G2 ≤ 0.
func StripePlaneWaveOmega(g1, g2 float64) float64 {
	if g2 <= 0 {
		return 0
	}
	if g2 >= 1 || g1+2*g2 <= 0 || g1 <= -2 {
		return math.NaN()
	}
	return 4 * math.Sqrt(g2*(1-g2)*(2+g1)/(g1+2*g2))
}

// StripeSingleMinimumOmega returns the first-order stripe ↔ single-minimum
// boundary Ω_s = 2(2 + G1) − 2√(G1(2 + G1)) (E_R) of the symmetric case; it
// applies for G2 ≥ TricriticalG2(G1). NaN for G1 < 0.
func StripeSingleMinimumOmega(g1 float64) float64 {
	if g1 < 0 {
		return math.NaN()
	}
	return 2*(2+g1) - 2*math.Sqrt(g1*(2+g1))
}

// TricriticalG2 returns the G2 of the tricritical point at given G1,
// G2* = (√(G1² + 2G1) − G1)/2 (E_R), where the stripe, plane-wave and
// single-minimum phases meet. NaN for G1 < 0.
func TricriticalG2(g1 float64) float64 {
	if g1 < 0 {
		return math.NaN()
	}
	return 0.5 * (math.Sqrt(g1*g1+2*g1) - g1)
}

// Tricritical returns the tricritical point (G2*, Ω*) at given G1 (E_R):
// G2* = TricriticalG2(G1), Ω* = 4(1 − G2*).
func Tricritical(g1 float64) (g2, omega float64) {
	g2 = TricriticalG2(g1)
	return g2, 4 * (1 - g2)
}

// UpperStripeOmega returns the upper edge of the stripe phase of the
// symmetric case at (G1, G2): StripePlaneWaveOmega below the tricritical G2,
// StripeSingleMinimumOmega above it (E_R). This is the curve to overlay on a
// map in (G2, Ω) or (Ω, G2).
func UpperStripeOmega(g1, g2 float64) float64 {
	if g2 <= 0 {
		return 0
	}
	if g2 >= TricriticalG2(g1) {
		return StripeSingleMinimumOmega(g1)
	}
	return StripePlaneWaveOmega(g1, g2)
}

// SymmetricEnergies returns the closed-form branch energies per particle
// (E_R) of the symmetric case at Ω, δ = 0: the single-plane-wave branch
// (plane wave, or the single minimum when |Ω| ≥ 4(1 − G2)) and the stripe
// branch (NaN when |Ω| ≥ 2(2 + G1), where the stripe solution ceases to
// exist). Formulas in the comment above PlaneWaveSingleMinimumOmega.
// Valid for G2 < 1 and G1 > −2.
func SymmetricEnergies(omega, g1, g2 float64) (planeWave, stripe float64) {
	om := math.Abs(omega)
	if om < 4*(1-g2) {
		planeWave = g1 + g2 - om*om/(16*(1-g2))
	} else {
		planeWave = g1 + 1 - om/2
	}
	stripe = math.NaN()
	if om < 2*(2+g1) {
		stripe = g1 - om*om/(8*(2+g1))
	}
	return
}

// SymmetricStripe returns k₁ (k_R) and the density contrast of the symmetric
// stripe, s = |Ω|/(2(2 + G1)), k₁ = √(1 − s²). At small Ω the contrast grows
// linearly, ≈ |Ω|/(2(2 + G1)).
func SymmetricStripe(omega, g1 float64) (k1, contrast float64) {
	s := math.Abs(omega) / (2 * (2 + g1))
	if s >= 1 {
		return 0, math.NaN()
	}
	return math.Sqrt(1 - s*s), s
}

// BalancingDetuning returns the detuning δ_b = (Gdd − Guu)/2 (E_R) at which
// unequal intra-species couplings are compensated. Derivation: with
// ñ = (n↑+n↓)/n and s = (n↑−n↓)/n the interaction energy is
// ε_int = ḡ1⟨ñ²⟩ + ḡ2⟨s²⟩ + Δg⟨ñs⟩ with Δg = (Guu − Gdd)/4 (Uniform.Couplings).
// In any state of uniform total density (all plane-wave states) ⟨ñs⟩ = ⟨σ_z⟩,
// so the term acts exactly like a detuning, (δ/2 + Δg)⟨σ_z⟩: the two
// plane-wave states at ±k are degenerate, and the spin states balanced,
// at δ + (Guu − Gdd)/2 = 0. In a stripe ⟨ñs⟩ also has the product of the
// density and spin modulations, so the centre of the stripe window in δ is
// at δ_b only up to a correction of order Δg times the contrast (the tests
// measure it).
func BalancingDetuning(guu, gdd float64) float64 { return 0.5 * (gdd - guu) }
