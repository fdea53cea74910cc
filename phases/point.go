package phases

import (
	"context"
	"errors"
	"fmt"
	"math"

	"socmap/phases/label"
)

// VariationalObservables are the observables of a variational map point, in
// the order of PointResult.Values produced by Result.Point.
var VariationalObservables = []Observable{
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the variational ground state"},
	{Name: "k1", Unit: "k_R", Description: "stripe: (k+ + k-)/2 (period pi/k1); plane wave: signed momentum"},
	{Name: "contrast", Unit: "dimensionless", Description: "total-density contrast (n_max - n_min)/(n_max + n_min)"},
	{Name: "sigma_z", Unit: "dimensionless", Description: "spatial average of <sigma_z>"},
	{Name: "gap", Unit: "E_R", Description: "energy of the best competing branch (stripe vs single plane wave) minus the ground-state energy"},
	{Name: "k_plus", Unit: "k_R", Description: "momentum k+ of the wave exp(i k+ x)"},
	{Name: "k_minus", Unit: "k_R", Description: "momentum k- of the wave exp(-i k- x)"},
	{Name: "weight_plus", Unit: "dimensionless", Description: "C+^2, weight of the wave exp(i k+ x)"},
	{Name: "period", Unit: "1/k_R", Description: "stripe period pi/k1 (NaN unless stripe)"},
}

// Point converts a variational result to a map point with the values of
// VariationalObservables.
func (r Result) Point() PointResult {
	return PointResult{Phase: r.Phase, Values: []float64{
		r.Energy, r.K1, r.Contrast, r.SigmaZ, r.Gap,
		r.State.KPlus, r.State.KMinus, r.State.W, r.Period,
	}}
}

// VariationalPoints returns a PointFunc that builds the uniform problem of
// point (ix, iy) with problem and solves it with Variational and settings s.
// A point that does not converge is returned with phase label.NotConverged
// (not an error); a problem that cannot be built is an error.
func VariationalPoints(problem func(ix, iy int) (Uniform, error), s *Settings) PointFunc {
	return uniformPoints(problem, len(VariationalObservables), variationalSolve(s))
}

// variationalSolve is the per-point solve of VariationalPoints.
func variationalSolve(s *Settings) func(context.Context, Uniform) (PointResult, error) {
	return func(_ context.Context, u Uniform) (PointResult, error) {
		r, err := Variational(u, s)
		if err != nil {
			return PointResult{}, fmt.Errorf("%+v: %w", u, err)
		}
		if r.Status != Converged {
			r.Phase = label.NotConverged
		}
		return r.Point(), nil
	}
}

// nanValues returns n NaNs.
func nanValues(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = math.NaN()
	}
	return v
}

// uniformPoints is the PointFunc shared by the methods: stop when ctx is
// cancelled, build the uniform problem of the point, solve it. A point where
// the scheme gives no recoil (ErrNoRecoil) is labelled label.NoCoupling with
// nObs NaN values.
func uniformPoints(problem func(ix, iy int) (Uniform, error), nObs int, solve func(context.Context, Uniform) (PointResult, error)) PointFunc {
	return func(ctx context.Context, ix, iy int) (PointResult, error) {
		if err := ctx.Err(); err != nil {
			return PointResult{}, err
		}
		u, err := problem(ix, iy)
		if errors.Is(err, ErrNoRecoil) {
			return PointResult{Phase: label.NoCoupling, Values: nanValues(nObs)}, nil
		}
		if err != nil {
			return PointResult{}, err
		}
		return solve(ctx, u)
	}
}
