package phases

import (
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"
	"time"

	"gonum.org/v1/gonum/optimize"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// DesignSettings configure Design. Zero fields take the documented defaults.
type DesignSettings struct {
	// Seed of the random sources (CMA-ES samples and restart points).
	// Default 1. The result depends only on the problem, Seed, Evaluations
	// and Restarts, not on Workers.
	Seed uint64
	// Evaluations: the budget (at most this many) of chain evaluations: a fifth for the final
	// Nelder–Mead polish of the best point of all searches, the rest shared
	// equally among the searches (Restarts per combination of categorical
	// choices). Default 4000.
	Evaluations int
	// Restarts: independent CMA-ES searches per combination of choices, the
	// first from the middle of the ranges, the others from points drawn
	// uniformly; each is polished by Nelder–Mead with what is left of its
	// share. Default 8.
	Restarts int
	// Top: how many distinct feasible candidates are reported. Default 5.
	Top int
	// Distinct: two candidates with the same choices are distinct when some
	// numeric setting differs by at least this fraction of its range (in
	// search coordinates). Default 0.05.
	Distinct float64
	// Workers: searches run in parallel. Default runtime.GOMAXPROCS(0).
	Workers int
	// WindowTol: relative tolerance of the stripe-window edges. Default 1e-4.
	WindowTol float64
	// Variational: settings of the variational theory (nil: defaults).
	Variational *Settings
	// SkipCheck: do not check the candidates with the time-dependent
	// verification and a GPE ground state. Default false (checked).
	SkipCheck bool
	// VerifyTolerance: the largest relative deviation of the verified k_t
	// and Rabi frequency from the cycle-averaged model that passes the
	// check. Default 0.1.
	VerifyTolerance float64
	// Progress, if not nil, is called from Design's goroutine with the
	// evaluations done and the budget, about five times a second.
	Progress func(done, total int)
}

func (s *DesignSettings) withDefaults() DesignSettings {
	var o DesignSettings
	if s != nil {
		o = *s
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	if o.Evaluations <= 0 {
		o.Evaluations = 4000
	}
	if o.Restarts <= 0 {
		o.Restarts = 4
	}
	if o.Top <= 0 {
		o.Top = 5
	}
	if o.Distinct <= 0 {
		o.Distinct = 0.05
	}
	if o.Workers <= 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	if o.VerifyTolerance <= 0 {
		o.VerifyTolerance = 0.1
	}
	return o
}

// DesignStatus says whether a design found a feasible candidate.
type DesignStatus int

const (
	// DesignFeasible: at least one candidate meets every hard constraint.
	DesignFeasible DesignStatus = iota + 1
	// DesignInfeasible: none does; DesignResult.Closest and Unmet say which
	// constraints fail, and by how much, at the least-violating candidate.
	DesignInfeasible
)

func (s DesignStatus) String() string {
	switch s {
	case DesignFeasible:
		return "feasible"
	case DesignInfeasible:
		return "infeasible"
	}
	return "unknown"
}

// DesignCandidate is a reported candidate.
type DesignCandidate struct {
	DesignEval
	// Index: position in DesignResult.Evaluations.
	Index int
	// Settings: every setting as a plan holds it (DesignEvaluator.Settings).
	Settings map[string]string
	// Binding: the constraints with a margin ≤ BindingMargin (their keys)
	// and the free settings within BindingEdge of an end of their range
	// ("gradient at HI"); empty for an interior optimum.
	Binding []string
	// Closest: the constraint with the smallest margin ("" without any).
	Closest string
	// Check: the verification of this candidate (nil if not checked).
	Check *DesignCheck
}

// BindingMargin and BindingEdge define when a constraint or a range binds
// (DesignCandidate.Binding).
const (
	BindingMargin = 0.02
	BindingEdge   = 0.005
)

// DesignCheck is the check of a candidate without the cycle average
// (shake: VerifyCoupling) and with a 1D GPE ground state in a uniform box at
// the planned point.
type DesignCheck struct {
	// Verified: the time-dependent verification ran (shake only).
	Verified bool
	// KtDeviation, RabiDeviation: measured/model − 1 of k_t and of the Rabi
	// frequency.
	KtDeviation, RabiDeviation float64
	VerifyErr                  string
	// GPEPhase: the phase of the GPE ground state; GPEConverged its status.
	GPEPhase     label.Phase
	GPEConverged bool
	GPEErr       string
	// Passed: |deviations| ≤ DesignSettings.VerifyTolerance and the GPE
	// state is a converged stripe.
	Passed bool
	// Why: what failed ("" when passed).
	Why string
}

// TradePoint is the stripe of the shaking scheme at one gradient amplitude
// (other settings of the winner, δ at the balancing detuning): the window in
// the Rabi frequency (StripeWindow, as compare reports it) and the stripe
// period in its middle.
type TradePoint struct {
	GradientTm, KtPerM, ERHz float64
	WindowLoHz, WindowHiHz   float64 // Hi = +Inf when the stripe reaches the end of the scan
	WindowWidthHz            float64 // Hi − Lo with Hi capped at the scan end
	PeriodM                  float64 // at mid window (NaN without window)
	HaveWindow               bool
}

// DesignResult is the outcome of Design.
type DesignResult struct {
	Status DesignStatus
	// Problem: the checked problem (a trap replaced by its Thomas–Fermi
	// peak density); Limits with their defaults.
	Problem DesignProblem
	Limits  DesignLimits
	// Evaluations: every evaluated candidate, search by search in a fixed
	// order (independent of the number of workers).
	Evaluations []DesignEval
	// Searches: the number of CMA-ES searches; Failed: evaluations the
	// chain refused (DesignEval.Err).
	Searches, Failed int
	// Candidates: the best Top distinct feasible candidates, best first.
	Candidates []DesignCandidate
	// Winner: index into Candidates of the first that passed its check
	// (-1: none passed or not checked).
	Winner int
	// Closest: with DesignInfeasible, the candidate that misses the
	// constraints least; Unmet: the constraints it misses (a pseudo
	// constraint "stripe" when its planned state is no stripe).
	Closest *DesignCandidate
	Unmet   []Margin
	// Trade: shake only, the winner's (or best candidate's) stripe at 0.8,
	// 1 and 1.25 times its gradient amplitude.
	Trade []TradePoint
	// Elapsed: wall time of the search.
	Elapsed time.Duration
}

// Design searches the free settings of p for the largest objective under
// the hard constraints: CMA-ES (gonum optimize.CmaEsChol) with restarts,
// each polished by Nelder–Mead, on the unit cube of the ranges (a point
// outside is folded back by reflection), minimising −objective at feasible
// points and 1 + (violations) elsewhere, so every feasible point beats every
// infeasible one. The searches run in parallel with their own seeds; the
// evaluations are merged in search order, so the result does not depend on
// Workers. Errors caused by p match ErrInput.
func Design(p DesignProblem, s *DesignSettings) (*DesignResult, error) {
	set := s.withDefaults()
	ev, err := NewDesignEvaluator(p, set.WindowTol, set.Variational)
	if err != nil {
		return nil, err
	}
	start := time.Now()
	res := &DesignResult{Problem: ev.p, Limits: ev.lim, Winner: -1}

	// Searches: every combination of choices × Restarts (one evaluation per
	// combination when nothing is numeric).
	combos := [][]int{{}}
	for _, i := range ev.choice {
		var next [][]int
		for _, c := range combos {
			for k := range ev.p.Free[i].Choices {
				next = append(next, append(append([]int{}, c...), k))
			}
		}
		combos = next
	}
	restarts := set.Restarts
	if len(ev.free) == 0 {
		restarts = 1
	}
	type job struct {
		combo   []int
		restart int
	}
	var jobs []job
	for _, c := range combos {
		for r := range restarts {
			jobs = append(jobs, job{c, r})
		}
	}
	res.Searches = len(jobs)
	polish := 0 // the final polish of the best point
	if len(ev.free) > 0 {
		polish = set.Evaluations / 5
	}
	share := max((set.Evaluations-polish)/len(jobs), 1)
	total := share*len(jobs) + polish
	if len(ev.free) == 0 {
		total = len(jobs)
	}
	logs := make([][]DesignEval, len(jobs))
	var done atomic.Int64
	var wg sync.WaitGroup
	next := make(chan int)
	workers := min(set.Workers, len(jobs))
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range next {
				logs[j] = ev.search(jobs[j].combo, jobs[j].restart, uint64(j), set.Seed, share, &done)
			}
		}()
	}
	finished := make(chan struct{})
	go func() {
		for j := range jobs {
			next <- j
		}
		close(next)
		wg.Wait()
		close(finished)
	}()
	tick := time.NewTicker(200 * time.Millisecond)
	for wait := true; wait; {
		select {
		case <-finished:
			wait = false
		case <-tick.C:
			if set.Progress != nil {
				set.Progress(int(done.Load()), total)
			}
		}
	}
	tick.Stop()
	if set.Progress != nil {
		set.Progress(int(done.Load()), total)
	}
	for _, l := range logs {
		res.Evaluations = append(res.Evaluations, l...)
	}
	if polish > 0 {
		res.Evaluations = append(res.Evaluations, ev.polish(res.Evaluations, polish, &done)...)
		if set.Progress != nil {
			set.Progress(int(done.Load()), total)
		}
	}
	for i := range res.Evaluations {
		if res.Evaluations[i].Err != "" {
			res.Failed++
		}
	}
	res.Candidates = ev.pick(res.Evaluations, set.Top, set.Distinct)
	if len(res.Candidates) == 0 {
		res.Status = DesignInfeasible
		c := ev.closest(res.Evaluations)
		res.Closest = c
		if c != nil {
			for _, m := range c.Margins {
				if !m.OK() {
					res.Unmet = append(res.Unmet, m)
				}
			}
			if !c.Merits.Stripe {
				res.Unmet = append(res.Unmet, Margin{Key: "stripe", Name: "stripe phase at the planned point (" + c.Merits.Phase.String() + " there)", Margin: -1})
			}
		}
		res.Elapsed = time.Since(start)
		return res, nil
	}
	res.Status = DesignFeasible
	if !set.SkipCheck {
		for i := range res.Candidates {
			c := &res.Candidates[i]
			c.Check = ev.checkCandidate(c, &set)
			if c.Check.Passed {
				res.Winner = i
				break
			}
		}
	}
	if ev.p.Scheme == "shake" {
		best := &res.Candidates[0]
		if res.Winner >= 0 {
			best = &res.Candidates[res.Winner]
		}
		res.Trade = ev.trade(best, set.Variational)
	}
	res.Elapsed = time.Since(start)
	return res, nil
}

