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
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the GPE ground state (lowest converged start)"},
	{Name: "k1", Unit: "k_R", Description: "|k_x| of the largest momentum peak"},
	{Name: "contrast", Unit: "dimensionless", Description: "total-density contrast (n_max - n_min)/(n_max + n_min) along x"},
	{Name: "sigma_z", Unit: "dimensionless", Description: "<sigma_z> per particle"},
	{Name: "residual", Unit: "E_R", Description: "residual |H psi - mu psi| of the kept state"},
	{Name: "energy_variational", Unit: "E_R", Description: "energy per particle of the variational optimum at this point"},
	{Name: "phase_variational", Unit: "dimensionless", Description: "phase code of the variational optimum at this point"},
	{Name: "box_length", Unit: "1/k_R", Description: "box length along x (commensurate with the variational k1)"},
	{Name: "spread", Unit: "E_R", Description: "energy spread among the converged starts"},
}

// GPESettings configure GPEPoints. Zero fields take the documented defaults.
type GPESettings struct {
	// Points: grid points along x; 0 chooses them by gpe.AutoPoints (a power
	// of two from 256 to 1024 with k_max = π/dx ≥ 4 k_R).
	Points int
	// Length: box length along x (1/k_R); 0 sizes the box per point for the
	// variational k₁ (or the competing stripe branch's for a single minimum):
	// four wavelengths, gpe.AutoLength(gpe.BoxMomentum(...)).
	Length float64
	// RandomStarts: random starts (seeds 1…n) besides the variational
	// optimum and the competing branch's state. Default 0.
	RandomStarts int
	// Solver settings (Threads defaults to 1: one solve per core).
	Solver gpe.Settings
	// Variational settings.
	Variational *Settings
}

// GPEPoints returns a PointFunc that solves the spinor GPE in a 1D periodic
// box at each map point: the uniform problem from problem, the box sized per
// point from the variational k₁ (unless Length is set), starts from the
// variational optimum and from the competing branch's state (plus random
// starts), the lowest converged energy kept, and the phase from the shared
// classifier (label.Classify, via gpe.Observe). A point whose starts all fail
// to converge is labelled label.NotConverged.
func GPEPoints(problem func(ix, iy int) (Uniform, error), s GPESettings) PointFunc {
	if s.Solver.Threads == 0 {
		s.Solver.Threads = 1
	}
	return uniformPoints(problem, len(GPEObservables), func(ctx context.Context, u Uniform) (PointResult, error) {
		vr, err := Variational(u, s.Variational)
		if err != nil {
			return PointResult{}, err
		}
		// The box admits the momentum of the variational winner exactly (for a
		// single minimum, that of the competing stripe branch): the shared
		// rule of gpe/autogrid.go.
		L := s.Length
		if L == 0 {
			L = gpe.AutoLength(gpe.BoxMomentum(vr.K1, vr.StripeState.K1()))
		}
		n := s.Points
		if n == 0 {
			n = gpe.AutoPoints(1, L)
		}
		grid, err := gpe.NewGrid([]int{n}, []float64{L})
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
		for i := 1; i <= s.RandomStarts; i++ {
			guesses = append(guesses, gpe.Guess{Name: fmt.Sprintf("random seed=%d", i), Kind: gpe.GuessRandom, Seed: uint64(i)})
		}
		set := s.Solver
		mr, err := gpe.MultiStart(p, guesses, &set, thresholds(s.Variational))
		if err != nil {
			return PointResult{}, err
		}
		o := mr.Observed
		ph := o.Phase
		if mr.Best.Status != gpe.Converged {
			ph = label.NotConverged
		}
		return PointResult{Phase: ph, Values: []float64{
			o.Energies.Total, o.K1, o.Contrast, o.Sz, mr.Best.Residual,
			vr.Energy, float64(vr.Phase), L, mr.Spread,
		}}, nil
	})
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
