package phases

import (
	"context"
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/phases/label"
)

// MethodSpin1: the three-level (F = 1) variational theory per point
// (Spin1Variational), configured by MapProblem.Spin1.
const MethodSpin1 Method = "spin1-variational"

// Spin1MapSettings configure MethodSpin1.
type Spin1MapSettings struct {
	// Epsilon: the quadratic Zeeman shift ε (E_R) of a Raman or direct
	// model; NaN for the shaking scheme (Breit–Rabi q at the bias field).
	Epsilon float64
	// With a scheme that has an atom (HaveSI): the mean density (m⁻³) and
	// the F = 1 couplings, n c0 and n c2 in each point's own E_R. Otherwise
	// G0, G2 (n c0, n c2 in E_R).
	HaveSI    bool
	Density   float64
	Couplings dispersion.Spin1Couplings
	G0, G2    float64
	// FixMagnetization, Magnetization: ⟨F_z⟩ = M at every point (default
	// free).
	FixMagnetization bool
	Magnetization    float64
	// Variational: settings of Spin1Variational (nil: defaults; the
	// magnetisation fields above override its own).
	Variational *Spin1Settings
	// GPE: grid and solver of MethodSpin1GPE (spin1gpemap.go); not used by
	// MethodSpin1.
	GPE Spin1GPESettings
}

// Spin1Observables are the observables of a MethodSpin1 point, in the
// order of Spin1Result.Point.
var Spin1Observables = []Observable{
	{Name: "energy", Unit: "E_R", Description: "energy per particle of the spin-1 variational ground state"},
	{Name: "fz", Unit: "dimensionless", Description: "<F_z> per particle"},
	{Name: "f_perp", Unit: "dimensionless", Description: "rms |F_x + iF_y| per particle"},
	{Name: "pop_p1", Unit: "dimensionless", Description: "fraction in m = +1"},
	{Name: "pop_0", Unit: "dimensionless", Description: "fraction in m = 0"},
	{Name: "pop_m1", Unit: "dimensionless", Description: "fraction in m = -1"},
	{Name: "density_rms", Unit: "dimensionless", Description: "rms modulation of the total density"},
	{Name: "waves", Unit: "dimensionless", Description: "number of plane waves of the winning ansatz"},
	{Name: "local_order", Unit: "dimensionless", Description: "local spin order L = <|F|^2>/<n^2> (1 locally ferromagnetic, M^2 for the +-1 mixture, 0 polar)"},
	{Name: "transverse_order", Unit: "dimensionless", Description: "transverse part P = <|F_x + iF_y|^2>/<n^2> of the local spin order"},
}

// Point converts a spin-1 result to a map point with Spin1Observables.
func (r Spin1Result) Point() PointResult {
	return PointResult{Phase: r.Phase, Values: []float64{r.Energy, r.Fz, r.FPerp,
		r.Populations[0], r.Populations[1], r.Populations[2], r.DensityRMS, float64(len(r.State.Waves)),
		r.Order.Local, r.Order.Transverse}}
}

// spin1Axes: the axes that only set pseudo-spin interactions have no
// meaning for the three-level theory.
var spin1RefusedAxes = map[string]bool{AxisG1: true, AxisG2: true, AxisRatio: true}

func (p *MapProblem) checkSpin1() error {
	for _, a := range []Axis{p.X, p.Y} {
		if a.Len() > 0 && spin1RefusedAxes[a.Name] {
			return fmt.Errorf("axis %q sets pseudo-spin couplings; the three-level map takes omega, delta, density and the scheme's axes", a.Name)
		}
	}
	s := p.Spin1
	if s.FixMagnetization && !(s.Magnetization > -1 && s.Magnetization < 1) {
		return fmt.Errorf("magnetisation %g: allowed −1 < M < 1", s.Magnetization)
	}
	if p.method() == MethodSpin1GPE {
		if err := p.checkSpin1GPE(); err != nil {
			return err
		}
	}
	nx, ny := p.Sweep().Shape()
	for _, c := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
		if _, err := p.Spin1At(c[0], c[1]); err != nil {
			return err
		}
	}
	return nil
}

// Spin1At returns the spin-1 uniform problem at point (ix, iy): the
// three-level model of the point's scheme (Spin1FromScheme), the coupling
// and pair-detuning overrides of the lab (omega, delta axes or
// --omega-er/--delta-er: Ω and δ_pair = E_Up − E_Down), the density axis,
// and n c0, n c2 in the point's E_R.
func (p *MapProblem) Spin1At(ix, iy int) (Spin1Uniform, error) {
	l, err := p.LabAt(ix, iy)
	if err != nil {
		return Spin1Uniform{}, err
	}
	s := p.Spin1
	m, _, err := Spin1FromScheme(l.Scheme, s.Epsilon)
	if err != nil {
		return Spin1Uniform{}, err
	}
	if l.CouplingSet {
		m.Omega = l.CouplingOverER
	}
	if l.DetuningSet {
		m = WithPairDetuning(m, l.DetuningOverER)
	}
	u := Spin1Uniform{Model: m, G0: s.G0, G2: s.G2}
	if s.HaveSI {
		if !(m.ER > 0) {
			return u, fmt.Errorf("%w: densities need a scheme with a recoil (E_R)", dispersion.ErrBadInput)
		}
		n := s.Density
		if l.HaveSI && l.Density > 0 {
			n = l.Density // the density axis sets the lab's density
		}
		u.G0, u.G2 = n*s.Couplings.C0/m.ER, n*s.Couplings.C2/m.ER
	}
	return u, nil
}

func (p *MapProblem) spin1Settings() *Spin1Settings {
	var vs Spin1Settings
	if p.Spin1.Variational != nil {
		vs = *p.Spin1.Variational
	}
	vs.FixMagnetization, vs.Magnetization = p.Spin1.FixMagnetization, p.Spin1.Magnetization
	return &vs
}

// Spin1Points is the point function of MethodSpin1: Spin1Variational at
// Spin1At(ix, iy). A point that does not converge has phase
// label.NotConverged; a point without recoil label.NoCoupling (values NaN).
func (p *MapProblem) Spin1Points() PointFunc {
	vs := p.spin1Settings()
	return spin1MapPoints(p, len(Spin1Observables), func(_ context.Context, ix, iy int, u Spin1Uniform) (PointResult, error) {
		r, err := Spin1Variational(u, vs)
		if err != nil {
			return PointResult{}, fmt.Errorf("point (%d, %d): %w", ix, iy, err)
		}
		if r.Status != Converged {
			return PointResult{Phase: label.NotConverged, Values: nanValues(len(Spin1Observables))}, nil
		}
		return r.Point(), nil
	})
}

// spin1Identity: the settings MethodSpin1 adds to the map's identity.
func (p *MapProblem) spin1Identity() []dispersion.Setting {
	s := p.Spin1
	num := strconvG
	id := []dispersion.Setting{{Name: "levels", Value: "3"}}
	add := func(n, v string) { id = append(id, dispersion.Setting{Name: n, Value: v}) }
	if !math.IsNaN(s.Epsilon) {
		add("epsilon-er", num(s.Epsilon))
	}
	if s.HaveSI {
		add("a0", num(s.Couplings.A0))
		add("a2", num(s.Couplings.A2))
	} else {
		add("nc0-er", num(s.G0))
		add("nc2-er", num(s.G2))
	}
	if s.FixMagnetization {
		add("magnetization", num(s.Magnetization))
	}
	if p.method() == MethodSpin1GPE {
		id = append(id, p.spin1GPEIdentity()...)
	}
	return id
}