// fold maps the real line onto [0, 1] by reflection at 0 and 1.
func fold(x float64) float64 {
	x = math.Mod(math.Abs(x), 2)
	if x > 1 {
		x = 2 - x
	}
	return x
}

// cost is the function the searches minimise.
func cost(d *DesignEval) float64 {
	if d.Feasible {
		return -d.Objective
	}
	v := 1.0
	if d.Err != "" {
		v += 1
	}
	for _, m := range d.Margins {
		if m.Margin < 0 {
			x := math.Min(-m.Margin, 1e6)
			v += x / (1 + x)
		}
	}
	if !d.Merits.Stripe && d.Err == "" {
		v += 1 - 1/(1+100*math.Max(d.Gap, 0))
	}
	return v
}

// search runs one CMA-ES search and its Nelder–Mead polish with at most
// budget evaluations and returns every evaluation in order.
func (e *DesignEvaluator) search(choices []int, restart int, stream, seed uint64, budget int, done *atomic.Int64) []DesignEval {
	nf := len(e.p.Free)
	var log []DesignEval
	evalUnit := func(u []float64) float64 {
		d := DesignEval{Values: e.values(u, choices), Unit: append([]float64(nil), u...)}
		for _, i := range e.choice {
			d.Unit[i] = math.NaN()
		}
		e.evaluate(&d)
		log = append(log, d)
		done.Add(1)
		return cost(&d)
	}
	u := make([]float64, nf)
	if len(e.free) == 0 {
		evalUnit(u)
		return log
	}
	// The search space: one coordinate per numeric free setting.
	x0 := make([]float64, len(e.free))
	rng := rand.New(rand.NewPCG(seed, stream^0x5bd1e995))
	for k := range x0 {
		x0[k] = 0.5
		if restart > 0 {
			x0[k] = rng.Float64()
		}
	}
	f := func(x []float64) float64 {
		for k, i := range e.free {
			u[i] = fold(x[k])
		}
		if len(log) >= budget {
			return math.Inf(1)
		}
		return evalUnit(u)
	}
	prob := optimize.Problem{Func: f}
	src := rand.NewPCG(seed, stream)
	// CMA-ES, then Nelder–Mead from its best point; a search that has
	// converged with budget left starts again from a random point (the
	// restarts within one search share its random stream).
	for run := 0; len(log) < budget-len(e.free)-1; run++ {
		if run > 0 {
			for k := range x0 {
				x0[k] = rng.Float64()
			}
		}
		left := budget - len(log)
		cma := &optimize.CmaEsChol{InitStepSize: 0.3, Src: src}
		conv := &optimize.FunctionConverge{Absolute: 1e-12, Relative: 1e-10, Iterations: 40}
		r, _ := optimize.Minimize(prob, x0, &optimize.Settings{FuncEvaluations: max(left*85/100, 1), Converger: conv}, cma)
		best := x0
		if r != nil && r.X != nil {
			best = r.X
		}
		if left = budget - len(log); left > len(e.free)+1 {
			nm := &optimize.NelderMead{SimplexSize: 0.05}
			_, _ = optimize.Minimize(prob, best, &optimize.Settings{FuncEvaluations: min(left, max(budget*15/100, 4*len(e.free)+4)),
				Converger: &optimize.FunctionConverge{Absolute: 1e-12, Relative: 1e-10, Iterations: 50}}, nm)
		}
	}
	if len(log) > budget {
		log = log[:budget]
	}
	return log
}

