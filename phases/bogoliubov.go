package phases

import (
	"errors"
	"fmt"
	"math"

	"socmap/phases/label"
)

// Bogoliubov–de Gennes (BdG) theory of the mean-field states of a uniform
// spin–orbit-coupled condensate. Units as in the package doc: energies and
// frequencies in E_R (ħ = 1), momenta in k_R, m = 1/2, so that the free
// kinetic energy is q² and a velocity ω/q (E_R/k_R) is 2 in units of ħk_R/m.
//
// Derivation (this project). The state is ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}
// with real two-component amplitudes a_m (Σ_m |a_m|² = 1): one harmonic for
// the plane-wave and single-minimum states (k₀ = k₁, K = 0), a lattice of
// harmonics for the stripe (K = 2k₁, the reciprocal lattice vector). The
// fluctuation at Bloch momentum q is
//
//	δψ = e^{ik₀x} [ Σ_m u_m e^{i(q+mK)x − iωt} + Σ_j v_j* e^{−i(q−jK)x + iωt} ],
//
// both sums over the harmonics of the state, so that at q = 0 the phase and
// translation zero modes lie in the basis. Linearising the Gross–Pitaevskii
// equation i∂_tψ_σ = hψ_σ + Σ_τ g_στ|ψ_τ|²ψ_σ gives σ₃MΨ = ωΨ with Ψ = (u, v),
// M = [[A, Y], [Yᵀ, B]] real symmetric and
//
//	A = h(k₀ + q + mK) − μ + X,   B = h(k₀ − q + jK) − μ + X,
//	X_{σm,τm'} = δ_στ Σ_ρ G_σρ C_ρρ(m−m') + G_στ C_στ(m−m'),
//	Y_{σm,τj} = G_στ D_στ(m+j),
//	C_στ(p) = Σ_b a_{σ,b+p} a_{τ,b},   D_στ(s) = Σ_{a+b=s} a_{σa} a_{τb},
//
// G_στ = n g_στ in E_R and h(k) = (k_x − σ_z)² + k_⊥² + (Ω/2)σ_x + (δ/2)σ_z.
// Modes are normalised to Σ(|u|² − |v|²) = 1 (per particle). The density
// fluctuation of a mode at total momentum q + nK has the amplitude
//
//	δn_n = Σ_σ [ Σ_m a_{σ,m−n} u_{σm} + Σ_j a_{σ,n+j} v_{σj} ],
//
// and the spin (n↑ − n↓) amplitude the same sum with a sign (+ for ↑, − for
// ↓). The dynamic structure factor per particle is
// S(q, ω) = Σ_modes |δn|² δ(ω − ω_mode), so that its first moment is the
// f-sum rule ∫ω S(q, ω) dω = q² (ħ²q²/2m in E_R; L. Pitaevskii, S. Stringari,
// Bose–Einstein Condensation and Superfluidity, Oxford 2016) for a state
// without current.

// Branch selects which mean-field state's excitations are computed.
type Branch int

const (
	// BranchGround: the lower of the plane-wave branch minimum and the
	// stripe solved in the plane-wave basis of its reciprocal lattice.
	BranchGround Branch = iota
	// BranchPlaneWave: the minimum of the single-plane-wave branch (plane
	// wave or single minimum), also where the stripe wins (a metastable or
	// unstable state: the BdG spectrum then shows the roton instability).
	BranchPlaneWave
	// BranchStripe: the stripe, also where a plane wave wins, as long as a
	// stripe solution exists (ErrNotStripe otherwise).
	BranchStripe
)

// String returns "ground", "plane-wave" or "stripe".
func (b Branch) String() string {
	switch b {
	case BranchGround:
		return "ground"
	case BranchPlaneWave:
		return "plane-wave"
	case BranchStripe:
		return "stripe"
	}
	return fmt.Sprintf("branch(%d)", int(b))
}

// ParseBranch reads "ground", "plane-wave" or "stripe".
func ParseBranch(s string) (Branch, error) {
	switch s {
	case "ground", "":
		return BranchGround, nil
	case "plane-wave":
		return BranchPlaneWave, nil
	case "stripe":
		return BranchStripe, nil
	}
	return 0, fmt.Errorf("unknown branch %q; allowed: ground, plane-wave, stripe", s)
}

