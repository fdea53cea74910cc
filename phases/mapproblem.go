package phases

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strconv"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Method is how the points of a map are computed.
type Method string

const (
	// MethodVariational: the two-plane-wave mean-field theory (Variational).
	MethodVariational Method = "variational"
	// MethodGPE: a 1D spinor GPE ground state per point (GPEPoints).
	MethodGPE Method = "gpe"
)

// MapProblem is a phase map to compute: the lab setting shared by every
// point, the axes that change it point by point, the method and the
// method's settings. Its point function is Points, its identity (what two
// runs must share to resume or merge each other's files) Identity.
type MapProblem struct {
	// Lab is the setting at every point before the axes change it.
	Lab Lab
	// X is the first axis (required); Y the second (no values: a one-axis
	// map). Names from Axes, values in the table's units (ParseAxis,
	// LinearAxis).
	X, Y Axis
	// Method: MethodVariational (default when empty) or MethodGPE.
	Method Method
	// GPE configures MethodGPE (zero fields: GPESettings' defaults).
	GPE GPESettings
	// Variational configures the variational theory (nil: defaults); with
	// MethodGPE it is GPE.Variational's default.
	Variational *Settings
	// Spin1 configures MethodSpin1 (spin1map.go).
	Spin1 Spin1MapSettings
	// HoldDelta holds the detuning while the axes change the lab setting
	// (sweeps of gradient, shaking frequency, bias, density, …), as a lab
	// retunes the RF at every setting:
	//   - HoldNone (default, ""): the scheme's detuning at every point (a
	//     fixed RF detuning: the micromotion shift and δ_b move with the
	//     sweep);
	//   - HoldBalance ("balance"): δ = δ_b = (n g↓↓ − n g↑↑)/2 at every point
	//     (Lab.Hold = HoldBalance), the detuning at which the stripe window
	//     is widest;
	//   - HoldCompensate ("compensate"): δ/2π at every point equal to its
	//     value at the base setting (Lab before the axes), i.e. the RF
	//     detuning follows the change of the micromotion shift
	//     (⟨A↑²⟩ − ⟨A↓²⟩)/(2mh) and of the resonance, so a plan whose RF
	//     detuning compensates the micromotion stays compensated (Lab.Hold =
	//     HoldHz). Needs a scheme with an atom.
	// Not with the delta or rf-detuning axes, which set δ themselves.
	HoldDelta HoldMode
	// Excitations adds ExcitationObservables (roton gap, sound velocities of
	// the uniform phases, from UniformPointExcitations) after the method's
	// observables. Default false (the map's datasets are those of the
	// method). Not with Trap.
	Excitations bool
	// GPEEdge, when non-nil, asks for the GPE-corrected upper stripe edge of
	// a one-axis map along omega (MapProblem.StripeEdgeGPE, the settings of
	// GPEStripeEdge; zero fields its defaults). It does not change the
	// points; the command stores the edge beside them. Default nil.
	GPEEdge *GPEEdgeSettings
	// Trap: nil for uniform gases; otherwise a trapped-cloud GPE map
	// (MethodGPE only): every point is the ground state of Lab.Atoms atoms
	// in this trap (trapPoints, through Ground), with interactions from the
	// atom's scattering lengths. Default nil.
	Trap *MapTrap
}

// HoldMode is MapProblem.HoldDelta.
type HoldMode string

const (
	HoldOff        HoldMode = ""
	HoldToBalance  HoldMode = "balance"
	HoldCompensate HoldMode = "compensate"
)

func (p *MapProblem) method() Method {
	if p.Method == "" {
		return MethodVariational
	}
	return p.Method
}

// Sweep returns the map's axes and the method's observables, followed by
// ExcitationObservables (with Excitations) and LabObservables when the
// lab's scheme has an atom (HasLabUnits).
func (p *MapProblem) Sweep() Sweep {
	switch p.method() {
	case MethodSpin1:
		return Sweep{X: p.X, Y: p.Y, Observables: Spin1Observables}
	case MethodSpin1GPE:
		return Sweep{X: p.X, Y: p.Y, Observables: Spin1GPEObservables}
	}
	obs := p.methodObservables()
	if p.Excitations {
		obs = append(append([]Observable(nil), obs...), ExcitationObservables...)
	}
	if p.HasLabUnits() {
		obs = append(append([]Observable(nil), obs...), LabObservables...)
	}
	return Sweep{X: p.X, Y: p.Y, Observables: obs}
}

