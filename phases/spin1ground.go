package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/gpe"
)

// Spin1FromScheme builds the three-level model of a coupling scheme:
//
//   - dispersion.Shake: dispersion.ShakeSpin1 (its pair must be two adjacent
//     sublevels of one F = 1 manifold; F = 2 pairs are refused); ε is the
//     Breit–Rabi quadratic Zeeman shift at the bias field and epsilon must
//     be NaN (it is not a free setting there);
//   - dispersion.Raman: the Raman-dressed model dispersion.RamanSpin1 with the
//     scheme's Ω and δ (the linear two-photon detuning, term δF_z) and the
//     quadratic Zeeman shift epsilon (E_R), which is required;
//   - dispersion.Direct: dispersion.RamanSpin1(Ω, δ, epsilon), epsilon required.
//
// Errors wrap dispersion.ErrBadInput.
func Spin1FromScheme(s dispersion.Scheme, epsilon float64) (dispersion.Spin1Model, []dispersion.Warning, error) {
	switch p := s.(type) {
	case dispersion.Shake:
		if !math.IsNaN(epsilon) {
			return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: the shaking scheme's quadratic Zeeman shift follows from the bias field; do not give ε", dispersion.ErrBadInput)
		}
		r, err := dispersion.ShakeSpin1(p)
		if err != nil {
			return dispersion.Spin1Model{}, nil, err
		}
		return r.Model, r.Warnings, nil
	case dispersion.Raman, dispersion.Direct:
		if math.IsNaN(epsilon) || math.IsInf(epsilon, 0) {
			return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: the three-level %s model needs the quadratic Zeeman shift ε (E_R)", dispersion.ErrBadInput, s.Name())
		}
		m, err := s.EffectiveModel()
		if err != nil {
			return dispersion.Spin1Model{}, nil, err
		}
		d := dispersion.RamanSpin1(m.OmegaOverER, m.DeltaOverER, epsilon)
		d.Mass, d.KR, d.ER = m.Mass, m.KR, m.ER
		return d, nil, nil
	}
	return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: scheme %q has no three-level model", dispersion.ErrBadInput, s.Name())
}

// Spin1GroundProblem is the ground state of a spin-1 gas: uniform in a
// periodic box (n·c0, n·c2 given) or N atoms in a harmonic trap
// (interactions from the F = 1 scattering lengths). The `ground --levels 3`
// problem.
type Spin1GroundProblem struct {
	// Model: the three-level single-particle model (Spin1FromScheme). A
	// trap needs its k_R and E_R (a scheme, not a direct model). Required.
	Model dispersion.Spin1Model
	// G0, G2: n c0, n c2 in E_R of the uniform box; not used with a Trap.
	G0, G2 float64
	// Trap: nil for the uniform periodic box; otherwise N atoms in a
	// harmonic trap. Default nil.
	Trap *Spin1Trap
	// Dims: 1, 2 or 3 (default 1).
	Dims int
	// Lengths (1/k_R) per axis; nil: automatic. Box: L_x = the shortest of
	// j·gpe.AutoLength(k) (j = 1 … 8, k the largest wave momentum of the
	// variational winner through gpe.BoxMomentum) that admits every wave
	// momentum of the winner (else, with a warning, the j whose momentum
	// grid is nearest to every wave: smallest largest |k − k_grid|, ties
	// the shorter); transverse axes
	// gpe.AutoTransverse. Trap: as the two-level GroundProblem, 2.6 × the
	// larger of the Thomas–Fermi radius (of c0 + max(c2, 0), the widest
	// cloud) and four oscillator lengths per axis.
	Lengths []float64
	// Points per axis; nil: the smallest power of two from
	// gpe.AutoPointsMin[dim] with k_max = πn/L ≥ 4 + max|K_m| (the offsets
	// K_m shift the parabolas), at most gpe.AutoPointsMax[dim]; when that
	// ceiling does not reach 4 + max|K_m|, the smallest FFT-friendly size
	// (gpe.FFTSize) that does, up to gpe.AutoPointsLimit[dim] (the
	// escalation of gpe.ResolveBox). Spin1GroundSetup.Resolved says whether
	// the grid reaches it.
	Points []int
	// RandomStarts: random starts (seeds 2…n+1) after the default guesses,
	// which hold seed 1. Default 0.
	RandomStarts int
	// FixMagnetization, Magnetization: hold ⟨F_z⟩ = M (−1 < M < 1) in the
	// variational theory and the GPE (gpe.Spin1Problem). Default: free.
	FixMagnetization bool
	Magnetization    float64
	// Variational: settings of the variational step (nil: defaults; its
	// magnetisation fields are overridden by the two above).
	Variational *Spin1Settings
}