// QAxis is the direction of the excitation momenta.
type QAxis int

const (
	QAlongX QAxis = iota // along the spin–orbit coupling (extended zones for a stripe)
	QAlongY              // perpendicular (q_x = 0)
	QAlongZ              // perpendicular (q_x = 0); equivalent to QAlongY
)

// ErrNotStripe is returned when BranchStripe is requested and no stripe
// solution exists at these parameters.
var ErrNotStripe = errors.New("no stripe state at these parameters")

// ErrBadMomenta is returned for an empty or non-finite momentum grid.
var ErrBadMomenta = errors.New("momentum grid empty or not finite")

// ExcitationProblem is the excitation spectrum of one uniform problem.
type ExcitationProblem struct {
	Uniform Uniform
	Branch  Branch
	// Q: excitation momenta along Axis (k_R); for a stripe along x they are
	// total momenta (extended zones), reduced to the first Brillouin zone.
	Q    []float64
	Axis QAxis
	// Bragg: if non-nil, the Bragg response at one momentum (see Bragg).
	Bragg *BraggProblem
}

// ExcitationSettings configure Excitations. The zero value (or nil) gives
// the documented defaults.
type ExcitationSettings struct {
	// Variational: settings of the variational theory that picks the state.
	// Default nil (its defaults).
	Variational *Settings
	// Bands: number of stripe bands reported per momentum. Default 6.
	// (The uniform phases always have 2.)
	Bands int
	// Harmonics: number of plane waves 2M of the stripe basis; 0 chooses M
	// from convergence (see HarmonicTol). Default 0.
	Harmonics int
	// HarmonicTol: M is raised until the lowest Bands bands at q = 0, K/4 and
	// K/2 and the energy per particle change by less than HarmonicTol (E_R)
	// when M is raised by one. Default 1e-9.
	HarmonicTol float64
	// MaxHarmonics: largest M tried; not converged by then gives Status
	// HarmonicsNotConverged. Default 24.
	MaxHarmonics int
	// SoundStep: momentum step h (k_R) of the sound velocities,
	// see soundSlope. Default 1e-4.
	SoundStep float64
	// ImagTol: |Im ω| (E_R) above which a frequency counts as complex
	// (dynamical instability). Default 1e-7 × max(1, |Ω|, |δ|, |n g|)
	// (spin-1: max(1, |Ω|, |G0|, |G2|, max|E_m|)).
	ImagTol float64
	// RotonRange: the lower branch is scanned for a roton minimum along x
	// for |q| ≤ RotonRange (k_R). Default 4.
	RotonRange float64
	// Spin1: settings of the spin-1 variational theory (Spin1Excitations
	// only). Default nil (its defaults).
	Spin1 *Spin1Settings
}

func (s *ExcitationSettings) withDefaults(u Uniform) ExcitationSettings {
	return s.withDefaultsScale(u.scale())
}

// withDefaultsScale: the defaults with the energy scale sc of the problem
// (ImagTol = 1e-7 sc).
func (s *ExcitationSettings) withDefaultsScale(sc float64) ExcitationSettings {
	var o ExcitationSettings
	if s != nil {
		o = *s
	}
	if o.Bands <= 0 {
		o.Bands = 6
	}
	if o.HarmonicTol <= 0 {
		o.HarmonicTol = 1e-9
	}
	if o.MaxHarmonics <= 0 {
		o.MaxHarmonics = 24
	}
	if o.SoundStep <= 0 {
		o.SoundStep = 1e-4
	}
	if o.ImagTol <= 0 {
		o.ImagTol = 1e-7 * sc
	}
	if o.RotonRange <= 0 {
		o.RotonRange = 4
	}
	return o
}

// scale is the energy scale max(1, |Ω|, |δ|, |n g_ij|) of the problem (E_R).
func (u Uniform) scale() float64 {
	s := 1.0
	for _, v := range [...]float64{u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud} {
		s = math.Max(s, math.Abs(v))
	}
	return s
}

// ExcitationStatus summarises the spectrum.
type ExcitationStatus int

