package gpe

import (
	"errors"
	"fmt"
	"math"
	"slices"

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
	Iterations int // finisher iterations on the problem's grid (with continuation)
	// CoarseIterations: finisher iterations on coarse grids (Settings.Coarsen)
	CoarseIterations int
	Phase            label.Phase // NotConverged unless Status == Converged
	K1               float64     // dominant |k_x|, k_R
	Sz               float64     // ⟨σ_z⟩ per particle (the tie-break of degenerate starts)
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
	// Continued: indices of the starts that were carried on (see
	// MultiStart: unconverged below the kept energy), in the order they
	// were continued.
	Continued []int
	// LowerUnconverged: index of the lowest start that ended unconverged
	// with an energy below the kept converged one by more than the
	// degeneracy tolerance even after its continuation, −1 if none. When
	// ≥ 0 the kept state is not the ground state of the solve (a lower
	// state exists) and Warning says so.
	LowerUnconverged int
	// Warning: one line when LowerUnconverged ≥ 0, else "".
	Warning string
}

// lowerThan reports whether the energy of the unconverged start u lies below
// that of the converged start c by more than the degeneracy tolerance. The
// finisher lowers the energy at every iteration (the exact line search only
// accepts descent), so an unconverged start's energy is an upper bound on
// the state it converges to: a lower one means that the kept state is not
// the lowest found.
func lowerThan(u, c StartReport) bool {
	tol := DegenerateTol * math.Max(1, math.Max(math.Abs(u.Energy), math.Abs(c.Energy)))
	return u.Status == MaxIterations && c.Status == Converged && u.Energy < c.Energy-tol
}

// MultiStart solves p from each guess (DefaultGuesses(p.Model) when guesses
// is empty) and keeps the lowest energy among the converged starts, since
// ground states of SOC condensates are degenerate and metastable states are
// common; ties within DegenerateTol follow the documented rule (see
// DegenerateTol). Every start's energy and phase are reported.
//
// A converged start is not kept silently above an unconverged one: every
// start that ends unconverged with an energy below the kept converged energy
// (by more than the degeneracy tolerance; its energy is an upper bound on
// its limit, see lowerThan) is carried on from its last state, lowest energy
// first, with Settings.ContinueIter further finisher iterations (CGOnly),
// and the kept state is chosen again; when no start converged, the lowest
// one is carried on in the same way. A start that is still
// unconverged and lower afterwards is named in LowerUnconverged and Warning.
func MultiStart(p Problem, guesses []Guess, s *Settings, th label.Thresholds) (*MultiResult, error) {
	if len(guesses) == 0 {
		guesses = DefaultGuesses(p.Model)
	}
	mr := &MultiResult{BestIndex: -1, LowerUnconverged: -1}
	var set Settings
	if s != nil {
		set = *s
	}
	results := make([]*Result, len(guesses))
	observed := make([]*Observables, len(guesses))
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
			Residual: r.Residual, SplitSteps: r.SplitSteps, Iterations: r.Iterations, CoarseIterations: r.CoarseIterations,
			Phase: ob.Phase, K1: ob.K1, Sz: ob.Sz}
		if rep.Name == "" {
			rep.Name = guessName(gs)
		}
		mr.Starts = append(mr.Starts, rep)
		results[i], observed[i] = r, ob
	}
	if len(mr.Starts) == 0 {
		return nil, errors.New("gpe: no starts")
	}
	mr.choose(results, observed)
	// Carry on the unconverged starts that lie below the kept one.
	cont := set.withDefaults()
	cont.Method = CGOnly
	cont.MaxIter = cont.ContinueIter
	for cont.ContinueIter > 0 {
		j := -1
		for i, rep := range mr.Starts {
			if slices.Contains(mr.Continued, i) {
				continue
			}
			if !lowerThan(rep, mr.Starts[mr.BestIndex]) && !(i == mr.BestIndex && rep.Status == MaxIterations) {
				continue
			}
			if j < 0 || rep.Energy < mr.Starts[j].Energy {
				j = i
			}
		}
		if j < 0 {
			break
		}
		mr.Continued = append(mr.Continued, j)
		cont.startIndex = j
		r, err := Solve(p, results[j].State, &cont)
		if err != nil {
			return nil, err
		}
		ob, err := r.Observe(p, th)
		if err != nil {
			return nil, err
		}
		rep := &mr.Starts[j]
		rep.Status, rep.Energy, rep.Mu, rep.Residual = r.Status, r.Energies.Total, r.Energies.Mu, r.Residual
		rep.Iterations += r.Iterations
		rep.Phase, rep.K1, rep.Sz = ob.Phase, ob.K1, ob.Sz
		r.SplitSteps, r.Iterations = results[j].SplitSteps, rep.Iterations
		r.CoarseIterations, r.CoarseShape = results[j].CoarseIterations, results[j].CoarseShape
		r.EnergyHistory = append(results[j].EnergyHistory, r.EnergyHistory...)
		r.ResidualHistory = append(results[j].ResidualHistory, r.ResidualHistory...)
		results[j], observed[j] = r, ob
		mr.choose(results, observed)
	}
	for i, rep := range mr.Starts {
		if lowerThan(rep, mr.Starts[mr.BestIndex]) && (mr.LowerUnconverged < 0 || rep.Energy < mr.Starts[mr.LowerUnconverged].Energy) {
			mr.LowerUnconverged = i
		}
	}
	if i := mr.LowerUnconverged; i >= 0 {
		u, b := mr.Starts[i], mr.Starts[mr.BestIndex]
		mr.Warning = fmt.Sprintf("start %q ended unconverged (residual %.2g E_R after %d finisher iterations) %.3g E_R below the kept state: the kept state is metastable, a lower state exists", u.Name, u.Residual, u.Iterations, b.Energy-u.Energy)
	}
	return mr, nil
}

// choose sets the kept start, its observables and the spread from the
// reports (rule: preferred).
func (mr *MultiResult) choose(results []*Result, observed []*Observables) {
	mr.BestIndex, mr.Converged = 0, 0
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, rep := range mr.Starts {
		if rep.Status == Converged {
			mr.Converged++
			lo, hi = math.Min(lo, rep.Energy), math.Max(hi, rep.Energy)
		}
		if i > 0 && preferred(rep, mr.Starts[mr.BestIndex]) {
			mr.BestIndex = i
		}
	}
	mr.Best, mr.Observed = results[mr.BestIndex], observed[mr.BestIndex]
	mr.Spread = 0
	if mr.Converged >= 2 {
		mr.Spread = hi - lo
	}
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
