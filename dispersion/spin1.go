package dispersion

import (
	"fmt"
	"math"
)

// Spin-1 (F = 1) three-level effective model.
//
// Basis and order: the three Zeeman sublevels m = +1, 0, −1 of one F = 1
// manifold, stored in that order (index i ↔ m = 1 − i). Solver units as for
// the pseudo-spin model: momenta in k_R, energies in E_R, where k_R is half
// the momentum transfer of the reference pair (Up → Down) and may be signed
// (DESIGN.md, "The effective model"). The single-particle Hamiltonian along
// the coupling axis is
//
//	h(k) = Σ_m [(k − K_m)² + E_m] |m⟩⟨m| + (Ω/√2) F_x,
//
// with the spin-1 matrix ⟨±1|F_x|0⟩ = 1/√2, so each of the two adjacent
// pairs (+1, 0) and (0, −1) is coupled by the element Ω/2, exactly the
// (Ω/2)σ_x of the pseudo-spin model. K_m is the momentum offset of sublevel
// m (its kinetic momentum is k − K_m) and E_m its energy in the rotating
// frame (detunings, quadratic Zeeman shift, micromotion).
//
// The model is written in the gauge of its reference pair: K_Up = +1,
// K_Down = −1 and E_Up + E_Down = 0, so that restricted to the pair it is the
// pseudo-spin model h = (k − σ_z)² + (Ω/2)σ_x + (δ/2)σ_z with
// δ = E_Up − E_Down (↑ = Up, ↓ = Down). The third level t then sits at K_t,
// E_t.
//
// Quadratic Zeeman sign: the rotating-frame energies contain +q m², i.e. the
// levels m = ±1 lie q above m = 0 at zero linear detuning (q > 0 for the
// F = 1 manifolds of the alkalis at low field, Species.QuadraticZeemanHz).
// Equivalently, up to a constant, m = 0 is lowered by q.
type Spin1Model struct {
	Mass float64 // kg (0 for a model given directly in E_R)
	KR   float64 // k_R, 1/m, signed (0 for a direct model)
	ER   float64 // E_R, J (0 for a direct model)

	K     [3]float64 // K_m (k_R), order m = +1, 0, −1
	E     [3]float64 // E_m (E_R), order m = +1, 0, −1
	Omega float64    // ħΩ/E_R: the coupling term (Ω/√2)F_x

	Up, Down int // m of the reference pair (↑, ↓); |Up − Down| = 1
}

// Spin1Index returns the storage index of sublevel m ∈ {+1, 0, −1}.
func Spin1Index(m int) int { return 1 - m }

// Third returns the m of the level outside the reference pair.
func (s Spin1Model) Third() int { return -(s.Up + s.Down) }

// RamanSpin1 is the standard Raman-dressed F = 1 model in E_R, k_R (two
// counter-propagating-like beams transferring 2ħk_R per Δm = −1 step):
//
//	h(k) = (k − 2F_z)² + δ F_z + ε F_z² + (Ω/√2) F_x,
//
// i.e. K_m = 2m and E_m = δ m + ε m², with δ the linear (two-photon)
// detuning and ε the quadratic Zeeman shift, both in E_R (our convention;
// the form is that of the Raman-dressed F = 1 experiments, Y.-J. Lin,
// K. Jiménez-García, I. B. Spielman, Nature 471, 83 (2011), and
// D. L. Campbell et al., Nat. Commun. 7, 10897 (2016), from memory). Its
// reference pair is (↑, ↓) = (0, −1), the pair Lin et al. isolated with a
// large ε: restricted to it, the model is the pseudo-spin model with
// δ_pair = E_0 − E_{−1} = δ − ε after the gauge shift k → k + 1 (see
// InPairGauge). The other transition (+1, 0) is detuned by δ + ε, 2ε away.
// The result is returned in the gauge of the pair.
func RamanSpin1(omega, delta, epsilon float64) Spin1Model {
	s := Spin1Model{Omega: omega, Up: 0, Down: -1}
	for i := 0; i < 3; i++ {
		m := float64(1 - i)
		s.K[i] = 2 * m
		s.E[i] = delta*m + epsilon*m*m
	}
	return s.InPairGauge()
}

// RamanSpin1Pair is the Raman-dressed model of RamanSpin1 parametrised by the
// detuning of its reference pair (0, −1): δ_pair = E_0 − E_{−1}, so that
// δ = δ_pair + ε. As ε grows at fixed δ_pair, the level +1 moves away
// (E_{+1} − E_0 = δ_pair + 2ε) and the model tends to the pseudo-spin model
// (Ω, δ_pair) (see FarLevel).
func RamanSpin1Pair(omega, deltaPair, epsilon float64) Spin1Model {
	return RamanSpin1(omega, deltaPair+epsilon, epsilon)
}

