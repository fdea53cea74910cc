package phases

import (
	"errors"
	"fmt"
	"math"

	"socmap/phases/label"
)

// Bogoliubov–de Gennes theory of the uniform (one-plane-wave) states of the
// spin-1 model (Spin1Uniform). Units as in the package doc (E_R, k_R, ħ = 1,
// m = 1/2); order of the components m = +1, 0, −1.
//
// Derivation (this project). The energy per volume is
//
//	ℰ = ψ†(h − λF_z)ψ + (c0/2)n² + (c2/2)|⟨F⟩|²,  ⟨F_α⟩ = ψ†F_αψ,
//
// (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998); T. Ohmi and K. Machida,
// J. Phys. Soc. Jpn. 67, 1822 (1998)), with λ = 0 when the magnetisation is
// free and λ the Lagrange multiplier of ⟨F_z⟩ = M when it is fixed: a fixed
// M is an F_z-conserving constraint on the collisions, and the state that
// minimises ℰ at fixed M is a stationary point of ℰ − λ⟨F_z⟩, so the
// dynamics around it is that of h − λF_z (a linear Zeeman shift that
// exactly compensates the constraint). The Gross–Pitaevskii equation is
//
//	i∂_tψ = (h − λF_z)ψ + c0 n ψ + c2 Σ_α ⟨F_α⟩ F_α ψ.
//
// The state is ψ₀ = √n e^{ik₀x} φ with a real unit spinor φ (h is real, so a
// real stationary spinor is stationary also against complex variations); it
// solves (H[φ] − λF_z)φ = μφ with H[φ] = h(k₀) + G0 + G2(f_x F_x + f_z F_z),
// f_α = φᵀF_αφ (f_y = 0 for real φ), G0 = n c0, G2 = n c2 (E_R), and carries
// no current, φᵀ∂_k h(k₀)φ = 0 (k₀ is the energy minimum). The fluctuation
// δψ = e^{ik₀x}[u e^{iqx − iωt} + v* e^{−iqx + iωt}] (u, v ∈ ℂ³) linearises
// the GP equation to σ₃MΨ = ωΨ, Ψ = (u, v), M = [[A, Y], [Y*, B*]]:
//
//	A = h(k₀ + q) − μ − λF_z + G0 + G2(f_x F_x + f_z F_z) + G0 φφᵀ + G2 Σ_α (F_αφ)(F_αφ)†,
//	B = A with h(k₀ − q),
//	Y = G0 φφᵀ + G2 Σ_α (F_αφ)(F_αφ)ᵀ,
//
// from δ(nψ) = nδψ + (φ†δψ + δψ†φ)φ and δ(⟨F_α⟩F_αψ) = ⟨F_α⟩F_αδψ +
// (φ†F_αδψ + δψ†F_αφ)F_αφ. Writing F_y = iS with S real antisymmetric,
// (F_yφ)(F_yφ)† = (Sφ)(Sφ)ᵀ and (F_yφ)(F_yφ)ᵀ = −(Sφ)(Sφ)ᵀ, so that with
// a = F_xφ, b = Sφ, c = F_zφ
//
//	Σ_α (F_αφ)(F_αφ)† = aaᵀ + bbᵀ + ccᵀ,  Σ_α (F_αφ)(F_αφ)ᵀ = aaᵀ − bbᵀ + ccᵀ,
//
// and M is real symmetric (6×6), solved by the same σ₃-symplectic solver as
// the two-level problem (bdgSolver). For q along y or z, h(k₀ ± q) is
// h(k₀) + q². Modes are normalised to Σ(|u|² − |v|²) = 1. The amplitudes of
// the density, longitudinal and transverse spin fluctuations of a mode are
//
//	δn = φ·(u + v),  δF_z = (F_zφ)·(u + v),  δF_x = a·(u + v),  δF_y = i b·(v − u),
//
// and the weights are Density = |δn|², Spin = |δF_z|², Transverse =
// |δF_x|² + |δF_y|² (per particle). S(q, ω) = Σ_modes Density δ(ω − ω_mode)
// obeys the f-sum rule m1(q) + m1(−q) = 2q² (the coupling F_x and the
// offsets K_m are local in x, so [ρ_q, h] is the kinetic commutator).
//
// Checks (spin1bdg_test.go): without coupling, the polar state
// (φ = (0, 1, 0), quadratic Zeeman q > 0) has the density branch
// √(ε_k(ε_k + 2G0)) and two degenerate spin branches
// √((ε_k + q)(ε_k + q + 2G2)); the ferromagnetic state φ = (1, 0, 0) has
// √(ε_k(ε_k + 2(G0 + G2))) (density), ε_k − q (m = 0; from A₀₀ = ε_k − q,
// Y₀ = 0) and ε_k − 2G2 (m = −1; A₋₁ = ε_k − 2G2, Y₋₁ = 0), ε_k = q_k², the
// linear Zeeman shift left out. These follow from the matrices above (derived
// here) and agree with the forms of D. M. Stamper-Kurn and M. Ueda, Rev. Mod.
// Phys. 85, 1191 (2013) (recalled).

