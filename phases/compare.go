package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Comparison is the problem of comparing the shaking scheme with a Raman
// scheme for one atom, one pseudo-spin pair and one density: for each scheme
// its recoil, its interaction parameters in its own E_R, the coupling window
// of the stripe phase at the balancing detuning, the stripe in the middle of
// that window, the phase at the planned couplings, what limits the scheme and
// a verdict. The variational theory of a uniform gas is used throughout.
type Comparison struct {
	// Shake: the shaking scheme (its atom and sublevels are those of the
	// comparison). Required.
	Shake dispersion.Shake
	// Raman: the Raman scheme for the same atom. Required. Its pair and bias
	// are those of Shake: left zero they are taken from Shake, given they
	// must be equal to Shake's.
	Raman dispersion.Raman
	// Couplings: 3D contact couplings g_ij (J m³) of the pair. Required.
	Couplings dispersion.Couplings
	// Density: mean density of the uniform gas in m⁻³. 0: the Thomas–Fermi
	// peak density of Trap.
	Density float64
	// Trap: N atoms in a harmonic trap whose Thomas–Fermi peak density is
	// used when Density is 0 (Couplings.PairCoupling() as the coupling of the
	// total density). Exactly one of Density and Trap must be given.
	Trap *CompareTrap
}

// CompareTrap is N atoms in a harmonic trap.
type CompareTrap struct {
	Atoms  float64    // atom number N (≥ 1)
	FreqHz [3]float64 // trap frequencies f_x, f_y, f_z in Hz (> 0)
}

// CompareSettings configure Compare. Zero fields take the documented
// defaults.
type CompareSettings struct {
	// OmegaScan: scan points of the stripe window in Ω (StripeWindow).
	// Default 400.
	OmegaScan int
	// OmegaTol: tolerance of the window edges in Ω, E_R. Default 1e-7.
	OmegaTol float64
	// DeltaScan: scan points of the detuning window at mid-window Ω
	// (DetuningWindow). Default 400.
	DeltaScan int
	// DeltaTol: tolerance of the detuning window edges, E_R. Default 1e-9.
	DeltaTol float64
	// Variational: settings of the variational theory (nil: defaults).
	Variational *Settings
	// GPE: also find each window's upper edge from GPE ground states
	// (GPEStripeEdge, bisection with BestGPEState at δ_b). Default false.
	GPE bool
	// GPEEdge: settings of GPEStripeEdge (zero: its defaults, Ω to 1e-3 E_R).
	GPEEdge GPEEdgeSettings
}

// CompareResult is the outcome of Compare.
type CompareResult struct {
	// Density: the density compared at, m⁻³.
	Density float64
	// ThomasFermi: the Thomas–Fermi estimate of Comparison.Trap (nil when
	// the density was given).
	ThomasFermi *dispersion.ThomasFermi
	// Cloud: the density model of Comparison.Trap (TrapCloud with Dims 3,
	// the same rule `ground` uses) with its validity check; nil when the
	// density was given.
	Cloud *CloudResult
	// ShakeResult, RamanResult: the schemes' effective parameters.
	ShakeResult dispersion.ShakeResult
	RamanResult dispersion.RamanResult
	// Shake and Raman: the two columns.
	Shake, Raman SchemeSide
	// ShakeLimits and RamanLimits: what limits each scheme.
	ShakeLimits ShakeLimits
	RamanLimits RamanLimits
}