// Spin1Trap is N atoms of an F = 1 gas in a harmonic trap.
type Spin1Trap struct {
	// Atoms: the atom number N (≥ 1).
	Atoms float64
	// FreqHz: trap frequencies f_x, f_y, f_z in Hz (all > 0). Axes beyond
	// the grid's dimension are frozen out (reduced couplings of
	// gpe.Trapped: g_1D = g/(2π a⊥²), g_2D = g/(√(2π) a_z)).
	FreqHz [3]float64
	// Couplings: the F = 1 scattering lengths A0, A2 (m) are used:
	// c0 ∝ (a0 + 2a2)/3, c2 ∝ (a2 − a0)/3.
	Couplings dispersion.Spin1Couplings
}

// Spin1GroundResult is the solution of a Spin1GroundProblem.
type Spin1GroundResult struct {
	Problem gpe.Spin1Problem
	// Trapped: a harmonic trap (else the uniform box).
	Trapped bool
	// Units: k_R and E_R in SI (nil for a direct model).
	Units *gpe.Units
	// Where the variational answer applies: "uniform box" or "uniform gas
	// at the Thomas–Fermi peak density"; VarG0, VarG2: its n c0, n c2 (E_R).
	VariationalWhere string
	VarG0, VarG2     float64
	// PeakDensity: the Thomas–Fermi peak density n₀ of a trap in k_R^d
	// (0 for a box).
	PeakDensity float64
	Variational Spin1Result
	Multi       *gpe.Spin1MultiResult
	Observed    *gpe.Spin1Observables
	Status      gpe.Status
	// PairEnergyDiff: the two-level comparison: the variational energy of
	// the pseudo-spin model of the pair (Ω, δ_pair, g↑↑, g↓↓, g↑↓ from c0,
	// c2) minus the three-level one (E_R, at the variational densities);
	// > 0 when the third level lowers it. With a fixed magnetisation the
	// two-level energy is that of the free pair (its ⟨σ_z⟩ is not M).
	PairEnergyDiff float64
	PairPhase      string
	// BoxAdmitsWaves (uniform box only): every wave momentum of the
	// variational winner lies on the box's momentum grid (k·L/2π an
	// integer to 1e-6). Otherwise finite-box quantisation moves a wave and
	// the GPE energy can lie above the variational one (stripes of
	// incommensurate momenta).
	BoxAdmitsWaves bool
	// Notes: what was chosen (box, reduced couplings), one line each.
	Notes    []string
	Warnings []string
}

// Spin1GroundSetup is a Spin1GroundProblem set up, before any solve: the
// GPE problem (grid and model), the variational answer and the starts.
// Spin1Ground is Setup then Solve; the spin-1 GPE map points
// (MethodSpin1GPE) use the two steps to label a point whose box is not
// resolved before solving it.
type Spin1GroundSetup struct {
	// Result holds Problem, Trapped, Units, the variational answer, Notes
	// and Warnings; Solve fills in the rest.
	Result *Spin1GroundResult
	// Guesses: the variational winner (when it has waves), then
	// gpe.DefaultSpin1Guesses, then the RandomStarts (seeds 2…n+1).
	Guesses []gpe.Spin1Guess
	// KMaxNeeded = 4 + max|K_m| (k_R), the resolution the automatic points
	// aim at; Resolved: every axis of the grid has π·n/L ≥ KMaxNeeded.
	KMaxNeeded float64
	Resolved   bool
	model      dispersion.Spin1Model
	vs         Spin1Settings
}

