package phases

import (
	"context"
	"errors"
	"fmt"
	"math"

	"socmap/gpe"
	"socmap/phases/label"
)

// MapTrap is the harmonic trap of a trapped-cloud GPE map
// (MapProblem.Trap): every point is the ground state of Lab.Atoms atoms (the
// atoms axis, or the lab's) in this trap, through Ground.
type MapTrap struct {
	// FreqHz: trap frequencies f_x, f_y, f_z in Hz (all > 0). Axes beyond
	// the grid's dimension (GPESettings.Dims) are frozen out: Ground's
	// reduced couplings.
	FreqHz [3]float64
}

// TrapObservables are the observables of a trapped-cloud GPE map point, in
// the order of the values of the point function (then LabObservables).
var TrapObservables = []Observable{
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the trapped GPE ground state (Ground: lowest converged start)"},
	{Name: "k1", Unit: "k_R", Description: "|k_x| of the largest momentum peak"},
	{Name: "contrast", Unit: "dimensionless", Description: "stripe contrast of the trapped state (gpe.Observables.Contrast)"},
	{Name: "sigma_z", Unit: "dimensionless", Description: "<sigma_z> per particle"},
	{Name: "residual", Unit: "E_R", Description: "residual |H psi - mu psi| of the kept state"},
	{Name: "mu", Unit: "E_R", Description: "chemical potential of the kept state"},
	{Name: "energy_variational", Unit: "E_R", Description: "energy per particle of the variational optimum of the uniform gas at the Thomas-Fermi peak density"},
	{Name: "phase_variational", Unit: "dimensionless", Description: "phase code of the variational optimum at the Thomas-Fermi peak density"},
	{Name: "box_length", Unit: "1/k_R", Description: "box length along x (Ground's trap sizing)"},
	{Name: "spread", Unit: "E_R", Description: "energy spread among the converged starts"},
	{Name: "grid_points", Unit: "dimensionless", Description: "grid points along x"},
}

// checkTrap validates a trapped-cloud map: the GPE method, interactions
// from an atom's scattering lengths, trap frequencies, no balancing hold
// (δ_b needs a uniform density), and at the corners a model and an atom
// number.
func (p *MapProblem) checkTrap() error {
	if p.method() != MethodGPE {
		return errors.New("a trapped cloud needs the gpe method")
	}
	if !p.Lab.HaveSI {
		return errors.New("a trapped cloud needs interactions from an atom's scattering lengths (not n·g in E_R)")
	}
	for _, f := range p.Trap.FreqHz {
		if !(f > 0) || math.IsInf(f, 0) {
			return fmt.Errorf("trap frequencies %v Hz: all must be positive", p.Trap.FreqHz)
		}
	}
	if p.HoldDelta == HoldToBalance {
		return errors.New("hold-delta balance needs a uniform density; use compensate for a trapped cloud")
	}
	for _, a := range []Axis{p.X, p.Y} {
		if a.Len() > 0 && a.Name == AxisDensity {
			return errors.New("the density axis is for uniform gases; a trapped cloud has the atoms axis")
		}
	}
	nx, ny := p.Sweep().Shape()
	for _, c := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
		l, err := p.LabAt(c[0], c[1])
		if err != nil {
			return err
		}
		if !(l.Atoms >= 1) {
			return errors.New("a trapped cloud needs an atom number (atoms, or the atoms axis)")
		}
		if _, err := l.Model(); err != nil && !errors.Is(err, ErrNoRecoil) {
			return err
		}
	}
	return nil
}

// trapPoints is the point function of a trapped-cloud map: at each point
// the lab setting (LabAt) and the trap give a GroundProblem (Dims, the
// given Points per axis or Ground's rule), solved by Ground with the map's
// random starts and one thread. A grid that misses k_max ≥ 4 k_R
// (Grid.ResolutionWarning) is labelled label.UnderResolved and not solved;
// a solve that does not converge label.NotConverged; a point without
// recoil label.NoCoupling. Degenerate states follow Ground's (gpe.MultiStart's)
// choice. The values are TrapObservables then LabObservables.
func (p *MapProblem) trapPoints() PointFunc {
	s := p.GPE
	if s.Variational == nil {
		s.Variational = p.Variational
	}
	if s.Solver.Threads == 0 {
		s.Solver.Threads = 1
	}
	dims := s.dims()
	n := len(TrapObservables) + len(LabObservables)
	return func(ctx context.Context, ix, iy int) (PointResult, error) {
		if err := ctx.Err(); err != nil {
			return PointResult{}, err
		}
		l, err := p.LabAt(ix, iy)
		if err != nil {
			return PointResult{}, err
		}
		m, err := l.Model()
		if errors.Is(err, ErrNoRecoil) {
			return PointResult{Phase: label.NoCoupling, Values: nanValues(n)}, nil
		}
		if err != nil {
			return PointResult{}, err
		}
		gp := GroundProblem{Lab: l, Dims: dims, Trap: &GroundTrap{Atoms: l.Atoms, FreqHz: p.Trap.FreqHz, Couplings: l.Couplings}}
		if s.Points > 0 {
			gp.Points = intsOf(dims, s.Points)
		}
		su, err := gp.Setup(s.Variational)
		if err != nil {
			return PointResult{}, err
		}
		g := su.Problem.Grid
		ev, pv := math.NaN(), math.NaN()
		if v := su.Variational; v != nil {
			ev, pv = v.Energy, float64(v.Phase)
		}
		u := Uniform{Omega: m.OmegaOverER, Delta: m.DeltaOverER}
		nan := math.NaN()
		if g.ResolutionWarning() != "" {
			r := PointResult{Phase: label.UnderResolved, Values: []float64{nan, nan, nan, nan, nan, nan, ev, pv, g.L[0], nan, float64(g.N[0])}}
			r.Values = append(r.Values, labValues(u, m, r)...)
			return r, nil
		}
		solver := s.Solver
		solver.Context = ctx // a canceled map stops the running solves
		res, err := su.Solve(&GroundSettings{RandomStarts: s.RandomStarts, Solver: solver, Variational: s.Variational})
		if err != nil {
			return PointResult{}, err
		}
		o := res.Multi.Observed
		ph := o.Phase
		if res.Status != gpe.Converged {
			ph = label.NotConverged
		}
		r := PointResult{Phase: ph, Values: []float64{
			o.Energies.Total, o.K1, o.Contrast, o.Sz, res.Multi.Best.Residual, o.Energies.Mu,
			ev, pv, g.L[0], res.Multi.Spread, float64(g.N[0]),
		}}
		r.Values = append(r.Values, labValues(u, m, r)...)
		return r, nil
	}
}
