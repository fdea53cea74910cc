package phases

import (
	"errors"
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// ErrInput marks errors caused by the settings of a problem (bad input, as
// opposed to a failure of the computation); test with errors.Is. The text of
// such an error is the plain message, without a prefix.
var ErrInput = errors.New("bad input")

type inputError struct{ err error }

func (e inputError) Error() string        { return e.err.Error() }
func (e inputError) Unwrap() error        { return e.err }
func (e inputError) Is(target error) bool { return target == ErrInput }

func badInput(err error) error { return inputError{err} }

func badInputf(format string, a ...any) error { return inputError{fmt.Errorf(format, a...)} }

// GroundProblem is a spinor GPE ground-state problem stated in lab terms: a
// scheme (or a directly given model), and either a uniform periodic box
// (interactions from the Lab) or N atoms in a harmonic trap (interactions
// from the atom's scattering lengths). Setup turns it into a gpe.Problem:
// the effective model, the units, the grid (gpe/autogrid.go unless given)
// and the variational prediction the GPE state is compared with.
type GroundProblem struct {
	// Lab: the scheme and its Ω/δ overrides (Lab.Model). For a box the
	// interactions come from the Lab too (Lab.Resolve); for a trap the Lab's
	// interactions are not used. Required.
	Lab Lab
	// Dims: dimension of the grid, 1, 2 or 3 (SOC along x). Required.
	Dims int
	// Trap: nil for a uniform periodic box; otherwise N atoms in a harmonic
	// trap (needs a scheme, for k_R and E_R).
	Trap *GroundTrap
	// Lengths: box length per axis in 1/k_R (nil, or Dims entries; an entry 0
	// is chosen automatically). Default: for a box, x from the variational
	// k₁ (gpe.AutoLength(gpe.BoxMomentum(k₁)): four wavelengths) and the
	// transverse axes half of it; for a trap, 2.6 times the larger of the
	// Thomas–Fermi radius and four oscillator lengths per axis.
	Lengths []float64
	// LengthsSI: as Lengths, in metres (needs a scheme); give Lengths or
	// LengthsSI, not both. Default nil.
	LengthsSI []float64
	// Points: grid points per axis (nil, or Dims entries). Default (nil):
	// gpe.AutoPoints per axis.
	Points []int
	// Commensurate: for a box, move a given x length to the nearest one that
	// admits ±k₁ of the variational optimum exactly
	// (gpe.CommensurateLength). Default false: a given length is kept, and a
	// note warns when it misses ±k₁ by more than 5 % of the momentum step.
	Commensurate bool
}

// GroundTrap is N atoms in a harmonic trap.
type GroundTrap struct {
	// Atoms: the atom number N (≥ 1).
	Atoms float64
	// FreqHz: trap frequencies f_x, f_y, f_z in Hz (ω = 2πf, all > 0). Axes
	// beyond the grid's dimension are frozen out: the reduced 1D/2D
	// couplings of gpe.Trapped.
	FreqHz [3]float64
	// Couplings: 3D contact couplings of the pair; the scattering lengths
	// Auu, Add, Aud (m) are used.
	Couplings dispersion.Couplings
	// Model: how a 1D/2D grid treats the frozen axes (TrapCloud): CloudAuto
	// (default) uses the reduced couplings while μ ≤ ħω⊥ and otherwise
	// scales them so that μ is the 3D Thomas–Fermi μ (CloudMatched, the
	// density `compare` uses); CloudReduced keeps the reduced couplings with
	// a warning.
	Model CloudModel
}

// VariationalRef is the variational prediction beside a GPE ground state.
type VariationalRef struct {
	Where    string // "uniform box", or the uniform gas at the Thomas–Fermi peak density of a trap
	Phase    label.Phase
	Status   Status
	Energy   float64 // E_R per particle
	K1       float64 // k_R
	Contrast float64
	State    TwoWave // the variational optimum
}

// GroundSetup is a GroundProblem made ready to solve.
type GroundSetup struct {
	Problem gpe.Problem
	Units   *gpe.Units // nil for a direct model (no SI)
	Trapped bool
	Uniform Uniform // the uniform problem of a box (zero for a trap)
	// Variational: the variational optimum of the box, or of the uniform
	// gas at the Thomas–Fermi peak density of a trap; nil when it could not
	// be evaluated (a note says why).
	Variational *VariationalRef
	// Cloud: the trapped cloud's density model and its validity check
	// (TrapCloud); nil for a box.
	Cloud *CloudResult
	// Notes: what was chosen and warnings, one line each.
	Notes []string
}

// GroundSettings configure Ground. Zero fields take the documented defaults.
type GroundSettings struct {
	// RandomStarts: random starts with seeds 1…RandomStarts besides the
	// plane waves at the band minima and the stripe of gpe.DefaultGuesses
	// (which already holds seed 1, so 0 and 1 both give one random start).
	// Default 0.
	RandomStarts int
	// Solver: the GPE solver settings (gpe.Settings documents the defaults).
	Solver gpe.Settings
	// Variational: settings of the variational theory (nil: defaults); its
	// Thresholds also name the GPE states (default label.DefaultThresholds).
	Variational *Settings
}

// GroundResult is a solved ground-state problem.
type GroundResult struct {
	GroundSetup
	// Multi: every start and the one kept (lowest converged energy).
	Multi *gpe.MultiResult
	// Status of the kept start (gpe.Converged when the solve converged).
	Status gpe.Status
}

// Ground sets up p and finds its ground state: gpe.MultiStart from the
// starts of GroundSettings plus, for a box, the variational optimum. When a
// start ends unconverged below the kept state even after MultiStart's
// continuation, a warning note says so (gpe.MultiResult.Warning).
// Errors caused by p's settings match ErrInput.
func Ground(p GroundProblem, s *GroundSettings) (*GroundResult, error) {
	var set GroundSettings
	if s != nil {
		set = *s
	}
	su, err := p.Setup(set.Variational)
	if err != nil {
		return nil, err
	}
	return su.Solve(&set)
}

// Solve finds the ground state of the set-up problem (see Ground).
func (su *GroundSetup) Solve(s *GroundSettings) (*GroundResult, error) {
	var set GroundSettings
	if s != nil {
		set = *s
	}
	guesses := su.guesses(&set, true)
	solver := set.Solver
	mr, err := gpe.MultiStart(su.Problem, guesses, &solver, thresholds(set.Variational))
	if err != nil {
		return nil, fmt.Errorf("ground: %w", err)
	}
	res := &GroundResult{GroundSetup: *su, Multi: mr, Status: mr.Best.Status}
	if mr.Warning != "" {
		// a lower unconverged start exists: the kept state is metastable
		res.Notes = append(append([]string(nil), su.Notes...), "warning: "+mr.Warning)
	}
	return res, nil
}

// Starts returns the number of starts Solve makes with the settings s.
func (su *GroundSetup) Starts(s *GroundSettings) int {
	var set GroundSettings
	if s != nil {
		set = *s
	}
	return len(su.guesses(&set, false))
}

// guesses are the starts of Solve (states built only when build is set).
func (su *GroundSetup) guesses(set *GroundSettings, build bool) []gpe.Guess {
	guesses := gpe.DefaultGuesses(su.Problem.Model)
	for i := 2; i <= set.RandomStarts; i++ {
		guesses = append(guesses, gpe.Guess{Name: fmt.Sprintf("random seed=%d", i), Kind: gpe.GuessRandom, Seed: uint64(i)})
	}
	if v := su.Variational; v != nil && v.Status == Converged && !su.Trapped {
		gs := gpe.Guess{Name: "variational optimum", Kind: gpe.GuessGiven}
		if build {
			gs.State = TwoWaveState(su.Problem.Grid, v.State)
		}
		guesses = append(guesses, gs)
	}
	return guesses
}

func varRef(where string, r Result) *VariationalRef {
	return &VariationalRef{Where: where, Phase: r.Phase, Status: r.Status, Energy: r.Energy, K1: r.K1, Contrast: r.Contrast, State: r.State}
}

// Setup builds the gpe problem of p (no solve). Every error matches ErrInput.
// vs configures the variational theory (nil: defaults).
func (p GroundProblem) Setup(vs *Settings) (*GroundSetup, error) {
	dims := p.Dims
	if dims < 1 || dims > 3 {
		return nil, badInputf("dimension %d: allowed 1, 2, 3", dims)
	}
	for _, l := range [][]float64{p.Lengths, p.LengthsSI} {
		if l != nil && len(l) != dims {
			return nil, badInputf("%d box lengths for a %dD grid", len(l), dims)
		}
	}
	if p.Points != nil && len(p.Points) != dims {
		return nil, badInputf("%d point counts for a %dD grid", len(p.Points), dims)
	}
	if p.Lengths != nil && p.LengthsSI != nil {
		return nil, badInputf("give the box lengths in 1/k_R or in metres, not both")
	}
	su := &GroundSetup{Trapped: p.Trap != nil}
	// The effective model (Ω, δ in E_R) and, with a scheme, the SI units.
	model, err := p.Lab.Model()
	if err != nil {
		return nil, badInput(err)
	}
	if model.ER > 0 {
		un, err := gpe.NewUnits(math.Abs(model.KR), model.ER)
		if err != nil {
			return nil, badInput(err)
		}
		su.Units = &un
	}
	lengths := make([]float64, dims)
	for a := range lengths {
		if p.Lengths != nil {
			lengths[a] = p.Lengths[a]
		}
		if p.LengthsSI != nil {
			if su.Units == nil {
				return nil, badInputf("lengths in metres need a scheme (k_R); with a direct model give them in 1/k_R")
			}
			lengths[a] = su.Units.Length(p.LengthsSI[a])
		}
		if !(lengths[a] >= 0) || math.IsInf(lengths[a], 0) {
			return nil, badInputf("box length %g: must be positive and finite (0: automatic)", lengths[a])
		}
	}
	points := func() []int {
		if p.Points != nil {
			return p.Points
		}
		n := make([]int, dims)
		for a := range n {
			n[a] = gpe.AutoPoints(dims, lengths[a])
		}
		return n
	}
	if su.Trapped {
		err = p.setupTrap(su, model, lengths, points, vs)
	} else {
		err = p.setupBox(su, lengths, points, vs)
	}
	if err != nil {
		return nil, err
	}
	if w := su.Problem.Grid.ResolutionWarning(); w != "" {
		su.Notes = append(su.Notes, "warning: "+w)
	}
	if err := su.Problem.Model.Validate(su.Problem.Grid); err != nil {
		return nil, badInput(err)
	}
	return su, nil
}

// setupTrap: the Thomas–Fermi size of the cloud sets the box, the grid's
// dimension the reduced couplings; the variational prediction is that of
// the uniform gas at the Thomas–Fermi peak density.
func (p GroundProblem) setupTrap(su *GroundSetup, model dispersion.Model, lengths []float64, points func() []int, vs *Settings) error {
	dims := p.Dims
	t := p.Trap
	if su.Units == nil {
		return badInputf("a trapped cloud needs a scheme (shake or raman) to set k_R and E_R")
	}
	if !(t.Atoms >= 1) || math.IsInf(t.Atoms, 0) {
		return badInputf("atom number %g: must be ≥ 1", t.Atoms)
	}
	if t.Model != CloudAuto && t.Model != CloudReduced {
		return badInputf("cloud model %v: request auto or reduced couplings", t.Model)
	}
	cr, err := TrapCloud(Cloud{Mass: su.Units.Mass(), Couplings: t.Couplings, Atoms: t.Atoms, FreqHz: t.FreqHz, Dims: dims, Model: t.Model})
	if err != nil {
		return err
	}
	su.Cloud = &cr
	ts := gpe.TrapSpec{Units: *su.Units, Atoms: t.Atoms, FreqHz: t.FreqHz, Auu: t.Couplings.Auu, Add: t.Couplings.Add, Aud: t.Couplings.Aud}
	trapped := func(g *gpe.Grid) (gpe.Model, error) {
		m, err := gpe.Trapped(g, ts, model.OmegaOverER, model.DeltaOverER)
		m.Guu, m.Gdd, m.Gud = cr.Scale*m.Guu, cr.Scale*m.Gdd, cr.Scale*m.Gud
		return m, err
	}
	// A provisional grid to evaluate the Thomas–Fermi size.
	tmp := gpe.MustGrid(intsOf(dims, 16), floatsOf(dims, 1))
	m0, err := trapped(tmp)
	if err != nil {
		return badInput(err)
	}
	geff := (m0.Guu + m0.Gdd + 2*m0.Gud) / 4
	mu := gpe.ThomasFermiMuG(dims, m0, geff)
	radii := gpe.ThomasFermiRadii(dims, m0, mu)
	for a := 0; a < dims; a++ {
		if lengths[a] == 0 {
			r := math.Max(radii[a], 4*gpe.OscillatorLength(m0.Potential.AngularFreq[a]))
			lengths[a] = 2.6 * r
		}
	}
	grid, err := gpe.NewGrid(points(), lengths)
	if err != nil {
		return badInput(err)
	}
	m, err := trapped(grid)
	if err != nil {
		return badInput(err)
	}
	su.Problem = gpe.Problem{Grid: grid, Model: m}
	// The variational theory at the Thomas–Fermi peak density:
	// n₀ = μ_TF/g_eff, n₀g_ij in E_R (in the grid's dimension).
	geffM := (m.Guu + m.Gdd + 2*m.Gud) / 4
	if n0 := gpe.ThomasFermiMuG(dims, m, geffM) / geffM; n0 > 0 {
		u := Uniform{Omega: model.OmegaOverER, Delta: model.DeltaOverER, Guu: m.Guu * n0, Gdd: m.Gdd * n0, Gud: m.Gud * n0}
		if vr, err := Variational(u, vs); err == nil {
			su.Variational = varRef("uniform gas at the Thomas–Fermi peak density", vr)
		} else {
			su.Notes = append(su.Notes, fmt.Sprintf("no variational estimate at the Thomas–Fermi peak density: %v", err))
		}
	}
	if dims < 3 {
		form, perp := "g_1D = g/(2π a⊥²)", "ħω⊥ = ħ√(ω_yω_z)"
		if dims == 2 {
			form, perp = "g_2D = g/(√(2π) a_z)", "ħω⊥ = ħω_z"
		}
		su.Notes = append(su.Notes, fmt.Sprintf("reduced %dD couplings for tight transverse confinement (%s): Thomas–Fermi μ/h = %.4g Hz against %s/h = %.4g Hz (valid up to %g×)",
			dims, form, cr.MuReduced/dispersion.Planck, perp, cr.HbarOmegaPerp/dispersion.Planck, ReducedValidityLimit))
	}
	if cr.Warning != "" {
		su.Notes = append(su.Notes, cr.Warning)
	}
	return nil
}

// setupBox: the uniform problem of the Lab in a periodic box that admits the
// variational optimum's momentum.
func (p GroundProblem) setupBox(su *GroundSetup, lengths []float64, points func() []int, vs *Settings) error {
	dims := p.Dims
	u, _, err := p.Lab.Resolve()
	if err != nil {
		return badInput(err)
	}
	su.Uniform = u
	vr, err := Variational(u, vs)
	if err != nil {
		return badInput(err)
	}
	su.Variational = varRef("uniform box", vr)
	k1 := gpe.BoxMomentum(vr.K1)
	xPoints := 0 // points along x chosen with an automatic box (gpe.ResolveBox)
	for a := 0; a < dims; a++ {
		switch {
		case lengths[a] == 0 && a == 0:
			given := 0
			if p.Points != nil {
				given = p.Points[0]
			}
			box := gpe.ResolveBox(dims, k1, given, 0)
			lengths[0], xPoints = box.Length, box.Points
			su.Notes = append(su.Notes, fmt.Sprintf("box length along x %.4g/k_R (%d wavelengths) admits ±k₁ = ±%.4g k_R of the variational optimum exactly", lengths[0], box.Wavelengths, k1))
			if !box.Resolved {
				su.Notes = append(su.Notes, fmt.Sprintf("warning: no box of the automatic-grid rule resolves k₁ = %.4g k_R with k_max ≥ %d k_R (k_max = %.3g k_R on %d points): the state may be an artefact of the grid", k1, gpe.ResolvedKMax, box.KMax(), box.Points))
			}
		case lengths[a] == 0:
			lengths[a] = gpe.AutoTransverse(lengths[0])
		case a == 0 && p.Commensurate:
			lengths[0] = gpe.CommensurateLength(k1, lengths[0])
		case a == 0 && vr.Phase != label.SingleMinimum:
			dk := 2 * math.Pi / lengths[0]
			if near := math.Round(k1/dk) * dk; math.Abs(near-k1) > 0.05*k1 {
				su.Notes = append(su.Notes, fmt.Sprintf("warning: the box (L = %.4g/k_R, momenta in steps of %.3g k_R) does not admit ±k₁ = ±%.4g k_R of the variational optimum (nearest %.4g): the state is distorted; use --auto-box", lengths[0], dk, k1, near))
			}
		}
	}
	n := points()
	if xPoints > 0 && p.Points == nil {
		n[0] = xPoints
	}
	grid, err := gpe.NewGrid(n, lengths)
	if err != nil {
		return badInput(err)
	}
	su.Problem = gpe.Problem{Grid: grid, Model: gpe.UniformBox(grid, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)}
	return nil
}

func intsOf(n, v int) []int {
	o := make([]int, n)
	for i := range o {
		o[i] = v
	}
	return o
}

func floatsOf(n int, v float64) []float64 {
	o := make([]float64, n)
	for i := range o {
		o[i] = v
	}
	return o
}
