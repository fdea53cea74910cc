package dispersion

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Line is an optical transition used for photon-scattering estimates.
type Line struct {
	Name       string  // "D1", "D2"
	Wavelength float64 // vacuum wavelength between the fine-structure centres of gravity, m
	GammaHz    float64 // natural linewidth Γ/2π, Hz
	// HFSSpanHz: the span of the excited state's hyperfine structure
	// (lowest to highest F'), Hz; the far-detuned Raman model treats it as
	// unresolved (NearResonanceHFS).
	HFSSpanHz float64
}

// Species holds the ground-state data of an alkali atom (J = 1/2).
//
// Source of the atomic data (mass, I, hyperfine splitting, g_J, g_I, D lines:
// wavelengths, natural widths and the excited-state hyperfine spans): the
// alkali D-line data compilations of D. A. Steck (Na, Rb), T. G. Tiecke (K)
// and M. E. Gehm (Li), values from memory. The hyperfine spans of the
// P_{3/2} states are rounded (≈ 6|A| corrected by B where recalled); they only
// set the near-resonance warning of the Raman scheme.
// Scattering lengths: see the per-species Source text; NaN where this table
// does not give them (pass explicit scattering lengths instead).
type Species struct {
	Name   string  // e.g. "Rb87"
	Mass   float64 // kg
	I      float64 // nuclear spin
	HFSHz  float64 // ground-state hyperfine splitting ΔE_hfs/h, Hz
	GJ, GI float64 // electron and nuclear g-factors, sign convention H = μ_B(g_J J + g_I I)·B
	A0, A2 float64 // F = 1 s-wave scattering lengths in the total-spin 0 and 2 channels, in Bohr radii (NaN if not tabulated)
	Lines  []Line
	Source string
}

// speciesTable lists the built-in atoms. Values from memory (see Species).
var speciesTable = map[string]Species{
	"Na23": {
		Name: "Na23", Mass: 22.9897692807 * AtomicMass, I: 1.5,
		HFSHz: 1771626128.8, GJ: 2.00229600, GI: -0.00080461080,
		A0: 47.36, A2: 52.98,
		Lines:  []Line{{"D1", 589.7558147e-9, 9.765e6, 188.70e6}, {"D2", 589.1583264e-9, 9.7946e6, 108.5e6}},
		Source: "atomic data: D. A. Steck, Sodium D line data (from memory); a0, a2: S. Knoop et al., Phys. Rev. A 83, 042704 (2011) (from memory)",
	},
	"Rb87": {
		Name: "Rb87", Mass: 86.909180527 * AtomicMass, I: 1.5,
		HFSHz: 6834682610.90429, GJ: 2.00233113, GI: -0.0009951414,
		A0: 101.8, A2: 100.4,
		Lines:  []Line{{"D1", 794.978851156e-9, 5.7500e6, 816.66e6}, {"D2", 780.241209686e-9, 6.0666e6, 495.8e6}},
		Source: "atomic data: D. A. Steck, Rubidium 87 D line data (from memory); a0, a2: E. G. M. van Kempen et al., Phys. Rev. Lett. 88, 093201 (2002) (from memory)",
	},
	"K39": {
		Name: "K39", Mass: 38.9637064864 * AtomicMass, I: 1.5,
		HFSHz: 461719720.2, GJ: 2.00229421, GI: -0.00014193489,
		A0: math.NaN(), A2: math.NaN(),
		Lines:  []Line{{"D1", 770.108385049e-9, 5.956e6, 55.5e6}, {"D2", 766.700921822e-9, 6.035e6, 33.8e6}},
		Source: "atomic data: T. G. Tiecke, Properties of potassium (from memory); scattering lengths are field dependent (Feshbach resonances): give them explicitly",
	},
	"K41": {
		Name: "K41", Mass: 40.9618252579 * AtomicMass, I: 1.5,
		HFSHz: 254013872.0, GJ: 2.00229421, GI: -0.00007790600,
		A0: math.NaN(), A2: math.NaN(),
		Lines:  []Line{{"D1", 770.108136e-9, 5.956e6, 30.5e6}, {"D2", 766.70045e-9, 6.035e6, 20.2e6}},
		Source: "atomic data: T. G. Tiecke, Properties of potassium (from memory); scattering lengths not tabulated here: give them explicitly",
	},
	"Li7": {
		Name: "Li7", Mass: 7.0160034366 * AtomicMass, I: 1.5,
		HFSHz: 803504086.6, GJ: 2.0023010, GI: -0.0011822130,
		A0: math.NaN(), A2: math.NaN(),
		Lines:  []Line{{"D1", 670.976e-9, 5.8724e6, 91.8e6}, {"D2", 670.961e-9, 5.8724e6, 18.3e6}},
		Source: "atomic data: M. E. Gehm, Properties of 6Li / 7Li compilations (from memory); scattering lengths not tabulated here: give them explicitly",
	},
}