// Spin1Ground solves p: the variational theory first (its winner sizes a
// box and is one of the starts), then gpe.Spin1MultiStart from the
// variational winner plus the default guesses (in a trap under the Gaussian
// envelope of gpe.Spin1Guess) and the RandomStarts, whose rule keeps
// degenerate states deterministically. Settings s are passed to the solver.
// Errors of p's settings wrap dispersion.ErrBadInput.
func Spin1Ground(p Spin1GroundProblem, s *gpe.Settings) (*Spin1GroundResult, error) {
	su, err := p.Setup()
	if err != nil {
		return nil, err
	}
	return su.Solve(s)
}

// Setup checks p, runs the variational theory and sizes the grid (the
// first step of Spin1Ground; nothing of the grid's size but the model's
// arrays is allocated).
func (p Spin1GroundProblem) Setup() (*Spin1GroundSetup, error) {
	dims := p.Dims
	if dims == 0 {
		dims = 1
	}
	if dims < 1 || dims > 3 {
		return nil, fmt.Errorf("%w: dimension %d, allowed 1, 2, 3", dispersion.ErrBadInput, dims)
	}
	if p.Lengths != nil && len(p.Lengths) != dims {
		return nil, fmt.Errorf("%w: %d lengths for %d dimensions", dispersion.ErrBadInput, len(p.Lengths), dims)
	}
	if p.Points != nil && len(p.Points) != dims {
		return nil, fmt.Errorf("%w: %d point counts for %d dimensions", dispersion.ErrBadInput, len(p.Points), dims)
	}
	if p.FixMagnetization && !(p.Magnetization > -1 && p.Magnetization < 1) {
		return nil, fmt.Errorf("%w: magnetisation %g: allowed −1 < M < 1", dispersion.ErrBadInput, p.Magnetization)
	}
	if p.RandomStarts < 0 {
		return nil, fmt.Errorf("%w: %d random starts: must be ≥ 0", dispersion.ErrBadInput, p.RandomStarts)
	}
	var vs Spin1Settings
	if p.Variational != nil {
		vs = *p.Variational
	}
	vs.FixMagnetization, vs.Magnetization = p.FixMagnetization, p.Magnetization
	res := &Spin1GroundResult{Trapped: p.Trap != nil}
	if p.Model.ER > 0 && p.Model.KR != 0 {
		if un, err := gpe.NewUnits(math.Abs(p.Model.KR), p.Model.ER); err == nil {
			res.Units = &un
		}
	}
	var prob gpe.Spin1Problem
	var err error
	if p.Trap != nil {
		prob, err = p.setupTrap(res, dims, &vs)
	} else {
		prob, err = p.setupBox(res, dims, &vs)
	}
	if err != nil {
		return nil, err
	}
	if w := prob.Grid.ResolutionWarning(); w != "" {
		res.Warnings = append(res.Warnings, w)
	}
	prob.FixMagnetization, prob.Magnetization = p.FixMagnetization, p.Magnetization
	if err := prob.Model.Validate(prob.Grid); err != nil {
		return nil, fmt.Errorf("%w: %v", dispersion.ErrBadInput, err)
	}
	res.Problem = prob
	if p.Trap == nil {
		res.BoxAdmitsWaves = admitsWaves(res.Variational.State, prob.Grid.L[0])
	}
	su := &Spin1GroundSetup{Result: res, model: p.Model, vs: vs, KMaxNeeded: p.kmaxNeeded(), Resolved: true}
	for a := 0; a < dims; a++ {
		if g := prob.Grid; math.Pi*float64(g.N[a])/g.L[a] < su.KMaxNeeded*(1-1e-12) {
			su.Resolved = false
		}
	}
	vr := res.Variational
	guesses := gpe.DefaultSpin1Guesses(p.Model)
	vg := gpe.Spin1Guess{Name: "variational " + vr.Phase.String()}
	for _, w := range vr.State.Waves {
		vg.K = append(vg.K, w.K)
		vg.Amp = append(vg.Amp, w.Amp)
	}
	if len(vg.K) > 0 {
		guesses = append([]gpe.Spin1Guess{vg}, guesses...)
	}
	for i := 2; i <= p.RandomStarts+1; i++ {
		guesses = append(guesses, gpe.Spin1Guess{Name: fmt.Sprintf("random seed=%d", i), Random: true, Seed: uint64(i)})
	}
	su.Guesses = guesses
	return su, nil
}

