package phases

import (
	"errors"
	"fmt"
	"math"

	"socmap/dispersion"
)

// Lab is a complete experimental setting: a coupling scheme (or a directly
// given effective model) and the atoms' interactions. Resolve turns it into
// the uniform problem of the variational theory, in E_R. Map axes change one
// setting each (Set, through the axis table Axes), so a map over lab
// settings goes through the whole scheme → effective-model chain at every
// point.
type Lab struct {
	// Scheme gives the effective model: dispersion.Shake, dispersion.Raman
	// or dispersion.Direct. Required.
	Scheme dispersion.Scheme

	// CouplingOverER, DetuningOverER replace the scheme's ħΩ/E_R and ħδ/E_R
	// when CouplingSet, DetuningSet (the omega and delta axes, or --omega-er
	// with a scheme).
	CouplingOverER, DetuningOverER float64
	CouplingSet, DetuningSet       bool

	// Interactions, either in SI (HaveSI: 3D couplings and mean density,
	// converted with the scheme's E_R) or directly as n·g_ij in E_R.
	HaveSI        bool
	Couplings     dispersion.Couplings // J m³
	Density       float64              // m⁻³
	Guu, Gdd, Gud float64              // n g_ij / E_R when !HaveSI

	// Overrides applied last, in E_R: G1 = ḡ1 and G2 = ḡ2 of
	// Uniform.Couplings (the asymmetry Δg is kept), and the ratio g↑↓/g with
	// g = (g↑↑ + g↓↓)/2.
	G1, G2, Ratio          float64
	G1Set, G2Set, RatioSet bool

	// Hold replaces the detuning last of all (after the interactions):
	// HoldNone (default) keeps it; HoldBalance sets the balancing detuning
	// ħδ_b = (n g↓↓ − n g↑↑)/2 of the resolved interactions; HoldHz sets
	// δ/2π = HoldDeltaHz (needs a scheme with E_R in SI).
	Hold        DeltaHold
	HoldDeltaHz float64

	// Atoms: the atom number of a trapped cloud (the atoms axis; trapped
	// GPE maps, MapProblem.Trap). Not used by Resolve. Default 0.
	Atoms float64
}

// DeltaHold is how Lab.Resolve holds the detuning (Lab.Hold).
type DeltaHold int

const (
	// HoldNone: the scheme's detuning, or the DetuningOverER override.
	HoldNone DeltaHold = iota
	// HoldBalance: δ = δ_b = (n g↓↓ − n g↑↑)/2, where the single-wave energy
	// is even in k (the two plane waves are degenerate, Uniform.Couplings:
	// δ/2 + Δg = 0).
	HoldBalance
	// HoldHz: δ/2π = Lab.HoldDeltaHz, whatever the scheme's settings.
	HoldHz
)

// SchemeName is the name of l's scheme ("shake", "raman", "direct"), or
// "none" without one.
func (l Lab) SchemeName() string {
	if l.Scheme == nil {
		return "none"
	}
	return l.Scheme.Name()
}

// Set returns a copy of l with the setting of the named map axis (see
// Axes) changed to v, in the axis's stored unit. An unknown axis, or a lab
// setting that l's scheme does not have, is an error.
func (l Lab) Set(axis string, v float64) (Lab, error) {
	a, ok := LookupAxis(axis)
	if !ok {
		return l, fmt.Errorf("unknown axis %q; allowed: %s", axis, axisList())
	}
	if err := a.set(&l, v); err != nil {
		return l, err
	}
	return l, nil
}

// ErrNoRecoil is returned by Resolve when the scheme gives no momentum
// transfer at this setting (e.g. the pulse phase θ = 90° of a sine shaking):
// there is no spin–orbit coupling and no E_R to measure energies in.
var ErrNoRecoil = errors.New("the scheme gives no recoil here (k_t = 0): no spin–orbit coupling")

// Model computes the effective model of l's scheme with the coupling and
// detuning overrides and a detuning held in Hz (Hold = HoldHz; no
// interactions). ErrNoRecoil when a scheme with an
// atom gives k_t = 0.
func (l Lab) Model() (dispersion.Model, error) {
	if l.Scheme == nil {
		return dispersion.Model{}, errors.New("lab setting without a scheme")
	}
	m, err := l.Scheme.EffectiveModel()
	if err != nil {
		return m, err
	}
	if l.Scheme.Atom() != nil && m.ER == 0 {
		return m, ErrNoRecoil
	}
	if l.CouplingSet {
		m.OmegaOverER = l.CouplingOverER
	}
	if l.DetuningSet {
		m.DeltaOverER = l.DetuningOverER
	}
	if l.Hold == HoldHz {
		if m.ER <= 0 {
			return m, fmt.Errorf("a detuning held in Hz needs a scheme with a recoil energy (E_R = 0 here)")
		}
		m.DeltaOverER = l.HoldDeltaHz * dispersion.Planck / m.ER
	}
	return m, nil
}

