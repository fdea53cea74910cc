package phases

import (
	"fmt"
	"math"

	"socmap/gpe"
	"socmap/phases/label"
)

// The best GPE state of a uniform gas over branches and boxes, and the GPE
// stripe edge. A periodic box admits only the momenta 2πm/L, so a box sized
// for one state distorts the other: each branch is solved in a box of its
// own. The plane-wave branch gets the box of its variational momentum
// (gpe.AutoLength, four wavelengths); the stripe branch gets boxes of four
// stripe wavelengths 2π/k for a stripe momentum k that is optimised (a scan
// of 7 boxes, then golden section on the GPE energy) around the variational
// stripe momentum, since
// the GPE stripe's period differs from the ansatz's. The state kept is the
// lowest converged energy over all candidates (ties within
// gpe.DegenerateTol keep the plane-wave branch). 1D, δ and couplings as in
// the Uniform; translation-invariant observables (gpe observe_shape.go).
//
// Checked against testdata/ref_gpe_edge.py (numpy/scipy: one-wavelength
// box, L-BFGS, period optimised, exact plane-wave energy): the GPE stripe
// edge at G1 = 1, G2 = 0.05, δ = 0 is Ω = 1.6517 E_R (variational 1.4397).

// GPEBestSettings configure BestGPEState. Zero fields take the documented
// defaults.
type GPEBestSettings struct {
	// Points: grid points of the 1D boxes. Default 256 (k_max ≈ 30 k_R for
	// four stripe wavelengths).
	Points int
	// KSpan: the stripe momentum is searched in [k_s − KSpan, k_s +
	// KSpan/2], k_s the variational stripe momentum (k_R). Default 0.08.
	KSpan float64
	// KTol: tolerance of the stripe momentum (k_R). Default 2e-4.
	KTol float64
	// Solver: GPE solver settings (gpe.Settings documents the defaults;
	// Threads default 1 here: the boxes are small).
	Solver gpe.Settings
	// Variational: settings of the variational theory (nil: defaults).
	Variational *Settings
}

func (s *GPEBestSettings) withDefaults() GPEBestSettings {
	var o GPEBestSettings
	if s != nil {
		o = *s
	}
	if o.Points == 0 {
		o.Points = 256
	}
	if o.KSpan == 0 {
		o.KSpan = 0.08
	}
	if o.KTol == 0 {
		o.KTol = 2e-4
	}
	if o.Solver.Threads == 0 {
		o.Solver.Threads = 1
	}
	return o
}

// GPECandidate is one branch-and-box solve of BestGPEState.
type GPECandidate struct {
	Branch      string  // "plane-wave" or "stripe"
	BoxMomentum float64 // the momentum the box is sized for, k_R
	Length      float64 // box length, 1/k_R
	Energy      float64 // energy per particle, E_R
	Phase       label.Phase
	Status      gpe.Status
	Residual    float64 // E_R
}

// GPEBest is the best GPE state of a uniform gas over branches and boxes.
type GPEBest struct {
	GPECandidate                // the kept candidate
	K1           float64        // k_R
	Contrast     float64        // (n_max − n_min)/(n_max + n_min), continuous
	Sz           float64        // ⟨σ_z⟩
	Variational  Result         // the variational optimum (and its branches)
	Candidates   []GPECandidate // every solve, in order
	// Status: gpe.Converged when the kept candidate converged.
	Status gpe.Status
}