// polish refines the best evaluation of all searches (the lowest cost)
// by Nelder–Mead from a small simplex (2 % of each range) with its choices
// fixed, with at most budget evaluations.
func (e *DesignEvaluator) polish(all []DesignEval, budget int, done *atomic.Int64) []DesignEval {
	bi, bc := -1, math.Inf(1)
	for i := range all {
		if c := cost(&all[i]); c < bc {
			bi, bc = i, c
		}
	}
	if bi < 0 {
		return nil
	}
	choices := make([]int, len(e.choice))
	for j, i := range e.choice {
		choices[j] = int(all[bi].Values[i])
	}
	x0 := make([]float64, len(e.free))
	for k, i := range e.free {
		x0[k] = all[bi].Unit[i]
	}
	var log []DesignEval
	u := make([]float64, len(e.p.Free))
	f := func(x []float64) float64 {
		if len(log) >= budget {
			return math.Inf(1)
		}
		for k, i := range e.free {
			u[i] = fold(x[k])
		}
		d := DesignEval{Values: e.values(u, choices), Unit: append([]float64(nil), u...)}
		for _, i := range e.choice {
			d.Unit[i] = math.NaN()
		}
		e.evaluate(&d)
		log = append(log, d)
		done.Add(1)
		return cost(&d)
	}
	// Restart Nelder–Mead from its best point with a smaller simplex until
	// the budget is spent or it stops improving.
	size := 0.02
	for len(log) < budget-len(e.free)-1 && size > 1e-6 {
		r, _ := optimize.Minimize(optimize.Problem{Func: f}, x0, &optimize.Settings{FuncEvaluations: budget - len(log),
			Converger: &optimize.FunctionConverge{Absolute: 1e-12, Relative: 1e-10, Iterations: 30}}, &optimize.NelderMead{SimplexSize: size})
		if r == nil || r.X == nil {
			break
		}
		x0 = r.X
		size /= 4
	}
	if len(log) > budget {
		log = log[:budget]
	}
	return log
}