// ErrSpin1MultiWave is returned when a spin-1 state of two or more plane
// waves is outside the plane-wave basis of spin1stripebdg.go: momenta not
// on one lattice, or amplitudes that are not real up to a common phase.
var ErrSpin1MultiWave = errors.New("the Bogoliubov spectrum of this spin-1 state of several plane waves is not implemented (momenta not on one lattice, or complex relative amplitudes)")

// Spin1ExcitationProblem is the excitation spectrum of one uniform spin-1
// problem.
type Spin1ExcitationProblem struct {
	Uniform Spin1Uniform
	// Branch: BranchGround (the variational winner: one plane wave, or
	// several solved in the plane-wave basis of their lattice), BranchPlaneWave
	// (the lowest converged one-wave candidate of the variational theory,
	// also where a state of more waves is lower: then Metastable) or
	// BranchStripe (the lowest converged candidate of two or three waves,
	// each of weight ≥ 1e-6; ErrNotStripe when there is none; Metastable
	// when a one-wave state is lower).
	Branch Branch
	// Q: excitation momenta along Axis (k_R).
	Q    []float64
	Axis QAxis
	// FixMagnetization, Magnetization: hold ⟨F_z⟩ = M (−1 < M < 1); the BdG
	// then uses h − λF_z (see the derivation). Default: free (λ = 0).
	FixMagnetization bool
	Magnetization    float64
	// Bragg: if non-nil, the Bragg response at one momentum along x.
	Bragg *BraggProblem
}

// Spin1CondensateState is the state ψ₀ = √n e^{ik₀x} φ.
type Spin1CondensateState struct {
	Phase label.Phase
	Name  string // the variational description (e.g. "plane-wave at minimum 1 of 2 (…)")
	// K0: k₀ (k_R); for a state of several waves the momentum of harmonic
	// m = 0, a lattice point k₀ + mK as the Newton solve leaves it.
	K0  float64
	Phi [3]float64 // φ, real, unit, order m = +1, 0, −1 (NaN for a state of several waves)
	Mu  float64    // chemical potential μ (E_R)
	// Lambda: the Lagrange multiplier of a fixed ⟨F_z⟩ (E_R), 0 when free.
	Lambda float64
	Energy float64 // energy per particle (E_R), without the −λ⟨F_z⟩ term
	Fz     float64 // ⟨F_z⟩ per particle
	FPerp  float64 // |⟨F_x⟩| per particle (the transverse magnetisation; ⟨F_y⟩ = 0)
	// Residual: max of |(H[φ] − λF_z − μ)φ| (E_R), |φᵀ∂_k hφ| (k_R) and
	// |⟨F_z⟩ − M| after the Newton refinement (for a stripe, of the
	// equations of spin1stripebdg.go).
	Residual float64
	// Stripe (two or more plane waves): K the reciprocal lattice vector
	// (k_R), M the harmonics m, Amp the real amplitudes a_m (m_F = +1, 0,
	// −1) of ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}, Harmonics = 2M the basis size
	// and HarmonicChange (E_R) the change of the bands and the energy on the
	// last increase of M; Phi is then NaN and FPerp the rms transverse
	// magnetisation. A uniform state has K = 0, Harmonics = 1.
	K              float64
	M              []int
	Amp            [][3]float64
	Harmonics      int
	HarmonicChange float64
}

