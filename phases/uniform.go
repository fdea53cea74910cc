// Package phases holds the uniform mean-field (variational) theory of a
// spin–orbit-coupled two-component condensate, the closed-form phase
// boundaries of the symmetric case, and the sweep engine that fills one- or
// two-axis maps with either theory or Gross–Pitaevskii results.
//
// Units (DESIGN.md §1): energy in E_R = ħ²k_R²/2m, momentum in k_R, length in
// 1/k_R. The single-particle Hamiltonian of a uniform system is
//
//	h(k) = (k − σ_z)² + (Ω/2) σ_x + (δ/2) σ_z,
//
// with Ω = ħΩ/E_R and δ = ħδ/E_R. Interactions enter as n·g_ij in E_R
// (n the mean density): Guu = n g↑↑, Gdd = n g↓↓, Gud = n g↑↓, and the energy
// per particle is
//
//	ε = (1/N) ∫ ψ†hψ + (1/N) ∫ [g↑↑|ψ↑|⁴/2 + g↓↓|ψ↓|⁴/2 + g↑↓|ψ↑|²|ψ↓|²].
//
// For equal intra-species couplings the shorthands are
// G1 = n(g + g↑↓)/4 and G2 = n(g − g↑↓)/4 (so Guu = Gdd = 2(G1+G2),
// Gud = 2(G1−G2)).
package phases

import "math"

// Uniform is the problem of a uniform (box-free, infinite) condensate with
// spin–orbit coupling along x. All fields are in E_R.
type Uniform struct {
	Omega float64 // Raman/RF coupling ħΩ/E_R
	Delta float64 // detuning ħδ/E_R (enters as +(δ/2)σ_z)
	Guu   float64 // n g↑↑ in E_R
	Gdd   float64 // n g↓↓ in E_R
	Gud   float64 // n g↑↓ in E_R
}

// Symmetric returns the problem with g↑↑ = g↓↓ = g and δ = 0 given the
// shorthands G1 = n(g+g↑↓)/4 and G2 = n(g−g↑↓)/4 (E_R).
func Symmetric(omega, g1, g2 float64) Uniform {
	return Uniform{Omega: omega, Guu: 2 * (g1 + g2), Gdd: 2 * (g1 + g2), Gud: 2 * (g1 - g2)}
}

// Couplings returns the combinations in which the interaction energy of any
// state is written,
//
//	ε_int = ḡ1 ⟨ñ²⟩ + ḡ2 ⟨s²⟩ + Δg ⟨ñ s⟩,
//
// with ñ = (n↑+n↓)/n, s = (n↑−n↓)/n, ḡ1 = (Guu+Gdd+2Gud)/8,
// ḡ2 = (Guu+Gdd−2Gud)/8 and Δg = (Guu−Gdd)/4. For Guu = Gdd, ḡ1 = G1 and
// ḡ2 = G2 and Δg = 0.
func (u Uniform) Couplings() (g1, g2, dg float64) {
	return (u.Guu + u.Gdd + 2*u.Gud) / 8, (u.Guu + u.Gdd - 2*u.Gud) / 8, (u.Guu - u.Gdd) / 4
}

// TwoWave is a state of the two-plane-wave ansatz
//
//	ψ(x) = √n [C₊ χ₊ e^{ik₊x} + C₋ χ₋ e^{−ik₋x}],  C₊² = W, C₋² = 1 − W,
//
// with real unit spinors χ± = (cos θ±, sin θ±). A single plane wave is W = 1
// (or W = 0). Momenta in k_R, angles in rad.
type TwoWave struct {
	KPlus, KMinus         float64 // k₊ and k₋; the second wave has momentum −k₋
	ThetaPlus, ThetaMinus float64 // spinor angles θ₊, θ₋
	W                     float64 // C₊², in [0, 1]
}

// singleParticle is the single-particle energy (E_R) of the plane wave
// e^{ipx}(cos θ, sin θ) with c = cos 2θ = ⟨σ_z⟩, s = sin 2θ = ⟨σ_x⟩:
//
//	e₀ = ⟨(p − σ_z)²⟩ + (Ω/2)s + (δ/2)c = p² + 1 − 2pc + (Ω/2)s + (δ/2)c.
func (u Uniform) singleParticle(p, c, s float64) float64 {
	return p*p + 1 - 2*p*c + 0.5*u.Omega*s + 0.5*u.Delta*c
}