// methodObservables are the observables of the method alone.
func (p *MapProblem) methodObservables() []Observable {
	if p.method() == MethodGPE {
		if p.Trap != nil {
			return TrapObservables
		}
		return GPEObservables
	}
	return VariationalObservables
}

// LabObservables are stored beside the method's observables in maps whose
// lab has an atom (a shaking or Raman scheme): there k_R and E_R — the units
// of k1, period and energy — can change from point to point (every
// lab-setting axis goes through the scheme), so each point carries its units
// and the SI values. NaN where the scheme gives no recoil.
var LabObservables = []Observable{
	{Name: "k_R", Unit: "1/m", Description: "|k_R| at this point (the unit of k1 and of the momenta)"},
	{Name: "E_R", Unit: "Hz", Description: "E_R/h at this point (the unit of the energies)"},
	{Name: "omega_over_ER", Unit: "dimensionless", Description: "coupling hbar Omega/E_R at this point"},
	{Name: "delta_over_ER", Unit: "dimensionless", Description: "detuning hbar delta/E_R at this point"},
	{Name: "energy_hz", Unit: "Hz", Description: "energy per particle / h (energy times E_R/h)"},
	{Name: "k1_si", Unit: "1/m", Description: "k1 in SI (k1 times |k_R|)"},
	{Name: "period_um", Unit: "µm", Description: "stripe period pi/k1 in micrometres (NaN unless stripe)"},
}

// HasLabUnits reports whether the lab's scheme has an atom, so that the map
// stores LabObservables (a direct model has no k_R or E_R in SI).
func (p *MapProblem) HasLabUnits() bool {
	return p.Lab.Scheme != nil && p.Lab.Scheme.Atom() != nil
}

// labValues returns the LabObservables of a point with model m and the
// method's result r (energy and k1 are r.Values[0] and [1] for both
// methods).
func labValues(u Uniform, m dispersion.Model, r PointResult) []float64 {
	kr, er := math.Abs(m.KR), m.ERHz()
	v := []float64{kr, er, u.Omega, u.Delta, r.Values[0] * er, r.Values[1] * kr, math.NaN()}
	if r.Phase == label.Stripe && r.Values[1] != 0 {
		v[6] = math.Pi / math.Abs(r.Values[1]*kr) * 1e6
	}
	return v
}

