package gpe

import (
	"context"
	"errors"
	"fmt"
	"math"

	"socmap/gpe/fft"
)

// Problem is a spinor GPE ground-state problem: a grid and a model.
type Problem struct {
	Grid  *Grid
	Model Model
}

// Method selects the solver stages.
type Method int

const (
	// SplitThenCG: split-step imaginary time with Δτ lowered as it
	// converges, then the preconditioned nonlinear conjugate gradient.
	SplitThenCG Method = iota
	// SplitOnly: split-step imaginary time only. Its fixed point carries the
	// splitting error (residual ∝ Δτ), so a tight Tol is not reached; the
	// result then has status MaxIterations.
	SplitOnly
	// CGOnly: the conjugate-gradient finisher from the initial state.
	CGOnly
)

// Status of a solve.
type Status int

const (
	Converged     Status = iota // residual ≤ Tol and energy change ≤ EnergyTol
	MaxIterations               // iteration budget spent first
	Diverged                    // NaN/Inf energy or norm

	// canceled: Settings.Context was canceled; never in a Result (Solve
	// returns the context's error instead).
	canceled Status = -1
)

// isCanceled reports whether the solve is to stop (Settings.Context).
func (s *Settings) isCanceled() bool { return s.Context != nil && s.Context.Err() != nil }

func (s Status) String() string {
	switch s {
	case Converged:
		return "converged"
	case MaxIterations:
		return "max-iterations"
	case Diverged:
		return "diverged"
	}
	return fmt.Sprintf("status(%d)", int(s))
}

// Settings of Solve. Zero fields take the documented defaults.
type Settings struct {
	Method Method

	// Tol: residual ‖Hψ − μψ‖ (package doc) to stop at, in E_R. Default 1e-8.
	Tol float64
	// EnergyTol: largest change of the energy per particle between the last
	// two finisher iterations at convergence, in E_R. Default 1e-10.
	EnergyTol float64

	// Dtau: initial imaginary-time step in ħ/E_R. Default 0.02.
	Dtau float64
	// DtauFactor: Δτ is divided by it when the split-step energy settles.
	// Default 4.
	DtauFactor float64
	// DtauLevels: number of Δτ reductions before the finisher takes over.
	// Default 2 (SplitOnly: default 6); negative: Δτ is never lowered.
	DtauLevels int
	// CheckEvery: split steps between energy/residual checks. Default 20.
	CheckEvery int
	// SplitEnergyTol: Δτ is lowered when the energy per particle changed by
	// less than SplitEnergyTol·Δτ/Dtau over the last CheckEvery steps, in E_R.
	// Default 1e-5.
	SplitEnergyTol float64
	// MaxSplitSteps: budget of split steps before the finisher takes over.
	// Default 200 (measured: a short split phase then the finisher is several
	// times faster than either alone, from random and from good guesses);
	// SplitOnly: default 100000.
	MaxSplitSteps int
	// MaxIter: budget of finisher iterations. Default 3000.
	MaxIter int
	// PhaseEvery: in a harmonic trap the finisher takes a phase step (cg.go,
	// phaseStep: ψ ← e^{iφ(x)}ψ with φ' = −J/n along x, the exact minimiser
	// of the kinetic energy over phases that depend on x only) every
	// PhaseEvery iterations, and stops taking them after the first that does
	// not lower the energy. Default 500 (measured on the demo 1D clouds and
	// the 3D 64³ benchmark cloud: less CPU time than without, or the same;
	// fewer coarse and fine iterations except up to 20 % more fine ones at
	// N = 2e6 matched after fewer coarse ones; 250 and 1000 no better;
	// DEVELOPERS.md, "Convergence of large clouds"); negative: never. The
	// spin-1 finisher (Spin1Solve, spin1Engine.phaseStep) takes the same
	// step on its three components.
	PhaseEvery int
	// ContinueIter (MultiStart only): further finisher iterations given to a
	// start that ended unconverged with an energy below the kept converged
	// start (see MultiStart). Default 2·MaxIter; negative: no continuation
	// (the result then only warns).
	ContinueIter int

	// Coarsen: coarse-to-fine start (gpe/coarse.go). 0 (default): a
	// SplitThenCG solve in a harmonic trap first solves the problem on a grid
	// with half the points along every axis that keeps k_max ≥ CoarseKMax
	// (recursively), then runs the finisher on the full grid from that state
	// zero-padded in k; boxes and walls are solved on their grid only.
	// Negative: never.
	Coarsen int

	// Threads: goroutines for pointwise passes and FFT pairs on grids of at
	// least ParallelMin points. Default GOMAXPROCS (at most 8).
	Threads int
	// Backend: FFT backend. Default fft.Default (FFTW unless built with purego).
	Backend fft.Backend
	// FFTMode: how the two components are transformed on several cores.
	// Default FFTAuto: on grids of at least ParallelMin points the two
	// components are transformed at once on two goroutines (FFTPairs). On
	// the 2-core development machine (shared, load ≈ 2) four 256×256
	// transforms took 0.72–0.98 ms as pairs, 0.89–0.97 ms serial and
	// 1.17–1.30 ms with FFTW's own threads (BenchmarkFourFFTs).
	FFTMode FFTMode

	// Progress, if set, is called at every split-step check and every
	// finisher iteration (from the solving goroutine; keep it cheap).
	Progress func(Progress)

	// Context, if set, interrupts a solve: it is checked at every
	// split-step check and every finisher iteration, and a canceled
	// context makes Solve, Spin1Solve and the multi-starts return its
	// error (no result). Not part of any identity or file.
	Context context.Context

	startIndex int // set by MultiStart
}