const (
	// Stable: every frequency real and positive (q ≠ 0).
	Stable ExcitationStatus = iota + 1
	// EnergeticallyUnstable: real frequencies, but a positive-norm mode with
	// ω < 0 (a Landau instability: the state is not a local energy minimum).
	EnergeticallyUnstable
	// DynamicallyUnstable: complex frequencies (Unstable, MaxGrowth).
	DynamicallyUnstable
	// HarmonicsNotConverged: the stripe basis did not converge within
	// MaxHarmonics (the spectrum is that of the largest basis).
	HarmonicsNotConverged
)

func (s ExcitationStatus) String() string {
	switch s {
	case Stable:
		return "stable"
	case EnergeticallyUnstable:
		return "energetically-unstable"
	case DynamicallyUnstable:
		return "dynamically-unstable"
	case HarmonicsNotConverged:
		return "harmonics-not-converged"
	}
	return fmt.Sprintf("status(%d)", int(s))
}

// Mode is one excitation at one momentum.
type Mode struct {
	Omega  float64 // Re ω (E_R)
	Growth float64 // Im ω ≥ 0 (E_R/ħ): growth rate of a dynamical instability, else 0
	// U, V: Bogoliubov amplitudes, index 2·(harmonic) + spin (spin 0 = ↑),
	// harmonics as in CondensateState.M (spin-1: index m = +1, 0, −1 as
	// 0, 1, 2); normalised to Σ|U|² − Σ|V|² = 1
	// (a complex or zero mode: Σ|U|² + Σ|V|² = 1). Phase: the
	// largest-modulus component of (U, V) is real and positive.
	U, V []complex128
	// Density, Spin: weights |δn|² and |δ(n↑ − n↓)|² of the mode at the
	// momentum of the grid point (per particle; spin-1: Spin is |δF_z|²). NaN for the zero modes at
	// q = 0 (and, for a stripe, at multiples of K: the elastic Bragg peak of
	// the crystal is not an excitation).
	Density, Spin float64
	// Transverse: spin-1 only, |δF_x|² + |δF_y|² (0 for the two-level model).
	Transverse float64
}

// CondensateState is the mean-field state ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}.
type CondensateState struct {
	Phase  label.Phase
	K0, K  float64      // k₀ and K (k_R); K = 0 for a plane wave or single minimum
	M      []int        // harmonic indices m
	Amp    [][2]float64 // a_m (↑, ↓), real, Σ|a|² = 1
	Mu     float64      // chemical potential (E_R)
	Energy float64      // energy per particle (E_R)
	// Residual: max |(H[a] − μ)a| of the stationarity equations (E_R), with
	// the currents Σ(p_m − σ)|a|² and Σ m(p_m − σ)|a|² (k_R) for a stripe.
	Residual float64
	// Harmonics: 2M, the basis size of a stripe (1 for uniform states);
	// HarmonicChange is the change (E_R) of the bands and energy on the last
	// increase of M.
	Harmonics      int
	HarmonicChange float64
}

// Spectrum is the part of an excitation result that does not depend on the
// kind of state: the modes on the grid and the observables derived from
// them (shared by ExcitationResult and Spin1ExcitationResult).
type Spectrum struct {
	Status ExcitationStatus

	Q     []float64 // the grid (k_R), as given
	Axis  QAxis
	Modes [][]Mode // per q, ascending in Re ω: 2 for the two-level uniform states, 3 for spin-1, Bands for a stripe
	// StaticS: S(q) = Σ_modes Density (the static structure factor), and
	// FSum: Σ_modes ω·Density (m1(q) + m1(−q) = 2q² by the f-sum rule), per q.
	StaticS, FSum []float64

	Unstable   bool    // a complex frequency on the grid or in the scans
	MaxGrowth  float64 // largest Im ω found (E_R), 0 if none
	MaxGrowthQ float64 // momentum of MaxGrowth along Axis (k_R), NaN if none

	// Sound velocities (units ħk_R/m) of the gapless branches: index 0 the
	// lowest. Uniform phases have one (length 1), a stripe two. CPlusX,
	// CMinusX along ±x, CY along y.
	CPlusX, CMinusX, CY []float64
	// EffectiveMass: m/m* of the condensate along x, ½ d²ε/dk² of the
	// mean-field energy per particle of a plane wave at fixed momentum
	// (spinor relaxed), at the state's momentum. NaN for a stripe.
	EffectiveMass float64
	// Roton: the local minimum of the lower branch along x away from q = 0
	// (|q| ≤ RotonRange); NaN when there is none.
	RotonQ, RotonGap float64

	Bragg *BraggResult // nil unless requested
}