// InPairGauge shifts momenta and energies so that K_Up = 1, K_Down = −1 and
// E_Up + E_Down = 0 (the gauge in which the pair is the pseudo-spin model).
// It requires K_Up − K_Down = 2 (k_R defined by the pair) up to rounding, and
// leaves the model unchanged otherwise.
func (s Spin1Model) InPairGauge() Spin1Model {
	u, d := Spin1Index(s.Up), Spin1Index(s.Down)
	if math.Abs(s.K[u]-s.K[d]-2) > 1e-9 {
		return s
	}
	kc := (s.K[u] + s.K[d]) / 2
	ec := (s.E[u] + s.E[d]) / 2
	for i := range s.K {
		s.K[i] -= kc
		s.E[i] -= ec
	}
	return s
}

// Validate checks finiteness and the pair.
func (s Spin1Model) Validate() error {
	for _, v := range []float64{s.K[0], s.K[1], s.K[2], s.E[0], s.E[1], s.E[2], s.Omega} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return badf("spin-1 model has a non-finite parameter: %+v", s)
		}
	}
	if s.Up < -1 || s.Up > 1 || s.Down < -1 || s.Down > 1 || absInt(s.Up-s.Down) != 1 {
		return badf("spin-1 reference pair (%d, %d) must be two adjacent sublevels of F = 1", s.Up, s.Down)
	}
	return nil
}

// PairModel returns the pseudo-spin parameters of the reference pair
// restricted to itself: Ω and δ = E_Up − E_Down (E_R). In the pair gauge the
// pair block of h(k) is exactly (k − σ_z)² + (Ω/2)σ_x + (δ/2)σ_z.
func (s Spin1Model) PairModel() Bands {
	return Bands{Omega: s.Omega, Delta: s.E[Spin1Index(s.Up)] - s.E[Spin1Index(s.Down)]}
}

// FarLevel is the second-order (Löwdin) correction that the third level t
// gives to the pair when it is far away. t couples only to its neighbour n
// in the pair (n = 0 when t = ±1; n = Up or Down), with element Ω/2, so the
// pair's level n is shifted by
//
//	s(k) = −(Ω/2)² / D(k),  D(k) = [(k − K_t)² + E_t] − [(k − K_n)² + E_n],
//
// to order Ω²/D (the eigenvalue in the denominator replaced by the
// unperturbed level n; the error is O(Ω³/D²)). A shift s on n = ↑ is
// δ → δ + s plus a constant s/2; on n = ↓ it is δ → δ − s plus s/2. Derived
// here by second-order perturbation theory (common practice, no source).
type FarLevel struct {
	Neighbour int     // m of the pair level that the third level couples to
	Shift     float64 // s at k = 0 of the pair gauge, E_R
	Delta     float64 // δ_pair + (±s): the pseudo-spin detuning with the shift, E_R
	Offset    float64 // s/2: the constant energy shift, E_R
}

// FarLevelAt returns the shift s(k) of the neighbour level at momentum k.
func (s Spin1Model) FarLevelAt(k float64) float64 {
	t := Spin1Index(s.Third())
	n := 1 // the third level is ±1, so its neighbour is m = 0
	if s.Third() == 0 {
		return math.NaN() // not a pair of adjacent levels with an outer third level
	}
	d := (k-s.K[t])*(k-s.K[t]) + s.E[t] - (k-s.K[n])*(k-s.K[n]) - s.E[n]
	return -s.Omega * s.Omega / 4 / d
}

// SecondOrder returns the far-level correction evaluated at k = 0 of the pair
// gauge (the pair's centre); the k-dependence of D is a relative correction
// O(k_R·K_t/E_t) and is left out.
func (s Spin1Model) SecondOrder() FarLevel {
	sh := s.FarLevelAt(0)
	p := s.PairModel()
	f := FarLevel{Neighbour: 0, Shift: sh, Offset: sh / 2}
	if s.Up == 0 {
		f.Delta = p.Delta + sh
	} else {
		f.Delta = p.Delta - sh
	}
	return f
}

// Spin1Couplings are the F = 1 contact couplings in 3D: the interaction
// energy density is (c0/2)n² + (c2/2)|F|² with
//
//	c0 = 4πħ²(a0 + 2a2)/3m,  c2 = 4πħ²(a2 − a0)/3m
//
// (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998); T. Ohmi and K. Machida,
// J. Phys. Soc. Jpn. 67, 1822 (1998)), n = Σ|ψ_m|², F = ψ†Fψ. c2 < 0 is
// ferromagnetic (87Rb), c2 > 0 antiferromagnetic (23Na).
type Spin1Couplings struct {
	C0, C2 float64 // J m³
	A0, A2 float64 // scattering lengths of the total-spin 0 and 2 channels, m
	Note   string  // where the lengths came from
}

