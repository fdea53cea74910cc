package phases

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"socmap/gpe"
	"socmap/phases/label"
)

// GPEObservables are the observables of a GPE map point, in the order of
// PointResult.Values produced by GPEPoints.
var GPEObservables = []Observable{
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the GPE ground state (lowest converged start; degenerate starts by the rule of GPEPoints)"},
	{Name: "k1", Unit: "k_R", Description: "|k_x| of the largest momentum peak"},
	{Name: "contrast", Unit: "dimensionless", Description: "total-density contrast (n_max - n_min)/(n_max + n_min) along x"},
	{Name: "sigma_z", Unit: "dimensionless", Description: "<sigma_z> per particle"},
	{Name: "residual", Unit: "E_R", Description: "residual |H psi - mu psi| of the kept state"},
	{Name: "energy_variational", Unit: "E_R", Description: "energy per particle of the variational optimum at this point"},
	{Name: "phase_variational", Unit: "dimensionless", Description: "phase code of the variational optimum at this point"},
	{Name: "box_length", Unit: "1/k_R", Description: "box length along x of the kept state (commensurate with the momentum its box is sized for: the plane-wave branch's, or the optimised stripe momentum)"},
	{Name: "spread", Unit: "E_R", Description: "energy spread among the converged starts (all boxes)"},
	{Name: "grid_points", Unit: "dimensionless", Description: "grid points along x of the kept state's box (the automatic-grid rule, gpe.ResolveBox)"},
}

// GPESettings configure GPEPoints. Zero fields take the documented defaults.
type GPESettings struct {
	// Points: grid points along x; 0 chooses them by the automatic-grid rule
	// (gpe.ResolveBox: a power of two from 256 to 1024 with k_max = π/dx ≥
	// 4 k_R, raised through FFT-friendly sizes up to 8192 when the box
	// needs it). A given count is kept; the box is then capped instead.
	Points int
	// Length: box length along x (1/k_R), the one box of every start; 0
	// sizes the boxes per point and per branch (see GPEPoints): four
	// wavelengths of the branch's momentum, fewer when the points cannot
	// resolve that box (gpe.ResolveBox over gpe.BoxMomentum(...)).
	Length float64
	// RandomStarts: random starts (seeds 1…n) in the plane-wave box besides
	// the variational states. Default 0.
	RandomStarts int
	// StripeBox: the boxes of the stripe branch, StripeBoxOptimise (default,
	// also "") or StripeBoxFixed. Not used when Length is given.
	StripeBox StripeBox
	// StripeKTol: the bracket (k_R) at which the optimised stripe momentum
	// stops. Default DefaultStripeKTol (1e-3).
	StripeKTol float64
	// Dims: dimension of the grid, 1 (default, also for 0) or 2. A uniform
	// 2D box has the x axis of the 1D rule and a y axis of half its length
	// (gpe.AutoTransverse) with points from the same rule (gpe.ResolveBox
	// for that length, or the given Points); the observables are those of
	// the 1D map (k1, contrast along x). Trapped maps (MapProblem.Trap)
	// solve in Dims dimensions with the other axes frozen out.
	Dims int
	// Solver settings (Threads defaults to 1: one solve per core).
	Solver gpe.Settings
	// Variational settings.
	Variational *Settings
}

func (s GPESettings) dims() int {
	if s.Dims == 0 {
		return 1
	}
	return s.Dims
}

// DegenerateTol (E_R) is the energy difference below which GPEPoints treats
// two converged starts as degenerate and applies its tie-break: far above
// the rounding of converged energies (≈ 1e-14 E_R), far below physical
// energy differences between phases on a map grid.
const DegenerateTol = 1e-9

// degenerateSzTol: ⟨σz⟩ values closer than this are equal for the
// tie-break (a stripe's ⟨σz⟩ = 0 differs between starts by rounding only).
const degenerateSzTol = 1e-6

// StripeBox is how GPE map points choose the boxes of the stripe branch
// (GPESettings.StripeBox).
type StripeBox string

const (
	// StripeBoxOptimise (default, also ""): boxes of four stripe
	// wavelengths with the stripe momentum optimised by
	// stripeMomentumSearch, the optimiser of BestGPEState (a scan of 7
	// boxes, then golden section to GPESettings.StripeKTol; skipped when no
	// scan box holds a stripe).
	StripeBoxOptimise StripeBox = "optimise"
	// StripeBoxFixed: one box sized for the variational stripe momentum
	// (the ansatz's period). 2.5–6× faster than optimise over
	// BenchmarkGPEMap's map; the GPE stripe edge then comes out early
	// (1.645 against 1.651 E_R at G1 = 1, G2 = 0.05), since the GPE
	// stripe's period differs from the ansatz's.
	StripeBoxFixed StripeBox = "fixed"
)