// Progress reports the state of a running solve.
type Progress struct {
	Start    int     // index of the start in MultiStart (0 in Solve)
	Stage    string  // "split" or "cg"
	Step     int     // split steps taken, or finisher iterations
	Energy   float64 // energy per particle, E_R
	Residual float64 // E_R
	Dtau     float64 // current split step (0 in the finisher)
	Coarse   bool    // a stage on a coarse grid (Settings.Coarsen)
}

func (s Settings) withDefaults() Settings {
	if s.Tol == 0 {
		s.Tol = 1e-8
	}
	if s.EnergyTol == 0 {
		s.EnergyTol = 1e-10
	}
	if s.Dtau == 0 {
		s.Dtau = 0.02
	}
	if s.DtauFactor == 0 {
		s.DtauFactor = 4
	}
	if s.DtauLevels == 0 {
		s.DtauLevels = 2
		if s.Method == SplitOnly {
			s.DtauLevels = 6
		}
	}
	if s.CheckEvery == 0 {
		s.CheckEvery = 20
	}
	if s.SplitEnergyTol == 0 {
		s.SplitEnergyTol = 1e-5
	}
	if s.MaxSplitSteps == 0 {
		s.MaxSplitSteps = 200
		if s.Method == SplitOnly {
			s.MaxSplitSteps = 100000
		}
	}
	if s.MaxIter == 0 {
		s.MaxIter = 3000
	}
	if s.PhaseEvery == 0 {
		s.PhaseEvery = 500
	}
	if s.ContinueIter == 0 {
		s.ContinueIter = 3 * s.MaxIter
	}
	return s
}

// Energies of a state. Energy parts are per particle (divided by the model
// norm) in E_R.
type Energies struct {
	Kinetic     float64 // ⟨(k_x − σ_z)² + k_⊥²⟩ (kinetic with SOC)
	Potential   float64 // ⟨V⟩
	Rabi        float64 // ⟨(Ω/2)σ_x⟩
	Detuning    float64 // ⟨(δ/2)σ_z⟩
	Interaction float64 // E_int/N
	Total       float64 // sum of the parts: E/N
	Mu          float64 // chemical potential ⟨ψ,H[ψ]ψ⟩/⟨ψ,ψ⟩
	Residual    float64 // ‖H[ψ]ψ − μψ‖ (package doc), E_R
	Norm        float64 // ∫|ψ|² dV
	NormUp      float64 // ∫|ψ↑|² dV
	NormDown    float64 // ∫|ψ↓|² dV
}