// ExcitationResult is the spectrum of one state.
type ExcitationResult struct {
	Variational Result          // the variational theory at the problem
	State       CondensateState // the state whose excitations these are
	// Metastable: a lower state exists (the other branch was requested).
	Metastable bool
	// PlaneWaveEnergy, StripeEnergy: energies per particle (E_R) of the
	// refined plane-wave state and of the stripe solved with harmonics (NaN
	// when there is no stripe solution). BranchGround takes the lower, which
	// can be a stripe where the two-wave ansatz prefers a plane wave (its
	// missing harmonics lower the stripe near the transition).
	PlaneWaveEnergy, StripeEnergy float64

	Spectrum
}

// checkMomenta: a non-empty grid of finite momenta along a known axis
// (ErrBadMomenta, or an error naming the axis).
func checkMomenta(q []float64, axis QAxis) error {
	if len(q) == 0 {
		return ErrBadMomenta
	}
	for _, v := range q {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ErrBadMomenta
		}
	}
	if axis < QAlongX || axis > QAlongZ {
		return fmt.Errorf("phases: unknown axis %d", axis)
	}
	return nil
}

// Excitations computes the Bogoliubov spectrum of the state selected by
// p.Branch (see Branch) at the momenta p.Q, its density and spin weights,
// the sound velocities, the effective mass, the roton minimum and, when
// p.Bragg is set, the Bragg response. Errors: ErrBadInput for a non-finite
// problem, ErrBadMomenta for an empty or non-finite grid, ErrNotStripe.
func Excitations(p ExcitationProblem, s *ExcitationSettings) (ExcitationResult, error) {
	var res ExcitationResult
	if err := checkMomenta(p.Q, p.Axis); err != nil {
		return res, err
	}
	if p.Branch < BranchGround || p.Branch > BranchStripe {
		return res, fmt.Errorf("phases: unknown branch %d", p.Branch)
	}
	vr, err := Variational(p.Uniform, s.variational())
	if err != nil {
		return res, err
	}
	if vr.Status != Converged {
		return res, fmt.Errorf("phases: the variational theory did not converge at %+v", p.Uniform)
	}
	st := s.withDefaults(p.Uniform)
	res.Variational = vr
	var sp twoLevelSpectrum
	us, err := newUniformSpectrum(p.Uniform, vr.PlaneWaveState, &st)
	if err != nil {
		return res, err
	}
	res.PlaneWaveEnergy, res.StripeEnergy = us.st.Energy, math.NaN()
	ss, serr := newStripeSpectrum(p.Uniform, vr, &st)
	switch {
	case serr == nil:
		res.StripeEnergy = ss.st.Energy
	case !errors.Is(serr, ErrNotStripe):
		return res, serr
	}
	stripeLower := serr == nil && ss.st.Energy < us.st.Energy-1e-12*p.Uniform.scale()
	switch p.Branch {
	case BranchPlaneWave:
		sp, res.Metastable = us, stripeLower
	case BranchStripe:
		if serr != nil {
			return res, serr
		}
		sp, res.Metastable = ss, !stripeLower
	default:
		if stripeLower {
			sp = ss
		} else {
			sp = us
		}
	}
	if sp == twoLevelSpectrum(ss) {
		ss = ss.converge(&st)
		sp = ss
		res.StripeEnergy = ss.st.Energy
	}
	res.State = sp.state()
	status := Stable
	if res.State.HarmonicChange > st.HarmonicTol {
		status = HarmonicsNotConverged
	}
	res.Spectrum, err = computeSpectrum(sp, p.Q, p.Axis, p.Bragg, &st, status)
	return res, err
}