// Check validates the problem: a known method, known distinct axes that
// the lab's scheme has, and a lab chain that resolves at the first and the
// last point (a point without recoil, ErrNoRecoil, is allowed: it is
// labelled label.NoCoupling).
func (p *MapProblem) Check() error {
	if m := p.method(); m != MethodVariational && m != MethodGPE && !m.isSpin1() {
		return fmt.Errorf("method %q: allowed: variational, gpe, %s, %s", p.Method, MethodSpin1, MethodSpin1GPE)
	}
	if p.X.Len() == 0 {
		return errors.New("the x axis has no points")
	}
	for _, a := range []Axis{p.X, p.Y} {
		if a.Len() == 0 {
			continue
		}
		if _, ok := LookupAxis(a.Name); !ok {
			return fmt.Errorf("unknown axis %q; allowed: %s", a.Name, axisList())
		}
	}
	if p.Y.Len() > 0 && p.Y.Name == p.X.Name {
		return fmt.Errorf("the y axis is the x axis (%s)", p.X.Name)
	}
	if p.method().isSpin1() {
		return p.checkSpin1()
	}
	switch p.HoldDelta {
	case HoldOff, HoldToBalance, HoldCompensate:
	default:
		return fmt.Errorf("hold-delta %q: allowed: balance, compensate", p.HoldDelta)
	}
	if p.HoldDelta != HoldOff {
		for _, a := range []Axis{p.X, p.Y} {
			if a.Len() > 0 && (a.Name == AxisDetuning || a.Name == AxisRFDetuning) {
				return fmt.Errorf("hold-delta %s with the %s axis: the axis sets the detuning itself", p.HoldDelta, a.Name)
			}
		}
	}
	if sb := p.GPE.StripeBox; sb != "" && sb != StripeBoxOptimise && sb != StripeBoxFixed {
		return fmt.Errorf("stripe-box %q: allowed: optimise, fixed", sb)
	}
	if !(p.GPE.StripeKTol >= 0) {
		return fmt.Errorf("stripe momentum tolerance %g: must be ≥ 0 (0: the default %g k_R)", p.GPE.StripeKTol, DefaultStripeKTol)
	}
	if d := p.GPE.Dims; d != 0 && d != 1 && d != 2 || d == 2 && p.method() != MethodGPE {
		return fmt.Errorf("dims %d: allowed 1, or 2 with the gpe method", d)
	}
	if p.GPEEdge != nil {
		if err := p.checkGPEEdge(); err != nil {
			return err
		}
	}
	if p.Excitations && p.Trap != nil {
		return errors.New("excitations: the map observables roton_gap and sound velocities are of uniform gases, not of a trapped cloud")
	}
	for _, a := range []Axis{p.X, p.Y} {
		if a.Len() > 0 && a.Name == AxisAtoms && p.Trap == nil {
			return errors.New("the atoms axis needs a trapped cloud (a trap)")
		}
	}
	if p.Trap != nil {
		if err := p.checkTrap(); err != nil {
			return err
		}
	}
	if p.HoldDelta == HoldCompensate {
		if !p.HasLabUnits() {
			return fmt.Errorf("hold-delta compensate needs a scheme with an atom (shake or raman): it holds δ/2π in Hz")
		}
		if _, err := p.Lab.Model(); err != nil {
			return fmt.Errorf("hold-delta compensate: the base setting has no detuning to hold: %w", err)
		}
	}
	if p.Trap != nil {
		return nil // checkTrap checked the corners
	}
	nx, ny := p.Sweep().Shape()
	for _, c := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
		if _, err := p.Uniform(c[0], c[1]); err != nil && !errors.Is(err, ErrNoRecoil) {
			return err
		}
	}
	return nil
}

// LabAt returns the lab setting at point (ix, iy), with the detuning held
// as HoldDelta says.
func (p *MapProblem) LabAt(ix, iy int) (Lab, error) {
	l, err := p.Lab.Set(p.X.Name, p.X.Values[ix])
	if err == nil && p.Y.Len() > 0 {
		l, err = l.Set(p.Y.Name, p.Y.Values[iy])
	}
	if err != nil {
		return l, err
	}
	switch p.HoldDelta {
	case HoldToBalance:
		l.Hold = HoldBalance
	case HoldCompensate:
		m0, err := p.Lab.Model()
		if err != nil {
			return l, err
		}
		l.Hold, l.HoldDeltaHz = HoldHz, m0.DeltaOverER*m0.ERHz()
	}
	return l, nil
}

// Uniform returns the uniform problem at point (ix, iy) (Lab.Resolve of
// LabAt).
func (p *MapProblem) Uniform(ix, iy int) (Uniform, error) {
	l, err := p.LabAt(ix, iy)
	if err != nil {
		return Uniform{}, err
	}
	u, _, err := l.Resolve()
	return u, err
}

