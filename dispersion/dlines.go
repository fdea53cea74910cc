package dispersion

import "math"

// Far-detuned light on an alkali ground state nS_{1/2} through the two D
// lines (D1: nS_{1/2} → nP_{1/2}, D2: nS_{1/2} → nP_{3/2}).
//
// Model and derivation. The light is detuned from each line by much more than
// that line's excited-state hyperfine structure and its natural width, so
// the excited hyperfine structure is unresolved and only the fine structure
// matters. One radial matrix element serves the doublet (LS coupling): for a
// polarisation ε and any ground sublevel the line strength Σ_e |⟨e|d·ε|g⟩|²
// splits 1/3 (D1) : 2/3 (D2). Adiabatic elimination of the excited states in
// the rotating-wave approximation gives, for two fields E_j = Re[ℰ_j ε_j e^{−iω_j t}],
// the ground-state operator (J = 1/2, so only ranks 0 and 1 survive)
//
//	V_21 = (ħΩ₁Ω₂/4) Σ_J' op_J'/Δ_J',
//	op_D1 = (1/3)[(ε₂*·ε₁) + i(ε₂*×ε₁)·σ],  op_D2 = (1/3)[2(ε₂*·ε₁) − i(ε₂*×ε₁)·σ],
//
// with σ the Pauli operator of the electron spin, Ω_j = √X ℰ_j/ħ the beam
// Rabi frequency on the doublet and Δ_J' = ω − ω_J' the detuning from the
// line as seen from the ground sublevel (angular frequencies). The
// coefficients come from the Clebsch–Gordan weights of σ⁺ light: from
// m_J = +1/2 only D2 (weight 1), from m_J = −1/2 D1 2/3 and D2 1/3 (per
// polarisation component; derived here, cross-checked in
// testdata/ref_raman.py from explicit L, S, I matrices). Per intensity
// I = ε₀c|ℰ|²/2 one beam gives U = I[u_s + u_v (iε*×ε)·σ] with
//
//	u_s = (ħΩ²/4I)(1/(3Δ₁) + 2/(3Δ₂)),   u_v = (ħΩ²/4I)(1/3)(1/Δ₁ − 1/Δ₂),
//	Ω²/I = 6πc²Γ̄/(ħω̄³),
//
// which is the two-line formula of R. Grimm, M. Weidemüller and
// Yu. B. Ovchinnikov, Adv. At. Mol. Opt. Phys. 42, 95 (2000):
// U = (πc²Γ/2ω₀³)[(2 + P g_F m_F)/Δ₂ + (1 − P g_F m_F)/Δ₁] I (P = ±1 for σ±;
// (iε*×ε)·σ → −P g_F m_F in a manifold F). The vector part cancels between
// the lines for |Δ| ≫ the fine-structure splitting Δ_FS: 1/Δ₁ − 1/Δ₂ ≈
// −Δ_FS/Δ². A linearly polarised beam scatters photons at
//
//	Γ_sc = (Ω²/4)(Γ₁/(3Δ₁²) + 2Γ₂/(3Δ₂²))
//
// from any ground sublevel (its vector part is zero). X = 3πε₀ħc³Γ̄/ω̄³ is
// the doublet's strength, taken as the 1 : 2 weighted mean of the two lines'
// Γ/ω³ (the two differ by 0.3 % for 87Rb); each line decays with its own Γ.
// Neglected: counter-rotating terms (relative size |Δ|/ω, 1 % at 3 THz),
// higher P states, the rank-2 (tensor) part that a resolved excited
// hyperfine structure adds.

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
// (see the model above), per unit intensity of one beam.
type DLineShift struct {
	// DetuningD1Hz, DetuningD2Hz: Δ_J'/2π = ν_L − ν_J' + E_g/h, signed
	// (+ = blue), with ν_J' the line between fine-structure centres of
	// gravity and E_g the ground level's Breit–Rabi energy (measured from
	// the ground centre of gravity). Hz.
	DetuningD1Hz, DetuningD2Hz float64
	// Scalar u_s and Vector u_v: U = I[u_s + u_v (iε*×ε)·σ], J per W/m².
	Scalar, Vector float64
	// Scatter: photon scattering rate of one linearly polarised beam per
	// intensity, 1/s per W/m².
	Scatter float64
	// RabiSqPerIntensity: Ω²/I = 6πc²Γ̄/(ħω̄³) of the doublet, (rad/s)² per W/m².
	RabiSqPerIntensity float64
	// FineStructureHz: Δ_FS/2π = ν_D2 − ν_D1, Hz.
	FineStructureHz float64
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
// from the ground centre of gravity; 0: the centre of gravity itself).
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
	d.FineStructureHz = nu2 - nu1
	w1, w2 := 2*math.Pi*nu1, 2*math.Pi*nu2
	g1, g2 := 2*math.Pi*d1.GammaHz, 2*math.Pi*d2.GammaHz
	// Γ̄/ω̄³: the 1 : 2 weighted mean of the lines' Γ/ω³.
	strength := (g1/(w1*w1*w1) + 2*g2/(w2*w2*w2)) / 3
	d.RabiSqPerIntensity = 6 * math.Pi * SpeedOfLight * SpeedOfLight * strength / Hbar
	D1, D2 := 2*math.Pi*d.DetuningD1Hz, 2*math.Pi*d.DetuningD2Hz
	q := Hbar * d.RabiSqPerIntensity / 4
	d.Scalar = q * (1/(3*D1) + 2/(3*D2))
	d.Vector = q * (1/D1 - 1/D2) / 3
	d.Scatter = d.RabiSqPerIntensity / 4 * (g1/(3*D1*D1) + 2*g2/(3*D2*D2))
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