// computeSpectrum fills a Spectrum from the BdG problem sp: the modes and
// moments on the grid q along axis, the sound velocities, the effective
// mass, the roton scan along x and, when br is set, the Bragg response.
// status is the starting status (Stable, or HarmonicsNotConverged); a
// negative-energy mode makes it EnergeticallyUnstable, a complex
// frequency DynamicallyUnstable.
func computeSpectrum(sp spectrum, q []float64, axis QAxis, br *BraggProblem, st *ExcitationSettings, status ExcitationStatus) (Spectrum, error) {
	res := Spectrum{Status: status, Q: append([]float64(nil), q...), Axis: axis, MaxGrowthQ: math.NaN()}
	track := func(q float64, ms []Mode, landau bool) {
		for _, m := range ms {
			if m.Growth > 0 {
				res.Unstable = true
				if m.Growth > res.MaxGrowth {
					res.MaxGrowth, res.MaxGrowthQ = m.Growth, q
				}
			}
		}
		if landau && res.Status == Stable {
			res.Status = EnergeticallyUnstable
		}
	}
	res.Modes = make([][]Mode, len(q))
	res.StaticS = make([]float64, len(q))
	res.FSum = make([]float64, len(q))
	for i, qi := range q {
		ms, landau, err := sp.modes(qi, axis, true)
		if err != nil {
			return res, err
		}
		track(qi, ms, landau)
		res.Modes[i] = ms
		res.StaticS[i], res.FSum[i] = sp.moments(qi, axis)
	}
	res.CPlusX, res.CMinusX, res.CY = sp.sound(st.SoundStep)
	res.EffectiveMass = sp.effectiveMass()
	var rq, rg, scanGrowth, scanQ = math.NaN(), math.NaN(), 0.0, math.NaN()
	if sp.gapless() == 1 {
		// A stripe has zero modes at every multiple of K and no roton.
		rq, rg, scanGrowth, scanQ = rotonScan(sp, st.RotonRange)
	}
	if scanGrowth > 0 {
		res.Unstable = true
		if scanGrowth > res.MaxGrowth && axis == QAlongX {
			res.MaxGrowth, res.MaxGrowthQ = scanGrowth, scanQ
		} else if scanGrowth > res.MaxGrowth {
			res.MaxGrowth, res.MaxGrowthQ = scanGrowth, math.NaN()
		}
	}
	res.RotonQ, res.RotonGap = rq, rg
	if rg < 0 && res.Status == Stable {
		res.Status = EnergeticallyUnstable
	}
	if res.Unstable {
		res.Status = DynamicallyUnstable
	}
	if br != nil {
		b, err := bragg(sp, *br)
		if err != nil {
			return res, err
		}
		res.Bragg = &b
	}
	return res, nil
}

func (s *ExcitationSettings) variational() *Settings {
	if s == nil {
		return nil
	}
	return s.Variational
}

// twoLevelSpectrum is the BdG problem of one state of the two-level model.
type twoLevelSpectrum interface {
	spectrum
	state() CondensateState
}

// spectrum is the BdG problem of one state (two-level or spin-1).
type spectrum interface {
	// modes at momentum q along axis (total momentum for a stripe along x),
	// ascending; landau reports a negative-energy mode. weights: fill
	// Density and Spin.
	modes(q float64, axis QAxis, weights bool) (ms []Mode, landau bool, err error)
	// moments: S(q) and Σ ω S over all modes (not only the reported bands).
	moments(q float64, axis QAxis) (staticS, fsum float64)
	sound(h float64) (cpx, cmx, cy []float64)
	effectiveMass() float64
	gapless() int
}

// uniformSpectrum is the 4×4 BdG problem of a plane-wave or single-minimum
// state e^{ik₁x}(cos θ, sin θ).
type uniformSpectrum struct {
	u     Uniform
	st    CondensateState
	phi   [2]float64
	mu    float64
	x, y  [2][2]float64 // X and Y of the package derivation (one harmonic)
	solve *bdgSolver
	m     [16]float64
}

