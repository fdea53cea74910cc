package dispersion

import "math"

// Far-detuned light on an alkali ground state nS_{1/2} through the two D
// lines (D1: nS_{1/2} → nP_{1/2}, D2: nS_{1/2} → nP_{3/2}).
//
// Model and derivation. The light is detuned from each line by much more than
// that line's excited-state hyperfine structure and its natural width, so
// the excited hyperfine structure is unresolved and only the fine structure
// matters. The angular part is that of LS coupling; each line has its own
// radial matrix element (see "Each line's own strength" below): with one
// element |d|² for both, for a polarisation ε and any ground sublevel the
// line strength Σ_e |⟨e|d·ε|g⟩|² would split 1/3 (D1) : 2/3 (D2). Write
// d₊(ε) for the raising part of d·ε (ground → excited), so that ⟨e|d·ε|g⟩ =
// ⟨e|d₊(ε)|g⟩ and ⟨g|d·ε|e⟩ = ⟨g|d₊(ε*)†|e⟩. Projected on J = 1/2 (only
// ranks 0 and 1 survive), the Clebsch–Gordan weights of σ⁺ light (from m_J =
// +1/2 only D2, weight 1; from m_J = −1/2 D1 2/3 and D2 1/3, per polarisation
// component; derived here, cross-checked in testdata/ref_raman.py from
// explicit L, S, I matrices) give
//
//	d₊(ε_b)† P_J' d₊(ε_a) → X_J' op_J'(ε_b*, ε_a),
//	op_D1 = (1/3)[(ε_b*·ε_a) + i(ε_b*×ε_a)·σ],  op_D2 = (1/3)[2(ε_b*·ε_a) − i(ε_b*×ε_a)·σ],
//
// with σ the Pauli operator of the electron spin, P_J' the projector on the
// excited fine-structure level J' and X_J' the line's squared radial element
// (X_J' = |d|² for one element).
//
// Both time orderings. Two fields E_j = Re[ℰ_j ε_j e^{−iω_j t}] (ω₁ ≈ ω₂ = ω;
// the two-photon frequency, ≤ GHz, is neglected beside ω in the
// denominators) couple ground sublevels a → b by absorbing a photon of beam 1
// and emitting one into beam 2. Second-order perturbation theory (V = −d·E,
// amplitude (ℰ_j/2) per photon) has two intermediate paths through each J':
//
//   - absorb 1 first, excited energy E_a + ħω: operator d₊(ε₂)† P_J' d₊(ε₁),
//     denominator E_a + ħω − E_J' = ħΔ_J', Δ_J' = ω − ω_J' + E_a/ħ (the
//     rotating-wave term);
//   - emit 2 first (the atom is raised by the e^{+iωt} part of the field),
//     excited energy E_a − ħω: operator d₊(ε₁*)† P_J' d₊(ε₂*), denominator
//     E_a − ħω − E_J' = ħΔ̃_J', Δ̃_J' = −ω − ω_J' + E_a/ħ (the
//     counter-rotating term; Δ̃ is Δ with ω → −ω, always < 0).
//
// The second operator is op_J'(ε₁, ε₂*) = (1/3)[c₀(ε₂*·ε₁) − c₁ i(ε₂*×ε₁)·σ]
// (c₀, c₁ = 1, +1 for D1 and 2, −1 for D2): swapping the two polarisations
// leaves the rank-0 part and reverses the rank-1 part, since ε₁×ε₂* = −ε₂*×ε₁.
// Hence, with x_J' = X_J'/X̄ (below),
//
//	V_21 = (ħΩ₁Ω₂/4) Σ_J' (x_J'/3)[c₀(ε₂*·ε₁)(1/Δ_J' + 1/Δ̃_J') + c₁ i(ε₂*×ε₁)·σ (1/Δ_J' − 1/Δ̃_J')]:
//
// the scalar part adds the two orderings, the vector part takes their
// difference. Red of a line both 1/Δ and 1/Δ̃ are negative, so the
// counter-rotating term deepens the scalar shift and weakens the vector one:
// for a single line 1/Δ + 1/Δ̃ = −2ω₀/(ω₀² − ω²) and 1/Δ − 1/Δ̃ = −2ω/(ω₀² − ω²),
// the rank-K polarisability ∝ 1/(ω₀ − ω) + (−1)^K/(ω₀ + ω) (the (−1)^K form is
// recalled from F. Le Kien, P. Schneeweiss and A. Rauschenbeutel, Eur. Phys.
// J. D 67, 92 (2013); derived here for K = 0, 1, checked by numpy from the
// matrices and against the exact Floquet quasi-energies of L ⊗ S in a real
// σ⁺ field at 1064 and 1560 nm, both in testdata/ref_raman.py). Ω_j =
// √X̄ ℰ_j/ħ is the beam Rabi frequency on the doublet (angular frequencies;
// X̄ = (X₁ + 2X₂)/3, so that Ω² = Σ_e |⟨e|d·ε|g⟩|²ℰ²/ħ² over both lines) and
// x_J' = X_J'/X̄ each line's strength relative to it (x₁ + 2x₂ = 3). Per
// intensity I = ε₀c|ℰ|²/2 one beam gives U = I[u_s + u_v (iε*×ε)·σ] with
//
//	u_s = (ħΩ²/4I)(1/3)[x₁(1/Δ₁ + 1/Δ̃₁) + 2x₂(1/Δ₂ + 1/Δ̃₂)],
//	u_v = (ħΩ²/4I)(1/3)[x₁(1/Δ₁ − 1/Δ̃₁) − x₂(1/Δ₂ − 1/Δ̃₂)],
//	Ω²/I = 6πc²Γ̄/(ħω̄³).
//
// Dropping the 1/Δ̃ terms is the rotating-wave approximation (RWA), the
// two-line formula of R. Grimm, M. Weidemüller and Yu. B. Ovchinnikov, Adv.
// At. Mol. Opt. Phys. 42, 95 (2000): U = (πc²Γ/2ω₀³)[(2 + P g_F m_F)/Δ₂ +
// (1 − P g_F m_F)/Δ₁] I (P = ±1 for σ±; (iε*×ε)·σ → −P g_F m_F in a manifold
// F), here with each line's own Γ and ω₀ in its term's prefactor
// (x_J'Ω²/I = 6πc²Γ_J'/(ħω_J'³)); their two-level form with both terms, U = −(3πc²/2ω₀³)(Γ/(ω₀ − ω) +
// Γ/(ω₀ + ω)) I, is the scalar part above for one line. The relative size of
// the counter-rotating terms is |Δ|/2ω in the scalar part near a line (0.3 %
// at 2 THz for 87Rb) and only ~|Δ₁Δ₂|/4ω² in the vector part between the
// lines (2.5e-5 at 790 nm): the rank-1 difference of the lines, 1/Δ₁ − 1/Δ₂
// ≈ −Δ_FS/Δ², gains +Δ_FS/Δ̃², small near the lines. At 1064 nm for 87Rb the
// scalar shift is 15 % deeper than the RWA's and the vector part 2.7 %
// weaker; at 1560 nm +33 % and −12 %. The vector part still nearly cancels
// between the lines for |Δ| ≫ the fine-structure splitting Δ_FS: to first
// order in Δ_FS and in η = x₁ − x₂ (x₁ = 1 + 2η/3, x₂ = 1 − η/3), with ω₁ =
// ω̄ − 2Δ_FS/3, ω₂ = ω̄ + Δ_FS/3 and f(ω₀) = 1/Δ − 1/Δ̃ = 2ω/(ω² − ω₀²),
//
//	3u_v/(ħΩ²/4I) = x₁f(ω₁) − x₂f(ω₂) ≈ −Δ_FS f'(ω̄) + η f(ω̄)
//	             = (2ω/(ω² − ω̄²))[η + 2ω̄Δ_FS/(ω̄² − ω²)],
//
// the equal-strength part −Δ_FS·4ωω̄/(ω̄² − ω²)² and the strength difference
// 2ωη/(ω² − ω̄²); in the RWA (f → 1/Δ) (1/Δ)(η − Δ_FS/Δ), Δ = ω − ω̄.
//
// Scattering. The Kramers–Heisenberg amplitude (damping neglected, far
// detuned) for absorbing (ω, ε) and emitting (ω, ε_s) from g to any ground
// sublevel g' is the same two-ordering operator with ε₁ = ε, ε₂ = ε_s,
// T(ε_s) = a_s(ε_s*·ε) + a_v i(ε_s*×ε)·σ, a_s = (1/3)Σ c₀x_J'(1/Δ + 1/Δ̃),
// a_v = (1/3)Σ c₁x_J'(1/Δ − 1/Δ̃) (each line's path with its own element
// squared: one X_J' from absorbing, one from emitting through J'; one
// factor X̄ is in Ω², the other in Γ(ω)). Summing |⟨g'|T|g⟩|² over all g',
// the emitted directions and polarisations (Σ over three Cartesian ε_s with
// the dipole pattern's 8π/3) and weighting by the emission rate at ω, Γ(ω) =
// Γ̄(ω/ω̄)³ = ω³X̄/(3πε₀ħc³):
//
//	Γ_sc = (Ω²/4) Γ(ω) Σ_q ⟨g|T(e_q)† T(e_q)|g⟩ = (Ω²/4) Γ(ω) (a_s² + 2a_v²)
//
// for linear polarisation (for real ε the a_s a_v cross term 2a_s a_v
// i(ε*×ε)·σ vanishes and Σ_q (ε×e_q)_l(ε×e_q)_m σ_l σ_m = σ·σ − (ε·σ)² = 2),
// the same from every ground sublevel. This is the full (non-RWA) form, used
// rather than a sum of per-line two-level rates because far from the lines
// the two lines and the two orderings interfere: in the RWA the D1–D2 cross
// terms of a_s² and 2a_v² cancel (giving (Ω²/4)(x₁²/(3Δ₁²) + 2x₂²/(3Δ₂²))Γ(ω),
// the per-line form (Ω²/4)(x₁Γ₁/(3Δ₁²) + 2x₂Γ₂/(3Δ₂²)) with x_J'Γ(ω_J') = Γ_J')
// but with the 1/Δ̃ terms they do not. For one line it
// is Grimm et al.'s two-level non-RWA rate, Γ_sc = (3πc²/2ħω₀³)(ω/ω₀)³(Γ/(ω₀ − ω)
// + Γ/(ω₀ + ω))² I. Relative to the RWA the rate changes by (ω/ω̄)³ (≈ 1 −
// 3Δ/ω near the lines) and the squared amplitudes: at 1064 nm for 87Rb it is
// 0.53 of the RWA rate (0.23 at 1560 nm).
//
// Each line's own strength. The standard relation between a line's decay
// rate and its reduced element (Wigner–Eckart with ⟨J m|d_q|J' m'⟩ =
// ⟨J‖d‖J'⟩⟨J m|J' m'; 1 q⟩, common practice, no source),
//
//	Γ_J' = ω_J'³|⟨J‖d‖J'⟩|²/(3πε₀ħc³) · (2J + 1)/(2J' + 1),
//
// follows from counting: Σ_{m,m',q} |⟨J m|d_q|J' m'⟩|² = (2J + 1)|⟨J‖d‖J'⟩|²
// (the Clebsch–Gordan sum over m', q is 1 for each m) is both (2J' + 1) ×
// the decay sum of one excited sublevel (Γ_J' = ω³/(3πε₀ħc³) × that sum) and
// (2J + 1) × 3 × the line strength per polarisation S_J' of one ground
// sublevel (isotropic for J = 1/2). So S_J' = |⟨J‖d‖J'⟩|²/3 =
// (2J' + 1)/(3(2J + 1)) · 3πε₀ħc³Γ_J'/ω_J'³, i.e. with X_J' =
// 3πε₀ħc³Γ_J'/ω_J'³, S_D1 = X₁/3 and S_D2 = 2X₂/3: equal Γ/ω³ give the 1/3 :
// 2/3 split of one radial element, and X_J' is the X_J' of op_J' above. In
// the code x_J' = (Γ_J'/ω_J'³)/(Γ̄/ω̄³) with Γ̄/ω̄³ the 1 : 2 mean of the
// lines' Γ/ω³ and ω̄ = (ω₁ + 2ω₂)/3 (Γ̄/ω̄³ sets only the normalisation of Ω
// and Γ(ω); testdata/ref_raman.py builds each line's element instead from
// its own decay sum of the matrices). For 87Rb X₁/X₂ = 1.0025 (η = x₁ − x₂ =
// 0.0025), for K39 1.3e-4, Na23 1.4e-5, Li7 6.7e-5 (equal Γ in our data:
// only the ω³). Against one element (the earlier model) the change is small
// where one line dominates and large where the lines cancel: the strength
// difference enters u_v far from the lines as η(ω̄² − ω²)/(2ω̄Δ_FS) relative
// (above). For 87Rb u_v is +0.09 % at 790 nm, +3.1 % at 1064 nm, +5.1 % at
// 1560 nm and −8.0 % at 532 nm, Γ_sc/Ω −3.0 % at 1064 nm and −4.9 % at
// 1560 nm; u_s and the scattering rate change by ≤ 2e-4 there (at 790 nm,
// the scalar tune-out, u_s by −24 %: the tune-out moves from 790.036 to
// 790.027 nm). At 1064 nm u_v is +0.69 % for K39 and +0.49 % for Na23, but
// +90 % for Li7, whose 10 GHz fine structure makes the cancellation almost
// complete: there the D-line vector part is set by the lines' strength
// difference, i.e. by the ω³ of two lines with Γ equal to the data's five
// digits, and is as uncertain as that data (and small beside the
// neglected terms below).
//
// Neglected: higher P states and the core polarisability (their size is not computed
// here; they matter most in the vector part where the D lines cancel), the
// rank-2 (tensor) part that a resolved excited hyperfine structure adds, the
// two-photon frequency beside ω in the denominators and the emitted
// frequency (ω_s = ω ± the ground hyperfine splitting, 2e-5 relative).