// BestGPEState returns the lowest GPE state of u over its branches, each in
// its own box (see above). Errors caused by u match ErrInput.
func BestGPEState(u Uniform, s *GPEBestSettings) (*GPEBest, error) {
	set := s.withDefaults()
	vr, err := Variational(u, set.Variational)
	if err != nil {
		return nil, badInput(err)
	}
	th := thresholds(set.Variational)
	best := &GPEBest{Variational: vr}
	var bestObs *gpe.Observables
	// warm is the lowest converged stripe so far (the start of the golden
	// section's boxes, warmStart).
	var warm *gpe.State
	warmE := math.Inf(1)
	solve := func(branch string, k float64, starts []gpe.Guess, solver gpe.Settings) (GPECandidate, *gpe.Observables, error) {
		L := gpe.AutoLength(gpe.BoxMomentum(k))
		g, err := gpe.NewGrid([]int{set.Points}, []float64{L})
		if err != nil {
			return GPECandidate{}, nil, err
		}
		p := gpe.Problem{Grid: g, Model: gpe.UniformBox(g, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)}
		mr, err := gpe.MultiStart(p, starts, &solver, th)
		if err != nil {
			return GPECandidate{}, nil, err
		}
		o := mr.Observed
		c := GPECandidate{Branch: branch, BoxMomentum: gpe.BoxMomentum(k), Length: L, Energy: o.Energies.Total,
			Phase: o.Phase, Status: mr.Best.Status, Residual: mr.Best.Residual}
		if c.Status == gpe.Converged && c.Phase == label.Stripe && c.Energy < warmE {
			warm, warmE = mr.Best.State, c.Energy
		}
		return c, o, nil
	}
	keep := func(c GPECandidate, o *gpe.Observables) {
		best.Candidates = append(best.Candidates, c)
		conv, bconv := c.Status == gpe.Converged, best.Status == gpe.Converged && bestObs != nil
		tol := gpe.DegenerateTol * math.Max(1, math.Abs(c.Energy))
		if bestObs == nil || (conv && !bconv) || (conv == bconv && c.Energy < best.Energy-tol) {
			best.GPECandidate, best.Status, bestObs = c, c.Status, o
		}
	}
	// Plane-wave branch: its own momentum, plane-wave starts at ±k.
	kpw := planeWaveMomentum(vr)
	c, o, err := solve("plane-wave", kpw, []gpe.Guess{{Name: "plane wave +k", Kind: gpe.GuessPlaneWave, K: math.Abs(kpw)},
		{Name: "plane wave −k", Kind: gpe.GuessPlaneWave, K: -math.Abs(kpw)}}, set.Solver)
	if err != nil {
		return nil, err
	}
	keep(c, o)
	// Stripe branch: boxes of four stripe wavelengths, the stripe momentum
	// optimised (stripeMomentumSearch).
	if ks, ok := stripeBranchMomentum(vr); ok {
		err := stripeMomentumSearch(ks, set.KSpan, set.KTol, func(k float64, useWarm bool) (float64, bool, error) {
			var c GPECandidate
			var o *gpe.Observables
			var err error
			if ws, sv, ok := warmStart(useWarm, warm, set.Points, set.Solver); ok {
				c, o, err = solve("stripe", k, ws, sv)
			}
			if err == nil && (o == nil || c.Status != gpe.Converged) {
				c, o, err = solve("stripe", k, stripeBoxStarts(k), set.Solver)
			}
			if err != nil {
				return 0, false, err
			}
			keep(c, o)
			return c.Energy, c.Phase == label.Stripe && c.Status == gpe.Converged, nil
		})
		if err != nil {
			return nil, err
		}
	}
	best.K1, best.Contrast, best.Sz = bestObs.K1, bestObs.Contrast, bestObs.Sz
	return best, nil
}

// planeWaveMomentum is the signed momentum (k_R) of the variational
// plane-wave branch's wave (the one of weight ≥ ½).
func planeWaveMomentum(vr Result) float64 {
	if vr.PlaneWaveState.W < 0.5 {
		return -vr.PlaneWaveState.KMinus
	}
	return vr.PlaneWaveState.KPlus
}

// stripeBranchMomentum is the variational stripe branch's momentum
// |k₊ + k₋|/2 (k_R) and whether the branch exists (finite energy, momentum
// ≥ gpe.MinBoxMomentum): the centre of stripeMomentumSearch.
func stripeBranchMomentum(vr Result) (float64, bool) {
	ks := math.Abs(vr.StripeState.KPlus+vr.StripeState.KMinus) / 2
	ok := !math.IsInf(vr.EnergyStripe, 0) && !math.IsNaN(vr.EnergyStripe) && ks >= gpe.MinBoxMomentum
	return ks, ok
}