// newUniformSpectrum refines the plane-wave state pw (Newton on dε/dθ to
// rounding, k = cos 2θ exactly) and prepares its BdG problem.
func newUniformSpectrum(u Uniform, pw TwoWave, st *ExcitationSettings) (*uniformSpectrum, error) {
	th := pw.ThetaPlus
	if pw.W < 0.5 {
		th = pw.ThetaMinus
	}
	th = refineTheta(u, th)
	// The mirror plane wave (k → −k): the lower of the two; when they are
	// degenerate (within 1e-12 of the energy scale) the one with k₁ > 0.
	thm := refineTheta(u, math.Pi/2-th)
	em, _, _ := u.pwEnergy(thm)
	e0, _, _ := u.pwEnergy(th)
	if tie := 1e-12 * u.scale(); em < e0-tie || (math.Abs(em-e0) <= tie && math.Cos(2*thm) > math.Cos(2*th)) {
		th = thm
	}
	e, d1, _ := u.pwEnergy(th)
	c, s := math.Cos(th), math.Sin(th)
	k1 := math.Cos(2 * th)
	us := &uniformSpectrum{u: u, phi: [2]float64{c, s}}
	us.x = [2][2]float64{{2*u.Guu*c*c + u.Gud*s*s, u.Gud * c * s}, {u.Gud * c * s, 2*u.Gdd*s*s + u.Gud*c*c}}
	us.y = [2][2]float64{{u.Guu * c * c, u.Gud * c * s}, {u.Gud * c * s, u.Gdd * s * s}}
	h := u.hk(k1, 0)
	hu := h[0][0]*c + h[0][1]*s + (u.Guu*c*c+u.Gud*s*s)*c
	hd := h[1][0]*c + h[1][1]*s + (u.Gdd*s*s+u.Gud*c*c)*s
	us.mu = c*hu + s*hd
	res := math.Max(math.Abs(hu-us.mu*c), math.Abs(hd-us.mu*s))
	f := TwoWave{KPlus: k1, KMinus: -k1, ThetaPlus: th, ThetaMinus: th, W: 1}
	plus, minus, mk := f.Fractions()
	ph := label.Classify(label.Features{MeanAbsK: mk, FracPlus: plus, FracMinus: minus, Converged: true}, st.thresholds())
	us.st = CondensateState{Phase: ph, K0: k1, M: []int{0}, Amp: [][2]float64{{c, s}}, Mu: us.mu, Energy: e,
		Residual: math.Max(res, math.Abs(d1)), Harmonics: 1}
	us.solve = newBDGSolver(2, st.ImagTol, math.Sqrt(st.ImagTol))
	return us, nil
}

func (s *ExcitationSettings) thresholds() label.Thresholds {
	if s != nil && s.Variational != nil && s.Variational.Thresholds != (label.Thresholds{}) {
		return s.Variational.Thresholds
	}
	return label.DefaultThresholds
}

// hk is the single-particle matrix h(k) at k = (kx, k⊥) (E_R).
func (u Uniform) hk(kx, kperp2 float64) [2][2]float64 {
	return [2][2]float64{
		{(kx-1)*(kx-1) + kperp2 + 0.5*u.Delta, 0.5 * u.Omega},
		{0.5 * u.Omega, (kx+1)*(kx+1) + kperp2 - 0.5*u.Delta},
	}
}

func (us *uniformSpectrum) state() CondensateState { return us.st }
func (us *uniformSpectrum) gapless() int           { return 1 }

func qvec(q float64, axis QAxis) (qx, qp2 float64) {
	if axis == QAlongX {
		return q, 0
	}
	return 0, q * q
}

func (us *uniformSpectrum) modes(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	qx, qp2 := qvec(q, axis)
	k1 := us.st.K0
	a := us.u.hk(k1+qx, qp2)
	b := us.u.hk(k1-qx, qp2)
	m := &us.m
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			dij := 0.0
			if i == j {
				dij = us.mu
			}
			m[4*i+j] = a[i][j] - dij + us.x[i][j]
			m[4*(i+2)+j+2] = b[i][j] - dij + us.x[i][j]
			m[4*i+j+2] = us.y[i][j]
			m[4*(i+2)+j] = us.y[j][i]
		}
	}
	bm := us.solve.solve(m[:])
	if len(bm) != 2 {
		return nil, false, fmt.Errorf("phases: BdG at q = %g gave %d modes (want 2)", q, len(bm))
	}
	out := make([]Mode, 2)
	for k, md := range bm {
		o := Mode{Omega: md.omega, Growth: md.growth, U: md.psi[:2:2], V: md.psi[2:]}
		if weights {
			o.Density, o.Spin = us.weights(q, md)
		}
		out[k] = o
	}
	return out, us.solve.landau, nil
}