// Points returns the point function of the method (VariationalPoints or
// GPEPoints over Uniform), with the ExcitationObservables appended when
// Excitations is set.
//
// With lab units (HasLabUnits) each point's model is resolved once and
// LabObservables follow the method's values.
func (p *MapProblem) Points() PointFunc {
	switch p.method() {
	case MethodSpin1:
		return p.Spin1Points()
	case MethodSpin1GPE:
		return p.Spin1GPEPoints()
	}
	if p.Trap != nil && p.method() == MethodGPE {
		return p.trapPoints()
	}
	var solve func(context.Context, Uniform) (PointResult, error)
	if p.method() == MethodGPE {
		s := p.GPE
		if s.Variational == nil {
			s.Variational = p.Variational
		}
		solve = gpeSolve(s)
	} else {
		solve = variationalSolve(p.Variational)
	}
	nObs := len(p.methodObservables())
	if p.Excitations {
		method, vs := solve, p.Variational
		if p.method() == MethodGPE && p.GPE.Variational != nil {
			vs = p.GPE.Variational
		}
		solve = func(ctx context.Context, u Uniform) (PointResult, error) {
			r, err := method(ctx, u)
			if err != nil {
				return r, err
			}
			ev, err := excitationValues(u, r.Phase, vs)
			if err != nil {
				return PointResult{}, fmt.Errorf("excitations at %+v: %w", u, err)
			}
			r.Values = append(r.Values, ev...)
			return r, nil
		}
		nObs += len(ExcitationObservables)
	}
	if !p.HasLabUnits() {
		return uniformPoints(p.Uniform, nObs, solve)
	}
	return func(ctx context.Context, ix, iy int) (PointResult, error) {
		if err := ctx.Err(); err != nil {
			return PointResult{}, err
		}
		l, err := p.LabAt(ix, iy)
		if err != nil {
			return PointResult{}, err
		}
		u, m, err := l.Resolve()
		if errors.Is(err, ErrNoRecoil) {
			return PointResult{Phase: label.NoCoupling, Values: nanValues(nObs + len(LabObservables))}, nil
		}
		if err != nil {
			return PointResult{}, err
		}
		r, err := solve(ctx, u)
		if err != nil {
			return r, err
		}
		r.Values = append(r.Values, labValues(u, m, r)...)
		return r, nil
	}
}

// Run computes the map's points into sink (the sweep engine Run with the
// problem's sweep and point function).
func (p *MapProblem) Run(ctx context.Context, sink PointSink, s *RunSettings) (RunResult, error) {
	return Run(ctx, p.Sweep(), p.Points(), sink, s)
}

// Identity returns the settings that determine the map's values, by value
// (see Identity): the lab's settings without those an axis replaces at
// every point, the axes (x, y as "name=lo:hi:n" in the stored unit), the
// method's settings (GPE: points, length-kr, starts, tol, stripe-box; 0
// means the default rule) and the classifier thresholds.
func (p *MapProblem) Identity() Identity {
	skip := map[string]bool{}
	for _, a := range []Axis{p.X, p.Y} {
		if def, ok := LookupAxis(a.Name); ok && a.Len() > 0 {
			for _, o := range def.Overrides {
				skip[o] = true
			}
		}
	}
	var id Identity
	for _, s := range p.Lab.Settings() {
		if !skip[s.Name] {
			id = append(id, s)
		}
	}
	add := func(name, v string) { id = append(id, dispersion.Setting{Name: name, Value: v}) }
	if p.HoldDelta != HoldOff {
		add("hold-delta", string(p.HoldDelta))
	}
	add("x", axisText(p.X))
	if p.Y.Len() > 0 {
		add("y", axisText(p.Y))
	}
	num := func(v float64) string { return strconvG(v) }
	if p.method() == MethodGPE {
		add("points", strconv.Itoa(p.GPE.Points))
		add("length-kr", num(p.GPE.Length))
		add("starts", strconv.Itoa(p.GPE.RandomStarts))
		add("tol", num(p.GPE.Solver.Tol))
		if d := p.GPE.dims(); d != 1 {
			add("dims", strconv.Itoa(d))
		}
		if p.Trap != nil {
			f := p.Trap.FreqHz
			add("trap", fmt.Sprintf("%s,%s,%s Hz", num(f[0]), num(f[1]), num(f[2])))
		} else if p.GPE.Length == 0 {
			add("stripe-box", string(p.GPE.stripeBox()))
		}
	}
	if p.method().isSpin1() {
		id = append(id, p.spin1Identity()...)
	}
	if p.Excitations {
		add("excitations", "true")
	}
	if p.GPEEdge != nil {
		add("gpe-edge", "true")
	}
	th := thresholds(p.Variational)
	add("threshold-single-minimum-k", num(th.SingleMinimumK))
	add("threshold-stripe-minority", num(th.StripeMinority))
	return id
}