// SpeciesNames lists the built-in atoms in a stable order.
func SpeciesNames() []string {
	names := make([]string, 0, len(speciesTable))
	for k := range speciesTable {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// LookupSpecies returns a built-in atom by name (case-insensitive, "Rb87",
// "87Rb" and "rb-87" all work).
func LookupSpecies(name string) (Species, error) {
	n := strings.ToLower(strings.NewReplacer("-", "", "_", "", " ", "").Replace(name))
	for k, s := range speciesTable {
		lk := strings.ToLower(k)
		// also accept mass number first: "87rb"
		i := strings.IndexAny(lk, "0123456789")
		alt := lk[i:] + lk[:i]
		if n == lk || n == alt {
			return s, nil
		}
	}
	return Species{}, fmt.Errorf("unknown atom %q; allowed: %s", name, strings.Join(SpeciesNames(), ", "))
}

// Sublevel is a ground-state hyperfine sublevel |F, m_F⟩.
type Sublevel struct {
	F, M int
}

func (l Sublevel) String() string {
	if l.M == 0 {
		return fmt.Sprintf("|%d,0>", l.F)
	}
	return fmt.Sprintf("|%d,%+d>", l.F, l.M)
}

// ParseSublevel reads "F,mF", e.g. "1,-1".
func ParseSublevel(s string) (Sublevel, error) {
	var l Sublevel
	parts := strings.Split(strings.TrimSpace(s), ",")
	if len(parts) != 2 {
		return l, fmt.Errorf("%q is not \"F,mF\" (e.g. \"1,-1\")", s)
	}
	if _, err := fmt.Sscanf(strings.TrimSpace(parts[0]), "%d", &l.F); err != nil {
		return l, fmt.Errorf("%q: F is not an integer", s)
	}
	if _, err := fmt.Sscanf(strings.TrimSpace(strings.TrimPrefix(parts[1], "+")), "%d", &l.M); err != nil {
		return l, fmt.Errorf("%q: m_F is not an integer", s)
	}
	return l, nil
}

// Validate checks that l belongs to the ground manifold of s (F = I ± 1/2, |m| ≤ F).
func (s Species) Validate(l Sublevel) error {
	lo, hi := int(s.I-0.5), int(s.I+0.5)
	if l.F != lo && l.F != hi {
		return fmt.Errorf("%s has F = %d or %d in its ground state, not F = %d", s.Name, lo, hi, l.F)
	}
	if l.M < -l.F || l.M > l.F {
		return fmt.Errorf("m_F = %d is outside F = %d (|m_F| ≤ %d)", l.M, l.F, l.F)
	}
	return nil
}

// x is the Breit–Rabi field parameter x = (g_J − g_I) μ_B B / ΔE_hfs, and dxdB its derivative.
func (s Species) x(B float64) (x, dxdB float64) {
	dxdB = (s.GJ - s.GI) * BohrMagneton / (s.HFSHz * Planck)
	return dxdB * B, dxdB
}

// Energy is the Breit–Rabi energy (J) of sublevel l at field B (T) for a
// J = 1/2 ground state:
//
//	E(F = I ± 1/2, m) = −ΔE/(2(2I+1)) + g_I μ_B m B ± (ΔE/2) √(1 + 4mx/(2I+1) + x²),
//
// x = (g_J − g_I) μ_B B/ΔE (G. Breit and I. I. Rabi, Phys. Rev. 38, 2082 (1931);
// in the sign convention of Steck's compilations). For the stretched states
// m = ±(I + 1/2) the root is taken on its analytic branch 1 ± x, so that the
// energy stays linear in B beyond x = 1. l must be valid for s.
func (s Species) Energy(l Sublevel, B float64) float64 {
	e, _ := s.energyAndSlope(l, B)
	return e
}

// Moment is μ = −∂E/∂B (J/T) of sublevel l at field B, from the analytic
// derivative of the Breit–Rabi formula.
func (s Species) Moment(l Sublevel, B float64) float64 {
	_, d := s.energyAndSlope(l, B)
	return -d
}

func (s Species) energyAndSlope(l Sublevel, B float64) (E, dEdB float64) {
	dE := s.HFSHz * Planck
	m := float64(l.M)
	x, xp := s.x(B)
	sign := 1.0
	if float64(l.F) < s.I {
		sign = -1
	}
	E = -dE/(2*(2*s.I+1)) + s.GI*BohrMagneton*m*B
	dEdB = s.GI * BohrMagneton * m
	if math.Abs(m) == s.I+0.5 { // stretched state, analytic branch
		sm := math.Copysign(1, m)
		E += sign * dE / 2 * (1 + sm*x)
		dEdB += sign * dE / 2 * sm * xp
		return
	}
	root := math.Sqrt(1 + 4*m*x/(2*s.I+1) + x*x)
	E += sign * dE / 2 * root
	dEdB += sign * dE / 2 * (4*m/(2*s.I+1) + 2*x) * xp / (2 * root)
	return
}

// TransitionHz is the signed transition frequency (E_down − E_up)/h in Hz at field B.
func (s Species) TransitionHz(up, down Sublevel, B float64) float64 {
	return (s.Energy(down, B) - s.Energy(up, B)) / Planck
}

// QuadraticZeemanHz is q/h = [E(F,+1) + E(F,−1)]/2 − E(F,0) in Hz for the
// manifold F at field B, from the full Breit–Rabi energies (not an expansion).
// For small fields q ≈ (g_J − g_I)² μ_B² B²/(16 ΔE_hfs) in an F = I − 1/2 = 1
// manifold (I = 3/2); derived by expanding the Breit–Rabi root to second order.
func (s Species) QuadraticZeemanHz(F int, B float64) float64 {
	p := s.Energy(Sublevel{F, 1}, B)
	m := s.Energy(Sublevel{F, -1}, B)
	z := s.Energy(Sublevel{F, 0}, B)
	return ((p+m)/2 - z) / Planck
}

// NeighbourDetuningHz returns, for an RF pair with |Δm| = 1 inside one
// manifold, the smallest |f_other − f_pair| over the other Δm = ±1 transitions
// that start from either state of the pair; an RF field resonant with the pair
// drives those off-resonantly (leakage to a third sublevel). ok is false when
// the pair is not an intra-manifold Δm = ±1 pair or has no such neighbour.
func (s Species) NeighbourDetuningHz(up, down Sublevel, B float64) (det float64, ok bool) {
	if up.F != down.F || absInt(up.M-down.M) != 1 {
		return 0, false
	}
	f0 := math.Abs(s.TransitionHz(up, down, B))
	det = math.Inf(1)
	for _, st := range []Sublevel{up, down} {
		for _, dm := range []int{-1, 1} {
			o := Sublevel{st.F, st.M + dm}
			if o == up || o == down || o.M < -o.F || o.M > o.F {
				continue
			}
			f := math.Abs(s.TransitionHz(st, o, B))
			if d := math.Abs(f - f0); d < det {
				det = d
			}
		}
	}
	return det, !math.IsInf(det, 1)
}

func absInt(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

// Couplings are the contact couplings g_ij = 4πħ²a_ij/m of the two pseudo-spin
// states in 3D, in J m³, and the scattering lengths they came from (m).
type Couplings struct {
	Guu, Gdd, Gud float64 // J m³
	Auu, Add, Aud float64 // m
	Note          string  // where they came from and what was neglected
}

// CouplingFromLength is g = 4πħ²a/m (J m³) for scattering length a (m).
func CouplingFromLength(mass, a float64) float64 { return 4 * math.Pi * Hbar * Hbar * a / mass }

// PairCouplings returns g↑↑, g↓↓, g↑↓ for two sublevels of an F = 1 manifold
// from the spin-1 couplings c0 = 4πħ²(a0 + 2a2)/3m, c2 = 4πħ²(a2 − a0)/3m:
// g(±1,±1) = c0 + c2, g(0,0) = c0, g(0,±1) = c0 + c2, g(+1,−1) = c0 − c2
// (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998); T. Ohmi and K. Machida,
// J. Phys. Soc. Jpn. 67, 1822 (1998): the density–density part of the spin-1
// interaction restricted to two components). Spin-changing collisions into the
// third sublevel are neglected.
func (s Species) PairCouplings(up, down Sublevel) (Couplings, error) {
	if up.F != 1 || down.F != 1 {
		return Couplings{}, fmt.Errorf("built-in couplings need two F = 1 sublevels; give the scattering lengths explicitly")
	}
	if up == down {
		return Couplings{}, fmt.Errorf("the two sublevels are the same (%v)", up)
	}
	if math.IsNaN(s.A0) || math.IsNaN(s.A2) {
		return Couplings{}, fmt.Errorf("%s: F = 1 scattering lengths not tabulated; give them explicitly", s.Name)
	}
	a0, a2 := s.A0*BohrRadius, s.A2*BohrRadius
	al := func(m1, m2 int) float64 { // effective scattering length of g(m1,m2)
		c0 := (a0 + 2*a2) / 3
		c2 := (a2 - a0) / 3
		switch {
		case m1 == m2 && m1 != 0:
			return c0 + c2
		case m1 == 0 && m2 == 0:
			return c0
		case m1 == 0 || m2 == 0:
			return c0 + c2
		default: // +1, −1
			return c0 - c2
		}
	}
	c := Couplings{Auu: al(up.M, up.M), Add: al(down.M, down.M), Aud: al(up.M, down.M)}
	c.Guu, c.Gdd, c.Gud = CouplingFromLength(s.Mass, c.Auu), CouplingFromLength(s.Mass, c.Add), CouplingFromLength(s.Mass, c.Aud)
	c.Note = "from F=1 spin-1 couplings (a0, a2); spin-changing collisions into the third sublevel neglected"
	return c, nil
}

// ExplicitCouplings builds couplings from scattering lengths given in Bohr radii.
func ExplicitCouplings(mass, auu, add, aud float64) Couplings {
	c := Couplings{Auu: auu * BohrRadius, Add: add * BohrRadius, Aud: aud * BohrRadius}
	c.Guu, c.Gdd, c.Gud = CouplingFromLength(mass, c.Auu), CouplingFromLength(mass, c.Add), CouplingFromLength(mass, c.Aud)
	c.Note = "from scattering lengths given explicitly"
	return c
}

// SpinDependentC2 returns c2 = 4πħ²(a2 − a0)/3m (J m³) for the F = 1 manifold (NaN if not tabulated).
func (s Species) SpinDependentC2() float64 {
	return 4 * math.Pi * Hbar * Hbar * (s.A2 - s.A0) * BohrRadius / (3 * s.Mass)
}
