package gpe

import (
	"errors"
	"math"

	"socmap/phases/label"
)

// StartReport is the outcome of one start of MultiStart.
type StartReport struct {
	Name       string
	Status     Status
	Energy     float64 // per particle, E_R
	Mu         float64 // E_R
	Residual   float64 // E_R
	SplitSteps int
	Iterations int
	Phase      label.Phase // NotConverged unless Status == Converged
	K1         float64     // dominant |k_x|, k_R
	Sz         float64     // ⟨σ_z⟩ per particle (the tie-break of degenerate starts)
}

// Degenerate starts. Ground states of SOC condensates are degenerate (the
// ±k₁ plane waves at δ = 0, translated stripes), and which of two
// degenerate starts ends lower is decided by rounding (1e-14). MultiStart
// therefore keeps, among converged starts, the lowest energy only when it is
// lower by more than DegenerateTol·max(1, |E|); within that tolerance the
// start with the larger ⟨σ_z⟩ (by more than DegenerateSz) is kept — the +k₁
// plane wave, since the SOC term (k_x − σ_z)² puts ↑ at +k₁ — and
// otherwise the earlier start in the list. The same starts and settings
// thus give the same kept state in every run.
const (
	DegenerateTol = 1e-9
	DegenerateSz  = 1e-6
)

// preferred reports whether start a is kept over start b by the rule above
// (b comes earlier in the list).
func preferred(a, b StartReport) bool {
	ca, cb := a.Status == Converged, b.Status == Converged
	if ca != cb {
		return ca
	}
	tol := DegenerateTol * math.Max(1, math.Max(math.Abs(a.Energy), math.Abs(b.Energy)))
	switch {
	case a.Energy < b.Energy-tol:
		return true
	case a.Energy > b.Energy+tol:
		return false
	}
	return a.Sz > b.Sz+DegenerateSz
}

// MultiResult is the outcome of MultiStart.
type MultiResult struct {
	Best      *Result      // the lowest-energy converged start (or lowest of all if none converged)
	BestIndex int          // index into Starts
	Observed  *Observables // observables of Best
	Starts    []StartReport
	// Spread: highest minus lowest energy per particle among the converged
	// starts (E_R); 0 with fewer than two.
	Spread float64
	// Converged: number of starts that converged.
	Converged int
}

// MultiStart solves p from each guess (DefaultGuesses(p.Model) when guesses
// is empty) and keeps the lowest energy among the converged starts, since
// ground states of SOC condensates are degenerate and metastable states are
// common; ties within DegenerateTol follow the documented rule (see
// DegenerateTol). Every start's energy and phase are reported.
func MultiStart(p Problem, guesses []Guess, s *Settings, th label.Thresholds) (*MultiResult, error) {
	if len(guesses) == 0 {
		guesses = DefaultGuesses(p.Model)
	}
	mr := &MultiResult{BestIndex: -1}
	lo, hi := math.Inf(1), math.Inf(-1)
	var bestObs *Observables
	var set Settings
	if s != nil {
		set = *s
	}
	for i, gs := range guesses {
		st, err := gs.Build(p)
		if err != nil {
			return nil, err
		}
		set.startIndex = i
		r, err := Solve(p, st, &set)
		if err != nil {
			return nil, err
		}
		ob, err := r.Observe(p, th)
		if err != nil {
			return nil, err
		}
		rep := StartReport{Name: gs.Name, Status: r.Status, Energy: r.Energies.Total, Mu: r.Energies.Mu,
			Residual: r.Residual, SplitSteps: r.SplitSteps, Iterations: r.Iterations, Phase: ob.Phase, K1: ob.K1, Sz: ob.Sz}
		if rep.Name == "" {
			rep.Name = guessName(gs)
		}
		mr.Starts = append(mr.Starts, rep)
		conv := r.Status == Converged
		if conv {
			mr.Converged++
			lo, hi = math.Min(lo, rep.Energy), math.Max(hi, rep.Energy)
		}
		if mr.Best == nil || preferred(rep, mr.Starts[mr.BestIndex]) {
			mr.Best, mr.BestIndex, bestObs = r, i, ob
		}
	}
	if mr.Best == nil {
		return nil, errors.New("gpe: no starts")
	}
	mr.Observed = bestObs
	if mr.Converged >= 2 {
		mr.Spread = hi - lo
	}
	return mr, nil
}

func guessName(g Guess) string {
	switch g.Kind {
	case GuessPlaneWave:
		return "plane-wave"
	case GuessStripe:
		return "stripe"
	case GuessRandom:
		return "random"
	case GuessGiven:
		return "given"
	}
	return "guess"
}