// Spin1CouplingsFromLengths returns c0, c2 for a0, a2 given in Bohr radii.
func Spin1CouplingsFromLengths(mass, a0Bohr, a2Bohr float64) (Spin1Couplings, error) {
	if !(mass > 0) || math.IsNaN(a0Bohr) || math.IsNaN(a2Bohr) || math.IsInf(a0Bohr, 0) || math.IsInf(a2Bohr, 0) {
		return Spin1Couplings{}, badf("spin-1 couplings need finite a0, a2 and a positive mass (got a0 = %g, a2 = %g a_B)", a0Bohr, a2Bohr)
	}
	a0, a2 := a0Bohr*BohrRadius, a2Bohr*BohrRadius
	c := Spin1Couplings{A0: a0, A2: a2, Note: "from a0, a2 given explicitly"}
	c.C0 = 4 * math.Pi * Hbar * Hbar * (a0 + 2*a2) / (3 * mass)
	c.C2 = 4 * math.Pi * Hbar * Hbar * (a2 - a0) / (3 * mass)
	return c, nil
}

// Spin1Couplings returns c0, c2 of the F = 1 manifold from the built-in
// scattering lengths A0, A2 (87Rb: a0 = 101.8, a2 = 100.4 a_B,
// E. G. M. van Kempen et al., Phys. Rev. Lett. 88, 093201 (2002); 23Na:
// a0 = 47.36, a2 = 52.98 a_B, S. Knoop et al., Phys. Rev. A 83, 042704
// (2011); both from memory, see speciesTable). Species without them give an
// ErrBadInput error: pass a0, a2 to Spin1CouplingsFromLengths.
func (s Species) Spin1Couplings() (Spin1Couplings, error) {
	if math.IsNaN(s.A0) || math.IsNaN(s.A2) {
		return Spin1Couplings{}, badf("%s: F = 1 scattering lengths a0, a2 are not built in; give them explicitly", s.Name)
	}
	c, err := Spin1CouplingsFromLengths(s.Mass, s.A0, s.A2)
	if err != nil {
		return c, err
	}
	c.Note = "built-in F = 1 scattering lengths: " + s.Source
	return c, nil
}

// ShakeSpin1Result is the three-level model of a shaking scheme and the
// per-sublevel numbers behind it.
type ShakeSpin1Result struct {
	Model Spin1Model // in the gauge of the pair (Up, Down); units of the pair's k_R, E_R
	Pair  ShakeResult

	// Per sublevel, order m = +1, 0, −1.
	Moment       [3]float64 // μ_m = −∂E_m/∂B at B0, J/T
	KSI          [3]float64 // cycle-averaged momentum offset K_m k_R (1/m), relative to m = 0
	MicroKinHz   [3]float64 // ⟨A_m²⟩/2m/h, Hz
	EnergyHz     [3]float64 // E_m/h in the rotating frame before the pair gauge, Hz
	TransHz      [2]float64 // bare |f0| of (+1,0) and (0,−1), Hz
	DetuningHz   [2]float64 // effective detunings E_m − E_{m−1} of (+1,0) and (0,−1), /h, Hz
	QuadZeemanHz float64    // q/h of F = 1 at B0, Hz
	// MixingK: the lab-momentum mismatch of a spin-changing collision in the
	// gauge of the model, Δk = 2K_0 − K_{+1} − K_{−1} (k_R). It vanishes when
	// K_m is linear in m (Raman); for the shaking scheme it comes from the
	// unequal moments. The model treats spin-changing collisions as resonant
	// (Δk neglected), valid when |Δk|·R ≪ 1 for a cloud of size R (1/k_R).
	MixingK  float64
	Warnings []Warning // WarnMixingMismatch (always: it states what is neglected)
}

// WarnMixingMismatch: the three-level model of the shaking scheme treats
// spin-changing collisions as resonant, neglecting the lab-momentum mismatch
// ShakeSpin1Result.MixingK of the unequal recoils.
const WarnMixingMismatch = "spin-mixing-mismatch"