// stripeBoxStarts are the cold starts of the stripe branch in the box of
// stripe momentum k: the equal superposition of the lower-band spinors at
// ±k (gpe.GuessStripe). The variational stripe state as a second start
// never gave a stripe the GuessStripe start missed, nor a lower one, in
// 483 scan boxes (G1 = 0.3 … 3, G2 = 0.014 … 0.25, Ω across and beyond the
// stripe windows; measured on this code): where it ended lower it was a
// plane wave, which its own box holds lower still. It is therefore not
// used (it cost half of the scan).
func stripeBoxStarts(k float64) []gpe.Guess {
	return []gpe.Guess{{Name: "stripe", Kind: gpe.GuessStripe, K: k}}
}

// warmStart returns the start of a box of the stripe search once a stripe
// was found (warm true, see stripeMomentumSearch):
// the best stripe so far (its array of values, which in a box of the same
// number of points and the same number of periods is the stripe stretched
// to the new period) with solver settings that go to the finisher after one
// split step (measured: 0.3 ms against 1.2 ms for a gpe.GuessStripe start,
// the same state to 1e-10 E_R). ok is false before a stripe was found or
// without a warm state of that size; a warm start that does not converge is
// followed by the full starts (the callers' rule).
func warmStart(use bool, warm *gpe.State, points int, solver gpe.Settings) ([]gpe.Guess, gpe.Settings, bool) {
	if !use || warm == nil || warm.Grid.Size != points {
		return nil, solver, false
	}
	solver.MaxSplitSteps = warmSplitSteps
	return []gpe.Guess{{Name: "best stripe so far", Kind: gpe.GuessGiven, State: warm}}, solver, true
}

// warmSplitSteps is the split-step budget of a warm start.
const warmSplitSteps = 1

// Stripe-momentum scan of stripeMomentumSearch: stripeScanBoxes boxes evenly
// spaced over the span.
const stripeScanBoxes = 7

// stripeMomentumSearch is the one optimiser of the stripe box (BestGPEState
// and the GPE map points use it): eval(k, warm) solves the stripe branch in
// the box sized for stripe momentum k (k_R) and returns the lowest
// converged energy there (+Inf when no start converged) and whether that
// lowest state is a stripe. The search scans stripeScanBoxes momenta evenly
// over [max(ks − span, gpe.MinBoxMomentum), ks + span/2], then refines by
// golden section in the bracket of the lowest stripe of the scan until it
// is narrower than tol (boxes whose lowest state is not a stripe count as
// +Inf: the stripe's period is optimised). Until a box holds a stripe, eval gets warm false and
// uses the full starts (a stripe start can fall to a plane wave in boxes
// far from its period, which also breaks unimodality: hence the scan);
// from then on warm is true and the caller may start from the best stripe
// found so far, a few finisher iterations from the stripe of the new box
// (warmStart). When no scan box holds a stripe the branch has none and the
// golden section is skipped (a stripe confined to a bracket narrower than
// the scan step, span/4, would be missed; the edge tests against the numpy
// reference check that this does not happen at the stripe edge).
// span ≤ 0 or tol ≥ span: only the box of ks (the variational period).
func stripeMomentumSearch(ks, span, tol float64, eval func(k float64, refine bool) (float64, bool, error)) error {
	if !(span > 0) || tol >= span {
		_, _, err := eval(ks, false)
		return err
	}
	a, b := math.Max(ks-span, gpe.MinBoxMomentum), ks+span/2
	h := (b - a) / (stripeScanBoxes - 1)
	jb, fb, any := 0, math.Inf(1), false
	for j := 0; j < stripeScanBoxes; j++ {
		f, st, err := eval(a+float64(j)*h, any)
		if err != nil {
			return err
		}
		any = any || st
		if st && f < fb {
			jb, fb = j, f
		}
	}
	if !any {
		return nil
	}
	a, b = math.Max(a+float64(jb-1)*h, gpe.MinBoxMomentum), a+float64(jb+1)*h
	f := func(k float64) (float64, error) {
		e, st, err := eval(k, true)
		if !st {
			e = math.Inf(1) // the period of the stripe is optimised, not the box of a plane wave
		}
		return e, err
	}
	const gr = 0.6180339887498949
	x1, x2 := b-gr*(b-a), a+gr*(b-a)
	f1, err := f(x1)
	if err != nil {
		return err
	}
	f2, err := f(x2)
	if err != nil {
		return err
	}
	for b-a > tol {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - gr*(b-a)
			if f1, err = f(x1); err != nil {
				return err
			}
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + gr*(b-a)
			if f2, err = f(x2); err != nil {
				return err
			}
		}
	}
	return nil
}