// Spin1ExcitationResult is the spectrum of one spin-1 state. Modes have
// three entries per momentum; Mode.U, V are indexed by m (+1, 0, −1).
type Spin1ExcitationResult struct {
	Variational Spin1Result
	State       Spin1CondensateState
	// Metastable: the variational theory finds a lower state (BranchPlaneWave).
	Metastable bool
	Spectrum
}

// Spin1Excitations computes the Bogoliubov spectrum of the spin-1 state of
// p (see Spin1ExcitationProblem.Branch) at the momenta p.Q. A state of one
// plane wave: three branches with their density, F_z and transverse-spin
// weights, the sound velocity of the gapless branch along ±x and y, the
// effective mass, the roton minimum of the lowest branch along x. A state of
// several plane waves (stripe, stripe-3, antiferromagnetic,
// broken-axisymmetry): solved in the plane-wave basis of its lattice
// (spin1stripebdg.go), the lowest Bands bands at total momentum q (extended
// zones along x), two gapless branches, no effective mass or roton. Both:
// dynamical instabilities and, with p.Bragg, the Bragg response (density
// and F_z channels). The state is the variational one refined by Newton's
// method on the stationarity equations. Errors: ErrBadInput, ErrBadMomenta,
// ErrNotStripe, ErrSpin1MultiWave. Settings: as for Excitations (Bands,
// Harmonics, HarmonicTol, MaxHarmonics for the several-wave states); Spin1
// holds the variational settings (its magnetisation fields are overridden
// by the problem's).
func Spin1Excitations(p Spin1ExcitationProblem, s *ExcitationSettings) (Spin1ExcitationResult, error) {
	var res Spin1ExcitationResult
	if err := checkMomenta(p.Q, p.Axis); err != nil {
		return res, err
	}
	switch p.Branch {
	case BranchGround, BranchPlaneWave:
	case BranchStripe:
	default:
		return res, fmt.Errorf("phases: unknown branch %d", p.Branch)
	}
	if p.FixMagnetization && !(p.Magnetization > -1 && p.Magnetization < 1) {
		return res, fmt.Errorf("%w: magnetisation %g: allowed −1 < M < 1", ErrBadInput, p.Magnetization)
	}
	var vs Spin1Settings
	if s != nil && s.Spin1 != nil {
		vs = *s.Spin1
	}
	vs.FixMagnetization, vs.Magnetization = p.FixMagnetization, p.Magnetization
	vr, err := Spin1Variational(p.Uniform, &vs)
	if err != nil {
		return res, err
	}
	if vr.Status != Converged {
		return res, fmt.Errorf("phases: the spin-1 variational theory did not converge at %+v", p.Uniform)
	}
	res.Variational = vr
	var wave Spin1Wave
	var name string
	ph := vr.Phase
	switch p.Branch {
	case BranchPlaneWave:
		best := -1
		for i, c := range vr.Candidates {
			if c.OK && len(c.State.Waves) == 1 && (best < 0 || c.Energy < vr.Candidates[best].Energy) {
				best = i
			}
		}
		if best < 0 {
			return res, fmt.Errorf("phases: no converged one-plane-wave spin-1 state at %+v", p.Uniform)
		}
		c := vr.Candidates[best]
		wave = c.State.Waves[0]
		res.Metastable = vr.Energy < c.Energy-vs.withDefaults().TieTol
		ph = label.PlaneWave
		if len(vr.Bands.Minima) == 1 {
			ph = label.SingleMinimum
		}
		name = fmt.Sprintf("one plane wave from %s, k = %+.4g", c.Start, wave.K)
	case BranchStripe:
		best := -1
		for i, c := range vr.Candidates {
			if c.OK && len(c.State.Waves) > 1 && minWeight(c.State) >= spin1WeightFloor && (best < 0 || c.Energy < vr.Candidates[best].Energy) {
				best = i
			}
		}
		if best < 0 {
			return res, ErrNotStripe
		}
		c := vr.Candidates[best]
		res.Metastable = vr.Energy < c.Energy-vs.withDefaults().TieTol
		ph, name = vr.Phase, vr.Name
		if res.Metastable {
			ph, name = label.Stripe, fmt.Sprintf("%s from %s", c.Family, c.Start)
		}
		return res, res.stripe(p, c.State, s, ph, name)
	default:
		if vr.Phase != label.PlaneWave && vr.Phase != label.SingleMinimum {
			return res, res.stripe(p, vr.State, s, vr.Phase, vr.Name)
		}
		// the dominant wave (the others are below the classifier's floor)
		bw := -1.0
		for _, w := range vr.State.Waves {
			if a := real(w.Amp)*real(w.Amp) + imag(w.Amp)*imag(w.Amp); a > bw {
				bw, wave = a, w
			}
		}
		name = vr.Name
	}
	sp, err := newSpin1Spectrum(p, wave, s)
	if err != nil {
		return res, err
	}
	sp.st.Phase, sp.st.Name = ph, name
	sp.st.M, sp.st.Amp, sp.st.Harmonics = []int{0}, [][3]float64{sp.st.Phi}, 1
	res.State = sp.st
	st := s.withDefaultsScale(sp.scale)
	res.Spectrum, err = computeSpectrum(sp, p.Q, p.Axis, p.Bragg, &st, Stable)
	return res, err
}