// Resolve computes the effective model and the uniform problem (E_R) of l.
// Order: the scheme's model, then the coupling/detuning overrides (Model),
// then interactions (SI couplings × density / E_R, or the given n·g), then
// G1/G2/ratio overrides.
func (l Lab) Resolve() (Uniform, dispersion.Model, error) {
	m, err := l.Model()
	if err != nil {
		return Uniform{}, m, err
	}
	u := Uniform{Omega: m.OmegaOverER, Delta: m.DeltaOverER, Guu: l.Guu, Gdd: l.Gdd, Gud: l.Gud}
	if l.HaveSI {
		if m.ER <= 0 {
			return u, m, fmt.Errorf("interactions in SI need a scheme with a recoil energy (E_R = 0 here)")
		}
		u.Guu = l.Density * l.Couplings.Guu / m.ER
		u.Gdd = l.Density * l.Couplings.Gdd / m.ER
		u.Gud = l.Density * l.Couplings.Gud / m.ER
	}
	if l.G1Set || l.G2Set {
		g1, g2, dg := u.Couplings()
		if l.G1Set {
			g1 = l.G1
		}
		if l.G2Set {
			g2 = l.G2
		}
		u.Guu, u.Gdd, u.Gud = 2*(g1+g2)+2*dg, 2*(g1+g2)-2*dg, 2*(g1-g2)
	}
	if l.RatioSet {
		u.Gud = l.Ratio * (u.Guu + u.Gdd) / 2
	}
	switch l.Hold {
	case HoldBalance:
		u.Delta = (u.Gdd - u.Guu) / 2
		m.DeltaOverER = u.Delta
	}
	for _, v := range []float64{u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return u, m, fmt.Errorf("the setting gives a non-finite effective model %+v", u)
		}
	}
	if u.Omega < 0 {
		return u, m, fmt.Errorf("Ω/E_R = %g: the coupling must be ≥ 0 (its sign is a gauge choice)", u.Omega)
	}
	// A uniform mean-field ground state needs repulsion: n g↑↑ > 0, n g↓↓ > 0
	// and g↑↓² < g↑↑g↓↓ is not required (phase separation is a ground state
	// too), but an attractive gas collapses (common practice, no source).
	if u.Guu <= 0 || u.Gdd <= 0 || u.Guu+u.Gdd+2*u.Gud <= 0 {
		return u, m, fmt.Errorf("n·g↑↑ = %g, n·g↓↓ = %g, n·g↑↓ = %g E_R: the uniform gas must be repulsive (n g↑↑, n g↓↓ > 0 and G1 > 0); an attractive gas collapses", u.Guu, u.Gdd, u.Gud)
	}
	return u, m, nil
}

// Settings lists l's settings by value (dispersion.Setting): the scheme's
// inputs, the coupling/detuning overrides, the interactions (in E_R as G1,
// G2 and the asymmetry ng-asym = (n g↑↑ − n g↓↓)/4, or in SI as the three
// couplings and the density) and the G1/G2/ratio overrides. Two labs with
// equal settings resolve to the same problem.
func (l Lab) Settings() []dispersion.Setting {
	num := func(v float64) string { return dispersion.FormatSI(v, dispersion.KindNumber) }
	var s []dispersion.Setting
	add := func(name, v string) { s = append(s, dispersion.Setting{Name: name, Value: v}) }
	add("scheme", l.SchemeName())
	if l.Scheme != nil {
		s = append(s, l.Scheme.Settings()...)
	}
	if l.CouplingSet {
		add("omega-er", num(l.CouplingOverER))
	}
	if l.DetuningSet {
		add("delta-er", num(l.DetuningOverER))
	}
	if l.HaveSI {
		add("g-uu", strconvG(l.Couplings.Guu)+" J m^3")
		add("g-dd", strconvG(l.Couplings.Gdd)+" J m^3")
		add("g-ud", strconvG(l.Couplings.Gud)+" J m^3")
		add("density", dispersion.FormatSI(l.Density, dispersion.KindDensity))
	} else {
		g1, g2, dg := Uniform{Guu: l.Guu, Gdd: l.Gdd, Gud: l.Gud}.Couplings()
		add("G1", num(g1))
		add("G2", num(g2))
		add("ng-asym", num(dg))
	}
	if l.G1Set {
		add("G1-override", num(l.G1))
	}
	if l.G2Set {
		add("G2-override", num(l.G2))
	}
	if l.RatioSet {
		add("ratio", num(l.Ratio))
	}
	if l.Atoms > 0 {
		add("atoms", num(l.Atoms))
	}
	switch l.Hold {
	case HoldBalance:
		add("hold-delta", "balance")
	case HoldHz:
		add("hold-delta", dispersion.FormatSI(l.HoldDeltaHz, dispersion.KindFrequency))
	}
	return dedupSettings(s)
}

// dedupSettings keeps the last of settings with the same name, in the
// place of the first (a direct model's omega-er replaced by an override).
func dedupSettings(s []dispersion.Setting) []dispersion.Setting {
	at := map[string]int{}
	var out []dispersion.Setting
	for _, x := range s {
		if i, ok := at[x.Name]; ok {
			out[i] = x
			continue
		}
		at[x.Name] = len(out)
		out = append(out, x)
	}
	return out
}