// weights: |δn|² and |δs|² of a mode (package derivation with one harmonic).
func (us *uniformSpectrum) weights(q float64, md bdgMode) (dn, ds float64) {
	if q == 0 && md.omega <= us.solve.zeroTol {
		return math.NaN(), math.NaN()
	}
	n := complex(us.phi[0], 0)*(md.psi[0]+md.psi[2]) + complex(us.phi[1], 0)*(md.psi[1]+md.psi[3])
	sp := complex(us.phi[0], 0)*(md.psi[0]+md.psi[2]) - complex(us.phi[1], 0)*(md.psi[1]+md.psi[3])
	return abs2c(n), abs2c(sp)
}

func abs2c(c complex128) float64 { return real(c)*real(c) + imag(c)*imag(c) }

func (us *uniformSpectrum) moments(q float64, axis QAxis) (float64, float64) {
	ms, _, err := us.modes(q, axis, true)
	if err != nil {
		return math.NaN(), math.NaN()
	}
	return sumMoments(ms)
}

func sumMoments(ms []Mode) (s0, s1 float64) {
	for _, m := range ms {
		if math.IsNaN(m.Density) {
			continue
		}
		s0 += m.Density
		s1 += m.Omega * m.Density
	}
	return
}

// soundSlope returns the slope dω/dq at 0⁺ of the lowest n modes from
// f(h) and f(2h) by Richardson extrapolation, ω(q) = cq + aq² + O(q³) ⇒
// c = 2ω(h)/h − ω(2h)/(2h); as a velocity in ħk_R/m it is c/2.
func soundSlope(f func(q float64) []Mode, h float64, n int) []float64 {
	m1, m2 := f(h), f(2*h)
	c := make([]float64, n)
	for i := 0; i < n; i++ {
		if i >= len(m1) || i >= len(m2) || m1[i].Growth > 0 || m2[i].Growth > 0 {
			c[i] = math.NaN()
			continue
		}
		c[i] = 0.5 * (2*m1[i].Omega/h - m2[i].Omega/(2*h))
	}
	return c
}

func (us *uniformSpectrum) sound(h float64) (cpx, cmx, cy []float64) {
	along := func(axis QAxis, sg float64) func(q float64) []Mode {
		return func(q float64) []Mode {
			ms, _, err := us.modes(sg*q, axis, false)
			if err != nil {
				return nil
			}
			return ms
		}
	}
	return soundSlope(along(QAlongX, 1), h, 1), soundSlope(along(QAlongX, -1), h, 1), soundSlope(along(QAlongY, 1), h, 1)
}

// effectiveMass returns m/m* = ½ d²ε/dk² at the state's momentum, with
// ε(k) = min_θ [k² + 1 − 2k cos 2θ + (Ω/2) sin 2θ + (δ/2) cos 2θ + ε_int(θ)]
// the mean-field energy per particle of the plane wave e^{ikx}(cos θ, sin θ)
// (Uniform.Couplings), by a central difference with step 1e-3.
func (us *uniformSpectrum) effectiveMass() float64 {
	th0 := math.Atan2(us.phi[1], us.phi[0])
	k1 := us.st.K0
	e := func(k float64) float64 {
		th := th0
		g1, g2, dg := us.u.Couplings()
		u := us.u
		var en float64
		for it := 0; it < 60; it++ {
			c, s := math.Cos(2*th), math.Sin(2*th)
			en = k*k + 1 - 2*k*c + 0.5*u.Omega*s + 0.5*u.Delta*c + g1 + dg*c + g2*c*c
			d1 := 4*k*s + u.Omega*c - u.Delta*s - 2*s*(dg+2*g2*c)
			d2 := 8*k*c - 2*u.Omega*s - 2*u.Delta*c - 4*c*(dg+2*g2*c) + 8*g2*s*s
			if d2 <= 0 {
				break
			}
			step := d1 / d2
			th -= step
			if math.Abs(step) < 1e-15 {
				break
			}
		}
		return en
	}
	h := 1e-3
	return 0.5 * (e(k1+h) - 2*e(k1) + e(k1-h)) / (h * h)
}