// SchemeSide is one scheme's column of a comparison; Ω, δ and the n·g_ij in
// the scheme's own E_R.
type SchemeSide struct {
	Name  string           // "shaking + RF" or "Raman"
	Model dispersion.Model // the planned effective model (no interactions)
	// Uniform: the planned uniform problem (Ω, δ, n·g_ij in E_R).
	Uniform Uniform
	// DeltaBalancing: δ_b = (n g↓↓ − n g↑↑)/2 in E_R, which balances the two
	// spin states (BalancingDetuning).
	DeltaBalancing float64
	// OmegaMax: upper end of the Ω scan, 2(2 + max(G1, 0)) + 1 E_R (above
	// the plane-wave edge 4(1 − G2) of the symmetric case for G1 ≥ 0).
	OmegaMax float64
	// Window: the stripe window in Ω (E_R) at δ = δ_b. Window.Hi is +Inf
	// when the stripe reaches OmegaMax.
	Window Window
	// MidOmega: the middle of the window, (Lo + min(Hi, OmegaMax))/2 (E_R;
	// 0 without a window).
	MidOmega float64
	// Mid: the variational state at MidOmega, δ_b (zero without a window).
	Mid Result
	// DeltaWindow: the window in δ (E_R) keeping the stripe at MidOmega,
	// searched within δ_b ± max(4·Window.Width(), 1e-3).
	DeltaWindow Window
	// Planned: the state at the planned Ω and δ; PlannedBalanced at the
	// planned Ω and δ_b.
	Planned, PlannedBalanced Result
	// GPEEdge: the GPE upper edge of the stripe window at δ_b
	// (CompareSettings.GPE; nil otherwise or without a window).
	GPEEdge *GPEEdge
	// Verdict on the planned coupling.
	Verdict Verdict
}

// ERHz returns the side's E_R/h in Hz.
func (s SchemeSide) ERHz() float64 { return s.Model.ERHz() }

// StripePeriodM returns the stripe period π/k₁ at mid window in metres
// (NaN without a window).
func (s SchemeSide) StripePeriodM() float64 {
	if !s.Window.Found {
		return math.NaN()
	}
	return s.Mid.Period / math.Abs(s.Model.KR)
}

// VerdictCode classifies the planned coupling of a scheme.
type VerdictCode int

const (
	// NoStripeWindow: no stripe phase at this density (G2 ≤ 0 or too small).
	NoStripeWindow VerdictCode = iota + 1
	// StripePlanned: the planned Ω and δ give a stripe.
	StripePlanned
	// StripeAtBalancing: the planned δ does not give a stripe, δ_b would.
	StripeAtBalancing
	// NoStripePlanned: neither the planned δ nor δ_b gives a stripe.
	NoStripePlanned
)

// Verdict is the judgement of a scheme's planned coupling.
type Verdict struct {
	Code VerdictCode
	// InWindow: the planned Ω lies strictly inside the stripe window.
	InWindow bool
	// PlannedPhase: the phase at the planned Ω and δ.
	PlannedPhase label.Phase
	// BetweenEdges: the planned Ω lies above the variational upper edge but
	// below the GPE edge (CompareSettings.GPE): the full GPE predicts a
	// stripe at δ_b where the two-plane-wave ansatz does not.
	BetweenEdges bool
	// RetuneHz: δ_b − δ in Hz (signed: + raises δ), the change of the
	// effective detuning δ/2π that would give a stripe (StripeAtBalancing
	// only, else 0).
	RetuneHz float64
	// SetDetuningHz: the scheme's detuning setting that gives δ = δ_b, Hz
	// (StripeAtBalancing only, else NaN): for the shaking scheme the RF
	// detuning f_RF − |f₀| = ZeroDeltaDetuningHz + sgn(f₀)·δ_b/2π (δ/2π =
	// sgn(f₀)(f_RF − |f₀|) + micromotion shift, dispersion.ShakeResult), for
	// the Raman scheme the two-photon detuning δ_b/2π.
	SetDetuningHz float64
	// SetDetuningChangeHz: SetDetuningHz minus the planned setting, Hz
	// (signed; NaN unless StripeAtBalancing).
	SetDetuningChangeHz float64
}