// GPEEdgeSettings configure GPEStripeEdge. Zero fields take the documented
// defaults.
type GPEEdgeSettings struct {
	// Tol: tolerance of the edge in Ω, E_R. Default 1e-3.
	Tol float64
	// Step: the first step above the variational edge when searching for a
	// Ω without a GPE stripe, E_R. Default max(0.05·Ω_var, 0.02); doubled
	// until the stripe is gone.
	Step float64
	// OmegaMax: the search gives up above this Ω (E_R). Default
	// 2(2 + max(G1, 0)) + 1.
	OmegaMax float64
	// Best: settings of each BestGPEState.
	Best GPEBestSettings
}

// GPEEdge is the upper stripe edge in Ω of the GPE.
type GPEEdge struct {
	Found bool
	// Omega: the edge (E_R): the best GPE state is a stripe below it and not
	// above, to within Tol (the midpoint of the last bracket).
	Omega float64
	// Lo, Hi: the last bracket (stripe at Lo, none at Hi).
	Lo, Hi float64
	// Solves: BestGPEState calls made.
	Solves int
	// Note: why no edge was found ("" when Found).
	Note string
}

// GPEStripeEdge finds the upper edge in Ω of the GPE stripe of u (u.Omega is
// ignored) by bisection with BestGPEState, starting from the variational
// edge from (a stripe there is required; the GPE stripe reaches at least as
// far for G2 > 0, since the GPE can only lower the stripe's energy).
func GPEStripeEdge(u Uniform, from float64, s *GPEEdgeSettings) (GPEEdge, error) {
	var set GPEEdgeSettings
	if s != nil {
		set = *s
	}
	g1, _, _ := u.Couplings()
	if set.Tol == 0 {
		set.Tol = 1e-3
	}
	if set.Step == 0 {
		set.Step = math.Max(0.05*from, 0.02)
	}
	if set.OmegaMax == 0 {
		set.OmegaMax = 2*(2+math.Max(g1, 0)) + 1
	}
	var e GPEEdge
	stripe := func(om float64) (bool, error) {
		uu := u
		uu.Omega = om
		e.Solves++
		b, err := BestGPEState(uu, &set.Best)
		if err != nil {
			return false, err
		}
		if b.Status != gpe.Converged {
			return false, fmt.Errorf("GPE state at Ω = %g E_R did not converge (residual %g)", om, b.Residual)
		}
		return b.Phase == label.Stripe, nil
	}
	lo := math.Max(from-set.Step/2, 0)
	ok, err := stripe(lo)
	if err != nil {
		return e, err
	}
	if !ok {
		e.Note = fmt.Sprintf("no GPE stripe at Ω = %.4g E_R, below the variational edge", lo)
		return e, nil
	}
	hi, step := from, set.Step
	for {
		if hi > set.OmegaMax {
			e.Note = fmt.Sprintf("the GPE stripe reaches the end of the search, Ω = %.4g E_R", set.OmegaMax)
			return e, nil
		}
		ok, err := stripe(hi)
		if err != nil {
			return e, err
		}
		if !ok {
			break
		}
		lo, hi, step = hi, hi+step, 2*step
	}
	for hi-lo > set.Tol {
		mid := (lo + hi) / 2
		ok, err := stripe(mid)
		if err != nil {
			return e, err
		}
		if ok {
			lo = mid
		} else {
			hi = mid
		}
	}
	e.Found, e.Lo, e.Hi, e.Omega = true, lo, hi, (lo+hi)/2
	return e, nil
}