// rotonScan scans the lowest mode along x for |q| ≤ r in steps of 0.005 k_R
// and refines the lowest interior local minimum with |q| ≥ 0.05 by golden
// section (to 1e-9 k_R). It also returns the largest growth rate met.
func rotonScan(sp spectrum, r float64) (rq, gap, growth, growthQ float64) {
	rq, gap, growthQ = math.NaN(), math.NaN(), math.NaN()
	low := func(q float64) (float64, float64) {
		ms, _, err := sp.modes(q, QAlongX, false)
		if err != nil || len(ms) == 0 {
			return math.NaN(), 0
		}
		g := 0.0
		for _, m := range ms {
			g = math.Max(g, m.Growth)
		}
		return ms[0].Omega, g
	}
	const dq = 0.005
	n := int(math.Round(r / dq))
	w := make([]float64, 2*n+1)
	for i := range w {
		q := float64(i-n) * dq
		var g float64
		w[i], g = low(q)
		if g > growth {
			growth, growthQ = g, q
		}
	}
	if growth > 0 {
		return
	}
	for i := 1; i < len(w)-1; i++ {
		q := float64(i-n) * dq
		if math.Abs(q) < 0.05 || !(w[i] <= w[i-1] && w[i] < w[i+1]) {
			continue
		}
		a, b := q-dq, q+dq
		const gr = 0.6180339887498949
		c, d := b-gr*(b-a), a+gr*(b-a)
		fc, _ := low(c)
		fd, _ := low(d)
		for b-a > 1e-9 {
			if fc < fd {
				b, d, fd = d, c, fc
				c = b - gr*(b-a)
				fc, _ = low(c)
			} else {
				a, c, fc = c, d, fd
				d = a + gr*(b-a)
				fd, _ = low(d)
			}
		}
		qm := 0.5 * (a + b)
		wm, _ := low(qm)
		if math.IsNaN(gap) || wm < gap {
			rq, gap = qm, wm
		}
	}
	return
}

// refineTheta polishes a minimum of the plane-wave energy in θ by Newton
// steps on dε/dθ (stopping where ε” ≤ 0).
func refineTheta(u Uniform, th float64) float64 {
	for it := 0; it < 50; it++ {
		_, d1, d2 := u.pwEnergy(th)
		if d2 <= 0 {
			break
		}
		step := d1 / d2
		th -= step
		if math.Abs(step) < 1e-15 {
			break
		}
	}
	return th
}

// PointExcitations are the excitation observables of one map point.
type PointExcitations struct {
	RotonGap, RotonQ         float64 // E_R, k_R; NaN without a roton minimum
	SoundPlusX, SoundMinusX  float64 // ħk_R/m along +x and −x
	Unstable                 bool    // a complex frequency in the roton scan
	EnergeticallyUnstableBdG bool    // a negative-energy mode in the roton scan
}

// UniformPointExcitations returns the roton gap and the sound velocities
// along ±x of the uniform (plane-wave or single-minimum) state of a
// variational result vr at u, for map observables. Stripe (and
// not-converged) points give NaN everywhere: their excitations need the
// stripe solve of Excitations. Settings as in Excitations (nil: defaults).
func UniformPointExcitations(u Uniform, vr Result, s *ExcitationSettings) (PointExcitations, error) {
	nan := math.NaN()
	out := PointExcitations{RotonGap: nan, RotonQ: nan, SoundPlusX: nan, SoundMinusX: nan}
	if vr.Phase != label.PlaneWave && vr.Phase != label.SingleMinimum {
		return out, nil
	}
	st := s.withDefaults(u)
	us, err := newUniformSpectrum(u, vr.PlaneWaveState, &st)
	if err != nil {
		return out, err
	}
	cp, cm, _ := us.sound(st.SoundStep)
	out.SoundPlusX, out.SoundMinusX = cp[0], cm[0]
	rq, rg, growth, _ := rotonScan(us, st.RotonRange)
	out.RotonQ, out.RotonGap = rq, rg
	out.Unstable = growth > 0
	out.EnergeticallyUnstableBdG = rg < 0
	return out, nil
}
