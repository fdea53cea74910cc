package phases

import (
	"context"
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
	{Name: "box_length", Unit: "1/k_R", Description: "box length along x (commensurate with the momentum the box is sized for)"},
	{Name: "spread", Unit: "E_R", Description: "energy spread among the converged starts"},
	{Name: "grid_points", Unit: "dimensionless", Description: "grid points along x (the automatic-grid rule, gpe.ResolveBox)"},
}

// GPESettings configure GPEPoints. Zero fields take the documented defaults.
type GPESettings struct {
	// Points: grid points along x; 0 chooses them by the automatic-grid rule
	// (gpe.ResolveBox: a power of two from 256 to 1024 with k_max = π/dx ≥
	// 4 k_R, raised through FFT-friendly sizes up to 8192 when the box
	// needs it). A given count is kept; the box is then capped instead.
	Points int
	// Length: box length along x (1/k_R); 0 sizes the box per point for the
	// variational k₁ (or the competing stripe branch's for a single minimum):
	// four wavelengths, fewer when the points cannot resolve that box
	// (gpe.ResolveBox over gpe.BoxMomentum(...)).
	Length float64
	// RandomStarts: random starts (seeds 1…n) besides the variational
	// optimum and the competing branch's state. Default 0.
	RandomStarts int
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

// GPEPoints returns a PointFunc that solves the spinor GPE in a 1D periodic
// box at each map point: the uniform problem from problem, the box chosen
// per point by gpe.ResolveBox for the variational k₁ (unless Length and
// Points are both set), starts from the variational optimum, from the
// competing branch's state and — when the optimum is a plane wave whose
// mirror image is degenerate with it (δ/2 + Δg = 0, Uniform.Couplings) —
// from that mirror image (plus random starts), and the phase from the
// shared classifier (label.Classify, via gpe.Observe).
//
// The kept state, a documented rule so that the same point gives the same
// state in every run (any worker count, resume, shards):
//
//  1. the lowest converged energy E₀; every converged start with energy
//     ≤ E₀ + DegenerateTol is a candidate;
//  2. among the candidates the one with the largest ⟨σz⟩ (values within
//     1e-6 count as equal) — the +k₁ plane wave of the degenerate pair,
//     since in this gauge a plane wave's ⟨σz⟩ has the sign of its k;
//  3. among those, the first in start order (variational optimum,
//     competing branch, mirror image, random seeds 1…n).
//
// A point whose starts all fail to converge is labelled label.NotConverged.
// A point for which no box within the rule's limits resolves k_max ≥ 4 k_R
// (possible only with both Points and Length given, or too few Points) is
// labelled label.UnderResolved, not solved, and stores NaN for the GPE
// observables (the variational ones and the box are kept).
func GPEPoints(problem func(ix, iy int) (Uniform, error), s GPESettings) PointFunc {
	return uniformPoints(problem, len(GPEObservables), gpeSolve(s))
}

// gpeSolve is the per-point solve of GPEPoints.
func gpeSolve(s GPESettings) func(context.Context, Uniform) (PointResult, error) {
	if s.Solver.Threads == 0 {
		s.Solver.Threads = 1
	}
	return func(ctx context.Context, u Uniform) (PointResult, error) {
		vr, err := Variational(u, s.Variational)
		if err != nil {
			return PointResult{}, err
		}
		// The box admits the momentum of the variational winner exactly (for a
		// single minimum, that of the competing stripe branch): the shared
		// rule of gpe/autogrid.go.
		dims := s.dims()
		box := gpe.ResolveBox(dims, gpe.BoxMomentum(vr.K1, vr.StripeState.K1()), s.Points, s.Length)
		points, lengths := []int{box.Points}, []float64{box.Length}
		resolved := box.Resolved
		if dims == 2 {
			by := gpe.ResolveBox(2, 1, s.Points, gpe.AutoTransverse(box.Length))
			points, lengths = append(points, by.Points), append(lengths, by.Length)
			resolved = resolved && by.Resolved
		}
		nan := math.NaN()
		if !resolved {
			return PointResult{Phase: label.UnderResolved, Values: []float64{
				nan, nan, nan, nan, nan, vr.Energy, float64(vr.Phase), box.Length, nan, float64(box.Points),
			}}, nil
		}
		grid, err := gpe.NewGrid(points, lengths)
		if err != nil {
			return PointResult{}, err
		}
		p := gpe.Problem{Grid: grid, Model: gpe.UniformBox(grid, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)}
		guesses := []gpe.Guess{
			{Name: "variational optimum", Kind: gpe.GuessGiven, State: TwoWaveState(grid, vr.State)},
		}
		other := vr.StripeState
		if vr.Phase == label.Stripe {
			other = vr.PlaneWaveState
		}
		guesses = append(guesses, gpe.Guess{Name: "competing branch", Kind: gpe.GuessGiven, State: TwoWaveState(grid, other)})
		if m, ok := mirrorPlaneWave(u, vr); ok {
			guesses = append(guesses, gpe.Guess{Name: "mirror image", Kind: gpe.GuessGiven, State: TwoWaveState(grid, m)})
		}
		for i := 1; i <= s.RandomStarts; i++ {
			guesses = append(guesses, gpe.Guess{Name: fmt.Sprintf("random seed=%d", i), Kind: gpe.GuessRandom, Seed: uint64(i)})
		}
		set := s.Solver
		th := thresholds(s.Variational)
		starts := make([]gpeStart, 0, len(guesses))
		for _, g := range guesses {
			if err := ctx.Err(); err != nil {
				return PointResult{}, err
			}
			st, err := g.Build(p)
			if err != nil {
				return PointResult{}, err
			}
			r, err := gpe.Solve(p, st, &set)
			if err != nil {
				return PointResult{}, err
			}
			o, err := r.Observe(p, th)
			if err != nil {
				return PointResult{}, err
			}
			starts = append(starts, gpeStart{res: r, obs: o})
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
			vr.Energy, float64(vr.Phase), box.Length, spread, float64(box.Points),
		}}, nil
	}
}

// gpeStart is the outcome of one start of a GPE map point.
type gpeStart struct {
	res *gpe.Result
	obs *gpe.Observables
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