// Result of Solve.
type Result struct {
	Status     Status
	State      *State
	Energies   Energies // of the returned state, evaluated afresh
	SplitSteps int      // split-step imaginary-time steps taken (on the coarsest grid with Settings.Coarsen)
	Iterations int      // finisher iterations taken on the problem's grid
	// CoarseIterations: finisher iterations on the coarse grids
	// (Settings.Coarsen); CoarseShape: the points of the first coarse grid,
	// nil without a coarse stage.
	CoarseIterations int
	CoarseShape      []int
	Dtau             float64 // last split-step Δτ
	Residual         float64 // = Energies.Residual
	// EnergyHistory: energy per particle at every split-step check and
	// every finisher iteration (coarse stages first); ResidualHistory
	// alongside.
	EnergyHistory   []float64
	ResidualHistory []float64
}

// Solve finds the ground state of p starting from init (which is not
// modified; it is normalised to p.Model.Norm first). s may be nil.
func Solve(p Problem, init *State, s *Settings) (*Result, error) {
	var set Settings
	if s != nil {
		set = *s
	}
	set = set.withDefaults()
	if p.Grid == nil {
		return nil, errors.New("gpe: problem without grid")
	}
	if err := p.Model.Validate(p.Grid); err != nil {
		return nil, err
	}
	if err := init.check(p.Grid); err != nil {
		return nil, err
	}
	if set.Method == SplitThenCG && set.Coarsen >= 0 && p.Model.Potential.Kind == Harmonic {
		if cg := coarseGrid(p.Grid); cg != nil {
			return solveCoarseToFine(p, cg, init, set)
		}
	}
	e, err := newEngine(p.Grid, p.Model, perf{threads: set.Threads, backend: set.Backend, fftMode: set.FFTMode})
	if err != nil {
		return nil, err
	}
	defer e.close()
	copy(e.psi[0], init.Psi[0])
	copy(e.psi[1], init.Psi[1])
	if err := e.normalize(); err != nil {
		return nil, err
	}
	res := &Result{Status: MaxIterations}
	stage, tau, cgCalls := "split", set.Dtau, 0
	hist := func(en Energies) {
		res.EnergyHistory = append(res.EnergyHistory, en.Total)
		res.ResidualHistory = append(res.ResidualHistory, en.Residual)
		if set.Progress != nil {
			pr := Progress{Start: set.startIndex, Stage: stage, Energy: en.Total, Residual: en.Residual}
			if stage == "split" {
				pr.Step, pr.Dtau = res.SplitSteps, tau
			} else {
				pr.Step = cgCalls
				cgCalls++
			}
			set.Progress(pr)
		}
	}
	// Stage 1: split step with Δτ lowered as the energy settles.
	if set.Method != CGOnly {
		level := 0
		prev := e.evaluate()
		hist(prev)
		for res.SplitSteps < set.MaxSplitSteps {
			n := min(set.CheckEvery, set.MaxSplitSteps-res.SplitSteps)
			e.splitSteps(tau, n)
			res.SplitSteps += n
			en := e.evaluate()
			hist(en)
			if bad(en) {
				res.Status = Diverged
				break
			}
			if set.isCanceled() {
				return nil, set.Context.Err()
			}
			if set.Method == SplitOnly && en.Residual <= set.Tol && math.Abs(en.Total-prev.Total) <= set.EnergyTol {
				res.Status = Converged
				break
			}
			if set.DtauLevels >= 0 && math.Abs(en.Total-prev.Total) < set.SplitEnergyTol*tau/set.Dtau {
				if level == set.DtauLevels {
					break
				}
				level++
				tau /= set.DtauFactor
			}
			prev = en
		}
		res.Dtau = tau
	}
	// Stage 2: preconditioned nonlinear conjugate gradient.
	if set.Method != SplitOnly && res.Status != Diverged {
		stage = "cg"
		res.Iterations, res.Status = e.cg(set, hist)
		if res.Status == canceled {
			return nil, set.Context.Err()
		}
	}
	res.State = NewState(p.Grid)
	copy(res.State.Psi[0], e.psi[0])
	copy(res.State.Psi[1], e.psi[1])
	res.Energies = e.evaluate()
	res.Residual = res.Energies.Residual
	if bad(res.Energies) {
		res.Status = Diverged
	} else if res.Status == Converged && res.Residual > set.Tol {
		// The fresh evaluation must confirm convergence.
		res.Status = MaxIterations
	}
	return res, nil
}