// minWeight is the smallest normalised weight of the waves of s.
func minWeight(s Spin1State) float64 {
	var tot float64
	w := math.Inf(1)
	for _, x := range s.Waves {
		a := real(x.Amp)*real(x.Amp) + imag(x.Amp)*imag(x.Amp)
		tot += a
		w = math.Min(w, a)
	}
	return w / tot
}

// stripe solves the multi-wave state s in the plane-wave basis of its
// lattice and fills the result with its Bloch–Bogoliubov spectrum.
func (res *Spin1ExcitationResult) stripe(p Spin1ExcitationProblem, s Spin1State, set *ExcitationSettings, ph label.Phase, name string) error {
	st := set.withDefaultsScale(spin1Scale(p.Uniform))
	ss, err := newSpin1StripeSpectrum(p, s, &st)
	if err != nil {
		return err
	}
	c, _ := spin1Pairs(ss.a, ss.nh)
	var fz, fp float64
	for pi := range c {
		fx, t := trMul(&spin1Fx, &c[pi]), trMul(&spin1S, &c[pi])
		fp += fx*fx + t*t
	}
	amp := make([][3]float64, ss.nh)
	ms := make([]int, ss.nh)
	for i := range amp {
		copy(amp[i][:], ss.a[3*i:3*i+3])
		ms[i] = i - ss.M
		fz += amp[i][0]*amp[i][0] - amp[i][2]*amp[i][2]
	}
	nan := math.NaN()
	res.State = Spin1CondensateState{Phase: ph, Name: name, K0: ss.k0, K: ss.K, Phi: [3]float64{nan, nan, nan}, Mu: ss.mu, Lambda: ss.lam,
		Energy: ss.energy, Fz: fz, FPerp: math.Sqrt(fp), Residual: ss.resid, M: ms, Amp: amp, Harmonics: ss.nh, HarmonicChange: ss.change}
	status := Stable
	if ss.change > st.HarmonicTol {
		status = HarmonicsNotConverged
	}
	res.Spectrum, err = computeSpectrum(ss, p.Q, p.Axis, p.Bragg, &st, status)
	return err
}