// axisText is "name=lo:hi:n" for an evenly spaced axis, "name=lo:hi:n:log"
// for one evenly spaced in log (LogAxis), else the values listed
// ("name=v0,v1,…").
func axisText(a Axis) string {
	n := a.Len()
	if n == 0 {
		return ""
	}
	same := func(b Axis) bool {
		for i, v := range a.Values {
			if !(math.Abs(v-b.Values[i]) <= 1e-12*math.Max(math.Abs(v), math.Abs(a.Values[n-1]-a.Values[0]))) {
				return false
			}
		}
		return true
	}
	s := a.Name + "="
	ends := strconvG(a.Values[0]) + ":" + strconvG(a.Values[n-1]) + ":" + strconv.Itoa(n)
	if same(LinearAxis(a.Name, a.Values[0], a.Values[n-1], n)) {
		return s + ends
	}
	if lo, hi := a.Values[0], a.Values[n-1]; lo*hi > 0 && same(LogAxis(a.Name, lo, hi, n)) {
		return s + ends + ":log"
	}
	for i, v := range a.Values {
		if i > 0 {
			s += ","
		}
		s += strconvG(v)
	}
	return s
}

// Boundary is a curve over a map in the axes' stored units. On a one-axis
// map a boundary is a point of the axis: X holds its one value, Y is nil.
type Boundary struct {
	Name string
	X, Y []float64
}

// ClosedFormBoundaries returns the closed-form phase boundaries of the
// symmetric case (g↑↑ = g↓↓, δ = 0; symmetric.go) when one axis is omega
// and the other G2: the upper stripe edge Ω_c(G1, G2) for G2 > 0 and the
// plane-wave ↔ single-minimum line Ω = 4(1 − G2) up to the tricritical
// G2*. On a one-axis map along omega the same two as points of the axis
// (Y nil; Ω_c for G2 > 0, 4(1 − G2) for G2 ≤ G2*). Nil when they do not
// apply.
func (p *MapProblem) ClosedFormBoundaries() []Boundary {
	l := p.Lab
	u, _, err := l.Resolve()
	if err != nil || u.Delta != 0 || math.Abs(u.Guu-u.Gdd) > 1e-12*math.Abs(u.Guu) || l.DetuningSet && l.DetuningOverER != 0 {
		return nil
	}
	g1, _, _ := u.Couplings()
	var other Axis
	var omegaIsX bool
	if l.G1Set {
		g1 = l.G1
	}
	if p.X.Name == AxisCoupling && p.Y.Len() == 0 {
		_, g2, _ := u.Couplings()
		if l.G2Set {
			g2 = l.G2
		}
		var out []Boundary
		if g2 > 0 {
			out = append(out, Boundary{Name: "stripe edge (closed form)", X: []float64{UpperStripeOmega(g1, g2)}})
		}
		if g2 <= TricriticalG2(g1) {
			out = append(out, Boundary{Name: "Ω = 4(1 − G2) (closed form)", X: []float64{PlaneWaveSingleMinimumOmega(g2)}})
		}
		return out
	}
	switch {
	case p.X.Name == AxisCoupling && p.Y.Name == AxisG2:
		other, omegaIsX = p.Y, true
	case p.Y.Name == AxisCoupling && p.X.Name == AxisG2:
		other = p.X
	default:
		return nil
	}
	lo, hi := other.Values[0], other.Values[len(other.Values)-1]
	up := Boundary{Name: "stripe edge (closed form)"}
	pw := Boundary{Name: "Ω = 4(1 − G2) (closed form)"}
	add := func(b *Boundary, omega, g2 float64) {
		if omegaIsX {
			b.X, b.Y = append(b.X, omega), append(b.Y, g2)
		} else {
			b.X, b.Y = append(b.X, g2), append(b.Y, omega)
		}
	}
	g2t := TricriticalG2(g1)
	for i := 0; i <= 400; i++ {
		g2 := lo + (hi-lo)*float64(i)/400
		if g2 > 0 {
			add(&up, UpperStripeOmega(g1, g2), g2)
		}
		if g2 <= g2t {
			add(&pw, PlaneWaveSingleMinimumOmega(g2), g2)
		}
	}
	return []Boundary{up, pw}
}

// Thresholds returns the classifier thresholds the map uses.
func (p *MapProblem) Thresholds() label.Thresholds { return thresholds(p.Variational) }