// ShakeSpin1 builds the three-level model of the shaking scheme p, whose
// pair (Up, Down) must be two adjacent sublevels of an F = 1 manifold. Each
// sublevel m has its own moment μ_m, so its own cycle-averaged impulse and
// micromotion: the momentum offsets are K_m = A_m(θ)/ħ (envelope mean, as in
// Shake.Evaluate) and the energies are, in the frame rotating with the RF at
// f_RF = |f0(Up, Down)| + DetuningHz,
//
//	E_m = E_m(B0) + sgn(f0)·m·h f_RF + ⟨A_m²⟩/2m,
//
// so that E_m − E_{m−1} = sgn(f0)(f_RF − |f0(m, m−1)|)h + micromotion
// difference: the two transitions have different recoils and RF detunings,
// 2q apart plus the micromotion difference. The RF couples both transitions
// with the F = 1 element Ω/2 (the Breit–Rabi mixing of the matrix elements at
// high field is neglected). The per-pair numbers come from Shake.Evaluate on
// (+1, 0) and (0, −1).
func ShakeSpin1(p Shake) (ShakeSpin1Result, error) {
	var r ShakeSpin1Result
	if p.Up.F != 1 || p.Down.F != 1 || absInt(p.Up.M-p.Down.M) != 1 {
		return r, badf("the three-level model needs two adjacent sublevels of one F = 1 manifold, got %v and %v", p.Up, p.Down)
	}
	if err := p.Species.Validate(p.Up); err != nil {
		return r, badf("up sublevel: %v", err)
	}
	pair, err := p.Evaluate()
	if err != nil {
		return r, err
	}
	r.Pair = pair
	if pair.Model.ER == 0 || pair.Model.KR == 0 {
		return r, badf("the pair gives no recoil (k_t = 0): no spin–orbit coupling to model")
	}
	sp := p.Species
	pa, pb := p, p
	pa.Up, pa.Down = Sublevel{1, 1}, Sublevel{1, 0}
	pb.Up, pb.Down = Sublevel{1, 0}, Sublevel{1, -1}
	ra, err := pa.Evaluate()
	if err != nil {
		return r, err
	}
	rb, err := pb.Evaluate()
	if err != nil {
		return r, err
	}
	fa := sp.TransitionHz(pa.Up, pa.Down, p.Bias)
	fb := sp.TransitionHz(pb.Up, pb.Down, p.Bias)
	if math.Signbit(fa) != math.Signbit(fb) {
		return r, badf("the two F = 1 transitions have opposite signs at %g G: the Zeeman ladder is not ordered", p.Bias/Gauss)
	}
	sgn := math.Copysign(1, fa)
	fRF := math.Abs(sp.TransitionHz(p.Up, p.Down, p.Bias)) + p.DetuningHz
	r.TransHz = [2]float64{math.Abs(fa), math.Abs(fb)}
	// momentum offsets relative to m = 0: flip +1→0 raises the momentum by
	// K_{+1} − K_0 = k_t(+1→0).
	r.KSI = [3]float64{ra.KtMean, 0, -rb.KtMean}
	r.MicroKinHz = [3]float64{ra.MicroKinUpHz, ra.MicroKinDownHz, rb.MicroKinDownHz}
	e0 := sp.Energy(Sublevel{1, 0}, p.Bias) // energies relative to m = 0 (GHz-sized absolute values would cost digits)
	for i := 0; i < 3; i++ {
		m := 1 - i
		l := Sublevel{1, m}
		r.Moment[i] = sp.Moment(l, p.Bias)
		r.EnergyHz[i] = (sp.Energy(l, p.Bias)-e0)/Planck + sgn*float64(m)*fRF + r.MicroKinHz[i]
	}
	r.DetuningHz = [2]float64{r.EnergyHz[0] - r.EnergyHz[1], r.EnergyHz[1] - r.EnergyHz[2]}
	r.QuadZeemanHz = sp.QuadraticZeemanHz(1, p.Bias)
	kR := pair.Model.KR
	eRHz := pair.Model.ERHz()
	m := Spin1Model{Mass: sp.Mass, KR: kR, ER: pair.Model.ER, Omega: pair.Model.OmegaOverER,
		Up: p.Up.M, Down: p.Down.M}
	for i := 0; i < 3; i++ {
		m.K[i] = r.KSI[i] / kR
		m.E[i] = r.EnergyHz[i] / eRHz
	}
	// Pair gauge, computed directly (K_Up − K_Down = 2 by the definition of k_R).
	u, d := Spin1Index(m.Up), Spin1Index(m.Down)
	kc, ec := (m.K[u]+m.K[d])/2, (m.E[u]+m.E[d])/2
	for i := 0; i < 3; i++ {
		m.K[i] -= kc
		m.E[i] -= ec
	}
	r.Model = m
	r.MixingK = 2*m.K[1] - m.K[0] - m.K[2]
	r.Warnings = append(r.Warnings, Warning{Code: WarnMixingMismatch, Text: fmt.Sprintf("spin-changing collisions treated as resonant: the lab-momentum mismatch 2K_0 − K_+1 − K_−1 = %.3g k_R is neglected (valid for clouds ≪ %.3g /k_R)", r.MixingK, 1/math.Max(math.Abs(r.MixingK), 1e-300))})
	return r, nil
}
