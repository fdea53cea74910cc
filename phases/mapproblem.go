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
}

func (p *MapProblem) method() Method {
	if p.Method == "" {
		return MethodVariational
	}
	return p.Method
}

// Sweep returns the map's axes and the method's observables.
func (p *MapProblem) Sweep() Sweep {
	sw := Sweep{X: p.X, Y: p.Y, Observables: VariationalObservables}
	if p.method() == MethodGPE {
		sw.Observables = GPEObservables
	}
	return sw
}

// Check validates the problem: a known method, known distinct axes that
// the lab's scheme has, and a lab chain that resolves at the first and the
// last point (a point without recoil, ErrNoRecoil, is allowed: it is
// labelled label.NoCoupling).
func (p *MapProblem) Check() error {
	if m := p.method(); m != MethodVariational && m != MethodGPE {
		return fmt.Errorf("method %q: allowed: variational, gpe", p.Method)
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
	nx, ny := p.Sweep().Shape()
	for _, c := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
		if _, err := p.Uniform(c[0], c[1]); err != nil && !errors.Is(err, ErrNoRecoil) {
			return err
		}
	}
	return nil
}

// LabAt returns the lab setting at point (ix, iy).
func (p *MapProblem) LabAt(ix, iy int) (Lab, error) {
	l, err := p.Lab.Set(p.X.Name, p.X.Values[ix])
	if err == nil && p.Y.Len() > 0 {
		l, err = l.Set(p.Y.Name, p.Y.Values[iy])
	}
	return l, err
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
// GPEPoints over Uniform).
func (p *MapProblem) Points() PointFunc {
	if p.method() == MethodGPE {
		s := p.GPE
		if s.Variational == nil {
			s.Variational = p.Variational
		}
		return GPEPoints(p.Uniform, s)
	}
	return VariationalPoints(p.Uniform, p.Variational)
}

// Run computes the map's points into sink (the sweep engine Run with the
// problem's sweep and point function).
func (p *MapProblem) Run(ctx context.Context, sink PointSink, s *RunSettings) (RunResult, error) {
	return Run(ctx, p.Sweep(), p.Points(), sink, s)
}

// Identity returns the settings that determine the map's values, by value
// (see Identity): the lab's settings without those an axis replaces at
// every point, the axes (x, y as "name=lo:hi:n" in the stored unit), the
// method's settings (GPE: points, length-kr, starts, tol; 0 means the
// default rule) and the classifier thresholds.
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
	}
	th := thresholds(p.Variational)
	add("threshold-single-minimum-k", num(th.SingleMinimumK))
	add("threshold-stripe-minority", num(th.StripeMinority))
	return id
}

// axisText is "name=lo:hi:n" for an evenly spaced axis, else the values
// listed ("name=v0,v1,…").
func axisText(a Axis) string {
	n := a.Len()
	if n == 0 {
		return ""
	}
	lin := LinearAxis(a.Name, a.Values[0], a.Values[n-1], n)
	even := true
	for i, v := range a.Values {
		if !(math.Abs(v-lin.Values[i]) <= 1e-12*math.Max(math.Abs(v), math.Abs(a.Values[n-1]-a.Values[0]))) {
			even = false
			break
		}
	}
	s := a.Name + "="
	if even {
		return s + strconvG(a.Values[0]) + ":" + strconvG(a.Values[n-1]) + ":" + strconv.Itoa(n)
	}
	for i, v := range a.Values {
		if i > 0 {
			s += ","
		}
		s += strconvG(v)
	}
	return s
}

// Boundary is a curve over a map in the axes' stored units.
type Boundary struct {
	Name string
	X, Y []float64
}

// ClosedFormBoundaries returns the closed-form phase boundaries of the
// symmetric case (g↑↑ = g↓↓, δ = 0; symmetric.go) when one axis is omega
// and the other G2: the upper stripe edge Ω_c(G1, G2) for G2 > 0 and the
// plane-wave ↔ single-minimum line Ω = 4(1 − G2) up to the tricritical
// G2*. Nil when they do not apply.
func (p *MapProblem) ClosedFormBoundaries() []Boundary {
	l := p.Lab
	u, _, err := l.Resolve()
	if err != nil || u.Delta != 0 || math.Abs(u.Guu-u.Gdd) > 1e-12*math.Abs(u.Guu) || l.DetuningSet && l.DetuningOverER != 0 {
		return nil
	}
	g1, _, _ := u.Couplings()
	var other Axis
	var omegaIsX bool
	switch {
	case p.X.Name == AxisCoupling && p.Y.Name == AxisG2:
		other, omegaIsX = p.Y, true
	case p.Y.Name == AxisCoupling && p.X.Name == AxisG2:
		other = p.X
	default:
		return nil
	}
	if l.G1Set {
		g1 = l.G1
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