// Excited-state hyperfine structure needed before the line counts as
// unresolved; see NearResonant.
const (
	// NearResonanceLinewidths: the beams must be at least this many natural
	// linewidths from each D line.
	NearResonanceLinewidths = 100.0
	// NearResonanceHFS: … and this many times the hyperfine structure that
	// the far-detuned model treats as unresolved: the line's excited-state
	// hyperfine span, plus the ground-state hyperfine splitting when the
	// ground manifold is not known (no pair given) or the pair spans both
	// manifolds.
	NearResonanceHFS = 10.0
)

// DLineShift holds the far-detuned two-line light shift of one ground level
// (see the model above), per unit intensity of one beam, with both time
// orderings, and its rotating-wave limit for comparison.
type DLineShift struct {
	// DetuningD1Hz, DetuningD2Hz: Δ_J'/2π = ν_L − ν_J' + E_g/h, signed
	// (+ = blue), with ν_J' the line between fine-structure centres of
	// gravity and E_g the ground level's Breit–Rabi energy (measured from
	// the ground centre of gravity). Hz.
	DetuningD1Hz, DetuningD2Hz float64
	// CounterD1Hz, CounterD2Hz: the counter-rotating denominators
	// Δ̃_J'/2π = −ν_L − ν_J' + E_g/h (< 0), Hz.
	CounterD1Hz, CounterD2Hz float64
	// Scalar u_s and Vector u_v: U = I[u_s + u_v (iε*×ε)·σ], J per W/m²,
	// both time orderings.
	Scalar, Vector float64
	// Scatter: photon scattering rate of one linearly polarised beam per
	// intensity (Kramers–Heisenberg, both orderings, Γ(ω) = Γ̄(ω/ω̄)³), 1/s
	// per W/m².
	Scatter float64
	// ScalarRWA, VectorRWA, ScatterRWA: the same in the rotating-wave
	// approximation (1/Δ̃ terms dropped; the scattering as the per-line sum
	// (Ω²/4I)(x₁Γ₁/(3Δ₁²) + 2x₂Γ₂/(3Δ₂²)), each line decaying with its own
	// Γ), kept for comparison.
	ScalarRWA, VectorRWA, ScatterRWA float64
	// RabiSqPerIntensity: Ω̄²/I = 6πc²Γ̄/(ħω̄³) of the doublet (the
	// normalisation: Ω̄² = Σ_e |⟨e|d·ε|g⟩|²ℰ²/ħ² summed over both lines),
	// (rad/s)² per W/m².
	RabiSqPerIntensity float64
	// WeightD1, WeightD2: each line's strength relative to the doublet's,
	// x_J' = (Γ_J'/ω_J'³)/(Γ̄/ω̄³) (x₁ + 2x₂ = 3; 1 for one radial element).
	WeightD1, WeightD2 float64
	// FineStructureHz: Δ_FS/2π = ν_D2 − ν_D1, Hz.
	FineStructureHz float64
	// GammaHz: Γ(ω)/2π = (Γ̄/ω̄³)ω³/2π, the doublet's emission rate at the
	// light's frequency, Hz; CentreHz: ω̄/2π = (ν_D1 + 2ν_D2)/3, Hz.
	GammaHz, CentreHz float64
}