// spin1Scale is max(1, |Ω|, |G0|, |G2|, max|E_m|) (E_R).
func spin1Scale(u Spin1Uniform) float64 {
	s := math.Max(1, math.Max(math.Abs(u.Model.Omega), math.Max(math.Abs(u.G0), math.Abs(u.G2))))
	for _, e := range u.Model.E {
		s = math.Max(s, math.Abs(e))
	}
	return s
}

// spin1Spectrum is the 6×6 BdG problem of a one-plane-wave spin-1 state.
type spin1Spectrum struct {
	u       Spin1Uniform
	fix     bool
	mag     float64
	scale   float64
	st      Spin1CondensateState
	a, b, c [3]float64    // F_xφ, Sφ, F_zφ
	local   [3][3]float64 // −μ − λF_z + G0 + G2(f_x F_x + f_z F_z) + X
	y       [3][3]float64
	solve   *bdgSolver
	m       [36]float64
}

var spin1Fx = [3][3]float64{{0, 1 / math.Sqrt2, 0}, {1 / math.Sqrt2, 0, 1 / math.Sqrt2}, {0, 1 / math.Sqrt2, 0}}
var spin1S = [3][3]float64{{0, -1 / math.Sqrt2, 0}, {1 / math.Sqrt2, 0, -1 / math.Sqrt2}, {0, 1 / math.Sqrt2, 0}}
var spin1Fz = [3]float64{1, 0, -1}

func mulVec3(m *[3][3]float64, v [3]float64) (o [3]float64) {
	for i := 0; i < 3; i++ {
		o[i] = m[i][0]*v[0] + m[i][1]*v[1] + m[i][2]*v[2]
	}
	return
}