// solveCoarseToFine solves p on the coarse grid cg from init (spectrally
// truncated onto it; that solve may coarsen again), then runs the finisher
// on p's grid from the coarse state zero-padded in k. A diverged coarse
// stage falls back to the full grid from init.
func solveCoarseToFine(p Problem, cg *Grid, init *State, set Settings) (*Result, error) {
	ci, err := resample(init, cg, set.Backend)
	if err != nil {
		return nil, err
	}
	cs := set
	cs.MaxIter = 2 * set.MaxIter // an iteration there costs at most half
	if pr := set.Progress; pr != nil {
		cs.Progress = func(q Progress) { q.Coarse = true; pr(q) }
	}
	cr, err := Solve(Problem{Grid: cg, Model: p.Model}, ci, &cs)
	if err != nil {
		return nil, err
	}
	fs := set
	fs.Coarsen = -1
	if cr.Status == Diverged {
		return Solve(p, init, &fs)
	}
	fi, err := resample(cr.State, p.Grid, set.Backend)
	if err != nil {
		return nil, err
	}
	fs.Method = CGOnly
	r, err := Solve(p, fi, &fs)
	if err != nil {
		return nil, err
	}
	r.SplitSteps, r.Dtau = cr.SplitSteps, cr.Dtau
	r.CoarseIterations = cr.Iterations + cr.CoarseIterations
	r.CoarseShape = cg.Shape()
	r.EnergyHistory = append(append([]float64(nil), cr.EnergyHistory...), r.EnergyHistory...)
	r.ResidualHistory = append(append([]float64(nil), cr.ResidualHistory...), r.ResidualHistory...)
	return r, nil
}

func bad(en Energies) bool {
	return math.IsNaN(en.Total) || math.IsInf(en.Total, 0) || math.IsNaN(en.Residual) || math.IsInf(en.Residual, 0)
}

// Evaluate returns the energies, μ and residual of st for problem p.
func Evaluate(p Problem, st *State, backend fft.Backend) (Energies, error) {
	if err := p.Model.Validate(p.Grid); err != nil {
		return Energies{}, err
	}
	if err := st.check(p.Grid); err != nil {
		return Energies{}, err
	}
	e, err := newEngine(p.Grid, p.Model, perf{threads: 1, backend: backend})
	if err != nil {
		return Energies{}, err
	}
	defer e.close()
	copy(e.psi[0], st.Psi[0])
	copy(e.psi[1], st.Psi[1])
	return e.evaluate(), nil
}

func (e *engine) normalize() error {
	s := 0.0
	for c := 0; c < 2; c++ {
		for _, v := range e.psi[c] {
			s += abs2(v)
		}
	}
	s *= e.dV
	if !(s > 0) || math.IsInf(s, 0) {
		return fmt.Errorf("gpe: initial state has norm %g", s)
	}
	e.scale = math.Sqrt(e.m.Norm / s)
	e.pool.do(opScale, e.n)
	return nil
}