// Solve runs gpe.Spin1MultiStart from the set-up's guesses with solver
// settings s and completes the result (the second step of Spin1Ground).
func (su *Spin1GroundSetup) Solve(s *gpe.Settings) (*Spin1GroundResult, error) {
	res := su.Result
	prob, vr := res.Problem, res.Variational
	mr, err := gpe.Spin1MultiStart(prob, su.model, su.Guesses, s)
	if err != nil {
		return nil, err
	}
	res.Multi = mr
	res.Status = mr.Best.Status
	ob, err := gpe.Spin1Observe(prob, mr.Best, su.model, su.vs.withDefaults().Thresholds)
	if err != nil {
		return nil, err
	}
	res.Observed = ob
	// two-level comparison at the variational densities
	pm := su.model.PairModel()
	gg := spin1PairCouplings(su.model.Up, su.model.Down, res.VarG0, res.VarG2)
	r2, err := Variational(Uniform{Omega: pm.Omega, Delta: pm.Delta, Guu: gg[0], Gdd: gg[1], Gud: gg[2]}, nil)
	if err == nil && vr.Status == Converged {
		res.PairEnergyDiff = r2.Energy - vr.Energy
		res.PairPhase = r2.Phase.String()
	}
	return res, nil
}

// setupBox: the variational winner of the uniform gas sizes the box.
func (p Spin1GroundProblem) setupBox(res *Spin1GroundResult, dims int, vs *Spin1Settings) (gpe.Spin1Problem, error) {
	u := Spin1Uniform{Model: p.Model, G0: p.G0, G2: p.G2}
	vr, err := Spin1Variational(u, vs)
	if err != nil {
		return gpe.Spin1Problem{}, err
	}
	res.Variational, res.VariationalWhere, res.VarG0, res.VarG2 = vr, "uniform box", p.G0, p.G2
	L := p.Lengths
	if L == nil {
		kmax := 0.0
		for _, w := range vr.State.Waves {
			kmax = math.Max(kmax, math.Abs(w.K))
		}
		l0 := gpe.AutoLength(gpe.BoxMomentum(kmax))
		lx := l0
		// The shortest multiple that holds every wave; else the multiple
		// whose momentum grid is nearest to every wave (smallest largest
		// |k − k_grid|; ties: the shorter).
		fits, best, miss := false, l0, math.Inf(1)
		for j := 1; j <= 8 && !fits; j++ {
			lx = l0 * float64(j)
			if fits = admitsWaves(vr.State, lx); !fits {
				if m := waveMisfit(vr.State, lx); m < miss*(1-1e-9) {
					best, miss = lx, m
				}
			}
		}
		if !fits {
			lx = best
			res.Warnings = append(res.Warnings, fmt.Sprintf("the box L = %.4g/k_R admits the largest variational momentum but not every one (of 1…8 multiples of %.4g/k_R the nearest: a wave moves by up to %.2g k_R): finite-box quantisation moves the others", lx, l0, miss))
		}
		L = []float64{lx}
		for a := 1; a < dims; a++ {
			L = append(L, gpe.AutoTransverse(lx))
		}
	}
	g, err := gpe.NewGrid(p.points(L, dims), L)
	if err != nil {
		return gpe.Spin1Problem{}, fmt.Errorf("%w: %v", dispersion.ErrBadInput, err)
	}
	return gpe.Spin1Problem{Grid: g, Model: gpe.Spin1UniformBox(g, p.Model, p.G0, p.G2)}, nil
}