// Densities returns the spatial structure of the ansatz state: the reduced
// densities are n↑(x)/n = Au + Bu cos(qx + φ₀), n↓(x)/n = Ad + Bd cos(qx + φ₀)
// with q = k₊ + k₋ and
//
//	Au = W cos²θ₊ + (1−W) cos²θ₋,  Bu = 2√(W(1−W)) cos θ₊ cos θ₋,
//	Ad = W sin²θ₊ + (1−W) sin²θ₋,  Bd = 2√(W(1−W)) sin θ₊ sin θ₋.
//
// (|a e^{ik₊x} + b e^{−ik₋x}|² = a² + b² + 2ab cos((k₊+k₋)x) for real a, b.)
func (s TwoWave) Densities() (au, bu, ad, bd float64) {
	a1, b1 := math.Cos(s.ThetaPlus), math.Sin(s.ThetaPlus)
	a2, b2 := math.Cos(s.ThetaMinus), math.Sin(s.ThetaMinus)
	w := s.W
	r := 2 * math.Sqrt(w*(1-w))
	return w*a1*a1 + (1-w)*a2*a2, r * a1 * a2, w*b1*b1 + (1-w)*b2*b2, r * b1 * b2
}

// interaction is the x-averaged interaction energy per particle (E_R) of a
// state with n↑/n = Au + Bu cos φ, n↓/n = Ad + Bd cos φ. Averaging over φ
// (⟨cos φ⟩ = 0, ⟨cos²φ⟩ = 1/2):
//
//	⟨n↑²⟩/n² = Au² + Bu²/2,  ⟨n↓²⟩/n² = Ad² + Bd²/2,  ⟨n↑n↓⟩/n² = AuAd + BuBd/2,
//	ε_int = Guu/2 ⟨n↑²⟩/n² + Gdd/2 ⟨n↓²⟩/n² + Gud ⟨n↑n↓⟩/n².
func (u Uniform) interaction(au, bu, ad, bd float64) float64 {
	return 0.5*u.Guu*(au*au+0.5*bu*bu) + 0.5*u.Gdd*(ad*ad+0.5*bd*bd) + u.Gud*(au*ad+0.5*bu*bd)
}

// Energy returns the energy per particle (E_R) of the ansatz state s:
//
//	ε = W e₀(k₊, θ₊) + (1−W) e₀(−k₋, θ₋) + ε_int,
//
// with e₀ the single-particle energy of one plane wave and ε_int the
// x-averaged interaction (see Densities). When the two waves have different
// momenta (k₊ + k₋ ≠ 0) the kinetic and coupling cross terms oscillate as
// e^{±i(k₊+k₋)x} and average to zero, and the interaction keeps only the
// interference terms Bu, Bd. For k₊ + k₋ = 0 the same expression is the limit
// of an infinitely long period; it is not the energy of the coherent sum
// of the two waves at equal momentum.
func (u Uniform) Energy(s TwoWave) float64 {
	c1, s1 := math.Cos(2*s.ThetaPlus), math.Sin(2*s.ThetaPlus)
	c2, s2 := math.Cos(2*s.ThetaMinus), math.Sin(2*s.ThetaMinus)
	e := s.W*u.singleParticle(s.KPlus, c1, s1) + (1-s.W)*u.singleParticle(-s.KMinus, c2, s2)
	au, bu, ad, bd := s.Densities()
	return e + u.interaction(au, bu, ad, bd)
}

// SigmaZ returns the spatial average ⟨σ_z⟩ = Au − Ad.
func (s TwoWave) SigmaZ() float64 {
	au, _, ad, _ := s.Densities()
	return au - ad
}

// Contrast returns the contrast of the total density,
// (n_max − n_min)/(n_max + n_min) = |Bu + Bd|/(Au + Ad) = 2√(W(1−W)) |χ₊·χ₋|.
func (s TwoWave) Contrast() float64 {
	au, bu, ad, bd := s.Densities()
	return math.Abs(bu+bd) / (au + ad)
}

// K1 returns k₁ = (k₊ + k₋)/2, half the wave number of the density
// modulation, so that the stripe period is π/k₁ (in 1/k_R) also when
// k₊ ≠ k₋.
func (s TwoWave) K1() float64 { return 0.5 * (s.KPlus + s.KMinus) }

// Period returns the stripe period π/k₁ = 2π/(k₊ + k₋) in 1/k_R
// (+Inf when k₊ + k₋ = 0).
func (s TwoWave) Period() float64 {
	k1 := math.Abs(s.K1())
	if k1 == 0 {
		return math.Inf(1)
	}
	return math.Pi / k1
}

// Fractions returns the share of atoms at positive and at negative momentum
// and the mean |k| (k_R), the features the classifier of package label uses.
// In this gauge both spin components of a plane wave carry the same
// quasi-momentum, so the wave at k₊ contributes W and the wave at −k₋
// contributes 1 − W.
func (s TwoWave) Fractions() (plus, minus, meanAbsK float64) {
	add := func(k, w float64) {
		switch {
		case k > 0:
			plus += w
		case k < 0:
			minus += w
		default:
			plus += w / 2
			minus += w / 2
		}
		meanAbsK += w * math.Abs(k)
	}
	add(s.KPlus, s.W)
	add(-s.KMinus, 1-s.W)
	return
}