// pick chooses the best top distinct feasible evaluations (ties: the
// earlier evaluation).
func (e *DesignEvaluator) pick(all []DesignEval, top int, distinct float64) []DesignCandidate {
	var idx []int
	for i := range all {
		if all[i].Feasible {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return all[idx[a]].Objective > all[idx[b]].Objective })
	var out []DesignCandidate
	for _, i := range idx {
		if len(out) == top {
			break
		}
		ok := true
		for _, c := range out {
			if !e.distinct(&all[i], &c.DesignEval, distinct) {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, e.candidate(all, i))
		}
	}
	return out
}

func (e *DesignEvaluator) distinct(a, b *DesignEval, d float64) bool {
	for _, i := range e.choice {
		if a.Values[i] != b.Values[i] {
			return true
		}
	}
	for _, i := range e.free {
		if math.Abs(a.Unit[i]-b.Unit[i]) >= d {
			return true
		}
	}
	return len(e.free) == 0 && len(e.choice) == 0
}

func (e *DesignEvaluator) candidate(all []DesignEval, i int) DesignCandidate {
	c := DesignCandidate{DesignEval: all[i], Index: i}
	c.Settings = e.Settings(&c.DesignEval)
	small := math.Inf(1)
	for _, m := range c.Margins {
		if m.Margin < small {
			small, c.Closest = m.Margin, m.Key+" ("+m.Name+")"
		}
		if m.Margin <= BindingMargin {
			c.Binding = append(c.Binding, m.Key+" ("+m.Name+")")
		}
	}
	for _, k := range e.free {
		f := e.p.Free[k]
		switch u := c.Unit[k]; {
		case u <= BindingEdge:
			c.Binding = append(c.Binding, f.Name+" at LO "+f.Text(f.Lo))
		case u >= 1-BindingEdge:
			c.Binding = append(c.Binding, f.Name+" at HI "+f.Text(f.Hi))
		}
	}
	return c
}