// ShakeLimits are what limits the shaking scheme.
type ShakeLimits struct {
	// Warnings: the validity warnings of the cycle average
	// (dispersion.ShakeResult.Warnings).
	Warnings []dispersion.Warning
	// Micromotion: the micromotion amplitude against the stripe period at
	// mid window; nil without a converged mid-window stripe.
	Micromotion *MicromotionLimit
	// QuadraticZeeman: the quadratic Zeeman shift against the spin-dependent
	// interaction energy; nil unless the pair is in F = 1 with q known and
	// the atom's c2 tabulated.
	QuadraticZeeman *QuadZeemanLimit
}

// MicromotionLimit compares the position micromotion with the stripe period.
type MicromotionLimit struct {
	AmplitudeM float64 // larger of the two components' amplitudes, m
	PeriodM    float64 // stripe period at mid window, m
	Fraction   float64 // AmplitudeM/PeriodM
}

// QuadZeemanLimit compares the quadratic Zeeman shift q with |c2|n: spin-
// changing collisions into the third sublevel are suppressed only while
// |q| ≫ |c2|n (common practice, no source; this project flags |q| < 10|c2|n).
type QuadZeemanLimit struct {
	QHz   float64 // q/h, Hz
	C2nHz float64 // |c2| n/h, Hz
	Large bool    // |q| ≥ 10 |c2| n
}

// RamanLimits are what limits the Raman scheme.
type RamanLimits struct {
	// Scattering: the photon scattering at mid-window coupling; nil without
	// a stripe window.
	Scattering *ScatteringLimit
	// TwoPhotonHz: the beams' frequency difference at two-photon resonance,
	// |E↓ − E↑|/h at the bias (dispersion.RamanResult.TwoPhotonHz), Hz.
	// BeamDifferenceHz: the difference for the planned δ;
	// BeamDifferenceBalancedHz: for δ = δ_b, |f₀| + sgn(f₀)δ_b/2π, Hz.
	TwoPhotonHz, BeamDifferenceHz, BeamDifferenceBalancedHz float64
	// Isolation: how far the nearest other two-photon transition (the
	// third sublevel of an F = 1 pair, 2|q|/h away) is from resonance
	// against its Raman Rabi frequency, at mid-window coupling (at the
	// planned coupling without a window); nil when the pair has no such
	// neighbour (a pair across the two manifolds).
	Isolation *IsolationLimit
	// Warnings: dispersion.RamanResult.Warnings (at the planned coupling).
	Warnings []dispersion.Warning
}

// ScatteringLimit is the two-line (D1 + D2) photon-scattering estimate of
// the Raman beams at mid-window coupling (dispersion.RamanResult).
type ScatteringLimit struct {
	RabiHz         float64 // the mid-window two-photon Rabi frequency, Hz
	Rate           float64 // scattering rate of both beams, 1/s
	NearestLine    string
	LineDetuningHz float64 // single-photon detuning from NearestLine, Hz
	HeatingER      float64 // heating, E_R per second
	// DetuningD1Hz, DetuningD2Hz: the single-photon detunings from each line
	// as seen from ↑, Hz.
	DetuningD1Hz, DetuningD2Hz float64
	// BeamIntensity: intensity of each beam for RabiHz, W/m².
	BeamIntensity float64
	// PerRabi: Γ_sc/Ω; FarDetunedPerRabi: its value for detunings ≫ the
	// fine-structure splitting (dispersion.RamanResult.FineStructureLimit;
	// not a floor: far into the red it falls as (ω/ω̄)²).
	PerRabi, FarDetunedPerRabi float64
}