// lines returns the species' D1 and D2 lines.
func (s Species) lines() (d1, d2 Line, err error) {
	var n1, n2 bool
	for _, l := range s.Lines {
		switch l.Name {
		case "D1":
			d1, n1 = l, true
		case "D2":
			d2, n2 = l, true
		}
	}
	if !n1 || !n2 {
		return d1, d2, badf("%s: no D1/D2 line data", s.Name)
	}
	return d1, d2, nil
}

// DLineLightShift returns the two-line light-shift coefficients for light of
// vacuum wavelength λ (m) on a ground level of Breit–Rabi energy groundJ (J,
// from the ground centre of gravity; 0: the centre of gravity itself), with
// both time orderings (u_s, u_v, Γ_sc of the model above) and their RWA limit.
func (s Species) DLineLightShift(wavelength, groundJ float64) (DLineShift, error) {
	var d DLineShift
	d1, d2, err := s.lines()
	if err != nil {
		return d, err
	}
	if !(wavelength > 0) || math.IsInf(wavelength, 0) {
		return d, badf("wavelength must be positive and finite, got %g m", wavelength)
	}
	nu := SpeedOfLight / wavelength
	nu1, nu2 := SpeedOfLight/d1.Wavelength, SpeedOfLight/d2.Wavelength
	d.DetuningD1Hz = nu - nu1 + groundJ/Planck
	d.DetuningD2Hz = nu - nu2 + groundJ/Planck
	d.CounterD1Hz = -nu - nu1 + groundJ/Planck
	d.CounterD2Hz = -nu - nu2 + groundJ/Planck
	d.FineStructureHz = nu2 - nu1
	d.CentreHz = (nu1 + 2*nu2) / 3
	w1, w2 := 2*math.Pi*nu1, 2*math.Pi*nu2
	g1, g2 := 2*math.Pi*d1.GammaHz, 2*math.Pi*d2.GammaHz
	// Each line's strength X_J' ∝ Γ_J'/ω_J'³; Γ̄/ω̄³ is their 1 : 2 mean
	// (the normalisation of Ω̄), x_J' = X_J'/X̄ (x₁ + 2x₂ = 3).
	k1, k2 := g1/(w1*w1*w1), g2/(w2*w2*w2)
	strength := (k1 + 2*k2) / 3
	x1, x2 := k1/strength, k2/strength
	d.WeightD1, d.WeightD2 = x1, x2
	w := 2 * math.Pi * nu
	d.GammaHz = strength * w * w * w / (2 * math.Pi)
	d.RabiSqPerIntensity = 6 * math.Pi * SpeedOfLight * SpeedOfLight * strength / Hbar
	D1, D2 := 2*math.Pi*d.DetuningD1Hz, 2*math.Pi*d.DetuningD2Hz
	C1, C2 := 2*math.Pi*d.CounterD1Hz, 2*math.Pi*d.CounterD2Hz
	q := Hbar * d.RabiSqPerIntensity / 4
	// a_s, a_v: the rank-0 and rank-1 amplitudes, both orderings.
	as := (x1*(1/D1+1/C1) + 2*x2*(1/D2+1/C2)) / 3
	av := (x1*(1/D1-1/C1) - x2*(1/D2-1/C2)) / 3
	d.Scalar = q * as
	d.Vector = q * av
	d.Scatter = d.RabiSqPerIntensity / 4 * (2 * math.Pi * d.GammaHz) * (as*as + 2*av*av)
	d.ScalarRWA = q * (x1/D1 + 2*x2/D2) / 3
	d.VectorRWA = q * (x1/D1 - x2/D2) / 3
	d.ScatterRWA = d.RabiSqPerIntensity / 4 * (x1*g1/(3*D1*D1) + 2*x2*g2/(3*D2*D2))
	return d, nil
}