// DefaultStripeKTol is the default GPESettings.StripeKTol, 1e-3 k_R: the
// stripe energy is quadratic in the box momentum around its optimum,
// E(k) ≈ E₀ + ½c(k − k₀)² with c = d²E/dk² ≈ 0.8 E_R/k_R² (measured at G1 = 1,
// G2 = 0.05, Ω = 1.635–1.65), so a bracket of 1e-3 k_R leaves ≲ 1e-7 E_R,
// and moves the stripe edge by ≲ 1e-5 E_R.
const DefaultStripeKTol = 1e-3

func (s GPESettings) stripeBox() StripeBox {
	if s.StripeBox == "" {
		return StripeBoxOptimise
	}
	return s.StripeBox
}

// GPEPoints returns a PointFunc that solves the spinor GPE in a periodic
// box at each map point of the uniform problem from problem. Each branch
// is solved in boxes sized for its own momentum (automatic boxes,
// gpe.ResolveBox with the given Points):
//
//   - the plane-wave box, for the variational plane-wave branch's momentum
//     (for a single minimum, k ≈ 0, the competing stripe branch's:
//     gpe.BoxMomentum), with the starts: the plane-wave branch's state,
//     its mirror image (−k) when the two are degenerate (δ/2 + Δg = 0,
//     Uniform.Couplings), the variational stripe state, random seeds 1…n;
//   - the stripe boxes (when the variational theory has a stripe branch):
//     with StripeBox optimise the boxes of stripeMomentumSearch, with fixed
//     the one box of the variational stripe momentum; in each the start of
//     BestGPEState's stripe branch (stripeBoxStarts: gpe.GuessStripe at the
//     box momentum; once a stripe is found, the best stripe so far first,
//     warmStart).
//
// With Length given every start runs in that one box (and the stripe
// period is not optimised). The phase comes from the shared classifier
// (label.Classify, via gpe.Observe).
//
// The kept state, a documented rule so that the same point gives the same
// state in every run (any worker count, resume, shards):
//
//  1. the lowest converged energy E₀ over every box; every converged start
//     with energy ≤ E₀ + DegenerateTol is a candidate;
//  2. among the candidates the one with the largest ⟨σz⟩ (values within
//     1e-6 count as equal) — the +k₁ plane wave of the degenerate pair,
//     since in this gauge a plane wave's ⟨σz⟩ has the sign of its k;
//  3. among those, the first in start order (the plane-wave box's starts in
//     the order above, then the stripe boxes in the order they were
//     solved, each box's starts in order).
//
// A point whose starts all fail to converge is labelled label.NotConverged.
// A point for which a box it needs cannot be resolved within the rule's
// limits (k_max ≥ 4 k_R; possible only with both Points and Length given,
// or too few Points) is labelled label.UnderResolved, not solved, and
// stores NaN for the GPE observables (the variational ones are kept, and
// box_length, grid_points of the box that could not be resolved).
func GPEPoints(problem func(ix, iy int) (Uniform, error), s GPESettings) PointFunc {
	return uniformPoints(problem, len(GPEObservables), gpeSolve(s))
}

