package phases

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"socmap/dispersion"
)

// Lab is a complete experimental setting: a coupling scheme (or a directly
// given effective model) and the atoms' interactions. Resolve turns it into
// the uniform problem of the variational theory, in E_R. Map axes change one
// field each (Set), so a map over lab settings goes through the whole
// scheme → effective-model chain at every point.
type Lab struct {
	Scheme string // "shake", "raman" or "direct"
	Shake  dispersion.Shake
	Raman  dispersion.Raman

	// Omega, Delta (E_R): the effective model when Scheme is "direct"; for a
	// scheme they replace the scheme's Ω/E_R, δ/E_R when OmegaSet/DeltaSet.
	Omega, Delta       float64
	OmegaSet, DeltaSet bool

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
}

// Axis names accepted by Lab.Set, with the unit of their values.
var LabAxes = map[string]string{
	"omega": "E_R", "delta": "E_R", "G1": "E_R", "G2": "E_R", "density": "m^-3", "ratio": "dimensionless",
	"gradient": "T/m", "shake": "Hz", "phase": "rad", "bias": "T", "rabi": "Hz", "wavelength": "m", "angle": "rad",
}

// LabAxisNames lists the axis names in a stable order.
func LabAxisNames() []string {
	n := make([]string, 0, len(LabAxes))
	for k := range LabAxes {
		n = append(n, k)
	}
	sort.Strings(n)
	return n
}

// Set returns a copy of l with the named setting changed to v (in the unit
// of LabAxes). Lab settings that the scheme does not have are an error.
func (l Lab) Set(name string, v float64) (Lab, error) {
	bad := func() (Lab, error) {
		return l, fmt.Errorf("axis %q needs the %s scheme (this map uses %q)", name, schemeOf(name), l.Scheme)
	}
	switch name {
	case "omega":
		l.Omega, l.OmegaSet = v, true
	case "delta":
		l.Delta, l.DeltaSet = v, true
	case "G1":
		l.G1, l.G1Set = v, true
	case "G2":
		l.G2, l.G2Set = v, true
	case "ratio":
		l.Ratio, l.RatioSet = v, true
	case "density":
		if !l.HaveSI {
			return l, fmt.Errorf("axis density needs interactions from an atom (scattering lengths), not n·g in E_R")
		}
		l.Density = v
	case "gradient", "shake", "phase", "bias":
		if l.Scheme != "shake" {
			return bad()
		}
		switch name {
		case "gradient":
			l.Shake.Gradient = v
		case "shake":
			l.Shake.ShakeHz = v
		case "phase":
			l.Shake.PulsePhase = v
		case "bias":
			l.Shake.Bias = v
		}
	case "rabi":
		switch l.Scheme {
		case "shake":
			l.Shake.RabiHz = v
		case "raman":
			l.Raman.RabiHz = v
		default:
			return l, fmt.Errorf("axis rabi needs a scheme (shake or raman); use omega for a direct model")
		}
	case "wavelength", "angle":
		if l.Scheme != "raman" {
			return bad()
		}
		if name == "wavelength" {
			l.Raman.Wavelength = v
		} else {
			l.Raman.Angle = v
		}
	default:
		return l, fmt.Errorf("unknown axis %q; allowed: %s", name, strings.Join(LabAxisNames(), ", "))
	}
	return l, nil
}

func schemeOf(axis string) string {
	if axis == "wavelength" || axis == "angle" {
		return "raman"
	}
	return "shake"
}

// ErrNoRecoil is returned by Resolve when the scheme gives no momentum
// transfer at this setting (e.g. the pulse phase θ = 90° of a sine shaking):
// there is no spin–orbit coupling and no E_R to measure energies in.
var ErrNoRecoil = errors.New("the scheme gives no recoil here (k_t = 0): no spin–orbit coupling")

// Model computes the effective model of l's scheme with the Ω/δ overrides
// (no interactions). ErrNoRecoil when the scheme gives k_t = 0.
func (l Lab) Model() (dispersion.Model, error) {
	var m dispersion.Model
	switch l.Scheme {
	case "direct":
		m = dispersion.Model{OmegaOverER: l.Omega, DeltaOverER: l.Delta}
	case "shake":
		r, err := l.Shake.Evaluate()
		if err != nil {
			return m, err
		}
		m = r.Model
		if m.ER == 0 {
			return m, ErrNoRecoil
		}
	case "raman":
		r, err := l.Raman.Evaluate()
		if err != nil {
			return m, err
		}
		m = r.Model
	default:
		return m, fmt.Errorf("unknown scheme %q (shake, raman, direct)", l.Scheme)
	}
	if l.OmegaSet {
		m.OmegaOverER = l.Omega
	}
	if l.DeltaSet {
		m.DeltaOverER = l.Delta
	}
	return m, nil
}

// Resolve computes the effective model and the uniform problem (E_R) of l.
// Order: the scheme's model, then Ω/δ overrides (Model), then interactions
// (SI couplings × density / E_R, or the given n·g), then G1/G2/ratio
// overrides.
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