// spinState returns the Breit–Rabi eigenstate of l at field B (T) in the
// uncoupled basis: |l⟩ = a|m_J = +1/2, m_I = m − 1/2⟩ + b|m_J = −1/2, m_I = m + 1/2⟩,
// from H = A I·J + μ_B B(g_J J_z + g_I I_z), A = ΔE_hfs/(I + 1/2), in the
// 2×2 block of fixed m (a = 0 or b = 0 outside the range of m_I). The upper
// eigenvector is F = I + 1/2; signs follow the Condon–Shortley convention at
// B → 0 (b ≥ 0 for F = I + 1/2, a ≥ 0 for F = I − 1/2).
func (s Species) spinState(l Sublevel, B float64) (a, b float64) {
	m := float64(l.M)
	okA := math.Abs(m-0.5) <= s.I+1e-9 // m_I = m − 1/2 exists
	okB := math.Abs(m+0.5) <= s.I+1e-9
	switch {
	case okA && !okB:
		return 1, 0
	case okB && !okA:
		return 0, 1
	}
	A := s.HFSHz * Planck / (s.I + 0.5)
	mu := BohrMagneton * B
	haa := A*0.5*(m-0.5) + mu*(s.GJ*0.5+s.GI*(m-0.5))
	hbb := -A*0.5*(m+0.5) + mu*(-s.GJ*0.5+s.GI*(m+0.5))
	hab := A / 2 * math.Sqrt(s.I*(s.I+1)-m*m+0.25)
	// Eigenvector of [[haa, hab], [hab, hbb]] for the eigenvalue
	// λ = (haa + hbb)/2 ± r: (hab, λ − haa), normalised.
	r := math.Hypot((haa-hbb)/2, hab)
	upper := float64(l.F) > s.I
	lam := (haa+hbb)/2 - r
	if upper {
		lam = (haa+hbb)/2 + r
	}
	x, y := hab, lam-haa
	if n := math.Hypot(x, y); n > 0 {
		x, y = x/n, y/n
	}
	// Fix the overall sign: at B = 0 the upper state has a, b > 0 (hab > 0)
	// and the lower state a > 0, b < 0.
	if upper && y < 0 || !upper && x < 0 {
		x, y = -x, -y
	}
	return x, y
}