// gpeSolve is the per-point solve of GPEPoints.
func gpeSolve(s GPESettings) func(context.Context, Uniform) (PointResult, error) {
	if s.Solver.Threads == 0 {
		s.Solver.Threads = 1
	}
	ktol := s.StripeKTol
	if ktol == 0 {
		ktol = DefaultStripeKTol
	}
	span := (&GPEBestSettings{}).withDefaults().KSpan
	if s.stripeBox() == StripeBoxFixed {
		span = 0
	}
	dims := s.dims()
	th := thresholds(s.Variational)
	// box returns the axes of the box for momentum k (the shared rule of
	// gpe/autogrid.go) and whether every axis is resolved.
	box := func(k float64) ([]gpe.BoxAxis, bool) {
		bx := gpe.ResolveBox(dims, k, s.Points, s.Length)
		axes, ok := []gpe.BoxAxis{bx}, bx.Resolved
		if dims == 2 {
			by := gpe.ResolveBox(2, 1, s.Points, gpe.AutoTransverse(bx.Length))
			axes, ok = append(axes, by), ok && by.Resolved
		}
		return axes, ok
	}
	return func(ctx context.Context, u Uniform) (PointResult, error) {
		vr, err := Variational(u, s.Variational)
		if err != nil {
			return PointResult{}, err
		}
		nan := math.NaN()
		kpw := planeWaveMomentum(vr)
		ks, hasStripe := stripeBranchMomentum(vr)
		pwAxes, ok := box(gpe.BoxMomentum(kpw, vr.StripeState.K1()))
		if !ok {
			return PointResult{Phase: label.UnderResolved, Values: []float64{
				nan, nan, nan, nan, nan, vr.Energy, float64(vr.Phase), pwAxes[0].Length, nan, float64(pwAxes[0].Points),
			}}, nil
		}
		// run solves the starts of guesses (made on the box's grid) in the
		// box of axes with solver settings set, appends them to starts and
		// returns the lowest converged energy among them, whether that
		// state is a stripe and whether any start converged.
		var starts []gpeStart
		var warm *gpe.State // the lowest converged stripe so far
		var warmBox []gpe.BoxAxis
		warmE := math.Inf(1)
		run := func(axes []gpe.BoxAxis, set gpe.Settings, guesses func(*gpe.Grid) []gpe.Guess) (float64, bool, bool, error) {
			points, lengths := make([]int, len(axes)), make([]float64, len(axes))
			for i, a := range axes {
				points[i], lengths[i] = a.Points, a.Length
			}
			grid, err := gpe.NewGrid(points, lengths)
			if err != nil {
				return 0, false, false, err
			}
			p := gpe.Problem{Grid: grid, Model: gpe.UniformBox(grid, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)}
			lo, stripe, conv := math.Inf(1), false, false
			for _, g := range guesses(grid) {
				if err := ctx.Err(); err != nil {
					return 0, false, false, err
				}
				st, err := g.Build(p)
				if err != nil {
					return 0, false, false, err
				}
				sv := set
				sv.Context = ctx // a canceled map stops the running solve
				r, err := gpe.Solve(p, st, &sv)
				if err != nil {
					return 0, false, false, err
				}
				o, err := r.Observe(p, th)
				if err != nil {
					return 0, false, false, err
				}
				starts = append(starts, gpeStart{res: r, obs: o, box: axes[0]})
				if r.Status != gpe.Converged {
					continue
				}
				conv = true
				if o.Energies.Total < lo {
					lo, stripe = o.Energies.Total, o.Phase == label.Stripe
				}
				if o.Phase == label.Stripe && o.Energies.Total < warmE {
					warm, warmBox, warmE = r.State, axes, o.Energies.Total
				}
			}
			return lo, stripe, conv, nil
		}
		// The plane-wave box: the plane-wave branch (the optimum unless it
		// is a stripe), its mirror image, the stripe branch, random seeds.
		pwState := vr.PlaneWaveState
		if vr.Phase != label.Stripe {
			pwState = vr.State
		}
		_, _, _, err = run(pwAxes, s.Solver, func(g *gpe.Grid) []gpe.Guess {
			gs := []gpe.Guess{{Name: "plane-wave branch", Kind: gpe.GuessGiven, State: TwoWaveState(g, pwState)}}
			if m, ok := mirrorPlaneWave(u, vr); ok {
				gs = append(gs, gpe.Guess{Name: "mirror image", Kind: gpe.GuessGiven, State: TwoWaveState(g, m)})
			}
			gs = append(gs, gpe.Guess{Name: "stripe branch", Kind: gpe.GuessGiven, State: TwoWaveState(g, vr.StripeState)})
			for i := 1; i <= s.RandomStarts; i++ {
				gs = append(gs, gpe.Guess{Name: fmt.Sprintf("random seed=%d", i), Kind: gpe.GuessRandom, Seed: uint64(i)})
			}
			return gs
		})
		if err != nil {
			return PointResult{}, err
		}
		// The stripe boxes, unless the box is given (then the plane-wave
		// box is the only one and held every start).
		if hasStripe && s.Length == 0 {
			var unresolved gpe.BoxAxis
			err := stripeMomentumSearch(ks, span, ktol, func(k float64, useWarm bool) (float64, bool, error) {
				axes, ok := box(k)
				if !ok {
					unresolved = axes[0]
					return math.Inf(1), false, errUnresolved
				}
				// Once a stripe is found, a box starts from the best stripe
				// so far when its box has the same shape (warmStart); a
				// warm start that does not converge is followed by the
				// full starts.
				if ws, set, ok := warmStart(useWarm && sameShape(warmBox, axes), warm, boxSize(axes), s.Solver); ok {
					e, st, conv, err := run(axes, set, func(*gpe.Grid) []gpe.Guess { return ws })
					if err != nil || conv {
						return e, st, err
					}
				}
				e, st, _, err := run(axes, s.Solver, func(*gpe.Grid) []gpe.Guess { return stripeBoxStarts(k) })
				return e, st, err
			})
			if errors.Is(err, errUnresolved) {
				return PointResult{Phase: label.UnderResolved, Values: []float64{
					nan, nan, nan, nan, nan, vr.Energy, float64(vr.Phase), unresolved.Length, nan, float64(unresolved.Points),
				}}, nil
			}
			if err != nil {
				return PointResult{}, err
			}
		}
		k, spread := keepStart(starts)
		best := starts[k]
		o := best.obs
		ph := o.Phase
		if best.res.Status != gpe.Converged {
			ph = label.NotConverged
		}
		return PointResult{Phase: ph, Values: []float64{
			o.Energies.Total, o.K1, o.Contrast, o.Sz, best.res.Residual,
			vr.Energy, float64(vr.Phase), best.box.Length, spread, float64(best.box.Points),
		}}, nil
	}
}