// closest returns the evaluation that misses the constraints least
// (DesignResult.Closest); nil if there is none without a chain error.
func (e *DesignEvaluator) closest(all []DesignEval) *DesignCandidate {
	best, bi := math.Inf(1), -1
	for i := range all {
		if all[i].Err != "" {
			continue
		}
		if c := cost(&all[i]); c < best {
			best, bi = c, i
		}
	}
	if bi < 0 {
		return nil
	}
	c := e.candidate(all, bi)
	return &c
}

// Schemes returns the complete scheme settings of candidate d (free values
// applied, the chosen detuning with BalanceDetuning).
func (e *DesignEvaluator) Schemes(d *DesignEval) (dispersion.Shake, dispersion.Raman) {
	sh, rm, _ := e.settings(d.Values)
	if e.p.BalanceDetuning {
		if e.p.Scheme == "shake" {
			sh.DetuningHz = d.Merits.DetuningHz
		} else {
			rm.DetuningHz = d.Merits.DetuningHz
		}
	}
	return sh, rm
}

// checkCandidate verifies candidate c (VerifyCoupling for shake) and solves
// the 1D GPE ground state in a uniform box at its planned point.
func (e *DesignEvaluator) checkCandidate(c *DesignCandidate, set *DesignSettings) *DesignCheck {
	ck := &DesignCheck{}
	sh, rm := e.Schemes(&c.DesignEval)
	var why []string
	if e.p.Scheme == "shake" {
		kt, rabi, err := VerifyCoupling(sh)
		if err != nil {
			ck.VerifyErr = err.Error()
			why = append(why, "verify failed: "+err.Error())
		} else {
			ck.Verified, ck.KtDeviation, ck.RabiDeviation = true, kt, rabi
			if !(math.Abs(kt) <= set.VerifyTolerance) {
				why = append(why, "verified k_t deviates beyond the tolerance")
			}
			if !(math.Abs(rabi) <= set.VerifyTolerance) {
				why = append(why, "verified Rabi frequency deviates beyond the tolerance")
			}
		}
	}
	var scheme dispersion.Scheme = sh
	if e.p.Scheme == "raman" {
		scheme = rm
	}
	lab := Lab{Scheme: scheme, HaveSI: true, Couplings: e.p.Couplings, Density: e.p.Density}
	gr, err := Ground(GroundProblem{Lab: lab, Dims: 1}, &GroundSettings{Variational: set.Variational})
	switch {
	case err != nil:
		ck.GPEErr = err.Error()
		why = append(why, "GPE ground state failed: "+err.Error())
	case gr.Multi == nil || gr.Multi.Observed == nil:
		ck.GPEErr = "no GPE state"
		why = append(why, "no GPE state")
	default:
		ck.GPEPhase = gr.Multi.Observed.Phase
		ck.GPEConverged = gr.Status == gpe.Converged
		if !ck.GPEConverged {
			why = append(why, "GPE ground state did not converge")
		} else if ck.GPEPhase != label.Stripe {
			why = append(why, "the GPE ground state is "+ck.GPEPhase.String()+", not a stripe")
		}
	}
	ck.Passed = len(why) == 0
	for i, w := range why {
		if i > 0 {
			ck.Why += "; "
		}
		ck.Why += w
	}
	return ck
}

