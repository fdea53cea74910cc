package phases

import (
	"context"
	"fmt"
	"math"
	"strconv"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// MethodSpin1GPE: the three-component (F = 1) GPE ground state per point
// (MapProblem.Spin1GPEPoints), configured by MapProblem.Spin1 (its GPE
// field for the grid and the solver).
const MethodSpin1GPE Method = "spin1-gpe"

// Spin1GPESettings configure MethodSpin1GPE (Spin1MapSettings.GPE). Zero
// fields take the documented defaults.
type Spin1GPESettings struct {
	// Points: grid points along x (and along y with Dims 2); 0: per point
	// the automatic rule of Spin1GroundProblem.Points (k_max = πn/L ≥
	// 4 + max|K_m|, escalated as gpe.ResolveBox).
	Points int
	// Length: box length along x (1/k_R), transverse gpe.AutoTransverse of
	// it; 0: per point the box of Spin1GroundProblem.Lengths, sized for the
	// variational winner's momenta (gpe.AutoLength of gpe.BoxMomentum, the
	// shortest multiple that admits every wave).
	Length float64
	// RandomStarts: random starts (seeds 2…n+1) besides the variational
	// winner and gpe.DefaultSpin1Guesses (which hold seed 1). Default 0.
	RandomStarts int
	// Dims: dimension of the grid, 1 (default, also for 0) or 2 (a uniform
	// box; the observables are those of the 1D map, k1 and contrast along x).
	Dims int
	// Solver: settings of gpe.Spin1Solve (Tol 0: the solver's default).
	Solver gpe.Settings
}

func (s Spin1GPESettings) dims() int {
	if s.Dims == 0 {
		return 1
	}
	return s.Dims
}

// Spin1GPEObservables are the observables of a MethodSpin1GPE point, in
// the order of the values of Spin1GPEPoints.
var Spin1GPEObservables = []Observable{
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the spin-1 GPE ground state (the start kept by the rule of gpe.Spin1MultiStart)"},
	{Name: "fz", Unit: "dimensionless", Description: "<F_z> per particle"},
	{Name: "f_perp", Unit: "dimensionless", Description: "density-weighted rms |F_x + iF_y| per particle"},
	{Name: "pop_p1", Unit: "dimensionless", Description: "fraction in m = +1"},
	{Name: "pop_0", Unit: "dimensionless", Description: "fraction in m = 0"},
	{Name: "pop_m1", Unit: "dimensionless", Description: "fraction in m = -1"},
	{Name: "contrast", Unit: "dimensionless", Description: "total-density contrast (n_max - n_min)/(n_max + n_min) along x"},
	{Name: "k1", Unit: "k_R", Description: "|k_x| of the largest momentum peak (in the gauge of the pair)"},
	{Name: "period", Unit: "1/k_R", Description: "density period 2 pi/|k_a - k_b| of the two largest momentum peaks (NaN unless stripe or stripe-3)"},
	{Name: "residual", Unit: "E_R", Description: "residual |H psi - mu psi| of the kept state"},
	{Name: "energy_variational", Unit: "E_R", Description: "energy per particle of the spin-1 variational optimum at this point"},
	{Name: "phase_variational", Unit: "dimensionless", Description: "phase code of the spin-1 variational optimum at this point"},
	{Name: "box_length", Unit: "1/k_R", Description: "box length along x"},
	{Name: "grid_points", Unit: "dimensionless", Description: "grid points along x"},
	{Name: "spread", Unit: "E_R", Description: "energy spread among the converged starts"},
	{Name: "local_order", Unit: "dimensionless", Description: "local spin order L = sum |F|^2 / sum n^2 of the kept state (1 locally ferromagnetic, M^2 for the +-1 mixture, 0 polar)"},
	{Name: "transverse_order", Unit: "dimensionless", Description: "transverse part P = sum |F_x + iF_y|^2 / sum n^2 of the local spin order"},
	{Name: "box_admits_waves", Unit: "dimensionless", Description: "1 when every wave momentum of the variational optimum lies on the box's momentum grid, else 0 (finite-box quantisation moves a wave: the GPE energy can lie above the variational one)"},
}

// spin1GroundAt is the Spin1GroundProblem of a map point: the point's
// model and couplings with the map's grid, magnetisation and variational
// settings.
func (p *MapProblem) spin1GroundAt(u Spin1Uniform) Spin1GroundProblem {
	s := p.Spin1
	gs := s.GPE
	dims := gs.dims()
	gp := Spin1GroundProblem{Model: u.Model, G0: u.G0, G2: u.G2, Dims: dims, RandomStarts: gs.RandomStarts,
		FixMagnetization: s.FixMagnetization, Magnetization: s.Magnetization, Variational: s.Variational}
	if gs.Length > 0 {
		gp.Lengths = []float64{gs.Length}
		if dims == 2 {
			gp.Lengths = append(gp.Lengths, gpe.AutoTransverse(gs.Length))
		}
	}
	if gs.Points > 0 {
		gp.Points = intsOf(dims, gs.Points)
	}
	return gp
}

// Spin1GPEPoints is the point function of MethodSpin1GPE. At each point
// (ix, iy) it solves Spin1GroundProblem at Spin1At(ix, iy) — the same
// set-up and starts as `ground --levels 3` (Spin1Ground): the spin-1
// variational theory sizes the box (Spin1GroundProblem.Lengths, Points
// with the map's Spin1GPESettings) and its winner is the first start,
// then gpe.DefaultSpin1Guesses and the random starts; gpe.Spin1MultiStart
// keeps the lowest converged energy and decides degenerate starts by its
// deterministic rule (largest ⟨F_z⟩, then largest ⟨k_x⟩, then the first
// start), so every run, worker count, resume or shard gives the same
// state. (A mirror pair of the δ = 0 model, k ↔ 2K_0 − k with m ↔ −m, is
// degenerate in the box only when its grid holds both momenta; the box is
// sized for the variational winner's, so at Ω > 0 it usually holds that one
// alone.) The phase is gpe.Spin1Observe's (the spin-1 labels).
//
// A point whose grid does not reach k_max = 4 + max|K_m|
// (Spin1GroundSetup.Resolved: too few Points for the box, or a box beyond
// the points limit) is label.UnderResolved and not solved: the GPE
// observables are NaN, the variational ones, box_length and grid_points
// are kept. A point whose kept start did not converge is
// label.NotConverged (its values are kept for inspection). A point without
// recoil is label.NoCoupling (values NaN).
func (p *MapProblem) Spin1GPEPoints() PointFunc {
	solver := p.Spin1.GPE.Solver
	nan := math.NaN()
	return spin1MapPoints(p, len(Spin1GPEObservables), func(ctx context.Context, ix, iy int, u Spin1Uniform) (PointResult, error) {
		su, err := p.spin1GroundAt(u).Setup()
		if err != nil {
			return PointResult{}, fmt.Errorf("point (%d, %d): %w", ix, iy, err)
		}
		vr := su.Result.Variational
		g := su.Result.Problem.Grid
		lx, nx := g.L[0], float64(g.N[0])
		fits := 0.0
		if su.Result.BoxAdmitsWaves {
			fits = 1
		}
		if !su.Resolved {
			return PointResult{Phase: label.UnderResolved, Values: []float64{
				nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, vr.Energy, float64(vr.Phase), lx, nx, nan, nan, nan, fits,
			}}, nil
		}
		set := solver
		set.Context = ctx // a canceled map stops the running solves
		res, err := su.Solve(&set)
		if err != nil {
			return PointResult{}, fmt.Errorf("point (%d, %d): %w", ix, iy, err)
		}
		ob, mr := res.Observed, res.Multi
		ph := ob.Phase
		if mr.Best.Status != gpe.Converged {
			ph = label.NotConverged
		}
		k1, period := nan, nan
		if len(ob.PeakK) > 0 {
			k1 = math.Abs(ob.PeakK[0])
		}
		if (ph == label.Stripe || ph == label.Stripe3) && len(ob.PeakK) >= 2 {
			period = 2 * math.Pi / math.Abs(ob.PeakK[0]-ob.PeakK[1])
		}
		pop := ob.Populations
		return PointResult{Phase: ph, Values: []float64{
			ob.Energies.Total, ob.Fz, ob.FPerp, pop[0], pop[1], pop[2], ob.Contrast, k1, period, mr.Best.Residual,
			vr.Energy, float64(vr.Phase), lx, nx, mr.Spread, ob.Order.Local, ob.Order.Transverse, fits,
		}}, nil
	})
}

// spin1MapPoints is the point loop shared by the spin-1 methods: the
// point's uniform problem (Spin1At), label.NoCoupling with NaN values at a
// point without recoil, else solve.
func spin1MapPoints(p *MapProblem, nObs int, solve func(ctx context.Context, ix, iy int, u Spin1Uniform) (PointResult, error)) PointFunc {
	return func(ctx context.Context, ix, iy int) (PointResult, error) {
		if err := ctx.Err(); err != nil {
			return PointResult{}, err
		}
		u, err := p.Spin1At(ix, iy)
		if err != nil {
			if m, e2 := p.LabAt(ix, iy); e2 == nil {
				if mm, e3 := m.Model(); e3 == nil && mm.ER == 0 {
					return PointResult{Phase: label.NoCoupling, Values: nanValues(nObs)}, nil
				}
			}
			return PointResult{}, err
		}
		return solve(ctx, ix, iy, u)
	}
}

// checkSpin1GPE validates Spin1.GPE.
func (p *MapProblem) checkSpin1GPE() error {
	s := p.Spin1.GPE
	if s.Points != 0 && (s.Points < 16 || s.Points > gpe.AutoPointsLimit[1]) {
		return fmt.Errorf("points %d: allowed 16 … %d (0: the automatic rule)", s.Points, gpe.AutoPointsLimit[1])
	}
	if !(s.Length >= 0) || math.IsInf(s.Length, 0) {
		return fmt.Errorf("box length %g: must be positive and finite (0: automatic)", s.Length)
	}
	if s.RandomStarts < 0 {
		return fmt.Errorf("random starts %d: must be ≥ 0", s.RandomStarts)
	}
	if d := s.Dims; d != 0 && d != 1 && d != 2 {
		return fmt.Errorf("dims %d: allowed 1, 2", d)
	}
	if !(s.Solver.Tol >= 0) {
		return fmt.Errorf("tolerance %g: must be ≥ 0 (0: the solver's default)", s.Solver.Tol)
	}
	return nil
}

// spin1GPEIdentity: the grid and solver settings MethodSpin1GPE adds to
// the map's identity (after spin1Identity), as the two-level GPE map
// (points, length-kr, starts, tol; dims unless 1; 0 means the default rule).
func (p *MapProblem) spin1GPEIdentity() []dispersion.Setting {
	s := p.Spin1.GPE
	id := []dispersion.Setting{
		{Name: "points", Value: strconv.Itoa(s.Points)},
		{Name: "length-kr", Value: strconvG(s.Length)},
		{Name: "starts", Value: strconv.Itoa(s.RandomStarts)},
		{Name: "tol", Value: strconvG(s.Solver.Tol)},
	}
	if d := s.dims(); d != 1 {
		id = append(id, dispersion.Setting{Name: "dims", Value: strconv.Itoa(d)})
	}
	return id
}

// isSpin1 reports whether the method is one of the three-level methods.
func (m Method) isSpin1() bool { return m == MethodSpin1 || m == MethodSpin1GPE }