func dot3(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// spin1MeanField returns H[φ]φ − λF_zφ at momentum k (E_R), f_x, f_z and the
// energy per particle φᵀhφ + G0/2 + G2/2 (f_x² + f_z²) for a unit φ.
func spin1MeanField(u *Spin1Uniform, k, lam float64, phi [3]float64) (hphi [3]float64, fx, fz, e float64) {
	h := u.Model.Hamiltonian(k)
	fx = dot3(phi, mulVec3(&spin1Fx, phi))
	fz = phi[0]*phi[0] - phi[2]*phi[2]
	n := dot3(phi, phi)
	hp := mulVec3(&h, phi)
	ax := mulVec3(&spin1Fx, phi)
	for i := 0; i < 3; i++ {
		hphi[i] = hp[i] + u.G0*n*phi[i] + u.G2*(fx*ax[i]+fz*spin1Fz[i]*phi[i]) - lam*spin1Fz[i]*phi[i]
	}
	e = dot3(phi, hp) + u.G0/2*n*n + u.G2/2*(fx*fx+fz*fz)
	return
}

// spin1Newton solves the stationarity equations of a one-plane-wave state
// by spin1NewtonFD: unknowns φ (3), μ, then k unless fixK, then λ when fix; equations (H[φ] − λF_z − μ)φ = 0, φ·φ = 1, then
// φᵀ∂_k hφ = 0 unless fixK, then φᵀF_zφ = mag when fix. It returns the
// solution and the largest residual.
func spin1Newton(u *Spin1Uniform, phi [3]float64, k, mu, lam float64, fixK, fix bool, mag float64) ([3]float64, float64, float64, float64, float64) {
	pack := func() []float64 {
		x := []float64{phi[0], phi[1], phi[2], mu}
		if !fixK {
			x = append(x, k)
		}
		if fix {
			x = append(x, lam)
		}
		return x
	}
	unpack := func(x []float64) ([3]float64, float64, float64, float64) {
		p, m, kk, l := [3]float64{x[0], x[1], x[2]}, x[3], k, 0.0
		i := 4
		if !fixK {
			kk = x[i]
			i++
		}
		if fix {
			l = x[i]
		}
		return p, m, kk, l
	}
	resid := func(x []float64, r []float64) {
		p, m, kk, l := unpack(x)
		hp, _, fz, _ := spin1MeanField(u, kk, l, p)
		for i := 0; i < 3; i++ {
			r[i] = hp[i] - m*p[i]
		}
		r[3] = dot3(p, p) - 1
		i := 4
		if !fixK {
			var cur float64
			for j := 0; j < 3; j++ {
				cur += 2 * (kk - u.Model.K[j]) * p[j] * p[j]
			}
			r[i] = cur
			i++
		}
		if fix {
			r[i] = fz - mag
		}
	}
	x := pack()
	res := spin1NewtonFD(x, resid, 60)
	p, m, kk, l := unpack(x)
	return p, m, kk, l, res
}

// newSpin1Spectrum refines the wave w of p and prepares its BdG problem.
// A refinement whose residual stays above 1e-9 × the energy scale is an
// error (the state is not stationary, so its spectrum would not be).
func newSpin1Spectrum(p Spin1ExcitationProblem, w Spin1Wave, s *ExcitationSettings) (*spin1Spectrum, error) {
	u := p.Uniform
	ss := &spin1Spectrum{u: u, fix: p.FixMagnetization, mag: p.Magnetization, scale: spin1Scale(u)}
	phi := w.Spinor
	nrm := math.Sqrt(dot3(phi, phi))
	for i := range phi {
		phi[i] /= nrm
	}
	// μ, λ from the projections of the mean-field action on φ and F_zφ
	hp, _, _, _ := spin1MeanField(&u, w.K, 0, phi)
	mu, lam := dot3(phi, hp), 0.0
	if ss.fix {
		c := [3]float64{phi[0], 0, -phi[2]}
		// least squares hp = μφ + λ F_zφ
		g11, g12, g22 := 1.0, dot3(phi, c), dot3(c, c)
		b1, b2 := dot3(phi, hp), dot3(c, hp)
		if det := g11*g22 - g12*g12; math.Abs(det) > 1e-14 {
			mu, lam = (b1*g22-b2*g12)/det, (g11*b2-g12*b1)/det
		}
	}
	phi, mu, k, lam, resid := spin1Newton(&u, phi, w.K, mu, lam, false, ss.fix, ss.mag)
	if resid > 1e-9*ss.scale {
		return nil, fmt.Errorf("phases: the spin-1 plane-wave state did not converge (Newton residual %.3g E_R)", resid)
	}
	_, fx, fz, e := spin1MeanField(&u, k, lam, phi)
	ss.st = Spin1CondensateState{K0: k, Phi: phi, Mu: mu, Lambda: lam, Energy: e, Fz: fz, FPerp: math.Abs(fx), Residual: resid}
	ss.a = mulVec3(&spin1Fx, phi)
	ss.b = mulVec3(&spin1S, phi)
	ss.c = [3]float64{phi[0], 0, -phi[2]}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			pp := phi[i] * phi[j]
			aa, bb, cc := ss.a[i]*ss.a[j], ss.b[i]*ss.b[j], ss.c[i]*ss.c[j]
			ss.local[i][j] = u.G0*pp + u.G2*(aa+bb+cc) + u.G2*fx*spin1Fx[i][j]
			ss.y[i][j] = u.G0*pp + u.G2*(aa-bb+cc)
		}
		ss.local[i][i] += -mu - lam*spin1Fz[i] + u.G0 + u.G2*fz*spin1Fz[i]
	}
	st := s.withDefaultsScale(ss.scale)
	ss.solve = newBDGSolver(3, st.ImagTol, math.Sqrt(st.ImagTol))
	return ss, nil
}

func (ss *spin1Spectrum) gapless() int { return 1 }

// matrix fills the 6×6 M at momentum q along axis.
func (ss *spin1Spectrum) matrix(q float64, axis QAxis) {
	qx, qp2 := qvec(q, axis)
	k := ss.st.K0
	a := ss.u.Model.Hamiltonian(k + qx)
	b := ss.u.Model.Hamiltonian(k - qx)
	m := &ss.m
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			m[6*i+j] = a[i][j] + ss.local[i][j]
			m[6*(i+3)+j+3] = b[i][j] + ss.local[i][j]
			m[6*i+j+3] = ss.y[i][j]
			m[6*(i+3)+j] = ss.y[j][i]
		}
		m[6*i+i] += qp2
		m[6*(i+3)+i+3] += qp2
	}
}