// sameShape reports whether two boxes have the same points per axis and the
// same number of wavelengths along x (a state of one is then the other's
// stretched to the new period).
func sameShape(a, b []gpe.BoxAxis) bool {
	if len(a) != len(b) || len(a) == 0 || a[0].Wavelengths != b[0].Wavelengths {
		return false
	}
	for i := range a {
		if a[i].Points != b[i].Points {
			return false
		}
	}
	return true
}

// boxSize is the number of grid points of a box.
func boxSize(axes []gpe.BoxAxis) int {
	n := 1
	for _, a := range axes {
		n *= a.Points
	}
	return n
}

// errUnresolved stops the stripe search of a GPE map point at a box that
// cannot be resolved (the point is under-resolved).
var errUnresolved = errors.New("box not resolved")

// gpeStart is the outcome of one start of a GPE map point.
type gpeStart struct {
	res *gpe.Result
	obs *gpe.Observables
	box gpe.BoxAxis // the x axis of its box
}

// keepStart applies the rule of GPEPoints to the starts: the index of the
// kept start and the energy spread among the converged ones (0 with fewer
// than two). Without a converged start it keeps the lowest energy.
func keepStart(starts []gpeStart) (int, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	conv := 0
	for _, s := range starts {
		if s.res.Status == gpe.Converged {
			conv++
			lo, hi = math.Min(lo, s.obs.Energies.Total), math.Max(hi, s.obs.Energies.Total)
		}
	}
	if conv == 0 {
		k := 0
		for i, s := range starts {
			if s.obs.Energies.Total < starts[k].obs.Energies.Total {
				k = i
			}
		}
		return k, 0
	}
	k := -1
	for i, s := range starts {
		if s.res.Status != gpe.Converged || s.obs.Energies.Total > lo+DegenerateTol {
			continue
		}
		if k < 0 || s.obs.Sz > starts[k].obs.Sz+degenerateSzTol {
			k = i
		}
	}
	spread := 0.0
	if conv >= 2 {
		spread = hi - lo
	}
	return k, spread
}

// mirrorPlaneWave returns the mirror image (k → −k, ↑ ↔ ↓: θ → π/2 − θ) of
// the variational optimum when it is a plane wave degenerate with it: the
// single-wave energy (Uniform.SingleWaveBistable's ε(c)) is even in c when
// b = δ/2 + Δg = 0, so the waves at ±k have the same energy.
func mirrorPlaneWave(u Uniform, vr Result) (TwoWave, bool) {
	_, _, dg := u.Couplings()
	if vr.Phase != label.PlaneWave || vr.State.W != 1 || u.Delta/2+dg != 0 {
		return TwoWave{}, false
	}
	s := vr.State
	th := math.Pi/2 - s.ThetaPlus
	c := math.Cos(2 * th)
	return TwoWave{KPlus: c, KMinus: -c, ThetaPlus: th, ThetaMinus: th, W: 1}, true
}

func thresholds(s *Settings) label.Thresholds {
	if s == nil || s.Thresholds == (label.Thresholds{}) {
		return label.DefaultThresholds
	}
	return s.Thresholds
}

// TwoWaveState builds the two-plane-wave state s on grid g (one or more
// dimensions, uniform across the transverse axes), its momenta snapped to the
// box: ψ = C₊χ₊e^{ik₊x} + C₋χ₋e^{−ik₋x} (TwoWave), not yet normalised.
func TwoWaveState(g *gpe.Grid, s TwoWave) *gpe.State {
	st := gpe.NewState(g)
	kp, km := g.SnapK(s.KPlus), g.SnapK(s.KMinus)
	cp, cm := math.Sqrt(s.W), math.Sqrt(1-s.W)
	for idx := 0; idx < g.Size; idx++ {
		i, _, _ := g.Coords(idx)
		x := g.X[0][i]
		ep, em := cmplx.Exp(complex(0, kp*x)), cmplx.Exp(complex(0, -km*x))
		st.Psi[0][idx] = complex(cp*math.Cos(s.ThetaPlus), 0)*ep + complex(cm*math.Cos(s.ThetaMinus), 0)*em
		st.Psi[1][idx] = complex(cp*math.Sin(s.ThetaPlus), 0)*ep + complex(cm*math.Sin(s.ThetaMinus), 0)*em
	}
	return st
}