// setKinSplit fills ek = exp(−τK)/n for step τ.
func (e *engine) setKinSplit(tau float64) {
	if tau == e.ekT {
		return
	}
	inv := 1 / float64(e.n)
	for c := 0; c < 2; c++ {
		for i, k := range e.kin[c] {
			e.ek[c][i] = math.Exp(-tau*k) * inv
		}
	}
	e.ekT = tau
}

// splitSteps takes n Strang steps exp(−τL/2) exp(−τK) exp(−τL/2) of
// imaginary time with renormalisation to the model norm (normalised gradient
// flow). Adjacent local half steps of consecutive steps are fused into one
// local step exp(−τL) (identical for the linear part); the renormalisation
// is applied right after the kinetic factor, its scale measured in k space
// (Parseval) and carried into the following local pass, so that it costs no
// sweep of its own. Per step: four FFTs, one kinetic and one local pass.
func (e *engine) splitSteps(tau float64, n int) {
	e.setKinSplit(tau)
	e.scale = 1
	e.tau = tau / 2
	e.reduce(opLocalSplit, 1)
	for i := 0; i < n; i++ {
		e.fftPair(opFwdPsi)
		e.reduce(opKinSplit, 1)
		e.fftPair(opBwdPsi)
		e.scale = math.Sqrt(e.m.Norm / (e.sum[0] * float64(e.n) * e.dV))
		e.tau = tau
		if i == n-1 {
			e.tau = tau / 2
		}
		e.reduce(opLocalSplit, 1)
	}
	e.scale = math.Sqrt(e.m.Norm / (e.sum[sNorm] * e.dV))
	e.pool.do(opScale, e.n)
}

// evaluate computes the energies of e.psi. It leaves hat = F(ψ), the
// residual r̂ in w and the preconditioner sums in e.sum for the finisher.
func (e *engine) evaluate() Energies {
	e.upd = false
	return e.evalAfterLocal(true)
}

// evalAfterLocal runs the local pass (which first applies the finisher's
// update ψ ← t(cψ + s q) when e.upd), the transforms and the k-space
// passes. With refresh, ψ̂ is recomputed as F(ψ); otherwise it is updated in
// k space by the same linear combination (opKin1), which requires e.upd.
// Clears e.upd.
func (e *engine) evalAfterLocal(refresh bool) Energies {
	e.copyHat = refresh
	e.reduce(opLocalH, sLocalEnd)
	var en Energies
	m := &e.m
	dv := e.dV
	en.NormUp = e.sum[sNormUp] * dv
	en.NormDown = e.sum[sNormDn] * dv
	en.Norm = en.NormUp + en.NormDown
	pot := e.sum[sPot] * dv
	rabi := m.Omega * e.sum[sRabi] * dv
	det := m.Delta / 2 * (e.sum[sNormUp] - e.sum[sNormDn]) * dv
	inter := (m.Guu/2*e.sum[sIntUU] + m.Gdd/2*e.sum[sIntDD] + m.Gud*e.sum[sIntUD]) * dv
	if refresh {
		e.fftPair(opFwdHat)
	}
	e.fftPair(opFwdW)
	if refresh {
		e.upd = false // ψ̂ is fresh: no k-space update
	}
	e.reduce(opKin1, 2)
	e.upd = false
	e.kinSum = e.sum[0]
	kin := e.sum[0] * dv / float64(e.n)
	e.mu = (kin + pot + rabi + det + 2*inter) / en.Norm
	e.reduce(opK2, 9)
	copy(e.k2sum[:], e.sum[:9])
	e.beta = e.sum[1] / e.sum[2]
	en.Residual = math.Sqrt(e.sum[0] * dv / float64(e.n) / en.Norm)
	N := m.Norm
	en.Kinetic, en.Potential, en.Rabi, en.Detuning, en.Interaction = kin/N, pot/N, rabi/N, det/N, inter/N
	en.Total = (kin + pot + rabi + det + inter) / N
	en.Mu = e.mu
	return en
}