// trade evaluates the stripe window of c's shaking settings at 0.8, 1 and
// 1.25 times its gradient amplitude, δ at the balancing detuning.
func (e *DesignEvaluator) trade(c *DesignCandidate, vs *Settings) []TradePoint {
	sh, _ := e.Schemes(&c.DesignEval)
	var out []TradePoint
	for _, f := range []float64{0.8, 1, 1.25} {
		s := sh
		s.Gradient *= f
		tp := TradePoint{GradientTm: s.Gradient, PeriodM: math.NaN()}
		r, err := s.Evaluate()
		if err != nil || r.Model.ER == 0 {
			continue
		}
		tp.KtPerM, tp.ERHz = r.KtMean, r.Model.ERHz()
		n := e.p.Density
		u := Uniform{Guu: n * e.p.Couplings.Guu / r.Model.ER, Gdd: n * e.p.Couplings.Gdd / r.Model.ER, Gud: n * e.p.Couplings.Gud / r.Model.ER}
		u.Delta = BalancingDetuning(u.Guu, u.Gdd)
		g1, _, _ := u.Couplings()
		omMax := 2*(2+math.Max(g1, 0)) + 1
		w, err := StripeWindow(u, omMax, 400, 1e-7, vs)
		if err != nil {
			continue
		}
		if w.Found {
			tp.HaveWindow = true
			hi := math.Min(w.Hi, omMax)
			tp.WindowLoHz, tp.WindowHiHz, tp.WindowWidthHz = w.Lo*tp.ERHz, w.Hi*tp.ERHz, (hi-w.Lo)*tp.ERHz
			um := u
			um.Omega = (w.Lo + hi) / 2
			if mr, err := Variational(um, vs); err == nil && mr.Phase == label.Stripe {
				tp.PeriodM = mr.Period / math.Abs(r.Model.KR)
			}
		}
		out = append(out, tp)
	}
	return out
}