// SpinMatrixElement returns |⟨b|σ_q|a⟩| for q = m_b − m_a: σ_± = (σ_x ± iσ_y)/2
// for Δm = ±1 and σ_z for Δm = 0 (a ≠ b, different manifolds), with the
// Breit–Rabi eigenstates at field B (T). Inside a manifold F at low field it
// is |g̃_F|·|⟨F,m_b|F_±|F,m_a⟩|/2 with g̃_F = [F(F+1) + 3/4 − I(I+1)]/(F(F+1))
// (projection theorem; g̃_F = −1/2 for F = 1, I = 3/2). |Δm| > 1 and a = b
// are errors: the rank-1 operator does not couple them.
func (s Species) SpinMatrixElement(a, b Sublevel, B float64) (float64, error) {
	dm := b.M - a.M
	if a == b || absInt(dm) > 1 {
		return 0, badf("sublevels %v and %v: a far-detuned Raman coupling needs |Δm| ≤ 1 between different sublevels (got Δm = %d)", a, b, dm)
	}
	aa, ab := s.spinState(a, B)
	ba, bb := s.spinState(b, B)
	switch dm {
	case 1: // σ_+ takes |−1/2, m_a + 1/2⟩ to |+1/2, m_a + 1/2⟩, b's "a" component
		return math.Abs(ba * ab), nil
	case -1:
		return math.Abs(aa * bb), nil
	}
	return math.Abs(aa*ba - ab*bb), nil
}