// IsolationLimit compares the detuning of the nearest other two-photon
// transition with its Raman Rabi frequency (dispersion.RamanResult): the
// quadratic Zeeman shift isolates an F = 1 pair from the third sublevel
// (the isolation used by Y.-J. Lin, K. Jiménez-García and I. B. Spielman,
// Nature 471, 83 (2011), from memory).
type IsolationLimit struct {
	RabiHz       float64 // the two-photon Rabi frequency it is evaluated at, Hz
	AtMidWindow  bool    // RabiHz is the mid-window coupling (else the planned one)
	Neighbour    string  // the transition, e.g. "|1,0> → |1,+1>"
	DetuningHz   float64 // its distance from two-photon resonance, Hz
	NeighbourHz  float64 // its Raman Rabi frequency, Hz
	QuadZeemanHz float64 // q/h of the manifold, Hz (NaN if n/a)
	Ratio        float64 // DetuningHz/NeighbourHz
	Leakage      float64 // largest population moved there, Ω₃²/(Ω₃² + δ₃²)
	// Isolated: Ratio ≥ dispersion.NeighbourSeparation.
	Isolated bool
}

// Compare evaluates c. Errors caused by c's settings match ErrInput (and
// dispersion.ErrBadInput where the schemes refuse them).
func Compare(c Comparison, s *CompareSettings) (*CompareResult, error) {
	var set CompareSettings
	if s != nil {
		set = *s
	}
	if set.OmegaScan == 0 {
		set.OmegaScan = 400
	}
	if set.OmegaTol == 0 {
		set.OmegaTol = 1e-7
	}
	if set.DeltaScan == 0 {
		set.DeltaScan = 400
	}
	if set.DeltaTol == 0 {
		set.DeltaTol = 1e-9
	}
	r := &CompareResult{}
	switch {
	case c.Density != 0 && c.Trap != nil:
		return nil, badInputf("give a density or a trap, not both")
	case c.Density != 0:
		if !(c.Density > 0) || math.IsInf(c.Density, 0) {
			return nil, badInputf("density %g m⁻³: must be positive", c.Density)
		}
		r.Density = c.Density
	case c.Trap != nil:
		if !(c.Trap.Atoms >= 1) {
			return nil, badInputf("atom number %g: must be ≥ 1", c.Trap.Atoms)
		}
		cr, err := TrapCloud(Cloud{Mass: c.Shake.Species.Mass, Couplings: c.Couplings, Atoms: c.Trap.Atoms, FreqHz: c.Trap.FreqHz, Dims: 3})
		if err != nil {
			return nil, err
		}
		tf := cr.ThomasFermi
		r.ThomasFermi, r.Cloud, r.Density = &tf, &cr, cr.PeakDensity
	default:
		return nil, badInputf("give a density, or atoms in a trap")
	}
	if c.Couplings.Guu <= 0 || c.Couplings.Gdd <= 0 || c.Couplings.PairCoupling() <= 0 {
		return nil, badInputf("couplings g↑↑ = %.4g, g↓↓ = %.4g, g↑↓ = %.4g J m³: the gas must be repulsive (g↑↑, g↓↓ > 0 and g↑↑ + g↓↓ + 2g↑↓ > 0); an attractive gas collapses", c.Couplings.Guu, c.Couplings.Gdd, c.Couplings.Gud)
	}
	var err error
	if r.ShakeResult, err = c.Shake.Evaluate(); err != nil {
		return nil, badInput(err)
	}
	if r.ShakeResult.Model.ER == 0 {
		return nil, badInputf("the shaking settings give no recoil (k_t = 0)")
	}
	if !c.Raman.HasPair() {
		c.Raman.Up, c.Raman.Down, c.Raman.Bias = c.Shake.Up, c.Shake.Down, c.Shake.Bias
	} else if c.Raman.Up != c.Shake.Up || c.Raman.Down != c.Shake.Down || c.Raman.Bias != c.Shake.Bias {
		return nil, badInputf("the Raman scheme's pair %v, %v at %g T differs from the shaking scheme's %v, %v at %g T: compare takes one pair",
			c.Raman.Up, c.Raman.Down, c.Raman.Bias, c.Shake.Up, c.Shake.Down, c.Shake.Bias)
	}
	if r.RamanResult, err = c.Raman.Evaluate(); err != nil {
		return nil, badInput(err)
	}
	r.Shake = SchemeSide{Name: "shaking + RF", Model: r.ShakeResult.Model}
	r.Raman = SchemeSide{Name: "Raman", Model: r.RamanResult.Model}
	for _, sd := range []*SchemeSide{&r.Shake, &r.Raman} {
		if err := sd.evaluate(r.Density, c.Couplings, &set); err != nil {
			return nil, err
		}
	}
	// The detuning settings that give δ_b.
	if v := &r.Shake.Verdict; v.Code == StripeAtBalancing {
		// sgn(f₀), f₀ = (E↓ − E↑)/h of the pair at the bias field.
		sgn := math.Copysign(1, c.Shake.Species.TransitionHz(c.Shake.Up, c.Shake.Down, c.Shake.Bias))
		v.SetDetuningHz = r.ShakeResult.ZeroDeltaDetuningHz + sgn*r.Shake.DeltaBalancing*r.Shake.ERHz()
		v.SetDetuningChangeHz = v.SetDetuningHz - c.Shake.DetuningHz
	}
	if v := &r.Raman.Verdict; v.Code == StripeAtBalancing {
		v.SetDetuningHz = r.Raman.DeltaBalancing * r.Raman.ERHz()
		v.SetDetuningChangeHz = v.SetDetuningHz - c.Raman.DetuningHz
	}
	// What limits the shaking scheme.
	shr := r.ShakeResult
	r.ShakeLimits.Warnings = append(r.ShakeLimits.Warnings, shr.Warnings...)
	if r.Shake.Mid.Status == Converged && r.Shake.Window.Found {
		per := r.Shake.StripePeriodM()
		amp := math.Max(shr.MicroAmpUp, shr.MicroAmpDown)
		r.ShakeLimits.Micromotion = &MicromotionLimit{AmplitudeM: amp, PeriodM: per, Fraction: amp / per}
	}
	if q := shr.QuadZeemanHz; !math.IsNaN(q) && c.Shake.Up.F == 1 {
		c2n := math.Abs(c.Shake.Species.SpinDependentC2()) * r.Density / dispersion.Planck
		if !math.IsNaN(c2n) {
			r.ShakeLimits.QuadraticZeeman = &QuadZeemanLimit{QHz: q, C2nHz: c2n, Large: math.Abs(q) >= 10*c2n}
		}
	}
	// What limits the Raman scheme: photon scattering and the isolation of
	// the pair at mid-window coupling; the two-photon frequency.
	rl := &r.RamanLimits
	rr := r.RamanResult
	rl.TwoPhotonHz, rl.BeamDifferenceHz = rr.TwoPhotonHz, rr.BeamDifferenceHz
	f0 := c.Shake.Species.TransitionHz(c.Raman.Up, c.Raman.Down, c.Raman.Bias)
	rl.BeamDifferenceBalancedHz = math.Abs(f0) + math.Copysign(1, f0)*r.Raman.DeltaBalancing*r.Raman.ERHz()
	iso, atMid := rr, false
	if r.Raman.Window.Found {
		ram := c.Raman
		ram.RabiHz = r.Raman.MidOmega * rr.Model.ERHz()
		rm, err := ram.Evaluate()
		if err != nil {
			return nil, fmt.Errorf("Raman scheme at mid-window coupling: %w", err)
		}
		rl.Scattering = &ScatteringLimit{RabiHz: ram.RabiHz, Rate: rm.ScatterRate, NearestLine: rm.NearestLine,
			LineDetuningHz: rm.LineDetuningHz, HeatingER: rm.HeatingER, DetuningD1Hz: rm.DetuningD1Hz, DetuningD2Hz: rm.DetuningD2Hz,
			BeamIntensity: rm.BeamIntensity, PerRabi: rm.ScatterPerRabi, FarDetunedPerRabi: rm.FineStructureLimit}
		iso, atMid = rm, true
	}
	if iso.Neighbour != "" {
		rabi := c.Raman.RabiHz
		if atMid {
			rabi = rl.Scattering.RabiHz
		}
		rl.Isolation = &IsolationLimit{RabiHz: rabi, AtMidWindow: atMid, Neighbour: iso.Neighbour, DetuningHz: iso.NeighbourHz,
			NeighbourHz: iso.NeighbourRabiHz, QuadZeemanHz: iso.QuadZeemanHz, Ratio: iso.Isolation, Leakage: iso.Leakage,
			Isolated: iso.Isolation >= dispersion.NeighbourSeparation}
	}
	rl.Warnings = append(rl.Warnings, rr.Warnings...)
	return r, nil
}