// admitsWaves reports whether every wave momentum of s lies on the
// momentum grid of a periodic box of length lx (k·lx/2π an integer to
// 1e-6).
func admitsWaves(s Spin1State, lx float64) bool {
	for _, w := range s.Waves {
		q := w.K * lx / (2 * math.Pi)
		if math.Abs(q-math.Round(q)) > 1e-6 {
			return false
		}
	}
	return true
}

// waveMisfit is the largest distance (k_R) of a wave momentum of s from
// the momentum grid 2πj/lx of a periodic box of length lx.
func waveMisfit(s Spin1State, lx float64) float64 {
	m, dk := 0.0, 2*math.Pi/lx
	for _, w := range s.Waves {
		m = math.Max(m, math.Abs(w.K-dk*math.Round(w.K/dk)))
	}
	return m
}

// kmaxNeeded is the resolution the automatic points aim at, 4 + max|K_m|
// (k_R).
func (p Spin1GroundProblem) kmaxNeeded() float64 {
	kk := 0.0
	for _, k := range p.Model.K {
		kk = math.Max(kk, math.Abs(k))
	}
	return gpe.ResolvedKMax + kk
}

// points: the given points or the automatic rule of Spin1GroundProblem.Points.
func (p Spin1GroundProblem) points(L []float64, dims int) []int {
	if p.Points != nil {
		return p.Points
	}
	need := p.kmaxNeeded()
	var pts []int
	for _, l := range L {
		n, max := gpe.AutoPointsMin[dims], gpe.AutoPointsMax[dims]
		for math.Pi*float64(n)/l < need && 2*n <= max {
			n *= 2
		}
		if math.Pi*float64(n)/l < need*(1-1e-12) { // beyond the ceiling: FFT-friendly sizes, as gpe.ResolveBox
			if m := gpe.FFTSize(int(math.Ceil(need*l/math.Pi*(1-1e-12))), gpe.AutoPointsLimit[dims]); m > 0 {
				n = m
			} else {
				n = gpe.AutoPointsLimit[dims]
			}
		}
		pts = append(pts, n)
	}
	return pts
}

