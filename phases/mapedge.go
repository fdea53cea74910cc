package phases

import (
	"errors"
	"fmt"
	"math"

	"socmap/dispersion"
)

// MapGPEEdge is the GPE-corrected upper stripe edge of a one-axis map along
// omega (MapProblem.StripeEdgeGPE).
type MapGPEEdge struct {
	// VariationalEdge: the upper edge of the variational stripe window
	// (StripeWindow, E_R) at the map's other settings; NaN when there is
	// no finite one (then GPE is not computed and Note says why).
	VariationalEdge float64
	// GPE: GPEStripeEdge from VariationalEdge (Found false and Note set
	// when no edge was found).
	GPE GPEEdge
	// Note: why no edge was computed ("" when GPE was computed).
	Note string
	// RecoilHz: E_R/h (Hz) of the map's scheme at its first point, so that
	// the edges read in Hz of Rabi frequency (Ω/2π = Ω/E_R × E_R/h); NaN for
	// the direct model, which has no recoil in SI units.
	RecoilHz float64
}

// StripeEdgeGPE returns the GPE-corrected upper stripe edge in Ω of a
// one-axis map along omega (X the omega axis, no Y, no trap): the uniform
// problem of the map's first point (every other setting of the map; Ω
// replaced), its variational stripe window (StripeWindow over [0,
// 2(2 + max(G1, 0)) + 1]) and from its upper edge GPEStripeEdge (bisection
// of the best GPE state over branches and boxes, BestGPEState) with the
// settings p.GPEEdge (nil: defaults) and the map's variational settings.
// Symmetric or general couplings and δ alike. A map that is not along
// omega is an ErrInput error.
func (p *MapProblem) StripeEdgeGPE() (*MapGPEEdge, error) {
	if err := p.checkGPEEdge(); err != nil {
		return nil, badInput(err)
	}
	u, err := p.Uniform(0, 0)
	if errors.Is(err, ErrNoRecoil) {
		return &MapGPEEdge{VariationalEdge: math.NaN(), RecoilHz: math.NaN(), Note: "the scheme gives no recoil at the map's settings"}, nil
	}
	if err != nil {
		return nil, err
	}
	g1, _, _ := u.Couplings()
	omax := 2*(2+math.Max(g1, 0)) + 1
	w, err := StripeWindow(u, omax, 0, 0, p.Variational)
	if err != nil {
		return nil, err
	}
	e := &MapGPEEdge{VariationalEdge: math.NaN(), RecoilHz: p.recoilHz()}
	switch {
	case !w.Found:
		e.Note = "no variational stripe window at these settings"
		return e, nil
	case math.IsInf(w.Hi, 1):
		e.Note = fmt.Sprintf("the variational stripe reaches the end of the search, Ω = %.4g E_R", omax)
		return e, nil
	}
	e.VariationalEdge = w.Hi
	var set GPEEdgeSettings
	if p.GPEEdge != nil {
		set = *p.GPEEdge
	}
	if set.OmegaMax == 0 {
		set.OmegaMax = omax
	}
	if set.Best.Variational == nil {
		set.Best.Variational = p.Variational
	}
	if e.GPE, err = GPEStripeEdge(u, w.Hi, &set); err != nil {
		return nil, fmt.Errorf("GPE stripe edge: %w", err)
	}
	if !e.GPE.Found {
		e.Note = e.GPE.Note
	}
	return e, nil
}

// recoilHz is E_R/h (Hz) of the lab at the map's first point, NaN without
// one (the direct model, or a lab that does not resolve).
func (p *MapProblem) recoilHz() float64 {
	l, err := p.LabAt(0, 0)
	if err != nil || l.Scheme == nil {
		return math.NaN()
	}
	m, err := l.Model()
	if err != nil || !(m.ER > 0) {
		return math.NaN()
	}
	return m.ER / dispersion.Planck
}

// checkGPEEdge: the GPE edge is for one-axis variational maps along omega
// of a uniform gas.
func (p *MapProblem) checkGPEEdge() error {
	switch {
	case p.X.Name != AxisCoupling || p.Y.Len() > 0:
		return fmt.Errorf("gpe-edge: needs a one-axis map along %s (the edge is a point on the Ω axis)", AxisCoupling)
	case p.Trap != nil:
		return errors.New("gpe-edge: the GPE stripe edge is of a uniform gas, not of a trapped cloud")
	case p.method() != MethodVariational:
		return errors.New("gpe-edge: for the variational method (a GPE map shows the GPE edge in its own points)")
	}
	return nil
}