func (ss *spin1Spectrum) modes(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	ss.matrix(q, axis)
	bm := ss.solve.solve(ss.m[:])
	if len(bm) != 3 {
		return nil, false, fmt.Errorf("phases: spin-1 BdG at q = %g gave %d modes (want 3)", q, len(bm))
	}
	out := make([]Mode, 3)
	for k, md := range bm {
		o := Mode{Omega: md.omega, Growth: md.growth, U: md.psi[:3:3], V: md.psi[3:]}
		if weights {
			o.Density, o.Spin, o.Transverse = ss.weights(q, md)
		}
		out[k] = o
	}
	return out, ss.solve.landau, nil
}

// weights: |δn|², |δF_z|² and |δF_x|² + |δF_y|² of a mode (see the derivation).
func (ss *spin1Spectrum) weights(q float64, md bdgMode) (dn, dz, dt float64) {
	if q == 0 && md.omega <= ss.solve.zeroTol {
		return math.NaN(), math.NaN(), math.NaN()
	}
	var n, z, x, y complex128
	phi := ss.st.Phi
	for i := 0; i < 3; i++ {
		s, d := md.psi[i]+md.psi[i+3], md.psi[i+3]-md.psi[i]
		n += complex(phi[i], 0) * s
		z += complex(ss.c[i], 0) * s
		x += complex(ss.a[i], 0) * s
		y += complex(ss.b[i], 0) * d
	}
	return abs2c(n), abs2c(z), abs2c(x) + abs2c(y)
}

func (ss *spin1Spectrum) moments(q float64, axis QAxis) (float64, float64) {
	ms, _, err := ss.modes(q, axis, true)
	if err != nil {
		return math.NaN(), math.NaN()
	}
	return sumMoments(ms)
}

func (ss *spin1Spectrum) sound(h float64) (cpx, cmx, cy []float64) {
	along := func(axis QAxis, sg float64) func(q float64) []Mode {
		return func(q float64) []Mode {
			ms, _, err := ss.modes(sg*q, axis, false)
			if err != nil {
				return nil
			}
			return ms
		}
	}
	return soundSlope(along(QAlongX, 1), h, 1), soundSlope(along(QAlongX, -1), h, 1), soundSlope(along(QAlongY, 1), h, 1)
}

// effectiveMass returns m/m* = ½ d²ε/dk² at k₀, ε(k) the energy per
// particle of the plane wave e^{ikx}φ at fixed k with φ (and μ, λ) relaxed
// by spin1Newton (at fixed ⟨F_z⟩ when the magnetisation is fixed), by a
// central difference with step 1e-3 (NaN when a relaxation fails).
func (ss *spin1Spectrum) effectiveMass() float64 {
	e := func(k float64) float64 {
		phi, _, _, lam, r := spin1Newton(&ss.u, ss.st.Phi, k, ss.st.Mu, ss.st.Lambda, true, ss.fix, ss.mag)
		if r > 1e-9*ss.scale {
			return math.NaN()
		}
		_, _, _, en := spin1MeanField(&ss.u, k, lam, phi)
		return en
	}
	h, k := 1e-3, ss.st.K0
	return 0.5 * (e(k+h) - 2*ss.st.Energy + e(k-h)) / (h * h)
}

// Spin1PairUniform returns the two-level problem of the reference pair of
// u's model: Ω, δ_pair (plus the far-level shift when secondOrder, see
// dispersion.Spin1Model.SecondOrder) and the pair couplings from G0, G2.
func Spin1PairUniform(u Spin1Uniform, secondOrder bool) Uniform {
	pm := u.Model.PairModel()
	d := pm.Delta
	if secondOrder {
		d = u.Model.SecondOrder().Delta
	}
	g := spin1PairCouplings(u.Model.Up, u.Model.Down, u.G0, u.G2)
	return Uniform{Omega: pm.Omega, Delta: d, Guu: g[0], Gdd: g[1], Gud: g[2]}
}