// setupTrap sizes the grid from the Thomas–Fermi cloud as the two-level
// GroundProblem does (gpe.Trapped for the trap and the reduced couplings,
// gpe.ThomasFermiMuG, gpe.ThomasFermiRadii): c0 and c2 are the couplings of
// the effective lengths (a0 + 2a2)/3 and (a2 − a0)/3, which gpe.Trapped
// reduces like any other (the reduction is linear in g). The variational
// answer is that of the uniform gas at the Thomas–Fermi peak density
// n₀ = μ/c0 (μ of the coupling c0: the density–density part, which the
// spin term changes by |c2|/c0 ≈ 0.5 % for ⁸⁷Rb).
func (p Spin1GroundProblem) setupTrap(res *Spin1GroundResult, dims int, vs *Spin1Settings) (gpe.Spin1Problem, error) {
	t := p.Trap
	fail := func(f string, a ...any) (gpe.Spin1Problem, error) {
		return gpe.Spin1Problem{}, fmt.Errorf("%w: "+f, append([]any{dispersion.ErrBadInput}, a...)...)
	}
	if res.Units == nil {
		return fail("a trapped spin-1 cloud needs a scheme (shake or raman) to set k_R and E_R")
	}
	if !(t.Atoms >= 1) || math.IsInf(t.Atoms, 0) {
		return fail("atom number %g: must be ≥ 1", t.Atoms)
	}
	a0, a2 := t.Couplings.A0, t.Couplings.A2
	if math.IsNaN(a0) || math.IsNaN(a2) || !((a0+2*a2)/3 > 0) {
		return fail("the F = 1 scattering lengths a0 = %g m, a2 = %g m must be finite with a0 + 2a2 > 0", a0, a2)
	}
	ts := gpe.TrapSpec{Units: *res.Units, Atoms: t.Atoms, FreqHz: t.FreqHz, Auu: (a0 + 2*a2) / 3, Add: (a2 - a0) / 3, Aud: (a0 + 2*a2) / 3}
	tmp := gpe.MustGrid(intsOf(dims, 16), floatsOf(dims, 1))
	m0, err := gpe.Trapped(tmp, ts, 0, 0)
	if err != nil {
		return fail("%v", err)
	}
	c0, c2 := m0.Guu, m0.Gdd
	lengths := make([]float64, dims)
	if p.Lengths != nil {
		copy(lengths, p.Lengths)
	}
	muWide := gpe.ThomasFermiMuG(dims, m0, c0+math.Max(c2, 0))
	radii := gpe.ThomasFermiRadii(dims, m0, muWide)
	for a := 0; a < dims; a++ {
		if !(lengths[a] >= 0) || math.IsInf(lengths[a], 0) {
			return fail("box length %g: must be positive and finite (0: automatic)", lengths[a])
		}
		if lengths[a] == 0 {
			lengths[a] = 2.6 * math.Max(radii[a], 4*gpe.OscillatorLength(m0.Potential.AngularFreq[a]))
		}
	}
	grid, err := gpe.NewGrid(p.points(lengths, dims), lengths)
	if err != nil {
		return fail("%v", err)
	}
	m, err := gpe.Trapped(grid, ts, 0, 0)
	if err != nil {
		return fail("%v", err)
	}
	gm := gpe.Spin1FromDispersion(p.Model)
	gm.C0, gm.C2, gm.Potential, gm.Norm = m.Guu, m.Gdd, m.Potential, m.Norm
	res.Notes = append(res.Notes, fmt.Sprintf("box %s/k_R: 2.6 × max(Thomas–Fermi radius, 4 oscillator lengths) per axis", fmtLengths(lengths)))
	if dims < 3 {
		form := "g_1D = g/(2π a⊥²)"
		if dims == 2 {
			form = "g_2D = g/(√(2π) a_z)"
		}
		res.Notes = append(res.Notes, fmt.Sprintf("reduced %dD couplings for tight transverse confinement (%s)", dims, form))
	}
	n0 := gpe.ThomasFermiMuG(dims, m, gm.C0) / gm.C0
	res.PeakDensity = n0
	res.VariationalWhere, res.VarG0, res.VarG2 = "uniform gas at the Thomas–Fermi peak density", n0*gm.C0, n0*gm.C2
	vr, err := Spin1Variational(Spin1Uniform{Model: p.Model, G0: res.VarG0, G2: res.VarG2}, vs)
	if err != nil {
		return gpe.Spin1Problem{}, err
	}
	res.Variational = vr
	return gpe.Spin1Problem{Grid: grid, Model: gm}, nil
}

func fmtLengths(l []float64) string {
	s := ""
	for i, v := range l {
		if i > 0 {
			s += " × "
		}
		s += fmt.Sprintf("%.4g", v)
	}
	return s
}

// spin1PairCouplings returns n·g↑↑, n·g↓↓, n·g↑↓ of the pair (up, down) from
// n c0, n c2: g(±1,±1) = c0 + c2, g(0,0) = c0, g(0,±1) = c0 + c2,
// g(+1,−1) = c0 − c2 (as dispersion.Species.PairCouplings).
func spin1PairCouplings(up, down int, g0, g2 float64) [3]float64 {
	g := func(a, b int) float64 {
		switch {
		case a == b && a != 0:
			return g0 + g2
		case a == 0 && b == 0:
			return g0
		case a == 0 || b == 0:
			return g0 + g2
		}
		return g0 - g2
	}
	return [3]float64{g(up, up), g(down, down), g(up, down)}
}