// evaluate fills a side: interactions, balancing detuning, windows, states,
// verdict.
func (sd *SchemeSide) evaluate(density float64, c dispersion.Couplings, set *CompareSettings) error {
	m := sd.Model
	vs := set.Variational
	sd.Uniform = Uniform{Omega: m.OmegaOverER, Delta: m.DeltaOverER,
		Guu: density * c.Guu / m.ER, Gdd: density * c.Gdd / m.ER, Gud: density * c.Gud / m.ER}
	sd.DeltaBalancing = BalancingDetuning(sd.Uniform.Guu, sd.Uniform.Gdd)
	ub := sd.Uniform
	ub.Delta = sd.DeltaBalancing
	g1, _, _ := sd.Uniform.Couplings()
	sd.OmegaMax = 2*(2+math.Max(g1, 0)) + 1
	var err error
	if sd.Window, err = StripeWindow(ub, sd.OmegaMax, set.OmegaScan, set.OmegaTol, vs); err != nil {
		return fmt.Errorf("%s: %w", sd.Name, err)
	}
	if sd.Window.Found {
		sd.MidOmega = (sd.Window.Lo + math.Min(sd.Window.Hi, sd.OmegaMax)) / 2
		um := ub
		um.Omega = sd.MidOmega
		if sd.Mid, err = Variational(um, vs); err != nil {
			return err
		}
		span := math.Max(4*sd.Window.Width(), 1e-3)
		if sd.DeltaWindow, err = DetuningWindow(um, sd.DeltaBalancing, span, set.DeltaScan, set.DeltaTol, vs); err != nil {
			return err
		}
	}
	if sd.Planned, err = Variational(sd.Uniform, vs); err != nil {
		return err
	}
	if sd.PlannedBalanced, err = Variational(ub, vs); err != nil {
		return err
	}
	if set.GPE && sd.Window.Found && !math.IsInf(sd.Window.Hi, 1) {
		es := set.GPEEdge
		if es.OmegaMax == 0 {
			es.OmegaMax = sd.OmegaMax
		}
		if es.Best.Variational == nil {
			es.Best.Variational = vs
		}
		e, err := GPEStripeEdge(ub, sd.Window.Hi, &es)
		if err != nil {
			return fmt.Errorf("%s: GPE stripe edge: %w", sd.Name, err)
		}
		sd.GPEEdge = &e
	}
	sd.Verdict = sd.verdict()
	return nil
}

func (sd *SchemeSide) verdict() Verdict {
	v := Verdict{PlannedPhase: sd.Planned.Phase, SetDetuningHz: math.NaN(), SetDetuningChangeHz: math.NaN()}
	if !sd.Window.Found {
		v.Code = NoStripeWindow
		return v
	}
	om := sd.Model.OmegaOverER
	v.InWindow = om > sd.Window.Lo && om < sd.Window.Hi
	if e := sd.GPEEdge; e != nil && e.Found {
		v.BetweenEdges = om >= sd.Window.Hi && om < e.Omega
	}
	switch {
	case sd.Planned.Phase == label.Stripe:
		v.Code = StripePlanned
	case sd.PlannedBalanced.Phase == label.Stripe:
		v.Code = StripeAtBalancing
		v.RetuneHz = (sd.DeltaBalancing - sd.Uniform.Delta) * sd.Model.ERHz()
	default:
		v.Code = NoStripePlanned
	}
	return v
}
